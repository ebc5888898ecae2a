#include "porofit/core/units.h"

#include <gtest/gtest.h>

namespace porofit::units {

// Conversion factors: check value 7 (docs/check-values.md; 1 MPa = 145.0377 psi;
// 1 microsip <-> 6.894757 GPa) [computed]; psi = 6894.757293168 Pa by definition
// of the international pound and inch (common practice).
TEST(Units, PsiAndMpaAgreeWithPublishedFactor) {
  EXPECT_NEAR(1e6 / *ToSiFactor(Quantity::kPressure, "psi"), 145.0377, 5e-5);
  EXPECT_NEAR(*ToSiFactor(Quantity::kModulus, "Mpsi") / 1e9, 6.894757, 5e-7);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kPressure, "ksi"), 1e3 * kPsi);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kPressure, "bar"), 1e5);
}

TEST(Units, VelocityAndDensity) {
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kVelocity, "km/s"), 1000.0);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kVelocity, "ft/s"), 0.3048);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kDensity, "g/cc"), 1000.0);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kDensity, "kg/m³"), 1.0);
}

TEST(Units, UnknownUnitIsRejectedAndListed) {
  EXPECT_FALSE(ToSiFactor(Quantity::kPressure, "m/s").has_value());
  EXPECT_FALSE(ToSiFactor(Quantity::kPressure, "mpa").has_value());
  EXPECT_EQ(AcceptedUnitsList(Quantity::kVelocity), "m/s, km/s, ft/s");
}

// Gradient factors: check value 8 [computed; docs/check-values.md] -- 1 psi/ft = 22.6206 kPa/m,
// which corresponds to 2.3067 g/cc; 1 g/cc -> 9.80665 kPa/m = 0.43353 psi/ft;
// 0.465 psi/ft = 10.5186 kPa/m; 1 ppg = 0.051948 psi/ft.
TEST(Units, GradientFactorsMatchCheckValue8) {
  const double psi_ft = *ToSiFactor(Quantity::kPressureGradient, "psi/ft");
  const double g_cc = *ToSiFactor(Quantity::kPressureGradient, "g/cc");
  const double ppg = *ToSiFactor(Quantity::kPressureGradient, "ppg");
  const double kpa_m = *ToSiFactor(Quantity::kPressureGradient, "kPa/m");
  EXPECT_NEAR(psi_ft / kpa_m, 22.6206, 5e-5);
  EXPECT_NEAR(psi_ft / g_cc, 2.3067, 5e-5);
  EXPECT_NEAR(g_cc / kpa_m, 9.80665, 1e-12);
  EXPECT_NEAR(g_cc / psi_ft, 0.43353, 5e-6);
  EXPECT_NEAR(0.465 * psi_ft / kpa_m, 10.5186, 5e-5);
  EXPECT_NEAR(ppg / psi_ft, 0.051948, 5e-7);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kPressureGradient, "MPa/km"), 1e3);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kPressureGradient, "MPa/m"), 1e6);
}

// 1 lb = 0.45359237 kg and 1 US gal = 3.785411784e-3 m^3 (exact by definition;
// common practice): 1 ppg = 119.8264 kg/m^3 [computed].
TEST(Units, LengthAndPpgDensity) {
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kLength, "ft"), 0.3048);
  EXPECT_DOUBLE_EQ(*ToSiFactor(Quantity::kLength, "km"), 1000.0);
  EXPECT_NEAR(*ToSiFactor(Quantity::kDensity, "ppg"), 119.8264, 5e-5);
  EXPECT_EQ(AcceptedUnitsList(Quantity::kLength), "m, km, ft");
  EXPECT_EQ(SiUnit(Quantity::kPressureGradient), "Pa/m");
}

TEST(Units, PressureUnitIsNotAGradient) {
  EXPECT_FALSE(ToSiFactor(Quantity::kPressureGradient, "psi").has_value());
  EXPECT_FALSE(ToSiFactor(Quantity::kPressureGradient, "MPa").has_value());
  EXPECT_FALSE(ToSiFactor(Quantity::kLength, "psi/ft").has_value());
}

}  // namespace porofit::units

#include "porofit/core/units.h"

#include <gtest/gtest.h>

namespace porofit::units {

// Conversion factors: domain brief §2 table and check value 7 (1 MPa = 145.0377 psi;
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

}  // namespace porofit::units

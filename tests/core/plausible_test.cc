#include "porofit/core/plausible.h"

#include <gtest/gtest.h>

#include "porofit/core/units.h"

namespace porofit::units {
namespace {

std::string MessageOf(Measured m, const char* label, double written, const char* unit, bool column = true) {
  const double f = *ToSiFactor(m == Measured::kVelocity  ? Quantity::kVelocity
                               : m == Measured::kDensity ? Quantity::kDensity
                                                         : Quantity::kPressure,
                               unit);
  return ImplausibleMessage(m, label, written, unit, written * f, column);
}

}  // namespace

// Every range is well formed: 0 <= lower < typical < upper, a unit to show it in,
// slip units to try and a stated basis.
TEST(Plausible, EveryRangeIsWellFormed) {
  for (Measured m : {Measured::kPressure, Measured::kModulus, Measured::kFluidModulus, Measured::kVelocity,
                     Measured::kDensity, Measured::kPorosity, Measured::kStrain}) {
    const PlausibleRange& r = RangeOf(m);
    EXPECT_GE(r.lower_si, 0.0) << r.what;
    EXPECT_LT(r.lower_si, r.typical_si) << r.what;
    EXPECT_LT(r.typical_si, r.upper_si) << r.what;
    EXPECT_FALSE(r.show_unit.empty()) << r.what;
    EXPECT_GE(r.slips.size(), 2u) << r.what;
    EXPECT_FALSE(r.basis.empty()) << r.what;
    EXPECT_TRUE(IsPlausible(m, r.typical_si)) << r.what;
    EXPECT_TRUE(IsPlausible(m, 0.0)) << r.what;  // zero is for the hard rules
  }
}

// Typical rock values pass (common practice: a 20 % porosity sandstone, K 10-40 GPa,
// Vp 2-6 km/s, density 2.0-2.7 g/cc, pressures up to 200 MPa).
TEST(Plausible, TypicalRockValuesPass) {
  EXPECT_TRUE(IsPlausible(Measured::kModulus, 37e9));    // quartz K, from memory
  EXPECT_TRUE(IsPlausible(Measured::kModulus, 0.05e9));  // loose sand at low pressure
  EXPECT_TRUE(IsPlausible(Measured::kPressure, 200e6));
  EXPECT_TRUE(IsPlausible(Measured::kVelocity, 5500));
  EXPECT_TRUE(IsPlausible(Measured::kDensity, 2650));
  EXPECT_TRUE(IsPlausible(Measured::kPorosity, 0.21));
  EXPECT_TRUE(IsPlausible(Measured::kStrain, 0.004));
  EXPECT_TRUE(IsPlausible(Measured::kFluidModulus, 2.25e9));
}

// The slip of the issue: moduli in psi declared as GPa (3.2e6 psi = 22 GPa).
TEST(Plausible, PsiDeclaredAsGpaNamesPsi) {
  const std::string m = MessageOf(Measured::kModulus, "K", 3.2e6, "GPa");
  EXPECT_NE(m.find("K = 3200000 GPa is far above any rock modulus (0.01–200 GPa)"), std::string::npos) << m;
  EXPECT_NE(m.find(": is the column in psi"), std::string::npos) << m;
}

TEST(Plausible, NamesTheLikelySlipPerQuantity) {
  // MPa written as GPa: 15000 "GPa" is 15 GPa in MPa.
  EXPECT_NE(MessageOf(Measured::kModulus, "K", 15000, "GPa").find("in MPa"), std::string::npos);
  // MPa declared, values in GPa is below the range only for K < 10 MPa: 5 "MPa".
  EXPECT_NE(MessageOf(Measured::kModulus, "K", 5, "MPa").find("far below"), std::string::npos);
  EXPECT_NE(MessageOf(Measured::kModulus, "K", 5, "MPa").find("in GPa"), std::string::npos);
  // psi declared as MPa: 5000 "MPa" = 34 MPa in psi.
  EXPECT_NE(MessageOf(Measured::kPressure, "P_c", 5000, "MPa").find("in psi"), std::string::npos);
  // kPa declared as MPa: 30000 "MPa" is 30 MPa in kPa (psi would give 207 MPa, farther from typical).
  const std::string kpa = MessageOf(Measured::kPressure, "P_c", 30000, "MPa");
  EXPECT_NE(kpa.find("in kPa (or psi)?"), std::string::npos) << kpa;
  // km/s declared as m/s, and m/s as km/s.
  EXPECT_NE(MessageOf(Measured::kVelocity, "Vp", 3.5, "m/s").find("in km/s"), std::string::npos);
  EXPECT_NE(MessageOf(Measured::kVelocity, "Vp", 3500, "km/s").find("in m/s"), std::string::npos);
  // kg/m3 declared as g/cc, and the reverse.
  EXPECT_NE(MessageOf(Measured::kDensity, "rho", 2300, "g/cc").find("in kg/m3"), std::string::npos);
  EXPECT_NE(MessageOf(Measured::kDensity, "rho", 2.3, "kg/m3").find("in g/cc"), std::string::npos);
  // A single value (not a column) says "is it in".
  EXPECT_NE(MessageOf(Measured::kModulus, "K_s", 2.5e6, "GPa", false).find(": is it in psi"), std::string::npos);
}

TEST(Plausible, PorosityAndStrainSlips) {
  EXPECT_EQ(SlipHint(Measured::kPorosity, 21, 1.0, false), ": is it in %?");
  const std::string eps = ImplausibleMessage(Measured::kStrain, "eps_v", 3000, "1", 3000, true);
  EXPECT_NE(eps.find("in microstrain"), std::string::npos) << eps;
}

TEST(Plausible, NoSlipExplainsItSaysCheck) {
  // 1e30 GPa is implausible in every unit.
  EXPECT_NE(MessageOf(Measured::kModulus, "K", 1e30, "GPa").find("check the value and its unit"), std::string::npos);
}

TEST(Plausible, SigmaAboveItsValueNamesTheUnit) {
  const SourceLocation at{"s.csv", 3, 4};
  // sigma_K written in MPa under a GPa column: 300 "GPa" against K = 15 GPa.
  try {
    RequirePlausibleSigma(Measured::kModulus, "sigma_K", 300, "GPa", 300e9, 15e9, true, at);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("sigma_K = 300 GPa is far above any rock modulus"), std::string::npos) << e.message();
  }
  try {
    RequirePlausibleSigma(Measured::kModulus, "sigma_K", 30, "GPa", 30e9, 15e9, true, at);
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("exceeds the value it qualifies (15 GPa): is the column in "), std::string::npos)
        << e.message();
    EXPECT_NE(e.message().find("MPa"), std::string::npos)
        << e.message();
  }
  EXPECT_THROW(RequirePlausibleSigma(Measured::kModulus, "sigma_K", 150, "%", 1.5 * 15e9, 15e9, true, at),
               InputError);
  EXPECT_NO_THROW(RequirePlausibleSigma(Measured::kModulus, "sigma_K", 0.5, "GPa", 0.5e9, 15e9, true, at));
  EXPECT_NO_THROW(RequirePlausibleSigma(Measured::kStrain, "sigma_eps", 1e-5, "1", 1e-5, 0.0, true, at));
}

}  // namespace porofit::units

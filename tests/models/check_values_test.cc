// Published/computed check values for the closure models.
#include <gtest/gtest.h>

#include "porofit/models/registry.h"

namespace porofit {
namespace {

// Check value 12 [computed; docs/check-values.md]: M1 with K_inf 20, K_0 8 GPa,
// P* 10 MPa. Tolerances are half a unit in the last quoted digit.
TEST(ExpModulus, ReproducesCheckValue12) {
  const ModelSpec& m1 = *ModelRegistry::Builtin().Find("exp-modulus");
  const double th[] = {20, 8, 10};
  EXPECT_NEAR(m1.value(th, 10), 15.5854, 5e-5);  // GPa
  EXPECT_NEAR(m1.value(th, 30), 19.4026, 5e-5);  // GPa
  EXPECT_NEAR(m1.slope(th, 0), 1.2, 5e-2);       // GPa/MPa, quoted as 1.2
  EXPECT_NEAR(m1.slope(th, 0), 1.2, 1e-14);      // exactly (K_inf - K_0)/P* by the formula
  // strain() is in MPa/GPa: times 1e-3 for a plain volumetric strain.
  const double eps10 = m1.strain(th, 10) * 1e-3;
  EXPECT_NEAR(eps10, 8.3345e-4, 5e-9);
  // Secant modulus 10 MPa / eps(10), in GPa; smaller than the tangent K(10).
  const double k_sec = 10e6 / eps10 / 1e9;
  EXPECT_NEAR(k_sec, 11.998, 5e-4);
  EXPECT_LT(k_sec, m1.value(th, 10));
  // alpha = 1 - K/K_s with K_s = 37 GPa at P = 0, 10, 30 MPa.
  const double k_s = 37;
  EXPECT_NEAR(1 - m1.value(th, 0) / k_s, 0.7838, 5e-5);
  EXPECT_NEAR(1 - m1.value(th, 10) / k_s, 0.5788, 5e-5);
  EXPECT_NEAR(1 - m1.value(th, 30) / k_s, 0.4756, 5e-5);
}

// Check value 13 [computed; docs/check-values.md]: M2 with C_inf 0.05, C_0 0.2 /GPa,
// P* 10 MPa.
TEST(ExpCompliance, ReproducesCheckValue13) {
  const ModelSpec& m2 = *ModelRegistry::Builtin().Find("exp-compliance");
  const double th[] = {0.05, 0.2, 10};
  EXPECT_NEAR(m2.value(th, 10), 9.507, 5e-4);              // GPa
  EXPECT_NEAR(m2.strain(th, 10) * 1e-3, 1.4482e-3, 5e-8);  // plain strain
  EXPECT_NEAR(m2.strain(th, 50) * 1e-3, 3.9899e-3, 5e-8);
}

}  // namespace
}  // namespace porofit

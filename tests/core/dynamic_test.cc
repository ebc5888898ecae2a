#include "porofit/core/dynamic.h"

#include <gtest/gtest.h>

#include <cmath>

namespace porofit {

// Check value 5 [computed; docs/check-values.md]: Vp 3.50, Vs 2.10 km/s, rho 2.30 g/cc
// -> K 14.651 GPa, mu 10.143 GPa, nu 0.21875.
TEST(DynamicModuli, CheckValue5) {
  const auto m = ComputeDynamicModuli({3500.0, 2100.0, 2300.0, 0, 0, 0});
  EXPECT_NEAR(m.bulk / 1e9, 14.651, 5e-4);
  EXPECT_NEAR(m.shear / 1e9, 10.143, 5e-4);
  EXPECT_NEAR(m.poisson, 0.21875, 1e-6);
  EXPECT_FALSE(m.negative_bulk);
  EXPECT_FALSE(m.negative_poisson);
}

// Check value 6 [computed]: sigma_rho 0.01 g/cc, 1 % Vp, 2 % Vs -> sigma_K 0.784 GPa (5.3 %).
TEST(DynamicModuli, CheckValue6PropagatedUncertainty) {
  const auto m = ComputeDynamicModuli({3500.0, 2100.0, 2300.0, 35.0, 42.0, 10.0});
  EXPECT_NEAR(m.sigma_bulk / 1e9, 0.784, 5e-4);
  EXPECT_NEAR(m.sigma_bulk / m.bulk, 0.0535, 5e-4);
}

// Vp/Vs thresholds sqrt(4/3) and sqrt(2) (computed from K >= 0 and nu >= 0; common practice).
TEST(DynamicModuli, FlagsImpossibleAndNegativePoissonRatios) {
  const auto bad = ComputeDynamicModuli({2000.0, 1800.0, 2300.0, 0, 0, 0});  // Vp/Vs 1.11
  EXPECT_TRUE(bad.negative_bulk);
  EXPECT_LT(bad.bulk, 0);
  const auto aux = ComputeDynamicModuli({2600.0, 2000.0, 2300.0, 0, 0, 0});  // Vp/Vs 1.3
  EXPECT_FALSE(aux.negative_bulk);
  EXPECT_TRUE(aux.negative_poisson);
}

TEST(DynamicModuli, NonPositiveInputGivesNaN) {
  const auto m = ComputeDynamicModuli({0.0, 2100.0, 2300.0, 0, 0, 0});
  EXPECT_TRUE(std::isnan(m.bulk));
}

}  // namespace porofit

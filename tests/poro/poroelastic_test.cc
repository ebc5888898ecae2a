#include "porofit/poro/poroelastic.h"

#include <gtest/gtest.h>

#include <cmath>

namespace porofit::poro {
namespace {

constexpr double GPa = 1e9;

// Check value 3 [computed; docs/check-values.md]: quartz (K 37, mu 44 GPa) at
// phi = 0.2, the HS bound gives alpha >= 0.2896.
TEST(BiotLowerBoundHashinShtrikman, QuartzAtTwentyPercentPorosityIsCheckValue) {
  EXPECT_NEAR(BiotLowerBoundHashinShtrikman(0.2, 37 * GPa, 44 * GPa), 0.2896, 5e-5);
}

TEST(BiotLowerBoundHashinShtrikman, IsZeroWithoutPoresAndOneWithoutSolid) {
  EXPECT_DOUBLE_EQ(BiotLowerBoundHashinShtrikman(0.0, 37 * GPa, 44 * GPa), 0.0);
  EXPECT_DOUBLE_EQ(BiotLowerBoundHashinShtrikman(1.0, 37 * GPa, 44 * GPa), 1.0);
}

TEST(BiotLowerBoundHashinShtrikman, LiesBetweenPorosityAndOne) {
  for (double phi = 0.01; phi < 1.0; phi += 0.07) {
    const double a = BiotLowerBoundHashinShtrikman(phi, 37 * GPa, 44 * GPa);
    EXPECT_GE(a, phi) << phi;
    EXPECT_LE(a, 1.0) << phi;
  }
}

// Check value 4 [computed; docs/check-values.md]: K_dry 10, K_s 37, K_f 2.25 GPa,
// phi 0.2 -> alpha 0.72973, M 9.6894 GPa, K_u 15.1596 GPa (both ways), B 0.46641.
TEST(Gassmann, ReproducesCheckValueBothWays) {
  const double k_dry = 10 * GPa, k_s = 37 * GPa, k_f = 2.25 * GPa, phi = 0.2;
  const double alpha = BiotCoefficient(k_dry, k_s);
  EXPECT_NEAR(alpha, 0.72973, 5e-6);
  const double m = BiotModulus(alpha, phi, k_s, k_f);
  EXPECT_NEAR(m / GPa, 9.6894, 5e-5);
  const double k_u = UndrainedBulkModulus(k_dry, alpha, m);
  EXPECT_NEAR(k_u / GPa, 15.1596, 5e-5);
  const double k_u_gassmann = GassmannUndrainedBulkModulus(k_dry, k_s, k_f, phi);
  EXPECT_NEAR(k_u_gassmann / GPa, 15.1596, 5e-5);
  EXPECT_NEAR(k_u_gassmann, k_u, 1e-9 * k_u);
  EXPECT_NEAR(SkemptonCoefficient(alpha, m, k_u), 0.46641, 5e-6);
}

TEST(Gassmann, BiotAndGassmannFormsAgreeAcrossInputs) {
  for (double phi : {0.02, 0.1, 0.3}) {
    for (double k_dry : {2.0, 8.0, 25.0}) {
      const double k_s = 40 * GPa, k_f = 2.2 * GPa, kd = k_dry * GPa;
      const double alpha = BiotCoefficient(kd, k_s);
      const double k_u = UndrainedBulkModulus(kd, alpha, BiotModulus(alpha, phi, k_s, k_f));
      EXPECT_NEAR(GassmannUndrainedBulkModulus(kd, k_s, k_f, phi), k_u, 1e-12 * k_u) << phi << " " << k_dry;
    }
  }
}

TEST(BiotModulus, PoreModulusFormReducesToBiotModulusWhenPoreModulusEqualsGrainModulus) {
  const double alpha = 0.7, phi = 0.15, k_s = 37 * GPa, k_f = 2.25 * GPa;
  EXPECT_NEAR(BiotModulusWithPoreModulus(alpha, phi, k_s, k_f, k_s), BiotModulus(alpha, phi, k_s, k_f), 1e-3);
  // K_phi = 20 GPa: 1/M = 0.7/37 + 0.15 (1/2.25 - 1/20) = 0.0780856 /GPa -> M = 12.8065 GPa
  // [computed by hand from the formula in porofit/poro/poroelastic.h].
  EXPECT_NEAR(BiotModulusWithPoreModulus(alpha, phi, k_s, k_f, 20 * GPa) / GPa, 12.8065, 5e-4);
}

TEST(Skempton, StiffFluidInSoftFrameApproachesOne) {
  // Drained frame much softer than everything else: B -> 1 (common practice limit).
  const double k_dry = 0.01 * GPa, k_s = 37 * GPa, k_f = 20 * GPa, phi = 0.3;
  const double alpha = BiotCoefficient(k_dry, k_s);
  const double m = BiotModulus(alpha, phi, k_s, k_f);
  EXPECT_GT(SkemptonCoefficient(alpha, m, UndrainedBulkModulus(k_dry, alpha, m)), 0.999);
}

// Check value 14 [computed; docs/check-values.md]: C11 30, C12 10, C13 8, C33 20,
// K_s 40 GPa -> alpha_h 0.600, alpha_v 0.700.
TEST(BiotCoefficientVti, ReproducesTransverselyIsotropicCheckValue) {
  const AnisotropicBiot a = BiotCoefficientVti({30 * GPa, 10 * GPa, 8 * GPa, 20 * GPa}, 40 * GPa);
  EXPECT_NEAR(a.horizontal, 0.600, 5e-4);
  EXPECT_NEAR(a.vertical, 0.700, 5e-4);
}

// Isotropic C reproduces 1 - K/K_s [computed].
TEST(BiotCoefficientVti, IsotropicStiffnessGivesIsotropicAlphaInBothDirections) {
  for (double k : {3.0, 12.0, 30.0}) {
    for (double mu : {1.0, 9.0, 25.0}) {
      const VtiStiffness c = IsotropicStiffness(k * GPa, mu * GPa);
      EXPECT_DOUBLE_EQ(c.c11, c.c33);
      EXPECT_DOUBLE_EQ(c.c12, c.c13);
      const AnisotropicBiot a = BiotCoefficientVti(c, 37 * GPa);
      const double iso = 1.0 - k / 37.0;
      EXPECT_NEAR(a.horizontal, iso, 1e-12) << k << " " << mu;
      EXPECT_NEAR(a.vertical, iso, 1e-12) << k << " " << mu;
    }
  }
}

// Check value 15 [computed; docs/check-values.md]: K 10 +- 0.5, K_s 37 +- 1 GPa
// -> alpha 0.7297 +- 0.01536.
TEST(BiotCoefficientWithUncertainty, DeltaMethodMatchesCheckValue) {
  const BiotEstimate e = BiotCoefficientWithUncertainty(10 * GPa, 0.5 * GPa, 37 * GPa, 1 * GPa);
  EXPECT_NEAR(e.alpha, 0.7297, 5e-5);
  EXPECT_NEAR(e.sigma, 0.01536, 5e-6);
  EXPECT_DOUBLE_EQ(e.variance_from_covariance, 0.0);
  // K_s share: (10/37^2)^2 / [(0.5/37)^2 + (10/37^2)^2] = 0.2261 [computed from the same formula]
  EXPECT_NEAR(e.ShareFromGrainModulus(), 0.2261, 5e-4);
}

TEST(BiotCoefficientWithUncertainty, PositiveCovarianceShrinksTheBand) {
  // alpha falls with K and rises with K_s, so positively correlated errors partly cancel.
  const double k = 10 * GPa, sk = 0.5 * GPa, ks = 37 * GPa, sks = 1 * GPa;
  const BiotEstimate none = BiotCoefficientWithUncertainty(k, sk, ks, sks, 0.0);
  const BiotEstimate pos = BiotCoefficientWithUncertainty(k, sk, ks, sks, 0.8 * sk * sks);
  const BiotEstimate neg = BiotCoefficientWithUncertainty(k, sk, ks, sks, -0.8 * sk * sks);
  EXPECT_LT(pos.sigma, none.sigma);
  EXPECT_GT(neg.sigma, none.sigma);
  const double expected_var = none.sigma * none.sigma - 2.0 * (k / (ks * ks * ks)) * 0.8 * sk * sks;
  EXPECT_NEAR(pos.sigma * pos.sigma, expected_var, 1e-15);
}

TEST(BiotCoefficientWithUncertainty, MatchesFiniteDifferencePropagation) {
  // Independent check of the derivatives: central differences of alpha.
  const double k = 14 * GPa, ks = 45 * GPa, sk = 0.7 * GPa, sks = 2 * GPa, h = 1e5;
  const double dk = (BiotCoefficient(k + h, ks) - BiotCoefficient(k - h, ks)) / (2 * h);
  const double dks = (BiotCoefficient(k, ks + h) - BiotCoefficient(k, ks - h)) / (2 * h);
  const double expected = std::sqrt(dk * dk * sk * sk + dks * dks * sks * sks);
  EXPECT_NEAR(BiotCoefficientWithUncertainty(k, sk, ks, sks).sigma, expected, 1e-9);
}

TEST(CheckBiotCoefficient, PlausibleValueRaisesNoFlag) {
  const double k_dry = 10 * GPa, k_s = 37 * GPa;
  const BiotChecks c = CheckBiotCoefficient(BiotCoefficient(k_dry, k_s), 0.2, k_dry, k_s, 44 * GPa);
  EXPECT_FALSE(c.any());
  EXPECT_TRUE(c.Messages().empty());
  EXPECT_NEAR(c.hs_limit, 0.2896, 5e-5);
}

TEST(CheckBiotCoefficient, FlagsAlphaBelowPorosityAndBelowHashinShtrikmanLimit) {
  // K_dry 32 GPa with phi 0.2 exceeds the Voigt bound (1-phi) K_s = 29.6 GPa.
  const double k_dry = 32 * GPa, k_s = 37 * GPa;
  const BiotChecks c = CheckBiotCoefficient(BiotCoefficient(k_dry, k_s), 0.2, k_dry, k_s, 44 * GPa);
  EXPECT_TRUE(c.below_porosity);
  EXPECT_TRUE(c.below_hs_limit);
  EXPECT_FALSE(c.above_one);
  EXPECT_FALSE(c.k_dry_not_below_k_s);
  ASSERT_EQ(c.Messages().size(), 2u);
  EXPECT_NE(c.Messages()[0].find("is below porosity 0.200"), std::string::npos) << c.Messages()[0];
  EXPECT_NE(c.Messages()[1].find("hashin-shtrikman limit"), std::string::npos) << c.Messages()[1];
}

TEST(CheckBiotCoefficient, FlagsOnlyHashinShtrikmanWhenAlphaIsBetweenPorosityAndLimit) {
  // phi 0.2: Voigt needs alpha >= 0.2, HS needs alpha >= 0.2896; alpha = 0.25 violates HS only.
  const double k_s = 37 * GPa, k_dry = 0.75 * k_s;
  const BiotChecks c = CheckBiotCoefficient(BiotCoefficient(k_dry, k_s), 0.2, k_dry, k_s, 44 * GPa);
  EXPECT_FALSE(c.below_porosity);
  EXPECT_TRUE(c.below_hs_limit);
}

TEST(CheckBiotCoefficient, FlagsStiffFrameAndNegativeModulusWithoutClipping) {
  const double k_s = 37 * GPa;
  const BiotChecks stiff = CheckBiotCoefficient(BiotCoefficient(40 * GPa, k_s), 0.1, 40 * GPa, k_s);
  EXPECT_TRUE(stiff.k_dry_not_below_k_s);
  EXPECT_TRUE(stiff.below_porosity);
  EXPECT_LT(stiff.alpha, 0.0);  // reported as computed, not clipped
  EXPECT_TRUE(std::isnan(stiff.hs_limit));  // mu_s not given: HS check skipped
  EXPECT_FALSE(stiff.below_hs_limit);

  const BiotChecks negative = CheckBiotCoefficient(BiotCoefficient(-1 * GPa, k_s), 0.1, -1 * GPa, k_s);
  EXPECT_TRUE(negative.above_one);
  EXPECT_FALSE(negative.k_dry_not_below_k_s);
}

}  // namespace
}  // namespace porofit::poro

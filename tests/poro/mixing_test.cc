#include "porofit/poro/mixing.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <random>

namespace porofit::poro {
namespace {

constexpr double GPa = 1e9;

Eigen::VectorXd Vec(std::initializer_list<double> v) {
  Eigen::VectorXd x(static_cast<Eigen::Index>(v.size()));
  Eigen::Index i = 0;
  for (double d : v) x[i++] = d;
  return x;
}

// Check value 9 [computed; docs/check-values.md]: quartz-calcite 80/20 by volume,
// K 37/76.8, mu 44/32 GPa.
TEST(MixingLaws, QuartzCalciteReproducesCheckValues) {
  const Eigen::VectorXd f = Vec({0.8, 0.2}), k = Vec({37, 76.8}), mu = Vec({44, 32});
  EXPECT_NEAR(VoigtAverage(f, k), 44.96, 5e-3);
  EXPECT_NEAR(ReussAverage(f, k), 41.278, 5e-4);
  EXPECT_NEAR(HillAverage(f, k), 43.119, 5e-4);
  const Bounds kb = HashinShtrikmanBulk(f, k, mu);
  EXPECT_NEAR(kb.lower, 42.687, 5e-4);
  EXPECT_NEAR(kb.upper, 42.972, 5e-4);
  EXPECT_NEAR(VoigtAverage(f, mu), 41.60, 5e-3);
  EXPECT_NEAR(ReussAverage(f, mu), 40.930, 5e-4);
  const Bounds mb = HashinShtrikmanShear(f, k, mu);
  EXPECT_NEAR(mb.lower, 41.248, 5e-4);
  EXPECT_NEAR(mb.upper, 41.315, 5e-4);
}

// Check value 10 [computed; docs/check-values.md]: quartz-clay 70/30, K 37/21 GPa.
TEST(MixingLaws, QuartzClayReproducesCheckValues) {
  const Eigen::VectorXd f = Vec({0.7, 0.3}), k = Vec({37, 21});
  EXPECT_NEAR(VoigtAverage(f, k), 32.20, 5e-3);
  EXPECT_NEAR(ReussAverage(f, k), 30.116, 5e-4);
  EXPECT_NEAR(HillAverage(f, k), 31.158, 5e-4);
}

TEST(MixingLaws, SingleMineralGivesItsOwnModulusEverywhere) {
  const Eigen::VectorXd f = Vec({1.0}), k = Vec({37}), mu = Vec({44});
  EXPECT_DOUBLE_EQ(VoigtAverage(f, k), 37);
  EXPECT_DOUBLE_EQ(ReussAverage(f, k), 37);
  EXPECT_NEAR(HashinShtrikmanBulk(f, k, mu).lower, 37, 1e-12);
  EXPECT_NEAR(HashinShtrikmanBulk(f, k, mu).upper, 37, 1e-12);
  EXPECT_NEAR(HashinShtrikmanShear(f, k, mu).lower, 44, 1e-12);
  EXPECT_NEAR(HashinShtrikmanShear(f, k, mu).upper, 44, 1e-12);
}

TEST(MixingLaws, MineralWithZeroFractionDoesNotLoosenTheBounds) {
  const Eigen::VectorXd k2 = Vec({37, 76.8}), mu2 = Vec({44, 32}), f2 = Vec({0.8, 0.2});
  const Eigen::VectorXd k3 = Vec({37, 76.8, 21}), mu3 = Vec({44, 32, 7}), f3 = Vec({0.8, 0.2, 0.0});
  EXPECT_DOUBLE_EQ(HashinShtrikmanBulk(f3, k3, mu3).lower, HashinShtrikmanBulk(f2, k2, mu2).lower);
  EXPECT_DOUBLE_EQ(HashinShtrikmanShear(f3, k3, mu3).lower, HashinShtrikmanShear(f2, k2, mu2).lower);
}

// Invariant (Mavko, Mukerji & Dvorkin 2009, The Rock Physics Handbook, 2nd ed.
// [from memory]): R <= HS- <= HS+ <= V, for K and mu, on random mixes.
TEST(MixingLaws, BoundsAreOrderedOnRandomMixes) {
  std::mt19937_64 rng(20240611);
  std::uniform_real_distribution<double> mod(2.0, 150.0), frac(0.0, 1.0);
  std::uniform_int_distribution<int> count(1, 6);
  for (int trial = 0; trial < 2000; ++trial) {
    const int n = count(rng);
    Eigen::VectorXd f(n), k(n), mu(n);
    for (int i = 0; i < n; ++i) {
      f[i] = frac(rng);
      k[i] = mod(rng);
      mu[i] = mod(rng);
    }
    f /= f.sum();
    const double tol = 1e-9 * k.maxCoeff();
    const Bounds kb = HashinShtrikmanBulk(f, k, mu);
    EXPECT_LE(ReussAverage(f, k), kb.lower + tol) << "trial " << trial;
    EXPECT_LE(kb.lower, kb.upper + tol) << "trial " << trial;
    EXPECT_LE(kb.upper, VoigtAverage(f, k) + tol) << "trial " << trial;
    const Bounds mb = HashinShtrikmanShear(f, k, mu);
    EXPECT_LE(ReussAverage(f, mu), mb.lower + tol) << "trial " << trial;
    EXPECT_LE(mb.lower, mb.upper + tol) << "trial " << trial;
    EXPECT_LE(mb.upper, VoigtAverage(f, mu) + tol) << "trial " << trial;
  }
}

// The same invariant through the built-in table, on random XRD-like weight
// mixes of its minerals (clay species and accessories included), and every
// mix gets a positive sigma.
TEST(GrainModulusFromMineralogy, BoundsAreOrderedOnRandomMixesOfTheBuiltinTable) {
  const MineralTable& t = MineralTable::Builtin();
  const std::vector<std::string> names = t.Names();
  std::mt19937_64 rng(20261201);
  std::uniform_real_distribution<double> frac(0.0, 1.0);
  std::uniform_int_distribution<int> count(1, 6);
  std::uniform_int_distribution<size_t> pick(0, names.size() - 1);
  for (int trial = 0; trial < 500; ++trial) {
    std::vector<std::string> chosen;
    const int n = count(rng);
    while (static_cast<int>(chosen.size()) < n) {
      const std::string& name = names[pick(rng)];
      if (std::find(chosen.begin(), chosen.end(), name) == chosen.end()) chosen.push_back(name);
    }
    std::vector<double> w(chosen.size());
    double sum = 0;
    for (double& x : w) sum += (x = 0.01 + frac(rng));
    Composition c;
    c.basis = FractionBasis::kWeight;
    for (size_t i = 0; i < chosen.size(); ++i) c.entries.push_back({chosen[i], w[i] / sum, {}});
    const GrainModulus g = GrainModulusFromMineralogy(t, c);
    const double tol = 1e-9 * g.k_voigt;
    EXPECT_LE(g.k_reuss, g.k_hs_lower + tol) << "trial " << trial;
    EXPECT_LE(g.k_hs_lower, g.k_hs_upper + tol) << "trial " << trial;
    EXPECT_LE(g.k_hs_upper, g.k_voigt + tol) << "trial " << trial;
    EXPECT_LE(g.mu_reuss, g.mu_hs_lower + tol) << "trial " << trial;
    EXPECT_LE(g.mu_hs_lower, g.mu_hs_upper + tol) << "trial " << trial;
    EXPECT_LE(g.mu_hs_upper, g.mu_voigt + tol) << "trial " << trial;
    EXPECT_GT(g.sigma_k_s, 0) << "trial " << trial;
  }
}

TEST(FractionConversion, WeightToVolumeRoundTrips) {
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> frac(0.0, 1.0), dens(2000.0, 5000.0);
  for (int trial = 0; trial < 200; ++trial) {
    Eigen::VectorXd w(4), rho(4);
    for (int i = 0; i < 4; ++i) {
      w[i] = frac(rng);
      rho[i] = dens(rng);
    }
    w /= w.sum();
    const Eigen::VectorXd v = WeightToVolumeFractions(w, rho);
    EXPECT_NEAR(v.sum(), 1.0, 1e-14);
    EXPECT_LT((VolumeToWeightFractions(v, rho) - w).cwiseAbs().maxCoeff(), 1e-14);
  }
}

TEST(FractionConversion, DenseMineralTakesLessVolumeThanItsWeight) {
  // 50/50 by weight of quartz (2650) and pyrite (4930): v_pyrite = (0.5/4930)/(0.5/2650 + 0.5/4930).
  const Eigen::VectorXd v = WeightToVolumeFractions(Vec({0.5, 0.5}), Vec({2650, 4930}));
  EXPECT_NEAR(v[1], 2650.0 / (2650.0 + 4930.0), 1e-15);
  EXPECT_LT(v[1], 0.5);
}

// --------------------------------------------------------- grain modulus

Composition Mix(std::initializer_list<MineralFraction> e, FractionBasis basis) {
  Composition c;
  c.entries = e;
  c.basis = basis;
  c.where = {"study.yaml", 4, 3};
  return c;
}

TEST(GrainModulusFromMineralogy, VolumeMixUsesBuiltinTableAndCheckValues) {
  // Builtin quartz 37/44 and calcite 76.8/32 are the inputs of check value 9 (docs/check-values.md).
  const GrainModulus g = GrainModulusFromMineralogy(
      MineralTable::Builtin(), Mix({{"quartz", 0.8, {}}, {"calcite", 0.2, {}}}, FractionBasis::kVolume));
  EXPECT_EQ(g.method, GrainModulusMethod::kMineralogy);
  EXPECT_EQ(ToString(g.method), "mineralogy");
  EXPECT_NEAR(g.k_voigt / GPa, 44.96, 5e-3);
  EXPECT_NEAR(g.k_reuss / GPa, 41.278, 5e-4);
  EXPECT_NEAR(g.k_hill / GPa, 43.119, 5e-4);
  EXPECT_NEAR(g.k_hs_lower / GPa, 42.687, 5e-4);
  EXPECT_NEAR(g.k_hs_upper / GPa, 42.972, 5e-4);
  EXPECT_NEAR(g.mu_hs_lower / GPa, 41.248, 5e-4);
  EXPECT_NEAR(g.mu_hs_upper / GPa, 41.315, 5e-4);
  EXPECT_DOUBLE_EQ(g.k_s, g.k_hill);
  EXPECT_DOUBLE_EQ(g.mu_s, g.mu_hill);
  EXPECT_DOUBLE_EQ(g.clay_volume_fraction, 0.0);
  ASSERT_EQ(g.minerals.size(), 2u);
  EXPECT_EQ(g.minerals[1], "calcite");
}

TEST(GrainModulusFromMineralogy, SigmaCombinesSpreadAndPropagatedTableUncertainty) {
  const MineralTable& t = MineralTable::Builtin();
  const GrainModulus g =
      GrainModulusFromMineralogy(t, Mix({{"quartz", 0.8, {}}, {"calcite", 0.2, {}}}, FractionBasis::kVolume));
  EXPECT_NEAR(g.sigma_k_s_spread, (g.k_voigt - g.k_reuss) / (2 * std::sqrt(3.0)), 1e-6);
  // Independent check of the propagated part: finite differences of Hill in each mineral's K.
  const Eigen::VectorXd f = Vec({0.8, 0.2});
  const Eigen::VectorXd k = Vec({t.Get("quartz").bulk, t.Get("calcite").bulk});
  const Eigen::VectorXd s = Vec({t.Get("quartz").sigma_bulk, t.Get("calcite").sigma_bulk});
  double var = 0;
  for (Eigen::Index i = 0; i < 2; ++i) {
    Eigen::VectorXd kp = k, km = k;
    kp[i] += 1e6;
    km[i] -= 1e6;
    const double d = (HillAverage(f, kp) - HillAverage(f, km)) / 2e6;
    var += d * d * s[i] * s[i];
  }
  EXPECT_NEAR(g.sigma_k_s_table, std::sqrt(var), 1e-6 * std::sqrt(var));
  EXPECT_NEAR(g.sigma_k_s, std::hypot(g.sigma_k_s_spread, g.sigma_k_s_table), 1e-3);
}

TEST(GrainModulusFromMineralogy, WeightFractionsAreConvertedWithDensities) {
  const MineralTable& t = MineralTable::Builtin();
  const GrainModulus w =
      GrainModulusFromMineralogy(t, Mix({{"quartz", 0.5, {}}, {"pyrite", 0.5, {}}}, FractionBasis::kWeight));
  const double rq = t.Get("quartz").density, rp = t.Get("pyrite").density;
  EXPECT_NEAR(w.volume_fractions[1], (0.5 / rp) / (0.5 / rq + 0.5 / rp), 1e-15);
  const GrainModulus v = GrainModulusFromMineralogy(
      t, Mix({{"quartz", w.volume_fractions[0], {}}, {"pyrite", w.volume_fractions[1], {}}}, FractionBasis::kVolume));
  EXPECT_NEAR(w.k_s, v.k_s, 1e-6);
  EXPECT_NEAR(w.sigma_k_s, v.sigma_k_s, 1e-6);
}

TEST(GrainModulusFromMineralogy, ClayRichMixIsRelativelyLessCertainThanCleanQuartz) {
  const MineralTable& t = MineralTable::Builtin();
  const GrainModulus clean = GrainModulusFromMineralogy(t, Mix({{"quartz", 1.0, {}}}, FractionBasis::kVolume));
  const GrainModulus shaly = GrainModulusFromMineralogy(
      t, Mix({{"quartz", 0.7, {}}, {"mixed_clay", 0.3, {}}}, FractionBasis::kVolume));
  EXPECT_DOUBLE_EQ(clean.sigma_k_s_spread, 0.0);
  EXPECT_NEAR(clean.sigma_k_s, t.Get("quartz").sigma_bulk, 1e-6);
  EXPECT_NEAR(shaly.k_s / GPa, 31.158, 5e-4);  // check value 10 [computed; docs/check-values.md]
  EXPECT_NEAR(shaly.clay_volume_fraction, 0.3, 1e-15);
  const double rel_clean = clean.sigma_k_s / clean.k_s, rel_shaly = shaly.sigma_k_s / shaly.k_s;
  EXPECT_GT(rel_shaly, 3 * rel_clean) << rel_clean << " vs " << rel_shaly;
  EXPECT_GT(shaly.sigma_mu_s / shaly.mu_s, 3 * clean.sigma_mu_s / clean.mu_s);
}

TEST(GrainModulusFromMineralogy, FractionsWithinToleranceAreRenormalised) {
  const GrainModulus g = GrainModulusFromMineralogy(
      MineralTable::Builtin(), Mix({{"quartz", 0.8004, {}}, {"calcite", 0.2, {}}}, FractionBasis::kVolume));
  EXPECT_NEAR(g.volume_fractions[0] + g.volume_fractions[1], 1.0, 1e-15);
  EXPECT_NEAR(g.volume_fractions[0], 0.8004 / 1.0004, 1e-15);
}

TEST(ValidateComposition, AcceptsAValidMix) {
  EXPECT_FALSE(ValidateComposition(MineralTable::Builtin(),
                                   Mix({{"quartz", 0.6, {}}, {"dolomite", 0.4, {}}}, FractionBasis::kWeight)));
}

TEST(ValidateComposition, RejectsNegativeFractionAtTheEntry) {
  const Composition c = Mix({{"quartz", 1.1, {}}, {"calcite", -0.1, {"study.yaml", 6, 16}}}, FractionBasis::kWeight);
  const auto issue = ValidateComposition(MineralTable::Builtin(), c);
  ASSERT_TRUE(issue);
  EXPECT_EQ(issue->message, "fraction of calcite = -0.1 is negative");
  EXPECT_EQ(issue->entry, 1);
  EXPECT_EQ(issue->Where(c).line, 6);
}

TEST(ValidateComposition, RejectsSumOutsideToleranceAtTheComposition) {
  const Composition c = Mix({{"quartz", 0.7, {"study.yaml", 5, 5}}, {"calcite", 0.2, {}}}, FractionBasis::kWeight);
  const auto issue = ValidateComposition(MineralTable::Builtin(), c);
  ASSERT_TRUE(issue);
  EXPECT_EQ(issue->message, "weight fractions sum to 0.9, not 1 (tolerance 0.001)");
  EXPECT_EQ(issue->Where(c).ToString(), "study.yaml:4:3");
}

TEST(ValidateComposition, RejectsUnknownMineralWithSuggestionAndDuplicates) {
  const auto unknown = ValidateComposition(MineralTable::Builtin(),
                                           Mix({{"qartz", 1.0, {}}}, FractionBasis::kVolume));
  ASSERT_TRUE(unknown);
  EXPECT_EQ(unknown->message, "unknown mineral 'qartz' (did you mean 'quartz'?)");
  const auto twice = ValidateComposition(MineralTable::Builtin(),
                                         Mix({{"quartz", 0.5, {}}, {"quartz", 0.5, {}}}, FractionBasis::kVolume));
  ASSERT_TRUE(twice);
  EXPECT_EQ(twice->message, "mineral 'quartz' is listed twice");
  EXPECT_EQ(twice->entry, 1);
  EXPECT_TRUE(ValidateComposition(MineralTable::Builtin(), Mix({}, FractionBasis::kVolume)));
}

TEST(GrainModulusFromMineralogy, ThrowsLocatedInputErrorForInvalidComposition) {
  const Composition c = Mix({{"quartz", 0.5, {}}, {"calcite", 0.2, {}}}, FractionBasis::kVolume);
  try {
    GrainModulusFromMineralogy(MineralTable::Builtin(), c);
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "study.yaml:4:3: error: volume fractions sum to 0.7, not 1 (tolerance 0.001)");
  }
}

TEST(MeasuredGrainModulus, CarriesValueAndSigmaAndMarksDerivedFieldsAsNotApplicable) {
  const GrainModulus g = MeasuredGrainModulus(36.5 * GPa, 0.9 * GPa);
  EXPECT_EQ(g.method, GrainModulusMethod::kMeasured);
  EXPECT_EQ(ToString(g.method), "measured");
  EXPECT_DOUBLE_EQ(g.k_s, 36.5 * GPa);
  EXPECT_DOUBLE_EQ(g.sigma_k_s, 0.9 * GPa);
  EXPECT_TRUE(std::isnan(g.mu_s));
  EXPECT_TRUE(std::isnan(g.k_hill));
  EXPECT_TRUE(std::isnan(g.clay_volume_fraction));
  const GrainModulus with_shear = MeasuredGrainModulus(36.5 * GPa, 0.9 * GPa, 44 * GPa, 1 * GPa);
  EXPECT_DOUBLE_EQ(with_shear.mu_s, 44 * GPa);
  EXPECT_DOUBLE_EQ(with_shear.sigma_mu_s, 1 * GPa);
}

TEST(MeasuredGrainModulus, RejectsNonPositiveModulusAndNegativeSigma) {
  const SourceLocation at{"study.yaml", 9, 12};
  try {
    MeasuredGrainModulus(-3e9, 1e9, std::nullopt, 0, at);
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "study.yaml:9:12: error: grain bulk modulus = -3 GPa must be > 0");
  }
  EXPECT_THROW(MeasuredGrainModulus(37e9, -1.0), InputError);
  EXPECT_THROW(MeasuredGrainModulus(37e9, 1e9, 0.0), InputError);
}

}  // namespace
}  // namespace porofit::poro

#include "porofit/bands/bands.h"

#include "porofit/bands/random.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <mutex>
#include <random>

#include "porofit/core/error.h"
#include "porofit/poro/poroelastic.h"
#include "simulate.h"

namespace porofit::bands {
namespace {

using porofit::testing::RequestFor;
using porofit::testing::Sample;
using porofit::testing::Simulate;

// ---------------------------------------------------------------- options and grids

TEST(BandOptions, DefaultsAreValid) { EXPECT_EQ(BandOptions().Validate(), ""); }

TEST(BandOptions, ConfidenceOutsideOpenUnitIntervalIsNamed) {
  BandOptions o;
  o.confidence = 1.0;
  EXPECT_EQ(o.Validate(), "bands.confidence = 1 violates 0 < confidence < 1");
  o = BandOptions();
  o.threads = 0;
  EXPECT_EQ(o.Validate(), "bands.threads = 0 violates threads >= 1");
  o = BandOptions();
  o.bootstrap_replicates = 10;
  EXPECT_NE(o.Validate().find("bootstrap_replicates = 10"), std::string::npos);
}

TEST(PressureGrid, DefaultSpansTheDataAndABitBeyondAndFlagsTheExtrapolatedEnds) {
  const std::vector<double> data = {10e6, 20e6, 50e6, 110e6};
  const PressureGrid g = MakeGrid(GridSpec(), data);
  ASSERT_EQ(g.size(), 200u);
  EXPECT_DOUBLE_EQ(g.pressure.front(), 0.0);     // 10 - 0.1 * 100 MPa
  EXPECT_DOUBLE_EQ(g.pressure.back(), 120e6);    // 110 + 0.1 * 100 MPa
  for (size_t i = 0; i < g.size(); ++i)
    EXPECT_EQ(g.extrapolated[i], g.pressure[i] < 10e6 || g.pressure[i] > 110e6) << i;
}

TEST(PressureGrid, LogSpacingIsGeometricAndExplicitGridIsSorted) {
  GridSpec s;
  s.spacing = GridSpacing::kLog;
  s.from = 1e6;
  s.to = 100e6;
  s.count = 3;
  const PressureGrid g = MakeGrid(s, std::vector<double>{5e6, 50e6});
  ASSERT_EQ(g.size(), 3u);
  EXPECT_NEAR(g.pressure[1], 10e6, 1e-3);
  EXPECT_TRUE(g.extrapolated[0]);
  EXPECT_FALSE(g.extrapolated[1]);
  EXPECT_TRUE(g.extrapolated[2]);

  GridSpec e;
  e.spacing = GridSpacing::kExplicit;
  e.pressures = {30e6, 5e6, 70e6};
  const PressureGrid ge = MakeGrid(e, std::vector<double>{5e6, 60e6});
  EXPECT_EQ(ge.pressure, (std::vector<double>{5e6, 30e6, 70e6}));
  EXPECT_EQ(ge.extrapolated, (std::vector<bool>{false, false, true}));
}

TEST(PressureGrid, InvalidSpecsThrowInputErrorNamingTheField) {
  GridSpec s;
  s.count = 1;
  EXPECT_THROW(MakeGrid(s, std::vector<double>{1e6, 2e6}), InputError);
  GridSpec l;
  l.spacing = GridSpacing::kLog;
  // Data reach P = 0: a default log grid has no lower end.
  try {
    MakeGrid(l, std::vector<double>{0.0, 2e6});
    FAIL() << "no throw";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("log spacing"), std::string::npos) << e.message();
  }
  GridSpec x;
  x.spacing = GridSpacing::kExplicit;
  EXPECT_THROW(MakeGrid(x, std::vector<double>{1e6}), InputError);
}

// ---------------------------------------------------------------- delta method

// A one-parameter constant curve K = K_0 (linear model with b fixed at 0)
// whose estimate and variance are set by hand: K = 10 +- 0.5 GPa.
struct ConstantCurve {
  FitRequest request;
  FitResult fit;
  ConstantCurve(double k_gpa, double se_gpa, bool scaled, int n = 10) {
    request.model = ModelRegistry::Builtin().Find("linear");
    for (int i = 0; i < n; ++i) {
      request.data.x.push_back((5.0 + i) * 1e6);
      request.data.y.push_back(k_gpa * 1e9);
    }
    request.settings["b"].fixed = 0.0;
    fit = Fit(request);
    fit.status = FitStatus::kConverged;
    fit.parameters[0].estimate = k_gpa * 1e9;
    fit.parameters[1].estimate = 0.0;
    fit.free_index = {0};
    fit.covariance = Eigen::MatrixXd::Constant(1, 1, se_gpa * se_gpa * 1e18);
    fit.covariance_ok = true;
    fit.covariance_scaled = scaled;
    fit.n = n;
    fit.p = 1;
    fit.dof = n - 1;
  }
  BandRequest Request(double ks_gpa, double sigma_ks_gpa) const {
    BandRequest r;
    r.fit_request = &request;
    r.fit = &fit;
    r.k_s = ks_gpa * 1e9;
    r.sigma_k_s = sigma_ks_gpa * 1e9;
    r.grid = GridAt({5e6, 10e6}, 5e6, 14e6);
    return r;
  }
};

TEST(DeltaBands, ReproducesDomainCheckValue15) {
  // Check value 15 [computed; docs/check-values.md]: K 10 +- 0.5, K_s 37 +- 1 -> alpha 0.7297 +- 0.01536.
  const ConstantCurve c(10.0, 0.5, false);
  const DeltaResult d = ComputeDeltaBands(c.Request(37.0, 1.0));
  ASSERT_TRUE(d.computed) << d.message;
  for (size_t i = 0; i < 2; ++i) {
    EXPECT_NEAR(d.alpha_confidence.estimate[i], 0.7297, 5e-5);
    EXPECT_NEAR(d.alpha_se[i], 0.01536, 5e-6);
    EXPECT_NEAR(d.k_se[i], 0.5e9, 1.0);
    // Share of K_s: (10/37^2)^2 / ((0.5/37)^2 + (10/37^2)^2) [computed] = 0.2261.
    EXPECT_NEAR(d.grain_share[i], 0.2261, 1e-4);
  }
  // Absolute sigmas: every variance part is known, the quantile is z.
  EXPECT_NEAR(d.alpha_quantile[0], 1.959964, 1e-6);
}

TEST(DeltaBands, AgreeWithFiniteDifferenceGradientsOfTheModel) {
  std::mt19937_64 rng(11);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 12, 0.02, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  const BandRequest r = RequestFor(s, 37e9, 1e9, {1.0, 5.0, 20.0, 45.0, 80.0});
  const DeltaResult d = ComputeDeltaBands(r);
  ASSERT_TRUE(d.computed) << d.message;
  const ModelSpec& m = *s.request.model;
  std::vector<double> th(3);
  for (size_t j = 0; j < 3; ++j) th[j] = s.fit.parameters[j].estimate / m.parameters[j].si_factor;
  for (size_t i = 0; i < r.grid.size(); ++i) {
    const double p = r.grid.pressure[i] * 1e-6;
    Eigen::Vector3d g;  // dK/dtheta in SI by central differences in working units
    for (int j = 0; j < 3; ++j) {
      std::vector<double> up = th, dn = th;
      const double h = 1e-6 * std::abs(th[static_cast<size_t>(j)]);
      up[static_cast<size_t>(j)] += h;
      dn[static_cast<size_t>(j)] -= h;
      g(j) = (m.value(up.data(), p) - m.value(dn.data(), p)) / (2 * h) * 1e9 /
             m.parameters[static_cast<size_t>(j)].si_factor;
    }
    const double var_k = g.dot(s.fit.covariance * g);
    EXPECT_NEAR(d.k_se[i], std::sqrt(var_k), 1e-6 * std::sqrt(var_k)) << "P = " << p;
    const double k = m.value(th.data(), p) * 1e9;
    const double var_a = var_k / (37e9 * 37e9) + std::pow(k / (37e9 * 37e9), 2) * 1e18;
    EXPECT_NEAR(d.alpha_se[i], std::sqrt(var_a), 1e-6 * std::sqrt(var_a));
    // Alpha also by differencing 1 - K/K_s in K_s.
    const double dks = 1e3;
    const double da_dks = ((1 - k / (37e9 + dks)) - (1 - k / (37e9 - dks))) / (2 * dks);
    EXPECT_NEAR(d.alpha_var_grain[i], da_dks * da_dks * 1e18, 1e-6 * d.alpha_var_grain[i]);
  }
}

TEST(DeltaBands, WelchSatterthwaiteDofGrowsWithTheKnownShareAndSetsTheQuantile) {
  // nu_eff = nu (1 + v_known / v_fit)^2 (Satterthwaite, 1946, Biometrics
  // Bulletin 2(6), 110-114; Welch, 1947, Biometrika 34 [both from memory]).
  EXPECT_DOUBLE_EQ(WelchSatterthwaiteDof(1.0, 9.0, 0.0), 9.0);
  EXPECT_DOUBLE_EQ(WelchSatterthwaiteDof(1.0, 9.0, 1.0), 36.0);
  EXPECT_TRUE(std::isinf(WelchSatterthwaiteDof(1.0, std::numeric_limits<double>::infinity(), 1.0)));
  // t(9), 95 % two-sided: 2.262 (standard tables).
  EXPECT_NEAR(TwoSidedT(0.95, 9.0), 2.2622, 1e-4);

  const ConstantCurve c(10.0, 0.5, true);  // scaled: fit part has 9 dof
  BandRequest r = c.Request(37.0, 1.0);
  const DeltaResult ws = ComputeDeltaBands(r);
  ASSERT_TRUE(ws.computed);
  const double nu = 9.0 * std::pow(1.0 + ws.alpha_var_grain[0] / ws.alpha_var_fit[0], 2);
  EXPECT_NEAR(ws.alpha_dof[0], nu, 1e-9 * nu);
  // The interpolated quantile matches Boost's exact one.
  EXPECT_NEAR(ws.alpha_quantile[0], TwoSidedT(0.95, nu), 1e-10);
  EXPECT_NEAR(ws.k_quantile, TwoSidedT(0.95, 9.0), 1e-12);

  r.options.delta_quantile = DeltaQuantile::kStudentT;
  EXPECT_NEAR(ComputeDeltaBands(r).alpha_quantile[0], TwoSidedT(0.95, 9.0), 1e-12);
  r.options.delta_quantile = DeltaQuantile::kNormal;
  EXPECT_NEAR(ComputeDeltaBands(r).alpha_quantile[0], 1.959964, 1e-6);
}

TEST(DeltaBands, InterpolatedQuantileMatchesExactOverTheWholeDofRange) {
  std::mt19937_64 rng(3);
  for (int n : {5, 8, 12, 20}) {
    const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, n, 0.02, rng);
    ASSERT_TRUE(s.fit.IsUsable());
    std::vector<double> grid;
    for (int i = 0; i < 60; ++i) grid.push_back(0.5 + 2.0 * i);
    // Sweep sigma_K_s so the K_s share (hence nu_eff) covers (0, 1).
    for (double sks : {0.01, 0.3, 1.0, 3.0, 10.0}) {
      const BandRequest r = RequestFor(s, 37e9, sks * 1e9, grid);
      const DeltaResult d = ComputeDeltaBands(r);
      ASSERT_TRUE(d.computed);
      for (size_t i = 0; i < grid.size(); ++i)
        ASSERT_NEAR(d.alpha_quantile[i], TwoSidedT(0.95, d.alpha_dof[i]), 1e-9)
            << "n " << n << " nu " << d.alpha_dof[i];
    }
  }
}

TEST(DeltaBands, PredictionAndSimultaneousBandsAreWiderThanConfidence) {
  std::mt19937_64 rng(5);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 12, 0.02, rng);
  const BandRequest r = RequestFor(s, 37e9, 1e9, {2.0, 30.0, 60.0});
  const DeltaResult d = ComputeDeltaBands(r);
  ASSERT_TRUE(d.computed);
  for (size_t i = 0; i < 3; ++i) {
    const double hw = d.k_confidence.upper[i] - d.k_confidence.estimate[i];
    EXPECT_GT(d.k_prediction.upper[i] - d.k_prediction.estimate[i], hw);
    EXPECT_GT(d.k_simultaneous.upper[i] - d.k_simultaneous.estimate[i], hw);
    // Noise at P: relative sigma (2 % of each reading) times K(P) times s.
    EXPECT_NEAR(d.noise_sigma[i], 0.02 * d.k_confidence.estimate[i] * std::sqrt(s.fit.chi2_reduced),
                0.02 * 0.05 * d.k_confidence.estimate[i]);
  }
  // Working–Hotelling for p = 3, nu = 9: sqrt(3 F_{0.95}(3, 9)) = sqrt(3 * 3.8625) (F tables).
  EXPECT_NEAR(d.k_simultaneous_quantile, std::sqrt(3 * 3.8625), 1e-3);
}

TEST(DeltaBands, UnusableFitIsAResultNotAnException) {
  ConstantCurve c(10.0, 0.5, false);
  c.fit.status = FitStatus::kMaxIterations;
  const BandResult b = ComputeBands(c.Request(37.0, 1.0));
  EXPECT_FALSE(b.computed);
  EXPECT_NE(b.message.find("max-iterations"), std::string::npos) << b.message;
  ConstantCurve bad(10.0, 0.5, false);
  EXPECT_THROW(ComputeBands(bad.Request(-1.0, 1.0)), InputError);
}

// ---------------------------------------------------------------- Monte Carlo

TEST(MonteCarloBands, AgreeWithTheDeltaMethodOnANearlyLinearProblem) {
  // A straight line with small noise: K is linear in the parameters and the
  // draws are normal, so the percentile band must match the delta band.
  std::mt19937_64 rng(17);
  const Sample s = Simulate("linear", {8.0, 0.15}, 40, 0.01, rng, 2.0, 60.0, false);
  ASSERT_TRUE(s.fit.IsUsable());
  BandRequest r = RequestFor(s, 37e9, 1e9, {5.0, 30.0, 55.0});
  r.options.monte_carlo_draws = 20000;
  r.options.monte_carlo_distribution = McDistribution::kNormal;
  r.options.delta_quantile = DeltaQuantile::kNormal;
  const DeltaResult d = ComputeDeltaBands(r);
  const MonteCarloResult mc = ComputeMonteCarloBands(r);
  ASSERT_TRUE(mc.computed) << mc.message;
  EXPECT_EQ(mc.rejected(), 0);
  for (size_t i = 0; i < 3; ++i) {
    const double dk = d.k_confidence.upper[i] - d.k_confidence.lower[i];
    EXPECT_NEAR(mc.k.upper[i] - mc.k.lower[i], dk, 0.03 * dk);
    const double da = d.alpha_confidence.upper[i] - d.alpha_confidence.lower[i];
    EXPECT_NEAR(mc.alpha.upper[i] - mc.alpha.lower[i], da, 0.03 * da);
    EXPECT_NEAR(mc.alpha.estimate[i], d.alpha_confidence.estimate[i], 0.05 * da);
  }
}

TEST(MonteCarloBands, AreIdenticalForAnyThreadCountAndCountRejectedDraws) {
  std::mt19937_64 rng(19);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 8, 0.03, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  // K_s = 2 +- 2 GPa: about 16 % of the K_s draws are <= 0 and must be counted.
  BandRequest r = RequestFor(s, 2e9, 2e9, {2.0, 20.0, 60.0});
  r.options.monte_carlo_draws = 3000;
  const MonteCarloResult one = ComputeMonteCarloBands(r);
  r.options.threads = 2;
  const MonteCarloResult two = ComputeMonteCarloBands(r);
  ASSERT_TRUE(one.computed);
  EXPECT_EQ(one.k.lower, two.k.lower);
  EXPECT_EQ(one.alpha.upper, two.alpha.upper);
  EXPECT_EQ(one.rejected_grain, two.rejected_grain);
  EXPECT_NEAR(one.rejected_grain / 3000.0, 0.1587, 0.03);
  EXPECT_EQ(one.accepted + one.rejected(), one.draws);
  const BandResult all = [&] {
    BandRequest q = r;
    q.options.bootstrap = false;
    return ComputeBands(q);
  }();
  bool noted = false;
  for (const auto& n : all.notes) noted = noted || n.find("draws rejected") != std::string::npos;
  EXPECT_TRUE(noted);
}

TEST(MonteCarloBands, AreTheType7PercentilesOfTheReproducedDraws) {
  // K = K_0 with K_0 ~ N(10, 0.5^2) GPa: each draw i is 10 + 0.5 z_i from
  // stream (seed, Monte Carlo, i), whose first normal is z_i (the second is
  // the K_s draw). Rebuilding the draws here and taking numpy-style (type 7)
  // percentiles of the sorted values must give the band exactly.
  const ConstantCurve c(10.0, 0.5, false);
  BandRequest r = c.Request(37.0, 0.0);
  r.options.monte_carlo_draws = 1001;
  r.options.monte_carlo_distribution = McDistribution::kNormal;
  const MonteCarloResult mc = ComputeMonteCarloBands(r);
  ASSERT_TRUE(mc.computed) << mc.message;
  std::vector<double> k;
  for (int d = 0; d < 1001; ++d) {
    Stream s(r.options.seed, 1, static_cast<std::uint64_t>(d));
    k.push_back(10e9 + 0.5e9 * s.Normal());
  }
  std::sort(k.begin(), k.end());
  auto type7 = [&](double q) {
    const double h = 1000 * q;
    const auto lo = static_cast<size_t>(std::floor(h));
    return k[lo] + (h - static_cast<double>(lo)) * (k[lo + 1] - k[lo]);
  };
  for (size_t g = 0; g < 2; ++g) {
    EXPECT_NEAR(mc.k.lower[g], type7(0.025), 1e-6 * 1e9);
    EXPECT_NEAR(mc.k.estimate[g], k[500], 1e-6 * 1e9);
    EXPECT_NEAR(mc.k.upper[g], type7(0.975), 1e-6 * 1e9);
    EXPECT_NEAR(mc.alpha.lower[g], 1 - type7(0.975) / 37e9, 1e-12);
  }
}

// ---------------------------------------------------------------- bootstrap

TEST(BootstrapBands, AreReproducibleAndIdenticalForOneAndTwoThreads) {
  std::mt19937_64 rng(23);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 15, 0.02, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  for (BootstrapKind kind : {BootstrapKind::kResidual, BootstrapKind::kWild}) {
    BandRequest r = RequestFor(s, 37e9, 1e9, {2.0, 10.0, 30.0, 60.0, 70.0});
    r.options.bootstrap_replicates = 400;
    r.options.bootstrap_kind = kind;
    const BootstrapResult a = ComputeBootstrapBands(r);
    const BootstrapResult b = ComputeBootstrapBands(r);
    r.options.threads = 2;
    const BootstrapResult c = ComputeBootstrapBands(r);
    ASSERT_TRUE(a.computed) << a.message;
    EXPECT_EQ(a.k.lower, b.k.lower);
    EXPECT_EQ(a.alpha.upper, b.alpha.upper);
    EXPECT_EQ(a.k.lower, c.k.lower);
    EXPECT_EQ(a.k.upper, c.k.upper);
    EXPECT_EQ(a.alpha.lower, c.alpha.lower);
    EXPECT_EQ(a.failed(), c.failed());
    r.options.seed += 1;
    const BootstrapResult d = ComputeBootstrapBands(r);
    EXPECT_NE(a.k.lower, d.k.lower);
    // Sanity: the band brackets the plug-in curve; the residual bootstrap's is
    // of the delta band's size (the wild band at a high-leverage end rests on
    // that one point's residual and may be much narrower at n = 15).
    const DeltaResult dl = ComputeDeltaBands(r);
    for (size_t i = 0; i < 4; ++i) {
      EXPECT_LT(a.k.lower[i], dl.k_confidence.estimate[i]);
      EXPECT_GT(a.k.upper[i], dl.k_confidence.estimate[i]);
      const double w = a.k.upper[i] - a.k.lower[i];
      const double wd = dl.k_confidence.upper[i] - dl.k_confidence.lower[i];
      if (kind == BootstrapKind::kWild) continue;
      EXPECT_GT(w, 0.5 * wd) << " P#" << i;
      EXPECT_LT(w, 2.0 * wd) << " P#" << i;
    }
  }
}

TEST(BootstrapBands, ReportProgressOncePerRefitWithoutChangingTheBands) {
  std::mt19937_64 rng(37);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 12, 0.02, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  BandRequest r = RequestFor(s, 37e9, 1e9, {5.0, 30.0});
  r.options.bootstrap_replicates = 120;
  r.options.threads = 2;
  const BootstrapResult quiet = ComputeBootstrapBands(r);
  std::mutex mu;
  std::vector<size_t> seen;
  r.bootstrap_progress = [&](size_t done, size_t total) {
    std::lock_guard<std::mutex> lock(mu);
    EXPECT_EQ(total, 120u);
    seen.push_back(done);
  };
  const BootstrapResult heard = ComputeBootstrapBands(r);
  ASSERT_TRUE(heard.computed) << heard.message;
  EXPECT_EQ(heard.k.lower, quiet.k.lower);
  EXPECT_EQ(heard.alpha.upper, quiet.alpha.upper);
  // Each count 1..120 exactly once (two threads may report out of order).
  ASSERT_EQ(seen.size(), 120u);
  std::sort(seen.begin(), seen.end());
  for (size_t i = 0; i < seen.size(); ++i) EXPECT_EQ(seen[i], i + 1);
}

TEST(BootstrapBands, CountFailedRefitsAndExcludeThem) {
  std::mt19937_64 rng(29);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 10, 0.03, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  // Built to fail: refits limited to 2 solver iterations from the warm start.
  // Some replicates converge within them, the rest stop at the limit.
  FitRequest limited = s.request;
  limited.options.max_iterations = 2;
  BandRequest r = RequestFor(s, 37e9, 1e9, {5.0, 30.0});
  r.fit_request = &limited;
  r.options.bootstrap_replicates = 300;
  const BootstrapResult b = ComputeBootstrapBands(r);
  EXPECT_GT(b.failed_status, 0);
  EXPECT_EQ(b.succeeded + b.failed(), 300);
  if (b.succeeded > 0) {
    EXPECT_TRUE(b.computed);
    EXPECT_LT(b.k.lower[0], b.k.upper[0]);
  }
  // One iteration cannot converge from a perturbed start: every refit fails.
  limited.options.max_iterations = 1;
  limited.options.function_tolerance = 0;
  limited.options.gradient_tolerance = 0;
  limited.options.parameter_tolerance = 0;
  BandRequest r1 = r;
  r1.options.refit_tolerance = 1e-300;
  const BootstrapResult none = ComputeBootstrapBands(r1);
  EXPECT_FALSE(none.computed);
  EXPECT_EQ(none.failed_status, 300);
  EXPECT_EQ(none.message, "every bootstrap refit failed");

  // A grid where the model is undefined fails every replicate on the curve.
  std::mt19937_64 rng2(31);
  const Sample pr = Simulate("power-ref", {15.0, 0.25, 20.0}, 10, 0.02, rng2);
  ASSERT_TRUE(pr.fit.IsUsable());
  BandRequest rp = RequestFor(pr, 37e9, 1e9, {-1.0, 10.0});
  rp.options.bootstrap_replicates = 100;
  const BootstrapResult und = ComputeBootstrapBands(rp);
  EXPECT_EQ(und.failed_curve, 100);
}

// ---------------------------------------------------------------- flags and derived properties

TEST(PointFlags, FireAtTheGridPointsThatViolateEachBound) {
  std::mt19937_64 rng(37);
  const Sample s = Simulate("exp-modulus", {20.0, 8.0, 10.0}, 12, 0.01, rng);
  ASSERT_TRUE(s.fit.IsUsable());
  // K_s = 18 GPa: K(P) crosses K_s at high P (K_inf = 20), so alpha < 0 there.
  BandRequest r = RequestFor(s, 18e9, 0.5e9, {0.0, 1.0, 10.0, 30.0, 60.0, 90.0});
  r.porosity = 0.2;
  r.mu_s = 44e9;
  r.options.monte_carlo = false;
  r.options.bootstrap = false;
  const BandResult b = ComputeBands(r);
  ASSERT_TRUE(b.computed);
  for (size_t i = 0; i < b.flags.size(); ++i) {
    const PointFlags& f = b.flags[i];
    const double k = b.k[i], a = b.alpha[i];
    EXPECT_EQ(f.extrapolated, r.grid.pressure[i] < 2e6 || r.grid.pressure[i] > 60e6) << i;
    EXPECT_EQ(f.k_dry_not_below_k_s, k >= 18e9) << i;
    EXPECT_EQ(f.alpha_below_porosity, a < 0.2) << i;
    EXPECT_FALSE(f.alpha_above_one);
    const double hs = poro::BiotLowerBoundHashinShtrikman(0.2, 18e9, 44e9);
    EXPECT_DOUBLE_EQ(f.hs_limit, hs);
    EXPECT_EQ(f.alpha_below_hs_limit, a < hs) << i;
  }
  // The fixtures really exercise both sides of each flag.
  EXPECT_TRUE(b.flags.front().extrapolated);
  EXPECT_FALSE(b.flags[2].extrapolated);
  EXPECT_FALSE(b.flags[1].k_dry_not_below_k_s);
  EXPECT_TRUE(b.flags.back().k_dry_not_below_k_s);
  EXPECT_FALSE(b.flags[0].alpha_below_porosity);
  EXPECT_TRUE(b.flags[4].alpha_below_porosity);
  // Nothing clipped: alpha stays negative where K > K_s.
  EXPECT_LT(b.alpha.back(), 0.0);
}

TEST(DerivedBands, MatchPoroFormulasAndPropagateKAndKsUncertainty) {
  // Check value 4 [computed; docs/check-values.md]: K 10, K_s 37, K_f 2.25, phi 0.2 ->
  // M 9.6894, K_u 15.1596, B 0.46641.
  const ConstantCurve c(10.0, 0.5, false);
  BandRequest r = c.Request(37.0, 1.0);
  r.porosity = 0.2;
  r.fluid_modulus = 2.25e9;
  r.options.monte_carlo = false;
  r.options.bootstrap = false;
  const BandResult b = ComputeBands(r);
  ASSERT_TRUE(b.biot_modulus.computed) << b.biot_modulus.message;
  EXPECT_NEAR(b.biot_modulus.confidence.estimate[0], 9.6894e9, 1e5);
  EXPECT_NEAR(b.undrained_modulus.confidence.estimate[0], 15.1596e9, 1e5);
  EXPECT_NEAR(b.skempton.confidence.estimate[0], 0.46641, 1e-5);
  // Standard errors against central differences of porofit::poro's formulas.
  auto m_of = [](double k, double ks) {
    return poro::BiotModulus(poro::BiotCoefficient(k, ks), 0.2, ks, 2.25e9);
  };
  auto ku_of = [&](double k, double ks) {
    return poro::UndrainedBulkModulus(k, poro::BiotCoefficient(k, ks), m_of(k, ks));
  };
  auto b_of = [&](double k, double ks) {
    return poro::SkemptonCoefficient(poro::BiotCoefficient(k, ks), m_of(k, ks), ku_of(k, ks));
  };
  auto se = [](auto f) {
    const double h = 1e3;
    const double dk = (f(10e9 + h, 37e9) - f(10e9 - h, 37e9)) / (2 * h);
    const double dks = (f(10e9, 37e9 + h) - f(10e9, 37e9 - h)) / (2 * h);
    return std::sqrt(dk * dk * 0.25e18 + dks * dks * 1e18);
  };
  EXPECT_NEAR(b.biot_modulus.se[0], se(m_of), 1e-5 * se(m_of));
  EXPECT_NEAR(b.undrained_modulus.se[0], se(ku_of), 1e-5 * se(ku_of));
  EXPECT_NEAR(b.skempton.se[0], se(b_of), 1e-5 * se(b_of));
  // Without a fluid modulus nothing is derived, and the result says why.
  r.fluid_modulus = std::numeric_limits<double>::quiet_NaN();
  const BandResult nb = ComputeBands(r);
  EXPECT_FALSE(nb.skempton.computed);
  EXPECT_EQ(nb.skempton.message, "needs porosity and fluid modulus");
}

TEST(BandResult, StatesTheKsCorrelationWithItsShare) {
  const ConstantCurve c(10.0, 0.5, false);
  BandRequest r = c.Request(37.0, 1.0);
  r.options.monte_carlo = false;
  r.options.bootstrap = false;
  const BandResult b = ComputeBands(r);
  ASSERT_FALSE(b.notes.empty());
  EXPECT_NE(b.notes[0].find("fully correlated across pressures"), std::string::npos) << b.notes[0];
  EXPECT_NE(b.notes[0].find("22.6"), std::string::npos) << b.notes[0];
}

}  // namespace
}  // namespace porofit::bands

// power-offset on saturating (exponential-shaped) data: the best fit lies at
// the P_r -> 0 limit (the model turns into power-ref), where the solver would
// otherwise creep along ln P_r until its iteration limit. Data are
// SYNTHETIC, seeded, drawn as bench/batch_bench.cc draws its samples.
#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace porofit {
namespace {

const ModelSpec& Model(const std::string& id) {
  const ModelSpec* m = ModelRegistry::Builtin().Find(id);
  if (m == nullptr) throw std::runtime_error("no built-in model " + id);
  return *m;
}

// The first `count` samples of bench/batch_bench.cc's generator (seed
// 20261202): K = K_inf - (K_inf - K_0) exp(-P/P_c) + N(0, 0.15) GPa.
std::vector<FitData> BatchSamples(int count) {
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> noise(0.0, 0.15);
  std::vector<FitData> out;
  for (int i = 0; i < count; ++i) {
    (void)u(rng);  // porosity column
    const double kinf = 15 + 10 * u(rng), k0 = 3 + 4 * u(rng), pc = 4 + 8 * u(rng);
    const int points = 10 + i % 6;
    FitData d;
    for (int k = 0; k < points; ++k) {
      const double p = 2 + 58.0 * k / (points - 1);
      d.x.push_back(p * 1e6);
      d.y.push_back((kinf - (kinf - k0) * std::exp(-p / pc) + noise(rng)) * 1e9);
    }
    out.push_back(std::move(d));
  }
  return out;
}

FitRequest Request(const ModelSpec& m, const FitData& d, SolverChoice solver) {
  FitRequest req;
  req.model = &m;
  req.data = d;
  req.options.solver = solver;
  return req;
}

TEST(PowerOffsetDrift, SaturatingDataStopsAtTheLimitAndSaysSo) {
  const ModelSpec& m = Model("power-offset");
  for (SolverChoice solver : {SolverChoice::kAuto, SolverChoice::kCeres}) {
    for (const FitData& d : BatchSamples(6)) {
      const FitResult r = Fit(Request(m, d, solver));
      EXPECT_EQ(r.status, FitStatus::kAtLimit) << r.BriefReport();
      EXPECT_FALSE(r.IsUsable());
      EXPECT_LT(r.iterations, 250) << "the limit is reported long before the 500-iteration limit";
      EXPECT_TRUE(r.parameters[2].at_lower) << "P_r runs toward 0";
      EXPECT_NE(r.message.find("P_r ran monotonically"), std::string::npos) << r.message;
      EXPECT_NE(r.message.find("toward 0"), std::string::npos) << r.message;
      EXPECT_LT(r.parameters[2].estimate, 1e-3 * 1e6) << "P_r far below the lowest data pressure (2 MPa)";
    }
  }
}

TEST(PowerOffsetDrift, StartsAfterTwoAtTheSameLimitAreSkippedUnlessEveryStartIsAsked) {
  const ModelSpec& m = Model("power-offset");
  for (const FitData& d : BatchSamples(4)) {
    FitRequest skip = Request(m, d, SolverChoice::kAuto);
    FitRequest every = skip;
    every.options.skip_starts_at_same_limit = false;
    const FitResult a = Fit(skip), b = Fit(every);
    ASSERT_EQ(a.status, FitStatus::kAtLimit) << a.BriefReport();
    ASSERT_EQ(b.status, FitStatus::kAtLimit) << b.BriefReport();
    EXPECT_EQ(a.starts_tried, 2);
    EXPECT_EQ(b.starts_tried, 8);
    EXPECT_EQ(a.starts_converged, 0);
    EXPECT_EQ(b.starts_converged, 0) << "every start ends at the limit, so skipping loses no converged start";
    EXPECT_NE(a.message.find("the other 6 start(s) were skipped"), std::string::npos) << a.message;
    EXPECT_EQ(b.message.find("skipped"), std::string::npos) << b.message;
    EXPECT_TRUE(a.parameters[2].at_lower);
    EXPECT_TRUE(b.parameters[2].at_lower);
  }
}

TEST(PowerOffsetDrift, WellPosedPowerOffsetStillConvergesToTheSameEstimates) {
  const ModelSpec& m = Model("power-offset");
  const double theta[3] = {9.0, 0.25, 5.0};  // invented truth (GPa, 1, MPa)
  std::mt19937_64 rng(7);
  std::normal_distribution<double> noise(0.0, 0.05);
  FitData d;
  for (int k = 0; k < 15; ++k) {
    const double p = 2 + 58.0 * k / 14;
    d.x.push_back(p * 1e6);
    d.y.push_back((m.value(theta, p) + noise(rng)) * 1e9);
  }
  const FitResult a = Fit(Request(m, d, SolverChoice::kAuto));
  const FitResult c = Fit(Request(m, d, SolverChoice::kCeres));
  ASSERT_EQ(a.status, FitStatus::kConverged) << a.message;
  ASSERT_EQ(c.status, FitStatus::kConverged) << c.message;
  for (int j = 0; j < 3; ++j) {
    EXPECT_NEAR(a.parameters[j].estimate, c.parameters[j].estimate, 1e-7 * std::abs(c.parameters[j].estimate));
    EXPECT_NEAR(a.parameters[j].std_error, c.parameters[j].std_error, 1e-6 * c.parameters[j].std_error);
  }
  EXPECT_NEAR(a.parameters[2].estimate / 1e6, 5.0, 2.0);
}

// The compact solver's answers against the Ceres path, and the Eigen
// covariance at the compact answer against ceres::Covariance.
TEST(CompactSolver, AgreesWithCeresOnTheCatalogueAndItsCovarianceWithCeresCovariance) {
  struct Case {
    const char* id;
    std::vector<double> theta;
  };
  // Invented, typical values (as tests/fit/fit_test.cc).
  const std::vector<Case> cases = {{"exp-modulus", {20.0, 8.0, 10.0}},
                                   {"exp-compliance", {0.05, 0.2, 10.0}},
                                   {"linear-exp", {18.0, 0.05, 10.0, 0.1}},
                                   {"linear", {8.0, 0.15}}};
  std::mt19937_64 rng(11);
  std::normal_distribution<double> noise(0.0, 1.0);
  for (const Case& cs : cases) {
    const ModelSpec& m = Model(cs.id);
    for (int rep = 0; rep < 3; ++rep) {
      FitData d;
      for (int k = 0; k < 15; ++k) {
        const double p = 2 + 58.0 * k / 14;
        const double y = m.value(cs.theta.data(), p);
        d.x.push_back(p * 1e6);
        d.y.push_back((y + 0.01 * std::abs(y) * noise(rng)) * 1e9);
      }
      FitRequest compact = Request(m, d, SolverChoice::kCompact), ceres = Request(m, d, SolverChoice::kCeres);
      compact.options.multistart = ceres.options.multistart = 1;
      FitRequest compact_ceres_cov = compact;
      compact_ceres_cov.options.covariance_backend = CovarianceBackend::kCeres;
      const FitResult a = Fit(compact), b = Fit(ceres), ac = Fit(compact_ceres_cov);
      ASSERT_EQ(a.status, FitStatus::kConverged) << cs.id << ": " << a.message;
      ASSERT_EQ(b.status, FitStatus::kConverged) << cs.id << ": " << b.message;
      EXPECT_EQ(a.message.rfind("compact solver", 0), 0u) << a.message;
      EXPECT_NEAR(a.ssr, b.ssr, 1e-10 * b.ssr) << cs.id;
      for (size_t j = 0; j < a.parameters.size(); ++j)
        EXPECT_NEAR(a.parameters[j].estimate, b.parameters[j].estimate,
                    1e-6 * a.parameters[j].std_error + 1e-12 * std::abs(b.parameters[j].estimate))
            << cs.id << " " << a.parameters[j].name;
      ASSERT_EQ(ac.covariance_method, "ceres-dense-svd");
      const Eigen::Index p = a.covariance.rows();
      for (Eigen::Index i = 0; i < p; ++i)
        for (Eigen::Index k = 0; k < p; ++k)
          EXPECT_NEAR(a.covariance(i, k), ac.covariance(i, k),
                      1e-10 * std::sqrt(ac.covariance(i, i) * ac.covariance(k, k)))
              << cs.id;
    }
  }
}

}  // namespace
}  // namespace porofit

// Joint fits with shared parameters: recovery, covariance, equivalence with a
// plain fit, and the joint-against-separate F test. All data are synthetic
// (exp-modulus, seeded noise); invented for these tests.
#include "porofit/fit/joint.h"

#include <gtest/gtest.h>

#include <Eigen/LU>

#include <cmath>
#include <random>

#include "porofit/bands/bands.h"
#include "porofit/compare/joint_vs_separate.h"
#include "porofit/models/registry.h"

namespace porofit {
namespace {

const ModelSpec& ExpModulus() { return *ModelRegistry::Builtin().Find("exp-modulus"); }

// K(P) = K_inf - (K_inf - K_0) exp(-P/P_close), SI, with 1 % Gaussian noise
// and sigma_i = 1 % of the true K (relative weights).
FitData Synthetic(double k_inf, double k_0, double p_close, std::uint64_t seed, int n = 14) {
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> z(0.0, 1.0);
  FitData d;
  for (int i = 0; i < n; ++i) {
    const double p = (2.0 + 58.0 * i / (n - 1)) * 1e6;
    const double k = k_inf - (k_inf - k_0) * std::exp(-p / p_close);
    d.x.push_back(p);
    d.y.push_back(k * (1 + 0.01 * z(rng)));
    d.sigma.push_back(0.01 * k);
  }
  return d;
}

// Four plugs of one facies: one closure pressure, different moduli.
JointFitRequest Facies(const std::vector<double>& p_close, std::uint64_t seed) {
  const double k_inf[] = {20e9, 25e9, 15e9, 30e9};
  const double k_0[] = {8e9, 12e9, 6e9, 14e9};
  JointFitRequest r;
  r.model = &ExpModulus();
  for (size_t k = 0; k < 4; ++k) {
    r.datasets.push_back(Synthetic(k_inf[k], k_0[k], p_close[k], seed + 17 * k));
    r.labels.push_back("S" + std::to_string(k + 1));
  }
  r.shared = {"P_close"};
  return r;
}

double SeOf(const FitResult& f, const std::string& name) {
  for (const auto& q : f.parameters)
    if (q.name == name) return q.std_error;
  return NAN;
}
double EstimateOf(const FitResult& f, const std::string& name) {
  for (const auto& q : f.parameters)
    if (q.name == name) return q.estimate;
  return NAN;
}

TEST(JointFit, RecoversSharedClosurePressureWithSmallerErrorThanSeparateFits) {
  const JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 101);
  const JointFitResult r = FitJoint(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  EXPECT_EQ(r.n, 56);
  EXPECT_EQ(r.p, 1 + 4 * 2);
  EXPECT_EQ(r.dof, 56 - 9);
  ASSERT_TRUE(r.covariance_ok);
  ASSERT_EQ(r.coordinates.front().label, "P_close");
  const double pc = r.coordinates.front().estimate, se = r.coordinates.front().std_error;
  EXPECT_LT(std::abs(pc - 12e6), 3 * se) << pc << " +- " << se;
  EXPECT_LT(std::abs(pc - 12e6), 0.1 * 12e6);
  ASSERT_EQ(r.datasets.size(), 4u);
  for (size_t k = 0; k < 4; ++k) {
    // Every view carries the shared estimate and its joint standard error.
    EXPECT_EQ(EstimateOf(r.datasets[k], "P_close"), pc);
    EXPECT_EQ(SeOf(r.datasets[k], "P_close"), se);
    EXPECT_EQ(r.datasets[k].free_index, (std::vector<int>{0, 1, 2}));
    EXPECT_EQ(r.datasets[k].dof, r.dof);
    const FitResult sep = Fit(SeparateRequest(req, k));
    ASSERT_EQ(sep.status, FitStatus::kConverged);
    EXPECT_LT(se, SeOf(sep, "P_close")) << "data set " << k;
  }
  // The views' SSRs add up to the pooled SSR.
  double sum = 0;
  for (const auto& v : r.datasets) sum += v.ssr;
  EXPECT_NEAR(sum, r.ssr, 1e-12 * r.ssr);
}

// Independent check: the weighted Jacobian of the stacked problem by central
// differences in SI parameters (P_close, then K_inf, K_0 of each plug), and
// Cov = s^2 (J^T J)^-1 with s^2 = SSR/(N - p).
TEST(JointFit, CovarianceEqualsStackedFiniteDifferenceComputation) {
  const JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 202);
  const JointFitResult r = FitJoint(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  const int p = r.p;
  Eigen::VectorXd theta(p);
  for (int c = 0; c < p; ++c) theta(c) = r.coordinates[static_cast<size_t>(c)].estimate;
  auto residuals = [&](const Eigen::VectorXd& t) {
    Eigen::VectorXd out(r.n);
    int i = 0;
    for (size_t k = 0; k < req.datasets.size(); ++k) {
      const double k_inf = t(1 + 2 * static_cast<Eigen::Index>(k)), k_0 = t(2 + 2 * static_cast<Eigen::Index>(k));
      const FitData& d = req.datasets[k];
      for (size_t q = 0; q < d.x.size(); ++q, ++i)
        out(i) = (d.y[q] - (k_inf - (k_inf - k_0) * std::exp(-d.x[q] / t(0)))) / d.sigma[q];
    }
    return out;
  };
  ASSERT_EQ(r.coordinates[1].label, "K_inf[S1]");
  ASSERT_EQ(r.coordinates[2].label, "K_0[S1]");
  Eigen::MatrixXd J(r.n, p);
  for (int c = 0; c < p; ++c) {
    const double h = 1e-6 * std::abs(theta(c));
    Eigen::VectorXd a = theta, b = theta;
    a(c) += h;
    b(c) -= h;
    J.col(c) = (residuals(a) - residuals(b)) / (2 * h);
  }
  const double ssr = residuals(theta).squaredNorm();
  EXPECT_NEAR(ssr, r.ssr, 1e-10 * ssr);
  const Eigen::MatrixXd cov = ssr / (r.n - p) * (J.transpose() * J).inverse();
  for (int a = 0; a < p; ++a)
    for (int b = 0; b < p; ++b) {
      const double scale = std::sqrt(cov(a, a) * cov(b, b));
      EXPECT_NEAR(r.covariance(a, b), cov(a, b), 1e-6 * scale) << a << "," << b;
    }
}

TEST(JointFit, SharingEveryParameterOfDuplicatedDataEqualsPlainFitOnConcatenatedData) {
  const FitData d = Synthetic(22e9, 9e9, 10e6, 303);
  JointFitRequest req;
  req.model = &ExpModulus();
  req.datasets = {d, d};
  req.shared = {"K_inf", "K_0", "P_close"};
  const JointFitResult j = FitJoint(req);
  FitRequest plain;
  plain.model = req.model;
  for (int rep = 0; rep < 2; ++rep) {
    plain.data.x.insert(plain.data.x.end(), d.x.begin(), d.x.end());
    plain.data.y.insert(plain.data.y.end(), d.y.begin(), d.y.end());
    plain.data.sigma.insert(plain.data.sigma.end(), d.sigma.begin(), d.sigma.end());
  }
  const FitResult f = Fit(plain);
  ASSERT_EQ(j.status, FitStatus::kConverged) << j.message;
  ASSERT_EQ(f.status, FitStatus::kConverged) << f.message;
  ASSERT_EQ(j.p, f.p);
  EXPECT_EQ(j.n, f.n);
  EXPECT_NEAR(j.ssr, f.ssr, 1e-8 * f.ssr);
  EXPECT_NEAR(j.aicc, f.aicc, 1e-8 * std::abs(f.aicc));
  EXPECT_NEAR(j.bic, f.bic, 1e-8 * std::abs(f.bic));
  for (int c = 0; c < j.p; ++c) {
    const auto& q = f.parameters[static_cast<size_t>(f.free_index[static_cast<size_t>(c)])];
    EXPECT_EQ(j.coordinates[static_cast<size_t>(c)].name, q.name);
    EXPECT_NEAR(j.coordinates[static_cast<size_t>(c)].estimate, q.estimate, 1e-8 * std::abs(q.estimate)) << q.name;
    EXPECT_NEAR(j.coordinates[static_cast<size_t>(c)].std_error, q.std_error, 1e-8 * q.std_error) << q.name;
  }
}

// The band layer used on a view: the K standard error is the delta method on
// the view's covariance block (which holds the shared P_close variance), with
// the joint degrees of freedom, and it exceeds the conditional standard error
// with P_close known (Schur complement), i.e. the shared variance is in it.
TEST(JointFit, DeltaBandsOfAViewCarryTheSharedParameterVariance) {
  const JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 909);
  const JointFitResult r = FitJoint(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  const FitResult& view = r.datasets[1];
  const FitRequest fr = SeparateRequest(req, 1);
  bands::BandRequest br;
  br.fit_request = &fr;
  br.fit = &view;
  br.k_s = 37e9;
  br.grid.pressure = {5e6, 20e6, 40e6};
  br.grid.extrapolated = {false, false, false};
  br.grid.data_min = 2e6;
  br.grid.data_max = 60e6;
  const bands::DeltaResult d = bands::ComputeDeltaBands(br);
  ASSERT_TRUE(d.computed) << d.message;
  EXPECT_EQ(d.k_dof, r.dof);
  const bands::CurveGradient cg = bands::EvaluateCurve(view, ExpModulus(), br.grid.pressure);
  for (size_t i = 0; i < 3; ++i) {
    const Eigen::Map<const Eigen::VectorXd> g(cg.gradient[i].data(), 3);
    const double full = std::sqrt(g.dot(view.covariance * g));
    // P_close is the third free parameter: Cov(K_inf, K_0 | P_close) = C11 - C12 C21 / C22.
    const Eigen::MatrixXd& c = view.covariance;
    const Eigen::MatrixXd given = c.topLeftCorner(2, 2) - c.topRightCorner(2, 1) * c.bottomLeftCorner(1, 2) / c(2, 2);
    const Eigen::Vector2d g2 = g.head(2);
    EXPECT_NEAR(d.k_se[i], full, 1e-9 * full);
    const double known = std::sqrt(g2.dot(given * g2));
    EXPECT_GT(full, known) << "P = " << br.grid.pressure[i];
    if (i == 1) {  // near P_close the shared variance matters most (12 %, measured)
      EXPECT_GT(full, 1.05 * known);
    }
  }
}

TEST(JointVsSeparate, FTestRejectsClosurePressuresThatDiffer) {
  const JointFitRequest req = Facies({5e6, 10e6, 18e6, 30e6}, 404);
  const JointFitResult j = FitJoint(req);
  ASSERT_EQ(j.status, FitStatus::kConverged) << j.message;
  const compare::JointVsSeparate c = compare::CompareJointWithSeparate(req, j);
  ASSERT_TRUE(c.computed) << c.reason;
  EXPECT_EQ(c.f_test.df1, 3);
  EXPECT_EQ(c.f_test.df2, 56 - 12);
  EXPECT_EQ(c.p_separate, 12);
  EXPECT_TRUE(c.f_test.reject);
  EXPECT_LT(c.f_test.p_value, 1e-6);
  EXPECT_EQ(c.decision, "shared rejected");
  EXPECT_EQ(c.aicc_prefers, "separate");
}

TEST(JointVsSeparate, FTestAcceptsACommonClosurePressure) {
  const JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 505);
  const JointFitResult j = FitJoint(req);
  ASSERT_EQ(j.status, FitStatus::kConverged) << j.message;
  const compare::JointVsSeparate c = compare::CompareJointWithSeparate(req, j);
  ASSERT_TRUE(c.computed) << c.reason;
  EXPECT_FALSE(c.f_test.reject) << "F = " << c.f_test.f << ", p = " << c.f_test.p_value;
  EXPECT_EQ(c.decision, "shared accepted");
  EXPECT_GE(c.rss_joint, c.rss_separate * (1 - 1e-12));  // the restriction cannot fit better
  EXPECT_EQ(c.k_joint, 10);                              // 9 + the common variance
  EXPECT_EQ(c.k_separate, 13);
  EXPECT_EQ(c.aicc_prefers, "joint");
}

TEST(JointFit, UnknownSharedParameterIsAnInvalidRequestWithSuggestion) {
  JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 606);
  req.shared = {"P_clos"};
  const JointFitResult r = FitJoint(req);
  EXPECT_EQ(r.status, FitStatus::kInvalidRequest);
  EXPECT_NE(r.message.find("did you mean 'P_close'"), std::string::npos) << r.message;
}

TEST(JointFit, RobustLossIsAnInvalidRequest) {
  JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 707);
  req.options.loss = RobustLoss::kHuber;
  EXPECT_EQ(FitJoint(req).status, FitStatus::kInvalidRequest);
}

TEST(JointFit, TooFewPooledPointsIsAStatus) {
  JointFitRequest req;
  req.model = &ExpModulus();
  req.datasets = {Synthetic(20e9, 8e9, 10e6, 1, 2), Synthetic(20e9, 8e9, 10e6, 2, 2)};
  req.shared = {"P_close"};
  EXPECT_EQ(FitJoint(req).status, FitStatus::kTooFewPoints);  // 4 points, 5 parameters
}

TEST(JointFit, FixedSharedParameterHoldsItsValueInEveryView) {
  JointFitRequest req = Facies({12e6, 12e6, 12e6, 12e6}, 808);
  ParameterSetting s;
  s.fixed = 11e6;
  req.settings["P_close"] = s;
  const JointFitResult r = FitJoint(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  EXPECT_EQ(r.p, 8);
  for (const auto& v : r.datasets) {
    EXPECT_EQ(EstimateOf(v, "P_close"), 11e6);
    EXPECT_EQ(SeOf(v, "P_close"), 0.0);
    EXPECT_EQ(v.free_index, (std::vector<int>{0, 1}));
  }
}

}  // namespace
}  // namespace porofit

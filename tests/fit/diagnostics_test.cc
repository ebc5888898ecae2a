// Residual diagnostics and FitOptions validation.
#include <gtest/gtest.h>

#include <cmath>

#include "porofit/fit/diagnostics.h"
#include "porofit/fit/fit_options.h"
#include "porofit/fit/fit_result.h"

namespace porofit {
namespace {

Eigen::VectorXd Vec(std::initializer_list<double> v) {
  Eigen::VectorXd out(static_cast<Eigen::Index>(v.size()));
  Eigen::Index i = 0;
  for (double x : v) out(i++) = x;
  return out;
}

TEST(DurbinWatson, AlternatingResidualsGiveThree) {
  // Check value 19 [computed; docs/check-values.md]: residuals (1, -1, 1, -1) give d = 3.0.
  EXPECT_DOUBLE_EQ(DurbinWatson(Vec({1, -1, 1, -1})), 3.0);
}

TEST(DurbinWatson, ConstantResidualsGiveZeroAndAllZerosAreUndefined) {
  EXPECT_DOUBLE_EQ(DurbinWatson(Vec({2, 2, 2})), 0.0);
  EXPECT_TRUE(std::isnan(DurbinWatson(Vec({0, 0, 0}))));
  EXPECT_TRUE(std::isnan(DurbinWatson(Vec({1}))));
}

TEST(WaldWolfowitzRuns, CountsRunsOfAKnownSignPattern) {
  // + + - - - + - + +  -> runs: ++ | --- | + | - | ++ = 5; n+ = 5, n- = 4.
  const RunsTest t = WaldWolfowitzRuns(Vec({1, 2, -1, -3, -2, 0.5, -0.1, 4, 1}));
  EXPECT_EQ(t.runs, 5);
  EXPECT_EQ(t.n_positive, 5);
  EXPECT_EQ(t.n_negative, 4);
  // mu = 2*5*4/9 + 1 = 49/9; var = 2*5*4*(40 - 9)/(81*8) = 1240/648 (formula in diagnostics.h).
  const double mu = 49.0 / 9.0, var = 1240.0 / 648.0;
  EXPECT_NEAR(t.z, (5 - mu) / std::sqrt(var), 1e-12);
  EXPECT_NEAR(t.p, std::erfc(std::abs(t.z) / std::sqrt(2.0)), 1e-12);
}

TEST(WaldWolfowitzRuns, DropsZerosAndFlagsASingleSignAsUndefined) {
  const RunsTest t = WaldWolfowitzRuns(Vec({1, 0, 1, 0, -1}));
  EXPECT_EQ(t.runs, 2);
  EXPECT_EQ(t.n_positive, 2);
  const RunsTest one = WaldWolfowitzRuns(Vec({1, 2, 3}));
  EXPECT_EQ(one.runs, 1);
  EXPECT_TRUE(std::isnan(one.p));
}

TEST(WaldWolfowitzRuns, StrictAlternationIsSignificant) {
  Eigen::VectorXd e(20);
  for (int i = 0; i < 20; ++i) e(i) = i % 2 == 0 ? 1.0 : -1.0;
  const RunsTest t = WaldWolfowitzRuns(e);
  EXPECT_EQ(t.runs, 20);
  EXPECT_GT(t.z, 3.0);
  EXPECT_LT(t.p, 0.01);
}

TEST(Leverages, SumToTheNumberOfParametersAndStayInUnitInterval) {
  Eigen::MatrixXd J(6, 3);
  for (int i = 0; i < 6; ++i) {
    const double x = i + 1.0;
    J(i, 0) = 1;
    J(i, 1) = x;
    J(i, 2) = x * x * 1e6;  // badly scaled column: leverages do not depend on scaling
  }
  const Eigen::VectorXd h = Leverages(J);
  EXPECT_NEAR(h.sum(), 3.0, 1e-10);
  EXPECT_GE(h.minCoeff(), 0.0);
  EXPECT_LE(h.maxCoeff(), 1.0 + 1e-12);
  // Straight line through 2 points: each point has leverage 1.
  Eigen::MatrixXd L(2, 2);
  L << 1, 1, 1, 2;
  EXPECT_NEAR(Leverages(L)(0), 1.0, 1e-12);
}

TEST(Leverages, RankDeficientJacobianSumsToItsRank) {
  Eigen::MatrixXd J(5, 2);
  for (int i = 0; i < 5; ++i) J(i, 0) = J(i, 1) = i + 1.0;  // identical columns
  EXPECT_NEAR(Leverages(J).sum(), 1.0, 1e-10);
}

TEST(StudentizedResiduals, DivideByScaleSigmaAndLeverage) {
  const Eigen::VectorXd r = StudentizedResiduals(Vec({1.0, -2.0}), Vec({0.5, 1.0}), Vec({0.75, 1.0}), 2.0);
  EXPECT_DOUBLE_EQ(r(0), 1.0 / (2.0 * 0.5 * 0.5));
  EXPECT_TRUE(std::isnan(r(1)));
}

TEST(FitOptions, DefaultsAreValid) { EXPECT_EQ(FitOptions{}.Validate(), ""); }

TEST(FitOptions, EachRuleNamesFieldValueAndRule) {
  auto msg = [](auto mutate) {
    FitOptions o;
    mutate(o);
    return o.Validate();
  };
  EXPECT_EQ(msg([](FitOptions& o) { o.loss_scale = 0; }), "fit.loss_scale = 0 violates loss_scale > 0");
  EXPECT_EQ(msg([](FitOptions& o) { o.multistart = 0; }), "fit.multistart = 0 violates multistart >= 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.start_spread = -1; }), "fit.start_spread = -1 violates start_spread > 0");
  EXPECT_EQ(msg([](FitOptions& o) { o.max_iterations = 0; }), "fit.max_iterations = 0 violates max_iterations >= 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.function_tolerance = -1; }),
            "fit.function_tolerance = -1 violates 0 <= function_tolerance < 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.gradient_tolerance = 2; }),
            "fit.gradient_tolerance = 2 violates 0 <= gradient_tolerance < 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.parameter_tolerance = 1; }),
            "fit.parameter_tolerance = 1 violates 0 <= parameter_tolerance < 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.min_reciprocal_condition = 0; }),
            "fit.min_reciprocal_condition = 0 violates 0 < min_reciprocal_condition < 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.correlation_threshold = 1.5; }),
            "fit.correlation_threshold = 1.5 violates 0 < correlation_threshold <= 1");
  EXPECT_EQ(msg([](FitOptions& o) { o.closure_range_factor = 0.5; }),
            "fit.closure_range_factor = 0.5 violates closure_range_factor >= 1");
}

TEST(FitOptions, EnumsHaveNames) {
  EXPECT_EQ(ToString(RobustLoss::kNone), "none");
  EXPECT_EQ(ToString(RobustLoss::kHuber), "huber");
  EXPECT_EQ(ToString(RobustLoss::kCauchy), "cauchy");
  EXPECT_EQ(ToString(CovarianceBackend::kEigen), "eigen");
  EXPECT_EQ(ToString(FitStatus::kConverged), "converged");
  EXPECT_EQ(ToString(FitStatus::kTooFewPoints), "too-few-points");
  EXPECT_EQ(ToString(FitStatus::kInvalidRequest), "invalid-request");
}

}  // namespace
}  // namespace porofit

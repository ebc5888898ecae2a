// Catalogue-wide derivative checks: every registered model's exact gradient,
// pressure slope and closed-form strain against finite differences.
#include <ceres/cost_function.h>
#include <ceres/gradient_checker.h>
#include <ceres/manifold.h>
#include <ceres/numeric_diff_options.h>
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "model_cases.h"
#include "porofit/models/registry.h"

namespace porofit {
namespace {

// One residual r = K(theta; P): lets ceres::GradientChecker compare the
// model's exact gradient with its own finite differences. One block per
// parameter, so the checker's report names each parameter's entry.
class ModelValueCost : public ceres::CostFunction {
 public:
  ModelValueCost(const ModelSpec& spec, double p) : spec_(spec), p_(p) {
    set_num_residuals(1);
    for (size_t j = 0; j < spec.num_parameters(); ++j) mutable_parameter_block_sizes()->push_back(1);
  }
  bool Evaluate(double const* const* parameters, double* residuals,
                double** jacobians) const override {
    const size_t n = spec_.num_parameters();
    std::vector<double> theta(n), grad(n);
    for (size_t j = 0; j < n; ++j) theta[j] = parameters[j][0];
    residuals[0] = spec_.value_and_gradient(theta.data(), p_, grad.data());
    if (jacobians != nullptr)
      for (size_t j = 0; j < n; ++j)
        if (jacobians[j] != nullptr) jacobians[j][0] = grad[j];
    return std::isfinite(residuals[0]);
  }

 private:
  const ModelSpec& spec_;
  double p_;
};

std::string TestName(const ::testing::TestParamInfo<std::string>& info) {
  std::string s = info.param;
  for (char& c : s)
    if (c == '-') c = '_';
  return s;
}

class EveryModel : public ::testing::TestWithParam<std::string> {
 protected:
  const ModelSpec& spec() const { return *ModelRegistry::Builtin().Find(GetParam()); }
};

TEST_P(EveryModel, HasTestParameterSetsOfTheRightSize) {
  const auto& sets = testing::ParameterSets(GetParam());
  ASSERT_FALSE(sets.empty()) << "add parameter sets for " << GetParam() << " to model_cases.h";
  for (const auto& th : sets) EXPECT_EQ(th.size(), spec().num_parameters());
}

TEST_P(EveryModel, GradientMatchesCeresGradientChecker) {
  // GradientChecker differentiates by Ridders' extrapolation. Its first step
  // is not relative to small parameters (measured: 0.32 with the default
  // options for C_0 = 0.2/GPa, which crosses the pole of K = 1/C), so start
  // far smaller. Its own pass/fail is relative per entry, which fails
  // spuriously on entries negligible against K (exp(-P/P_close) ~ 1e-11 at
  // P >> P_close), so each entry is judged here against
  // max(|dK/dtheta_j|, 1e-3 |K|/|theta_j|).
  ceres::NumericDiffOptions nd;
  nd.ridders_relative_initial_step_size = 1e-6;
  const std::vector<const ceres::Manifold*>* euclidean = nullptr;
  int probes = 0, strict_passes = 0;
  for (const auto& th : testing::ParameterSets(GetParam())) {
    for (double p : testing::ProbePressures()) {
      ModelValueCost cost(spec(), p);
      ceres::GradientChecker checker(&cost, euclidean, nd);
      ceres::GradientChecker::ProbeResults r;
      std::vector<const double*> blocks;
      for (const double& t : th) blocks.push_back(&t);
      if (checker.Probe(blocks.data(), 1e-7, &r)) ++strict_passes;
      ASSERT_TRUE(r.return_value) << GetParam() << " at P = " << p;
      const double k = std::abs(r.residuals(0));
      for (size_t j = 0; j < th.size(); ++j) {
        const double user = r.jacobians[j](0, 0);
        const double num = r.numeric_jacobians[j](0, 0);
        const double scale = std::max(std::abs(user), 1e-3 * k / std::max(std::abs(th[j]), 1e-12));
        EXPECT_NEAR(user, num, 1e-7 * scale)
            << GetParam() << " at P = " << p << ", d/d" << spec().parameters[j].name << "\n"
            << r.error_log;
      }
      ++probes;
    }
  }
  EXPECT_EQ(probes, 18);
  // Most probes must also pass Ceres's own per-entry relative test.
  EXPECT_GE(strict_passes, 12) << GetParam();
}

TEST_P(EveryModel, ValueAndGradientAgreesWithValue) {
  for (const auto& th : testing::ParameterSets(GetParam())) {
    for (double p : testing::ProbePressures()) {
      std::vector<double> g(spec().num_parameters());
      EXPECT_DOUBLE_EQ(spec().value_and_gradient(th.data(), p, g.data()), spec().value(th.data(), p));
    }
  }
}

TEST_P(EveryModel, SlopeMatchesCentralDifference) {
  for (const auto& th : testing::ParameterSets(GetParam())) {
    for (double p : testing::ProbePressures()) {
      const double h = 1e-4 * p;
      // Fourth-order central difference: error O(h^4), far below the tolerance.
      const auto k = [&](double q) { return spec().value(th.data(), q); };
      const double fd = (-k(p + 2 * h) + 8 * k(p + h) - 8 * k(p - h) + k(p - 2 * h)) / (12 * h);
      const double exact = spec().slope(th.data(), p);
      EXPECT_NEAR(exact, fd, 1e-7 * std::max(1.0, std::abs(exact))) << GetParam() << " P=" << p;
    }
  }
}

TEST_P(EveryModel, StrainDerivativeIsComplianceAndStrainStartsAtZero) {
  ASSERT_TRUE(static_cast<bool>(spec().strain)) << "every built-in model has a strain (linear-exp by quadrature)";
  for (const auto& th : testing::ParameterSets(GetParam())) {
    EXPECT_NEAR(spec().strain(th.data(), 0.0), 0.0, 1e-15) << GetParam();
    for (double p : testing::ProbePressures()) {
      const double h = 1e-4 * p;
      const auto e = [&](double q) { return spec().strain(th.data(), q); };
      const double deps = (-e(p + 2 * h) + 8 * e(p + h) - 8 * e(p - h) + e(p - 2 * h)) / (12 * h);
      const double compliance = 1.0 / spec().value(th.data(), p);
      EXPECT_NEAR(deps, compliance, 1e-7 * compliance) << GetParam() << " P=" << p;
      EXPECT_GT(e(p), 0.0) << "compression-positive strain grows from 0";
    }
  }
}

TEST_P(EveryModel, GradientAtZeroPressureIsFiniteWhereTheModelIsDefined) {
  if (spec().requires_positive_x) {
    const auto& th = testing::ParameterSets(GetParam()).front();
    EXPECT_FALSE(std::isfinite(spec().value(th.data(), 0.0))) << "documented as undefined at 0";
    return;
  }
  for (const auto& th : testing::ParameterSets(GetParam())) {
    std::vector<double> g(spec().num_parameters());
    const double k0 = spec().value_and_gradient(th.data(), 0.0, g.data());
    EXPECT_TRUE(std::isfinite(k0));
    for (size_t j = 0; j < g.size(); ++j) {
      std::vector<double> up = th, dn = th;
      const double h = 1e-6 * std::max(1.0, std::abs(th[j]));
      up[j] += h;
      dn[j] -= h;
      const double fd = (spec().value(up.data(), 0.0) - spec().value(dn.data(), 0.0)) / (2 * h);
      EXPECT_NEAR(g[j], fd, 1e-6 * std::max(1.0, std::abs(fd))) << GetParam() << " j=" << j;
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Catalogue, EveryModel,
                         ::testing::ValuesIn(ModelRegistry::Builtin().ids()), TestName);

}  // namespace
}  // namespace porofit

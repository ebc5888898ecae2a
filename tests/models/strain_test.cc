// Strain forms: exact strain derivatives, the quadrature rule, the strain-form
// fit model and the strain check values of docs/check-values.md.
#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

#include "model_cases.h"
#include "porofit/models/registry.h"
#include "porofit/models/strain_form.h"

namespace porofit {
namespace {

class EveryStrain : public ::testing::TestWithParam<std::string> {
 protected:
  const ModelSpec& spec() const { return *ModelRegistry::Builtin().Find(GetParam()); }
};

TEST_P(EveryStrain, HasAStrainFormWithItsMethodNamed) {
  EXPECT_TRUE(HasStrainForm(spec()));
  EXPECT_EQ(spec().strain_method, GetParam() == "linear-exp" ? "gauss-legendre" : "closed form");
}

TEST_P(EveryStrain, StrainGradientMatchesCentralDifferences) {
  for (const auto& th : testing::ParameterSets(GetParam())) {
    for (double p : testing::ProbePressures()) {
      const size_t n = spec().num_parameters();
      std::vector<double> g(n);
      const double e = spec().strain_and_gradient(th.data(), p, g.data());
      EXPECT_NEAR(e, spec().strain(th.data(), p), 1e-14 * std::abs(e));  // Jet and double may differ in rounding
      for (size_t j = 0; j < n; ++j) {
        // Fourth-order central difference in theta_j.
        const double h = 1e-4 * std::max(1e-2, std::abs(th[j]));
        auto at = [&](double d) {
          std::vector<double> t = th;
          t[j] += d;
          return spec().strain(t.data(), p);
        };
        const double fd = (-at(2 * h) + 8 * at(h) - 8 * at(-h) + at(-2 * h)) / (12 * h);
        EXPECT_NEAR(g[j], fd, 1e-7 * std::max(std::abs(fd), std::abs(e) / std::max(1e-2, std::abs(th[j]))))
            << GetParam() << " P=" << p << " j=" << j;
      }
    }
  }
}

TEST_P(EveryStrain, StrainAndGradientAreZeroAtZeroPressure) {
  for (const auto& th : testing::ParameterSets(GetParam())) {
    std::vector<double> g(spec().num_parameters(), 1.0);
    EXPECT_EQ(spec().strain_and_gradient(th.data(), 0.0, g.data()), 0.0) << GetParam();
    for (double v : g) EXPECT_EQ(v, 0.0) << GetParam();
  }
}

TEST_P(EveryStrain, StrainFormKeepsTheParametersAndEvaluatesStrainInMillistrain) {
  const ModelSpec s = StrainForm(spec());
  EXPECT_EQ(s.id, spec().id);
  ASSERT_EQ(s.num_parameters(), spec().num_parameters());
  for (size_t j = 0; j < s.num_parameters(); ++j) {
    EXPECT_EQ(s.parameters[j].name, spec().parameters[j].name);
    EXPECT_EQ(s.parameters[j].lower, spec().parameters[j].lower);
    EXPECT_EQ(s.parameters[j].upper, spec().parameters[j].upper);
    EXPECT_EQ(s.parameters[j].transform, spec().parameters[j].transform);
    EXPECT_EQ(s.parameters[j].fixed_by_default, spec().parameters[j].fixed_by_default);
  }
  EXPECT_EQ(s.y_unit, "millistrain");
  EXPECT_DOUBLE_EQ(s.y_si_factor, 1e-3);
  const auto& th = testing::ParameterSets(GetParam()).front();
  for (double p : testing::ProbePressures()) {
    EXPECT_DOUBLE_EQ(s.value(th.data(), p), spec().strain(th.data(), p));
    EXPECT_DOUBLE_EQ(s.slope(th.data(), p), 1.0 / spec().value(th.data(), p));
  }
}

TEST_P(EveryStrain, StrainStartFromNoiselessStrainIsInsideTheBoundsAndNearTheTruth) {
  const ModelSpec s = StrainForm(spec());
  for (const auto& th : testing::ParameterSets(GetParam())) {
    std::vector<double> x, y;
    for (double p : {2.0, 5.0, 10.0, 15.0, 20.0, 30.0, 40.0, 60.0}) {
      x.push_back(p);
      y.push_back(s.value(th.data(), p));
    }
    const std::vector<double> start = s.start(x, y);
    ASSERT_EQ(start.size(), th.size());
    for (size_t j = 0; j < th.size(); ++j) {
      EXPECT_TRUE(std::isfinite(start[j]));
      EXPECT_GT(start[j], s.parameters[j].lower);
      EXPECT_LT(start[j], s.parameters[j].upper);
    }
    // A start, not a fit: the modulus it implies is within a factor 2 of the
    // truth at the middle of the data (chord moduli are close to tangents there).
    if (!s.parameters.back().fixed_by_default) {
      const double k_true = spec().value(th.data(), 20.0), k_start = spec().value(start.data(), 20.0);
      EXPECT_GT(k_start, 0.5 * k_true) << GetParam();
      EXPECT_LT(k_start, 2.0 * k_true) << GetParam();
    }
  }
}

INSTANTIATE_TEST_SUITE_P(Catalogue, EveryStrain, ::testing::ValuesIn(ModelRegistry::Builtin().ids()),
                         [](const auto& param_info) {
                           std::string s = param_info.param;
                           for (char& c : s)
                             if (c == '-') c = '_';
                           return s;
                         });

// The rule integrates polynomials of degree 15 exactly on each panel; the
// panels are cubic in the pressure, so test on 1/k = polynomial directly.
TEST(GaussLegendreStrain, IntegratesLowDegreePolynomialComplianceExactly) {
  for (int degree = 0; degree <= 5; ++degree) {
    // 1/k(q) = (q/10)^degree: the cubic grading maps each panel affinely, so
    // any polynomial of degree <= 15 in q is exact.
    const auto k = [degree](double q) { return 1.0 / (1.0 + std::pow(q / 10.0, degree)); };
    const double p = 37.0;
    const double exact = p + 10.0 * std::pow(p / 10.0, degree + 1) / (degree + 1);
    EXPECT_NEAR(GaussLegendreStrain<double>(k, p), exact, 1e-13 * exact) << degree;
  }
}

TEST(GaussLegendreStrain, AgreesWithTheExpModulusClosedForm) {
  const ModelSpec& m1 = *ModelRegistry::Builtin().Find("exp-modulus");
  // {K_inf, K_0, P_close}: K_0/K_inf >= 0.05, P/P_close up to 1500.
  const std::vector<std::vector<double>> sets = {{20, 8, 10}, {30, 10, 3}, {20, 2, 1}, {20, 1, 0.3}, {20, 2, 0.1}};
  for (const auto& th : sets) {
    for (double p : {0.3, 5.0, 30.0, 75.0, 150.0}) {
      const double exact = m1.strain(th.data(), p);
      const double rule = GaussLegendreStrain<double>([&](double q) { return m1.value(th.data(), q); }, p);
      const double tol = p / th[2] <= 50 ? 1e-12 : 5e-9;
      EXPECT_NEAR(rule, exact, tol * exact) << "P_close=" << th[2] << " P=" << p;
    }
  }
}

TEST(GaussLegendreStrain, IsUndefinedWhereTheModulusIsNotPositive) {
  EXPECT_TRUE(std::isnan(GaussLegendreStrain<double>([](double q) { return q - 1.0; }, 5.0)));
  EXPECT_TRUE(std::isnan(GaussLegendreStrain<double>([](double) { return 1.0; }, -1.0)));
  EXPECT_EQ(GaussLegendreStrain<double>([](double) { return 1.0; }, 0.0), 0.0);
}

// Check value 12 [computed; docs/check-values.md]: M1 with K_inf 20, K_0 8 GPa,
// P* 10 MPa, through the strain-form model (millistrain).
TEST(StrainForm, ExpModulusReproducesCheckValue12) {
  const ModelSpec& m1 = *ModelRegistry::Builtin().Find("exp-modulus");
  const ModelSpec s = StrainForm(m1);
  const double th[] = {20, 8, 10};
  const double eps10 = s.value(th, 10) * s.y_si_factor;  // plain strain
  EXPECT_NEAR(eps10, 8.3345e-4, 5e-9);
  EXPECT_NEAR(10e6 / eps10 / 1e9, 11.998, 5e-4);  // secant modulus, GPa
  EXPECT_NEAR(1.0 / s.slope(th, 10), 15.5854, 5e-5);  // tangent = 1/(d eps/dP), GPa
  EXPECT_NEAR(1.0 / s.slope(th, 30), 19.4026, 5e-5);
  // Crack-closing rock: secant below tangent at every pressure (check 12's statement).
  for (double p : {1.0, 5.0, 10.0, 30.0, 60.0}) EXPECT_LT(p / s.value(th, p), m1.value(th, p)) << p;
}

// Check value 13 [computed; docs/check-values.md]: M2 with C_inf 0.05, C_0 0.2 /GPa, P* 10 MPa.
TEST(StrainForm, ExpComplianceReproducesCheckValue13) {
  const ModelSpec s = StrainForm(*ModelRegistry::Builtin().Find("exp-compliance"));
  const double th[] = {0.05, 0.2, 10};
  EXPECT_NEAR(s.value(th, 10) * s.y_si_factor, 1.4482e-3, 5e-8);
  EXPECT_NEAR(s.value(th, 50) * s.y_si_factor, 3.9899e-3, 5e-8);
  EXPECT_NEAR(1.0 / s.slope(th, 10), 9.507, 5e-4);
}

// linear-exp with B = 0 is exp-modulus [computed], so its
// quadrature strain must match the closed form of exp-modulus.
TEST(StrainForm, LinearExpQuadratureMatchesExpModulusAtBZero) {
  const ModelSpec& m1 = *ModelRegistry::Builtin().Find("exp-modulus");
  const ModelSpec& m3 = *ModelRegistry::Builtin().Find("linear-exp");
  const double th1[] = {20, 8, 10};
  const double th3[] = {20, 0, 12, 0.1};  // A = K_inf, C = K_inf - K_0, D = 1/P*
  for (double p : {0.5, 5.0, 20.0, 60.0})
    EXPECT_NEAR(m3.strain(th3, p), m1.strain(th1, p), 1e-12 * m1.strain(th1, p)) << p;
}

}  // namespace
}  // namespace porofit

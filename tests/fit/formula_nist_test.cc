// Formula models through porofit::Fit on every NIST StRD nonlinear-regression
// file in tests/data/nist (17 problems). Each model is written in the formula
// syntax (lib/models/include/porofit/models/expression.h) as the file prints
// it, with x as the x symbol, y as the response and b1.. as dimensionless
// parameters (x_unit = y_unit = "1"), and fitted from Start 1 and Start 2
// only (no heuristic, no perturbation). Scored by the log relative error
// LRE = -log10(|estimate - certified| / |certified|): estimates >= 6,
// standard errors >= 4, residual sum of squares >= 6 (pass criteria of the
// StRD accuracy studies, tests/data/nist/README.md). Every certified number is
// read from the file the case names: "NIST StRD <file>, certified values".
#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>
#include <string>
#include <vector>

#include "nist_reader.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/expression.h"

namespace porofit {
namespace {

double Lre(double estimate, double certified) {
  const double err = std::abs(estimate - certified) / std::abs(certified);
  if (err == 0) return 15.0;
  return std::isnan(err) ? 0.0 : -std::log10(err);
}

struct FormulaCase {
  const char* file;     // NIST StRD <file>, certified values
  const char* formula;  // the file's model statement in the formula syntax
  std::vector<std::string> log_parameters = {};  // solved as ln(b) (lower bound 0)
  bool nelson = false;  // two predictors and a log(y) response, see below
  std::vector<std::string> positive_parameters = {};  // declared with lower bound 0
};

// (file index, start 1 or 2, solver): every file on the Ceres path (the default)
// and on the compact solver (FitOptions::solver), the same certified gates.
class NistFormula : public ::testing::TestWithParam<std::tuple<int, int, SolverChoice>> {};

const std::vector<FormulaCase>& Cases() {
  static const std::vector<FormulaCase> cases = {
      // BoxBOD from Start 1 (b1 = b2 = 1) needs b2 solved as ln b2 and the
      // bound b1 >= 0 (the asymptote of a growth curve), as the built-in
      // exp-modulus has it; without the bound Start 1 ends far from the
      // certified minimum (measured: RSS LRE -0.87, SSR about 8 times the
      // certified 1168.0).
      {"BoxBOD", "y = b1*(1-exp[-b2*x])", {"b2"}, false, {"b1"}},
      {"Chwirut1", "y = exp[-b1*x]/(b2+b3*x)"},
      {"Chwirut2", "y = exp(-b1*x)/(b2+b3*x)"},
      {"DanWood", "y = b1*x**b2"},
      {"ENSO",
       "y = b1 + b2*cos( 2*pi*x/12 ) + b3*sin( 2*pi*x/12 )"
       "   + b5*cos( 2*pi*x/b4 ) + b6*sin( 2*pi*x/b4 )"
       "   + b8*cos( 2*pi*x/b7 ) + b9*sin( 2*pi*x/b7 )"},
      {"Gauss1",
       "y = b1*exp( -b2*x ) + b3*exp( -(x-b4)**2 / b5**2 )"
       "   + b6*exp( -(x-b7)**2 / b8**2 )"},
      {"Hahn1", "y = (b1+b2*x+b3*x**2+b4*x**3) / (1+b5*x+b6*x**2+b7*x**3)"},
      {"Kirby2", "y = (b1 + b2*x + b3*x**2) / (1 + b4*x + b5*x**2)"},
      {"Lanczos3", "y = b1*exp(-b2*x) + b3*exp(-b4*x) + b5*exp(-b6*x)"},
      {"MGH10", "y = b1 * exp[b2/(x+b3)]"},
      {"Misra1a", "y = b1*(1-exp[-b2*x])"},
      {"Misra1b", "y = b1 * (1-(1+b2*x/2)**(-2))"},
      {"Misra1c", "y = b1 * (1-(1+2*b2*x)**(-.5))"},
      {"Misra1d", "y = b1*b2*x*((1+b2*x)**(-1))"},
      // Nelson: log[y] = b1 - b2*x1 * exp[-b3*x2]. The response is the natural
      // log of the file's y (the certified values and RSS are for that model),
      // so the test feeds log(y) as the data and names the response log_y. The
      // two predictors are bound as data columns x1, x2 (FormulaOptions::
      // columns); the engine's x is then the row index.
      {"Nelson", "log_y = b1 - b2*x1 * exp[-b3*x2]", {}, true},
      {"Rat42", "y = b1 / (1+exp[b2-b3*x])"},
      // The file defines pi to 31 digits; the syntax's pi is the double nearest to it.
      {"Roszman1", "y =  b1 - b2*x - arctan[b3/(x-b4)]/pi"},
  };
  return cases;
}

TEST(NistFormulaCases, CoverEveryFileOfTheReferenceFolder) {
  EXPECT_EQ(Cases().size(), 17u);  // tests/data/nist/README.md lists 17 files
}

TEST_P(NistFormula, MatchesCertifiedValuesFromStart) {
  const auto [index, start, solver] = GetParam();
  const FormulaCase& c = Cases()[static_cast<size_t>(index)];
  SCOPED_TRACE(std::string("NIST StRD ") + c.file + ", certified values");  // the source of every check below
  testing::NistProblem p =
      testing::ReadNist(std::string(POROFIT_TEST_DATA_DIR) + "/nist/" + c.file + ".dat", c.file);
  const std::vector<double>& s = start == 1 ? p.start1 : p.start2;
  std::vector<FormulaParameter> params;
  for (size_t k = 0; k < s.size(); ++k) {
    FormulaParameter q;
    q.name = "b" + std::to_string(k + 1);
    q.unit = "1";
    q.start = s[k];
    if (std::find(c.log_parameters.begin(), c.log_parameters.end(), q.name) != c.log_parameters.end()) {
      q.transform = ParameterTransform::kLog;
      q.lower = 0.0;
    }
    if (std::find(c.positive_parameters.begin(), c.positive_parameters.end(), q.name) !=
        c.positive_parameters.end())
      q.lower = 0.0;
    params.push_back(q);
  }
  FormulaOptions options;
  options.x_symbol = "x";
  options.y_symbol = "y";
  options.x_unit = options.y_unit = "1";
  options.x_si_factor = options.y_si_factor = 1.0;
  FitRequest req;
  if (c.nelson) {
    ASSERT_EQ(p.x.size(), 2u);
    options.y_symbol = "log_y";
    options.columns = {{"x1", p.x[0]}, {"x2", p.x[1]}};
    for (size_t i = 0; i < p.y.size(); ++i) {
      req.data.x.push_back(static_cast<double>(i));
      req.data.y.push_back(std::log(p.y[i]));
    }
  } else {
    ASSERT_EQ(p.x.size(), 1u);
    req.data.x = p.x[0];
    req.data.y = p.y;
  }
  const ModelSpec spec = MakeFormulaModel(c.file, c.formula, params, options);
  EXPECT_EQ(spec.x_unit, "1");
  EXPECT_EQ(spec.y_si_factor, 1.0);
  req.model = &spec;
  req.extra_starts = {s};
  req.only_extra_starts = true;
  req.options.solver = solver;
  const FitResult r = Fit(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.BriefReport();
  double lre_est = std::numeric_limits<double>::infinity(), lre_se = lre_est;
  for (size_t k = 0; k < p.certified.size(); ++k) {
    lre_est = std::min(lre_est, Lre(r.parameters[k].estimate, p.certified[k]));
    lre_se = std::min(lre_se, Lre(r.parameters[k].std_error, p.certified_sd[k]));
  }
  const double lre_rss = Lre(r.ssr, p.rss);
  std::printf("[nist-formula] %-9s start %d %-7s LRE estimates %5.2f  std errors %5.2f  RSS %5.2f\n", c.file,
              start, std::string(ToString(solver)).c_str(), lre_est, lre_se, lre_rss);
  EXPECT_GE(lre_est, 6.0) << r.BriefReport();
  EXPECT_GE(lre_se, 4.0) << r.BriefReport();
  EXPECT_GE(lre_rss, 6.0) << r.BriefReport();
}

INSTANTIATE_TEST_SUITE_P(AllFiles, NistFormula,
                         ::testing::Combine(::testing::Range(0, 17), ::testing::Values(1, 2),
                                            ::testing::Values(SolverChoice::kCeres, SolverChoice::kCompact)),
                         [](const ::testing::TestParamInfo<std::tuple<int, int, SolverChoice>>& param_info) {
                           return std::string(Cases()[static_cast<size_t>(std::get<0>(param_info.param))].file) +
                                  "_Start" + std::to_string(std::get<1>(param_info.param)) +
                                  (std::get<2>(param_info.param) == SolverChoice::kCeres ? "_Ceres" : "_Compact");
                         });

}  // namespace
}  // namespace porofit

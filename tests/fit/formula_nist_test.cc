// Formula models through porofit::Fit on NIST StRD reference problems: the
// model is written in the formula syntax (x as P, b1.. as parameters) and
// fitted from Start 1 and Start 2 only. Scored by the log relative error
// LRE = -log10(|estimate - certified| / |certified|): estimates >= 6,
// standard errors >= 4 (pass criteria of the StRD accuracy studies,
// tests/data/nist/README.md). Certified numbers are read from the files:
// "NIST StRD <name> certified values".
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
  const char* file;
  const char* formula;
};

class NistFormula : public ::testing::TestWithParam<std::tuple<int, int>> {};

const std::vector<FormulaCase>& Cases() {
  static const std::vector<FormulaCase> cases = {
      {"Misra1a", "b1*(1 - exp(-b2*P))"},               // NIST StRD Misra1a certified values
      {"Misra1b", "b1 * (1 - (1 + b2*P/2)^(-2))"},      // NIST StRD Misra1b certified values
      {"Chwirut2", "exp(-b1*P)/(b2 + b3*P)"},           // NIST StRD Chwirut2 certified values
      {"Rat42", "K = b1 / (1 + exp(b2 - b3*P))"},       // NIST StRD Rat42 certified values
  };
  return cases;
}

TEST_P(NistFormula, MatchesCertifiedValuesFromStart) {
  const auto [index, start] = GetParam();
  const FormulaCase& c = Cases()[static_cast<size_t>(index)];
  const testing::NistProblem p =
      testing::ReadNist(std::string(POROFIT_TEST_DATA_DIR) + "/nist/" + c.file + ".dat", c.file);
  const std::vector<double>& s = start == 1 ? p.start1 : p.start2;
  std::vector<FormulaParameter> params;
  for (size_t k = 0; k < s.size(); ++k) {
    FormulaParameter q;
    q.name = "b" + std::to_string(k + 1);
    q.unit = "1";
    q.start = s[k];
    params.push_back(q);
  }
  ModelSpec spec = MakeFormulaModel(c.file, c.formula, params);
  spec.x_unit = spec.y_unit = "1";
  spec.x_si_factor = spec.y_si_factor = 1.0;

  FitRequest req;
  req.model = &spec;
  req.data.x = p.x[0];
  req.data.y = p.y;
  req.extra_starts = {s};
  req.only_extra_starts = true;
  const FitResult r = Fit(req);
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.BriefReport();
  double lre_est = std::numeric_limits<double>::infinity(), lre_se = lre_est;
  for (size_t k = 0; k < p.certified.size(); ++k) {
    lre_est = std::min(lre_est, Lre(r.parameters[k].estimate, p.certified[k]));
    lre_se = std::min(lre_se, Lre(r.parameters[k].std_error, p.certified_sd[k]));
  }
  std::printf("[nist-formula] %-9s start %d  LRE estimates %5.2f  std errors %5.2f  RSS %5.2f\n", c.file,
              start, lre_est, lre_se, Lre(r.ssr, p.rss));
  EXPECT_GE(lre_est, 6.0) << r.BriefReport();
  EXPECT_GE(lre_se, 4.0) << r.BriefReport();
  EXPECT_GE(Lre(r.ssr, p.rss), 6.0) << r.BriefReport();
}

INSTANTIATE_TEST_SUITE_P(Files, NistFormula,
                         ::testing::Combine(::testing::Range(0, 4), ::testing::Values(1, 2)),
                         [](const ::testing::TestParamInfo<std::tuple<int, int>>& param_info) {
                           return std::string(Cases()[static_cast<size_t>(std::get<0>(param_info.param))].file) +
                                  "_Start" + std::to_string(std::get<1>(param_info.param));
                         });

}  // namespace
}  // namespace porofit

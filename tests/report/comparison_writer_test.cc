// The comparison writers on a hand-built run: exact rows, units in headers,
// JSON sections.
#include <gtest/gtest.h>

#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "fixture.h"
#include "porofit/report/report.h"

namespace porofit {
namespace {

// The hand-built run with a hand-made comparison: exp-modulus ranked (weight
// 1), power-ref excluded (its fit failed), one pair not tested.
StudyRun RunWithComparison() {
  StudyRun run = testing::HandBuiltRun();
  compare::SampleComparison& c = run.samples[0].comparison;
  c.computed = true;
  compare::ModelScore a;
  a.model_id = "exp-modulus";
  a.included = true;
  a.n = 3;
  a.k = 3;
  a.aic = a.aicc = a.bic = -4.5;
  a.delta_aic = a.delta_aicc = a.delta_bic = 0;
  a.weight_aic = a.weight_aicc = a.weight_bic = 1;
  a.rank = 1;
  a.leave_one_out.reason = "not requested";
  a.holdout.computed = true;
  a.holdout.folds = 1;
  a.holdout.points_predicted = 1;
  a.holdout.rmse = 0.25e9;
  a.holdout.mean_error = -0.25e9;
  a.holdout.rms_standardized = 1;
  a.holdout.rank = 1;
  compare::ModelScore b;
  b.model_id = "power-ref";
  b.excluded_reason = "fit numerical-failure: no finite start";
  b.aic = b.aicc = b.bic = b.delta_aic = b.delta_aicc = b.delta_bic = std::nan("");
  b.weight_aic = b.weight_aicc = b.weight_bic = std::nan("");
  c.models = {a, b};
  compare::NestedTest t;
  t.restricted = "exp-modulus";
  t.fuller = "power-ref";
  t.reason = "no nesting declared between these models; compare with AICc";
  c.tests = {t};
  c.best = "exp-modulus";
  run.comparison_summary = SummarizeComparisons(run);
  return run;
}

std::string Data(const std::string& csv) {  // without the '#' preamble
  std::istringstream in(csv);
  std::string line, out;
  while (std::getline(in, line))
    if (!line.empty() && line[0] != '#') out += line + "\n";
  return out;
}

TEST(ComparisonCsv, HasOneRowPerSampleAndModelWithTheCriteria) {
  const StudyRun run = RunWithComparison();
  std::ostringstream s;
  WriteComparisonCsv(run, s);
  EXPECT_NE(s.str().find("# porofit"), std::string::npos);
  EXPECT_NE(s.str().find("predicted"), std::string::npos);
  const std::string d = Data(s.str());
  EXPECT_NE(d.find("holdout_rmse_GPa,holdout_mean_error_GPa,holdout_rms_standardized"), std::string::npos);
  EXPECT_NE(d.find("PLUG-1,\"sandstone, clean\",static,loading,1,exp-modulus,converged,true,,3,3,-4.5,-4.5,-4.5,0,0,0,"
                   "1,1,1,aicc,1,,,,0,0,,not requested,1,0.25,-0.25,1,1,0,1,1,\n"),
            std::string::npos)
      << d;
  EXPECT_NE(d.find("power-ref,too-few-points,false,fit numerical-failure: no finite start,,,,,,,,,,,,aicc,,"),
            std::string::npos)
      << d;
}

TEST(NestedTestsCsv, SaysWhyAPairIsNotTested) {
  std::ostringstream s;
  WriteNestedTestsCsv(RunWithComparison(), s);
  EXPECT_EQ(Data(s.str()),
            "sample,restricted,fuller,relation,restriction,tested,F,df1,df2,p_value,critical,level,decision,reason\n"
            "PLUG-1,exp-modulus,power-ref,not-declared,,false,,,,,,0.95,,no nesting declared between these models; "
            "compare with AICc\n");
}

TEST(ComparisonGroupsCsv, SummarisesTheGroup) {
  std::ostringstream s;
  WriteComparisonGroupsCsv(RunWithComparison(), s);
  const std::string d = Data(s.str());
  EXPECT_NE(d.find("lithology,\"sandstone, clean\",1,1,0,aicc,exp-modulus,1,1,1,,1,0\n"), std::string::npos) << d;
  EXPECT_NE(d.find("lithology,\"sandstone, clean\",1,1,0,aicc,power-ref,1,0,0,,,\n"), std::string::npos) << d;
}

TEST(ComparisonJson, AddsSampleAndSummarySections) {
  const StudyRun run = RunWithComparison();
  const nlohmann::ordered_json j = ResultsJson(run, {});
  EXPECT_GE(j["schema_version"], 3);  // 3 added the comparison sections
  const auto& c = j["samples"][0]["comparison"];
  EXPECT_EQ(c["best"], "exp-modulus");
  EXPECT_EQ(c["models"][0]["weight"]["aicc"], 1.0);
  EXPECT_TRUE(c["models"][1]["aicc"].is_null());
  EXPECT_EQ(c["models"][0]["high_pressure_holdout"]["rmse_GPa"], 0.25);
  EXPECT_EQ(c["nested_tests"][0]["tested"], false);
  EXPECT_EQ(j["comparison_summary"]["groups"][0]["models"][0]["wins"], 1);
}

TEST(ComparisonSummaryText, ShowsRankingAndGroupTable) {
  std::ostringstream s;
  WriteSummary(RunWithComparison(), s);
  EXPECT_NE(s.str().find("Ranking (AICc weight): 1. exp-modulus 1.00; not ranked: power-ref"), std::string::npos)
      << s.str();
  EXPECT_NE(s.str().find("Model comparison across samples (AICc, grouped by lithology)"), std::string::npos);
}

}  // namespace
}  // namespace porofit

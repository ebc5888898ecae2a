#include <gtest/gtest.h>

#include <sstream>
#include <string>

#include "fixture.h"
#include "porofit/report/report.h"

namespace porofit {
namespace {

std::string Summary(const StudyRun& run) {
  std::ostringstream s;
  WriteSummary(run, s);
  return s.str();
}

TEST(Summary, ShowsEachFitWithStatusParametersAndTheCaution) {
  const std::string s = Summary(testing::HandBuiltRun());
  EXPECT_NE(s.find(CautionText()), std::string::npos);
  EXPECT_NE(s.find("invented"), std::string::npos);
  EXPECT_NE(s.find("Sample PLUG-1"), std::string::npos);
  EXPECT_NE(s.find("K_inf = 20.00 ± 0.50 GPa"), std::string::npos) << s;  // rounded to the error's digits
  EXPECT_NE(s.find("P_close = 10.0 ± 2.0 MPa"), std::string::npos) << s;
  EXPECT_NE(s.find("exp-modulus    converged"), std::string::npos) << s;
  EXPECT_NE(s.find("power-ref      too-few-points"), std::string::npos) << s;
  EXPECT_NE(s.find("! 3 points for 2 free parameters"), std::string::npos) << s;
  EXPECT_NE(s.find("note: demo warning"), std::string::npos) << s;
  EXPECT_NE(s.find("1 samples, 2 fits (1 converged, 0 flagged)"), std::string::npos) << s;
}

TEST(Summary, TableColumnsLineUp) {
  const std::string s = Summary(testing::HandBuiltRun());
  std::istringstream in(s);
  size_t header_col = std::string::npos, row_col = std::string::npos;
  for (std::string line; std::getline(in, line);) {
    if (line.find("  model ") == 0) header_col = line.find("parameters (");
    if (line.find("  exp-modulus") == 0) row_col = line.find("K_inf =");
  }
  ASSERT_NE(header_col, std::string::npos);
  EXPECT_EQ(row_col, header_col) << s;
}

TEST(Summary, NamesTheLowestAiccModelAmongConvergedFits) {
  StudyRun run = testing::HandBuiltRun();
  FitResult second = run.samples[0].fits[0];
  second.model_id = "linear-exp";
  run.samples[0].fits[0].aicc = 4.0;
  second.aicc = 1.5;
  run.samples[0].fits.push_back(second);
  run.study.samples[0].models.push_back(run.study.samples[0].models[0]);
  const std::string s = Summary(run);
  EXPECT_NE(s.find("Lowest AICc: linear-exp (next exp-modulus, ΔAICc 2.50)."), std::string::npos) << s;
}

TEST(Summary, SaysWhenAiccCannotSeparateTwoModels) {
  StudyRun run = testing::HandBuiltRun();
  FitResult second = run.samples[0].fits[0];
  second.model_id = "exp-compliance";
  run.samples[0].fits[0].aicc = 3.0;
  second.aicc = 4.5;
  run.samples[0].fits.push_back(second);
  run.study.samples[0].models.push_back(run.study.samples[0].models[0]);
  const std::string s = Summary(run);
  EXPECT_NE(s.find("Lowest AICc: exp-modulus (next exp-compliance, ΔAICc 1.50: the data do not tell them apart)."),
            std::string::npos)
      << s;
}

TEST(Summary, StatesHowTheSampleWasWeighted) {
  StudyRun run = testing::HandBuiltRun();
  EXPECT_NE(Summary(run).find("weighted by sigma, SE rescaled by the scatter"), std::string::npos);
  run.study.samples[0].options.scale_covariance = false;
  EXPECT_NE(Summary(run).find("weighted by calibrated sigma, SE not rescaled"), std::string::npos);
  for (DataPoint& d : run.study.samples[0].sample.points) d.sigma = 0;
  EXPECT_NE(Summary(run).find("unweighted, SE from the scatter"), std::string::npos);
}

TEST(Summary, FlagsAppearInTheFlagsColumn) {
  StudyRun run = testing::HandBuiltRun();
  run.samples[0].fits[0].high_correlation = true;
  const std::string s = Summary(run);
  EXPECT_NE(s.find("high-correlation"), std::string::npos) << s;
  EXPECT_NE(s.find("1 flagged"), std::string::npos) << s;
}

}  // namespace
}  // namespace porofit

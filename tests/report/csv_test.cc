#include <gtest/gtest.h>

#include <sstream>
#include <string>
#include <vector>

#include "fixture.h"
#include "porofit/report/report.h"

namespace porofit {
namespace {

// Non-comment lines of a CSV text.
std::vector<std::string> DataLines(const std::string& csv) {
  std::vector<std::string> lines;
  std::istringstream in(csv);
  for (std::string l; std::getline(in, l);) {
    if (!l.empty() && l[0] != '#') lines.push_back(l);
  }
  return lines;
}

// Minimal RFC 4180 split of one line (quoted fields may hold commas and "").
std::vector<std::string> Split(const std::string& line) {
  std::vector<std::string> f(1);
  bool q = false;
  for (size_t i = 0; i < line.size(); ++i) {
    const char c = line[i];
    if (q) {
      if (c == '"' && i + 1 < line.size() && line[i + 1] == '"') {
        f.back() += '"';
        ++i;
      } else if (c == '"') {
        q = false;
      } else {
        f.back() += c;
      }
    } else if (c == '"') {
      q = true;
    } else if (c == ',') {
      f.emplace_back();
    } else {
      f.back() += c;
    }
  }
  return f;
}

std::string Render(void (*writer)(const StudyRun&, std::ostream&), const StudyRun& run) {
  std::ostringstream s;
  writer(run, s);
  return s.str();
}

TEST(ParametersCsv, HeaderHasAUnitColumnAndRowsAreInWorkingUnits) {
  const std::string csv = Render(WriteParametersCsv, testing::HandBuiltRun());
  const auto lines = DataLines(csv);
  ASSERT_EQ(lines.size(), 1u + 3u + 1u);  // header, 3 exp-modulus parameters, 1 power-ref parameter
  EXPECT_EQ(lines[0],
            "sample,lithology,kind,branch,cycle,model,status,parameter,unit,estimate,std_error,"
            "rel_std_error_percent,lower,upper,fixed,at_bound");
  const auto k_inf = Split(lines[1]);
  ASSERT_EQ(k_inf.size(), 16u);
  EXPECT_EQ(k_inf[0], "PLUG-1");
  EXPECT_EQ(k_inf[1], "sandstone, clean");
  EXPECT_EQ(k_inf[6], "converged");
  EXPECT_EQ(k_inf[7], "K_inf");
  EXPECT_EQ(k_inf[8], "GPa");
  EXPECT_EQ(k_inf[9], "20");     // 20e9 Pa shown in GPa
  EXPECT_EQ(k_inf[10], "0.5");
  EXPECT_EQ(k_inf[11], "2.5");   // 100 * 0.5 / 20
  EXPECT_EQ(k_inf[12], "0");
  EXPECT_EQ(k_inf[13], "inf");
  EXPECT_EQ(k_inf[14], "false");
  const auto p_close = Split(lines[3]);
  EXPECT_EQ(p_close[8], "MPa");
  EXPECT_EQ(p_close[9], "10");
  EXPECT_EQ(p_close[10], "2");
}

TEST(ParametersCsv, FailedFitHasBlankEstimates) {
  const auto lines = DataLines(Render(WriteParametersCsv, testing::HandBuiltRun()));
  const auto row = Split(lines[4]);
  EXPECT_EQ(row[5], "power-ref");
  EXPECT_EQ(row[6], "too-few-points");
  EXPECT_EQ(row[9], "");
  EXPECT_EQ(row[10], "");
  EXPECT_EQ(row[11], "");
}

TEST(FitsCsv, HeaderNamesTheUnitOfRmseAndFailedStatisticsAreBlank) {
  const auto lines = DataLines(Render(WriteFitsCsv, testing::HandBuiltRun()));
  ASSERT_EQ(lines.size(), 3u);
  EXPECT_EQ(lines[0],
            "sample,lithology,kind,branch,cycle,model,status,n,p,dof,ssr,ssr_unit,chi2_reduced,rmse_GPa,"
            "r_squared,aic,aicc,bic,max_abs_correlation,flags,message,iterations,starts,starts_converged");
  const auto ok = Split(lines[1]);
  ASSERT_EQ(ok.size(), 24u);
  EXPECT_EQ(ok[7], "3");
  EXPECT_EQ(ok[11], "1");       // weighted: SSR dimensionless
  EXPECT_EQ(ok[12], "");        // chi2_reduced NaN (dof 0)
  EXPECT_EQ(ok[13], "0.0123");  // 0.0123e9 Pa in GPa
  EXPECT_EQ(ok[16], "");        // AICc undefined
  EXPECT_EQ(ok[18], "0.8");
  EXPECT_EQ(ok[20], "function tolerance reached");
  const auto bad = Split(lines[2]);
  EXPECT_EQ(bad[6], "too-few-points");
  EXPECT_EQ(bad[13], "");
  EXPECT_EQ(bad[15], "");
  EXPECT_EQ(bad[20], "3 points for 2 free parameters");
}

TEST(FitsCsv, FlagsListTheRaisedIdentifiabilityFlags) {
  StudyRun run = testing::HandBuiltRun();
  FitResult& r = run.samples[0].fits[0];
  r.high_correlation = true;
  r.closure_outside_range = true;
  r.parameters[1].at_lower = true;
  const auto row = Split(DataLines(Render(WriteFitsCsv, run))[1]);
  EXPECT_EQ(row[19], "high-correlation;closure-outside-data;at-bound");
}

TEST(ResidualsCsv, HeaderCarriesUnitsAndValuesAreConverted) {
  const auto lines = DataLines(Render(WriteResidualsCsv, testing::HandBuiltRun()));
  ASSERT_EQ(lines.size(), 1u + 3u);  // the failed fit has no residuals
  EXPECT_EQ(lines[0],
            "sample,model,point,location,pressure_MPa,observed_K_GPa,fitted_K_GPa,sigma_K_GPa,residual_GPa,"
            "standardized_residual,leverage,robust_weight");
  const auto r2 = Split(lines[2]);
  EXPECT_EQ(r2[2], "2");
  EXPECT_EQ(r2[3], "demo/plug1.csv:3");
  EXPECT_EQ(r2[4], "10");
  EXPECT_EQ(r2[5], "15.5");
  EXPECT_EQ(r2[6], "15.52");
  EXPECT_EQ(r2[7], "0.25");
  EXPECT_NEAR(std::stod(r2[8]), -0.02, 1e-12);
  EXPECT_EQ(r2[9], "-1");
  EXPECT_EQ(r2[10], "0.6");
}

TEST(Csv, EveryTableOpensWithTheCautionAndTheInventedDataNotice) {
  for (auto writer : {WriteParametersCsv, WriteFitsCsv, WriteResidualsCsv}) {
    const std::string csv = Render(writer, testing::HandBuiltRun());
    ASSERT_EQ(csv.rfind("# porofit 9.9.9", 0), 0u);
    const std::string head = csv.substr(0, csv.find("\nsample,"));
    EXPECT_NE(head.find("# " + CautionText()), std::string::npos);
    EXPECT_NE(head.find("decision support only"), std::string::npos);
    EXPECT_NE(head.find("qualified"), std::string::npos);
    EXPECT_NE(head.find("local regulations and operator standards"), std::string::npos);
    EXPECT_NE(head.find("invented"), std::string::npos);
  }
}

TEST(Csv, NoInventedNoticeForAStudyThatDoesNotSayItIsInvented) {
  StudyRun run = testing::HandBuiltRun("Well 7 plugs", false);
  run.study.description = "lab programme";
  const std::string csv = Render(WriteFitsCsv, run);
  EXPECT_EQ(csv.find("NOTE: this study's data are invented"), std::string::npos);
  EXPECT_NE(csv.find("CAUTION"), std::string::npos);
}

// Regression: the notice followed the word "invented" in the name or
// description, so a real study saying "nothing here is invented" was stamped
// as invented. Only the declared key decides now.
TEST(Csv, InventedNoticeFollowsTheDeclaredKeyNotTheWords) {
  StudyRun real = testing::HandBuiltRun("Well 7 plugs (invented names removed)", false);
  real.study.description = "measured plugs; nothing here is invented";
  EXPECT_FALSE(IsInventedStudy(real.study));
  EXPECT_EQ(InventedNotice(real.study), "");
  EXPECT_EQ(Render(WriteFitsCsv, real).find("NOTE: this study's data are invented"), std::string::npos);
  StudyRun declared = testing::HandBuiltRun("Well 7 plugs", true);
  declared.study.description = "lab programme";
  EXPECT_TRUE(IsInventedStudy(declared.study));
  EXPECT_NE(Render(WriteFitsCsv, declared).find("# " + InventedNotice(declared.study)), std::string::npos);
}

}  // namespace
}  // namespace porofit

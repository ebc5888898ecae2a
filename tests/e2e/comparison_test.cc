// End to end through the CLI: model comparison outputs of
// tests/data/good/comparison.yaml (invented data; see its header).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "porofit/io/csv.h"
#include "porofit/report/report.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

const std::string kStudy = std::string(POROFIT_TEST_DATA_DIR) + "/good/comparison.yaml";

fs::path RunStudyCli(int threads) {
  const fs::path dir = fs::temp_directory_path() /
                       ("porofit-e2e-compare-" + std::to_string(::getpid()) + "-" + std::to_string(threads));
  fs::remove_all(dir);
  const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                          kStudy + "' --out '" + dir.string() + "' --quiet --threads " + std::to_string(threads);
  const int status = std::system(cmd.c_str());
  EXPECT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << cmd;
  return dir;
}

const fs::path& Output() {
  static const fs::path out = RunStudyCli(1);
  return out;
}

struct Cleanup : ::testing::Environment {
  void TearDown() override { fs::remove_all(Output()); }
};
const auto* const kCleanup = ::testing::AddGlobalTestEnvironment(new Cleanup);

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

// Rows of a CSV as column -> text maps.
std::vector<std::map<std::string, std::string>> Rows(const std::string& name) {
  const csv::Table t = csv::ReadCsvFile((Output() / name).string());
  std::vector<std::map<std::string, std::string>> out;
  for (const csv::Row& r : t.rows) {
    std::map<std::string, std::string> m;
    for (size_t k = 0; k < t.header.fields.size() && k < r.fields.size(); ++k) m[t.header.fields[k]] = r.fields[k];
    out.push_back(m);
  }
  return out;
}

double Num(const std::string& s) {
  double v = std::nan("");
  if (!s.empty()) csv::ParseNumber(s, v);
  return v;
}

TEST(ComparisonOutputs, RankingWeightsAndCrossValidationPerSampleAndModel) {
  const auto rows = Rows("comparison.csv");
  ASSERT_EQ(rows.size(), 4u + 3u + 3u);
  std::map<std::string, double> weight_sum;
  for (const auto& r : rows)
    if (r.at("included") == "true") weight_sum[r.at("sample")] += Num(r.at("weight_aicc"));
  for (const auto& [sample, w] : weight_sum) EXPECT_NEAR(w, 1.0, 1e-12) << sample;
  auto row = [&](const std::string& s, const std::string& m) {
    for (const auto& r : rows)
      if (r.at("sample") == s && r.at("model") == m) return r;
    ADD_FAILURE() << s << " " << m;
    return rows[0];
  };
  // CMP-1 is invented linear-exp data (B = 0.1 GPa/MPa).
  EXPECT_EQ(row("CMP-1", "linear-exp").at("rank"), "1");
  EXPECT_EQ(row("CMP-1", "linear-exp").at("delta_aicc"), "0");
  // CMP-2 is invented exp-modulus data: the line extrapolates worst (held-out top 2 points).
  EXPECT_EQ(row("CMP-2", "exp-modulus").at("rank"), "1");
  EXPECT_EQ(row("CMP-2", "linear").at("holdout_rank"), "3");
  EXPECT_EQ(row("CMP-2", "linear").at("holdout_points"), "2");
  EXPECT_EQ(row("CMP-2", "linear").at("holdout_points_predicted"), "2");
  EXPECT_GT(Num(row("CMP-2", "linear").at("holdout_rmse_GPa")), 10 * Num(row("CMP-2", "exp-modulus").at("holdout_rmse_GPa")));
  EXPECT_EQ(row("CMP-2", "exp-modulus").at("loo_refits"), "12");
  EXPECT_LT(Num(row("CMP-2", "exp-modulus").at("loo_rmse_GPa")), Num(row("CMP-2", "linear").at("loo_rmse_GPa")));
  // CMP-3: the power-offset fit runs to the P_r -> 0 limit (status at-limit)
  // and is excluded with its reason.
  const auto po = row("CMP-3", "power-offset");
  EXPECT_EQ(po.at("included"), "false");
  EXPECT_NE(po.at("excluded_reason").find("at-limit"), std::string::npos) << po.at("excluded_reason");
  EXPECT_EQ(po.at("rank"), "");
  EXPECT_EQ(po.at("holdout_note"), "fit not usable");
}

TEST(ComparisonOutputs, NestedTestsDecideRegularNestingsAndSayWhyForEveryOtherPair) {
  const auto rows = Rows("nested_tests.csv");
  ASSERT_EQ(rows.size(), 6u + 3u + 3u);  // C(4,2) + C(3,2) + C(3,2)
  int tested = 0;
  for (const auto& r : rows) {
    if (r.at("tested") == "true") {
      ++tested;
      EXPECT_EQ(r.at("relation"), "regular");
      EXPECT_FALSE(r.at("decision").empty());
      EXPECT_EQ(r.at("reason"), "");
    } else {
      EXPECT_FALSE(r.at("reason").empty()) << r.at("sample") << " " << r.at("restricted") << " " << r.at("fuller");
      EXPECT_EQ(r.at("F"), "");
    }
    if (r.at("sample") == "CMP-1" && r.at("restricted") == "exp-modulus" && r.at("fuller") == "linear-exp") {
      EXPECT_EQ(r.at("tested"), "true");
      EXPECT_EQ(r.at("decision"), "fuller model needed");
      EXPECT_EQ(r.at("df1"), "1");
      EXPECT_EQ(r.at("df2"), "8");
      EXPECT_LT(Num(r.at("p_value")), 0.05);
    }
    if (r.at("sample") == "CMP-2" && r.at("restricted") == "exp-modulus" && r.at("fuller") == "linear-exp") {
      EXPECT_NE(r.at("reason").find("at its lower bound"), std::string::npos) << r.at("reason");
    }
    if (r.at("sample") == "CMP-3" && r.at("restricted") == "grain-contact" && r.at("fuller") == "power-ref") {
      EXPECT_EQ(r.at("tested"), "true");
      EXPECT_EQ(r.at("decision"), "restricted model adequate");
    }
    if (r.at("restricted") == "linear" && r.at("fuller") == "exp-modulus") {
      EXPECT_EQ(r.at("relation"), "boundary-or-limit");
    }
  }
  EXPECT_EQ(tested, 2);
}

TEST(ComparisonOutputs, GroupsCountWinsAndSumOnlyCompleteSamples) {
  const auto rows = Rows("comparison_groups.csv");
  ASSERT_EQ(rows.size(), 4u + 3u);
  for (const auto& r : rows) {
    EXPECT_EQ(r.at("group_by"), "lithology");
    if (r.at("group") == "sandstone") {
      EXPECT_EQ(r.at("samples"), "2");
      EXPECT_EQ(r.at("complete_samples"), "1");  // CMP-2 has no exp-compliance
      if (r.at("model") == "linear-exp") {
        EXPECT_EQ(r.at("wins"), "1");
      }
      if (r.at("model") == "exp-modulus") {
        EXPECT_EQ(r.at("wins"), "1");
      }
      if (r.at("model") == "linear") {
        EXPECT_EQ(r.at("wins"), "0");
      }
    } else {
      EXPECT_EQ(r.at("group"), "unconsolidated sand");
      EXPECT_EQ(r.at("complete_samples"), "0");  // power-offset failed
      EXPECT_EQ(r.at("summed_score"), "");
      if (r.at("model") == "grain-contact") {
        EXPECT_EQ(r.at("wins"), "1");
      }
    }
  }
}

TEST(ComparisonOutputs, ResultsJsonCarriesTheComparisonSections) {
  const nlohmann::json j = nlohmann::json::parse(Slurp(Output() / "results.json"));
  EXPECT_GE(j["schema_version"], 3);  // 3 added the comparison sections
  ASSERT_EQ(j["samples"].size(), 3u);
  const auto& c = j["samples"][0]["comparison"];
  EXPECT_EQ(c["best"], "linear-exp");
  EXPECT_EQ(c["criterion"], "aicc");
  EXPECT_EQ(c["models"].size(), 4u);
  EXPECT_TRUE(c["models"][0]["leave_one_out"]["computed"].get<bool>());
  EXPECT_EQ(c["nested_tests"].size(), 6u);
  const auto& s = j["comparison_summary"];
  EXPECT_EQ(s["group_by"], nlohmann::json::array({"lithology"}));
  EXPECT_EQ(s["groups"].size(), 2u);
  EXPECT_EQ(s["groups"][1]["label"], "unconsolidated sand");
  EXPECT_TRUE(s["groups"][1]["models"][0]["summed_score"].is_null());
}

TEST(ComparisonOutputs, SummaryShowsRankingTestsAndGroupTable) {
  const std::string s = Slurp(Output() / "summary.txt");
  EXPECT_NE(s.find("Ranking (AICc weight): 1. linear-exp"), std::string::npos);
  EXPECT_NE(s.find("exp-modulus in linear-exp (B = 0): F "), std::string::npos);
  EXPECT_NE(s.find("-> fuller model needed"), std::string::npos);
  EXPECT_NE(s.find("grain-contact in power-ref (n = 1/3): F "), std::string::npos);
  EXPECT_NE(s.find("Model comparison across samples (AICc, grouped by lithology)"), std::string::npos);
  EXPECT_NE(s.find("High-P hold-out (2 pt) RMSE GPa"), std::string::npos);
}

TEST(ComparisonOutputs, AreIdenticalForAnyThreadCount) {
  const fs::path two = RunStudyCli(2);
  for (const char* f : {"comparison.csv", "nested_tests.csv", "comparison_groups.csv", "summary.txt"})
    EXPECT_EQ(Slurp(Output() / f), Slurp(two / f)) << f;
  fs::remove_all(two);
}

}  // namespace
}  // namespace porofit

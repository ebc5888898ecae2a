// End-to-end: `porofit fit` on the invented sample study, whose depth table
// (well QV-14, offshore, mean effective stress, Biot law, an invented density
// log with a NULL run, a washout and a fill trend, one depletion case) is
// written to depth_QV-14.csv, results.json and the summary.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace porofit {
namespace {

namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class DepthCli : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = fs::temp_directory_path() / ("porofit-depth-e2e-" + std::to_string(::getpid()));
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                            POROFIT_SAMPLE_STUDY + "' --threads 2 --out '" + (dir_ / "out").string() + "' >'" +
                            (dir_ / "stdout.txt").string() + "' 2>&1 </dev/null";
    const int status = std::system(cmd.c_str());
    exit_code_ = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  static void TearDownTestSuite() { fs::remove_all(dir_); }
  static fs::path dir_;
  static int exit_code_;
};
fs::path DepthCli::dir_;
int DepthCli::exit_code_ = -1;

TEST_F(DepthCli, WritesTheDepthTableWithItsAssumptionsAndCautions) {
  ASSERT_EQ(exit_code_, 0) << Slurp(dir_ / "stdout.txt");
  const std::string csv = Slurp(dir_ / "out" / "depth_QV-14.csv");
  ASSERT_FALSE(csv.empty());
  for (const std::string& expected :
       {std::string("# datum: MSL, offshore: water depth 2788.71 ft, seawater density 1.03 g/cc"),
        std::string("# K_dry evaluated at sigma_eval = mean effective stress (S_v + S_H + S_h)/3 - alpha P_p (Biot"),
        std::string("# horizontal stress: effective-stress ratio k = sigma'_h/sigma'_v = 0.6"),
        std::string("two-sided 80 % band; convention non-exceedance: p10 = 10 % non-exceedance (the low value)"),
        std::string("# overburden: density log data/QV-14-density.las curve RHOB"),
        std::string("# CAUTION: any operational use needs review and sign-off by qualified geomechanics"),
        std::string("# depletion d1 = '10 MPa drawdown'"),
        std::string("\ntvd_ft,sample,model,sv_psi,")}) {
    EXPECT_NE(csv.find(expected), std::string::npos) << expected;
  }
  // 1400 to 3200 m in 10 m steps: 181 rows; the NULL run and the washout are flagged below them.
  std::vector<std::string> rows;
  std::istringstream in(csv);
  bool header = true;
  for (std::string l; std::getline(in, l);) {
    if (l.empty() || l[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    rows.push_back(l);
  }
  ASSERT_EQ(rows.size(), 181u);
  EXPECT_EQ(rows.front().rfind("4593.175853018372,QV14-2544V,exp-modulus,", 0), 0u) << rows.front();
  EXPECT_NE(rows.back().find("log-gap"), std::string::npos) << rows.back();
  EXPECT_NE(rows.back().find("log-fill"), std::string::npos) << rows.back();
}

TEST_F(DepthCli, ResultsJsonAndSummaryCarryTheTable) {
  ASSERT_EQ(exit_code_, 0) << Slurp(dir_ / "stdout.txt");
  const nlohmann::json j = nlohmann::json::parse(Slurp(dir_ / "out" / "results.json"));
  EXPECT_EQ(j["schema_version"], 4);
  ASSERT_EQ(j["depth_tables"].size(), 1u);
  const auto& t = j["depth_tables"][0];
  EXPECT_EQ(t["computed"], true) << t["message"];
  ASSERT_EQ(t["rows"].size(), 181u);
  // Every mapped row has alpha inside its band, and the band inside [0, 1].
  size_t with_alpha = 0;
  for (const auto& r : t["rows"]) {
    if (r["alpha"].is_null()) continue;
    ++with_alpha;
    const double a = r["alpha"], lo = r["alpha_lower"], hi = r["alpha_upper"];
    EXPECT_LT(lo, a);
    EXPECT_LT(a, hi);
    EXPECT_GT(lo, 0.0);
    EXPECT_LT(hi, 1.0);
    // S_v > P_p everywhere below the mudline, and the Biot evaluation pressure is positive.
    EXPECT_GT(r["sv_MPa"].get<double>(), r["pp_MPa"].get<double>());
    EXPECT_GT(r["sigma_eval_MPa"].get<double>(), 0.0);
  }
  EXPECT_EQ(with_alpha, 181u);
  // The LAS file is an input with a digest.
  bool las = false;
  for (const auto& in : j["provenance"]["input_files"]) las = las || in["path"].get<std::string>().find("QV-14-density.las") != std::string::npos;
  EXPECT_TRUE(las);
  const std::string out = Slurp(dir_ / "stdout.txt");
  EXPECT_NE(out.find("Depth table QV-14 (depth_QV-14.csv): 4593.18 ft to 10498.7 ft below MSL"), std::string::npos)
      << out;
  EXPECT_NE(out.find("depth_QV-14.csv"), std::string::npos);
  EXPECT_TRUE(fs::exists(dir_ / "out" / "summary.txt"));
}

}  // namespace
}  // namespace porofit

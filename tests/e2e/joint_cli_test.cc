// End-to-end: `porofit fit` on a study with joint fits across samples
// (tests/data/good/joint.yaml, invented data: four plugs, true P_close = 12 MPa).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

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

class JointCli : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("porofit-joint-e2e-" + std::to_string(::getpid()));
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  void TearDown() override { fs::remove_all(dir_); }
  int Fit(const fs::path& out) const {
    const std::string study = std::string(POROFIT_TEST_DATA_DIR) + "/good/joint.yaml";
    const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                            study + "' --out '" + out.string() + "' >'" + (dir_ / "stdout.txt").string() +
                            "' 2>&1 </dev/null";
    const int status = std::system(cmd.c_str());
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  fs::path dir_;
};

// Data rows of a CSV (comment lines and the header dropped).
std::vector<std::string> Rows(const std::string& text) {
  std::vector<std::string> rows;
  std::istringstream in(text);
  std::string line;
  bool header = true;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    rows.push_back(line);
  }
  return rows;
}

TEST_F(JointCli, FitWritesJointTablesJsonAndSummaryLines) {
  const fs::path out = dir_ / "out";
  ASSERT_EQ(Fit(out), 0) << Slurp(dir_ / "stdout.txt");

  // joint_fits.csv: facies-A has 4 members x 3 parameters, clean-vertical 2 x 3.
  const std::string table = Slurp(out / "joint_fits.csv");
  EXPECT_EQ(table.rfind("# ", 0), 0u);
  EXPECT_EQ(Rows(table).size(), 4u * 3u + 2u * 3u);
  EXPECT_NE(table.find("facies-A,exp-modulus,converged,F3,P_close,MPa,yes,"), std::string::npos);

  // joint_tests.csv: one row per joint fit; the common P_close is accepted,
  // the common K_0 (true values 8 and 6 GPa) rejected.
  const std::vector<std::string> tests = Rows(Slurp(out / "joint_tests.csv"));
  ASSERT_EQ(tests.size(), 2u);
  EXPECT_NE(tests[0].find("shared accepted"), std::string::npos) << tests[0];
  EXPECT_NE(tests[1].find("shared rejected"), std::string::npos) << tests[1];

  // joint_alpha.csv: only F1 and F2 have K_s.
  const std::vector<std::string> alpha = Rows(Slurp(out / "joint_alpha.csv"));
  ASSERT_FALSE(alpha.empty());
  for (const std::string& r : alpha) {
    EXPECT_TRUE(r.find(",F1,") != std::string::npos || r.find(",F2,") != std::string::npos) << r;
  }

  const nlohmann::json j = nlohmann::json::parse(Slurp(out / "results.json"));
  ASSERT_EQ(j["joint_fits"].size(), 2u);
  const nlohmann::json& a = j["joint_fits"][0];
  EXPECT_EQ(a["name"], "facies-A");
  EXPECT_EQ(a["statistics"]["n"], 48);
  EXPECT_EQ(a["statistics"]["p"], 9);
  const double pc = a["coordinates"][0]["estimate"], se = a["coordinates"][0]["std_error"];
  EXPECT_EQ(a["coordinates"][0]["label"], "P_close");
  EXPECT_LT(std::abs(pc - 12.0), 3 * se) << pc << " +- " << se;  // MPa; true value of the invented data
  EXPECT_EQ(a["covariance"]["matrix"].size(), 9u);
  EXPECT_EQ(a["members"][0]["alpha"]["computed"], true);
  EXPECT_EQ(a["members"][2]["alpha"]["computed"], false);
  EXPECT_FALSE(a["notes"].empty());

  const std::string summary = Slurp(out / "summary.txt");
  EXPECT_NE(summary.find("Joint fits across samples"), std::string::npos);
  EXPECT_NE(summary.find("facies-A: exp-modulus on F1;F2;F3;F4, shared P_close - converged"), std::string::npos);
}

}  // namespace
}  // namespace porofit

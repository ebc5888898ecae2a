// End-to-end test of the branch tests through the porofit command line, on
// tests/data/good/plug-branches.yaml (one plug with a loading and an
// unloading sample, invented data, and a plug with one sample).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

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

std::string ShellQuote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

std::string ReadAll(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

std::vector<std::string> DataLines(const std::string& csv) {
  std::vector<std::string> out;
  std::istringstream in(csv);
  for (std::string line; std::getline(in, line);)
    if (!line.empty() && line[0] != '#') out.push_back(line);
  return out;
}

std::vector<std::string> Split(const std::string& row) {  // no quoted commas in the fields read here
  std::vector<std::string> f;
  std::string cur;
  bool quoted = false;
  for (char c : row) {
    if (c == '"') quoted = !quoted;
    else if (c == ',' && !quoted) f.push_back(cur), cur.clear();
    else cur += c;
  }
  f.push_back(cur);
  return f;
}

TEST(BranchCli, LoadingAndUnloadingOfOnePlugAreTestedAndReported) {
  const fs::path dir = fs::temp_directory_path() / ("porofit-e2e-branches-" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  const fs::path out = dir / "out";
  const std::string study = std::string(POROFIT_TEST_DATA_DIR) + "/good/plug-branches.yaml";
  const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z ") + ShellQuote(POROFIT_EXE) +
                          " fit " + ShellQuote(study) + " --out " + ShellQuote(out.string()) + " >" +
                          ShellQuote((dir / "stdout.txt").string()) + " 2>&1 </dev/null";
  const int status = std::system(cmd.c_str());
  const std::string stdout_text = ReadAll(dir / "stdout.txt");
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << stdout_text;

  // branch_tests.csv: one set test per model; exp-modulus separates the branches.
  const std::vector<std::string> tests = DataLines(ReadAll(out / "branch_tests.csv"));
  ASSERT_EQ(tests.size(), 3u) << ReadAll(out / "branch_tests.csv");
  const std::vector<std::string> header = Split(tests[0]);
  auto column = [&](const std::string& name) {
    for (size_t i = 0; i < header.size(); ++i)
      if (header[i] == name) return i;
    ADD_FAILURE() << "no column " << name;
    return size_t{0};
  };
  const std::vector<std::string> m1 = Split(tests[1]);
  EXPECT_EQ(m1[column("plug")], "QV14-2231");
  EXPECT_EQ(m1[column("model")], "exp-modulus");
  EXPECT_EQ(m1[column("members")], "QV-L1;QV-U1");
  EXPECT_EQ(m1[column("N")], "16");
  EXPECT_EQ(m1[column("df1")], "3");
  EXPECT_EQ(m1[column("df2")], "10");
  EXPECT_EQ(m1[column("decision")], "branches differ");
  EXPECT_LT(std::stod(m1[column("p_value")]), 1e-6);
  EXPECT_EQ(Split(tests[2])[column("model")], "linear");

  // hysteresis.csv: 11 grid points per model over 2-50 MPa, unloading stiffer.
  const std::vector<std::string> hyst = DataLines(ReadAll(out / "hysteresis.csv"));
  ASSERT_EQ(hyst.size(), 23u);
  const std::vector<std::string> hh = Split(hyst[0]);
  size_t dk = 0, p = 0, flag = 0;
  for (size_t i = 0; i < hh.size(); ++i) {
    if (hh[i] == "dK_GPa") dk = i;
    if (hh[i] == "P_MPa") p = i;
    if (hh[i] == "flag") flag = i;
  }
  ASSERT_GT(dk, 0u);
  EXPECT_EQ(Split(hyst[1])[p], "2");
  EXPECT_EQ(Split(hyst[11])[p], "50");
  for (size_t i = 1; i <= 11; ++i) {
    const std::vector<std::string> r = Split(hyst[i]);
    EXPECT_EQ(r[2], "exp-modulus");
    EXPECT_GT(std::stod(r[dk]), 0) << hyst[i];
    EXPECT_EQ(r[flag], "") << hyst[i];
  }

  // results.json and the summary carry the same tests; the single-sample plug forms no set.
  const auto j = nlohmann::json::parse(ReadAll(out / "results.json"));
  ASSERT_EQ(j["branches"]["sets"].size(), 1u);
  EXPECT_EQ(j["branches"]["sets"][0]["plug"], "QV14-2231");
  EXPECT_EQ(j["branches"]["sets"][0]["tests"][0]["decision"], "branches differ");
  EXPECT_EQ(j["branches"]["sets"][0]["tests"][0]["joint_fit"]["label"], "pooled, for the test only");
  EXPECT_GT(j["branches"]["sets"][0]["hysteresis"][0]["max_relative_dK"].get<double>(), 0.3);
  const std::string summary = ReadAll(out / "summary.txt");
  EXPECT_NE(summary.find("Plug QV14-2231 (static): QV-L1 loading, cycle 1; QV-U1 unloading, cycle 1"),
            std::string::npos)
      << summary;
  EXPECT_NE(summary.find("exp-modulus [set]: branches differ"), std::string::npos) << summary;
  EXPECT_EQ(summary.find("QV14-0007"), std::string::npos);
  fs::remove_all(dir);
}

}  // namespace
}  // namespace porofit

// End-to-end: `porofit fit`, `check` and `models` on a small study that
// declares a model of its own (`user_models:`); the fitted user model is in
// parameters.csv and results.json, a bad formula is reported at file:line:col.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>

#include "porofit/io/csv.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

// Invented data (K roughly 10 GPa (P/20 MPa)^(1/3)); the sample fixes P_1.
const char* kStudy =
    "name: user model e2e (invented data)\n"
    "user_models:\n"
    "  - id: cubic-root\n"
    "    name: cube-root stiffening, written by hand\n"
    "    formula: |\n"
    "      K = K_1 * (P/P_1)**(1/3)\n"
    "    parameters:\n"
    "      K_1: {unit: GPa, lower: 0, start: 10, meaning: modulus at P_1}\n"
    "      P_1: {unit: MPa, lower: 0, start: 20}\n"
    "samples:\n"
    "  - id: S1\n"
    "    lithology: clean sandstone\n"
    "    porosity: 0.2\n"
    "    bulk_density: 2.12 g/cc\n"
    "    measurement: static\n"
    "    data:\n"
    "      columns: [P_c MPa, P_p MPa, K GPa]\n"
    "      rows:\n"
    "        - [5, 0, 6.3]\n"
    "        - [10, 0, 7.9]\n"
    "        - [20, 0, 10.1]\n"
    "        - [40, 0, 12.6]\n"
    "    models:\n"
    "      - linear\n"
    "      - id: cubic-root\n"
    "        parameters:\n"
    "          P_1: {fixed: 20 MPa}\n";

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class UserModelCli : public ::testing::Test {
 protected:
  void SetUp() override {
    dir_ = fs::temp_directory_path() / ("porofit-e2e-user-model-" + std::to_string(::getpid()) + "-" +
                                        ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    std::ofstream(dir_ / "study.yaml") << kStudy;
  }
  void TearDown() override { fs::remove_all(dir_); }
  // Runs porofit with `args`; returns the exit code, stdout and stderr in out_, err_.
  int Run(const std::string& args) {
    const std::string cmd = "POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '" + std::string(POROFIT_EXE) + "' " + args +
                            " >'" + (dir_ / "o.txt").string() + "' 2>'" + (dir_ / "e.txt").string() + "'";
    const int status = std::system(cmd.c_str());
    out_ = Slurp(dir_ / "o.txt");
    err_ = Slurp(dir_ / "e.txt");
    return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  std::string Study() const { return "'" + (dir_ / "study.yaml").string() + "'"; }
  fs::path dir_;
  std::string out_, err_;
};

TEST_F(UserModelCli, FitWritesTheUserModelToParametersCsvAndResultsJson) {
  ASSERT_EQ(Run("fit " + Study() + " --out '" + (dir_ / "out").string() + "' --quiet"), 0) << err_;
  const csv::Table t = csv::ReadCsvFile((dir_ / "out" / "parameters.csv").string());
  const int model = t.ColumnIndex("model"), parameter = t.ColumnIndex("parameter"),
            estimate = t.ColumnIndex("estimate"), unit = t.ColumnIndex("unit"), status = t.ColumnIndex("status");
  ASSERT_GE(model, 0);
  ASSERT_GE(parameter, 0);
  ASSERT_GE(estimate, 0);
  int found = 0;
  for (const csv::Row& r : t.rows) {
    if (r.fields[static_cast<size_t>(model)] != "cubic-root") continue;
    ++found;
    EXPECT_EQ(r.fields[static_cast<size_t>(status)], "converged");
    double v = 0;
    ASSERT_TRUE(csv::ParseNumber(r.fields[static_cast<size_t>(estimate)], v));
    if (r.fields[static_cast<size_t>(parameter)] == "K_1") {
      EXPECT_EQ(r.fields[static_cast<size_t>(unit)], "GPa");
      EXPECT_NEAR(v, 10.0, 0.3);  // the invented data were written near K_1 = 10 GPa
    } else {
      EXPECT_EQ(r.fields[static_cast<size_t>(parameter)], "P_1");
      EXPECT_EQ(v, 20.0);  // fixed by the sample
    }
  }
  EXPECT_EQ(found, 2);

  const auto j = nlohmann::json::parse(Slurp(dir_ / "out" / "results.json"));
  ASSERT_EQ(j["user_models"].size(), 1u);
  EXPECT_EQ(j["user_models"][0]["id"], "cubic-root");
  EXPECT_EQ(j["user_models"][0]["formula"], "K = K_1 * (P/P_1)**(1/3)");
  EXPECT_EQ(j["user_models"][0]["parameters"][0]["meaning"], "modulus at P_1");
  const auto& fits = j["samples"][0]["fits"];
  ASSERT_EQ(fits.size(), 2u);
  EXPECT_EQ(fits[1]["model"], "cubic-root");
  EXPECT_EQ(fits[1]["model_name"], "cube-root stiffening, written by hand");
  EXPECT_EQ(fits[1]["formula"], "K = K_1 * (P/P_1)**(1/3)");
  EXPECT_EQ(fits[1]["status"], "converged");
  EXPECT_NE(Slurp(dir_ / "out" / "summary.txt").find("cubic-root: K = K_1 * (P/P_1)**(1/3)"), std::string::npos);
}

TEST_F(UserModelCli, ModelsAndCheckListTheStudyModels) {
  ASSERT_EQ(Run("models " + Study()), 0) << err_;
  EXPECT_NE(out_.find("cubic-root  -  cube-root stiffening, written by hand"), std::string::npos) << out_;
  EXPECT_NE(out_.find("exp-modulus"), std::string::npos);
  ASSERT_EQ(Run("models"), 0);
  EXPECT_EQ(out_.find("cubic-root"), std::string::npos);
  ASSERT_EQ(Run("check " + Study()), 0) << err_;
  EXPECT_NE(out_.find("models: linear cubic-root"), std::string::npos) << out_;
}

TEST_F(UserModelCli, ABadFormulaIsReportedAtItsFileLineAndColumnAndNothingIsWritten) {
  std::string text = kStudy;
  text.replace(text.find("(P/P_1)"), 7, "(P/P_l)");
  std::ofstream(dir_ / "study.yaml") << text;
  EXPECT_NE(Run("fit " + Study() + " --out '" + (dir_ / "out").string() + "'"), 0);
  // Line 6 is "      K = K_1 * (P/P_l)**(1/3)"; P_l starts at column 20.
  EXPECT_NE(err_.find("study.yaml:6:20: error: formula of user model 'cubic-root': unknown name 'P_l' (did you "
                      "mean 'P_1'?)"),
            std::string::npos)
      << err_;
  EXPECT_FALSE(fs::exists(dir_ / "out"));
}

}  // namespace
}  // namespace porofit

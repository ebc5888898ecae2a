// End-to-end: `porofit check` and `porofit fit` accept the invented
// spreadsheet export (samples/lab-export-study.yaml) as it is.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <string>

namespace porofit {
namespace {
namespace fs = std::filesystem;

int RunPorofit(const std::string& args) {
  const std::string cmd = std::string("'") + POROFIT_EXE + "' " + args + " >/dev/null 2>&1 </dev/null";
  const int status = std::system(cmd.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

TEST(LabExportCli, CheckAndFitAcceptTheSpreadsheetExport) {
  const std::string study = std::string(POROFIT_SOURCE_DIR) + "/samples/lab-export-study.yaml";
  EXPECT_EQ(RunPorofit("check '" + study + "'"), 0);
  const fs::path out = fs::temp_directory_path() / ("porofit-lab-export-" + std::to_string(::getpid()));
  fs::remove_all(out);
  EXPECT_EQ(RunPorofit("fit '" + study + "' --out '" + out.string() + "'"), 0);
  EXPECT_TRUE(fs::exists(out / "parameters.csv"));
  fs::remove_all(out);
}

}  // namespace
}  // namespace porofit

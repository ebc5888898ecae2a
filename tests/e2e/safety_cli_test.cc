// End-to-end tests of the safety of the user's files: output folders that
// cannot hurt inputs, --overwrite only of porofit's own folders, no staging
// left behind, and exit statuses a script can trust. Each test works on a
// copy of the invented sample study in a fresh temporary folder and runs the
// real binary from inside it.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <ostream>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/report/output_folder.h"
#include "porofit/version.h"
#include "porofit_test/folder_snapshot.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

const char* kFixedTime = "2026-02-03T04:05:06Z";

std::string Quote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

struct Outcome {
  int exit_code = -1;
  std::string out, err;
};

// root/            the test's temporary folder
//   study/         a copy of samples/: invented-field-study.yaml and data/
class StudyCopy {
 public:
  StudyCopy() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    std::string name = info->name();
    for (char& ch : name) ch = ch == '/' ? '_' : ch;  // parameterised names hold '/'
    root_ = fs::temp_directory_path() / ("porofit-safety-" + std::to_string(::getpid()) + "-" + name);
    fs::remove_all(root_);
    fs::create_directories(root_);
    root_ = fs::canonical(root_);  // messages name resolved paths
    fs::create_directories(study_dir());
    const fs::path samples = fs::path(POROFIT_SAMPLE_STUDY).parent_path();
    fs::copy_file(POROFIT_SAMPLE_STUDY, study());
    fs::copy(samples / "data", data_dir(), fs::copy_options::recursive);
    fs::create_directories(root_ / "logs");
  }
  ~StudyCopy() { fs::remove_all(root_); }

  fs::path root() const { return root_; }
  fs::path study_dir() const { return root_ / "study"; }
  fs::path data_dir() const { return study_dir() / "data"; }
  fs::path study() const { return study_dir() / "invented-field-study.yaml"; }

  // Runs `porofit <args>` (already shell-quoted) in `cwd` with the fixed
  // timestamp and `env` (e.g. "A=b ") before the command.
  Outcome Run(const fs::path& cwd, const std::string& args, const std::string& env = "") const {
    const fs::path o = root_ / "logs" / "stdout.txt", e = root_ / "logs" / "stderr.txt";
    const std::string cmd = "cd " + Quote(cwd.string()) + " && " + env + "POROFIT_FIXED_TIMESTAMP=" + kFixedTime + " " +
                            Quote(POROFIT_EXE) + " " + args + " >" + Quote(o.string()) + " 2>" + Quote(e.string()) +
                            " </dev/null";
    const int status = std::system(cmd.c_str());
    Outcome r;
    r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = Slurp(o);
    r.err = Slurp(e);
    fs::remove(o);
    fs::remove(e);
    return r;
  }

  // Everything under the study copy (logs/ excluded: it holds the run's own streams).
  test::FolderSnapshot Snapshot() const {
    test::FolderSnapshot s = test::SnapshotFolder(root_);
    for (auto it = s.begin(); it != s.end();) it = it->first.rfind("logs", 0) == 0 ? s.erase(it) : std::next(it);
    return s;
  }

 private:
  fs::path root_;
};

// ---------------------------------------------------------------- locations that would harm inputs

struct Harm {
  std::string name;
  std::string cwd;       // where porofit runs, relative to the copy's root ("" the root itself)
  std::string out;       // --out as typed; $ROOT is replaced by the copy's root
  std::string resolved;  // the path the message must name besides --out ($ROOT replaced)
  std::string why;       // fragment of the reason
};

// Keeps CTest names readable (gtest would print the raw bytes).
void PrintTo(const Harm& h, std::ostream* os) { *os << h.name; }

std::string Expand(std::string s, const fs::path& root) {
  const std::string key = "$ROOT";
  for (size_t at = s.find(key); at != std::string::npos; at = s.find(key)) s.replace(at, key.size(), root.string());
  return s;
}

class HarmfulOutput : public ::testing::TestWithParam<Harm> {};

TEST_P(HarmfulOutput, IsRefusedWithExitTwoNamingBothPathsAndEveryInputStaysByteIdentical) {
  const Harm& h = GetParam();
  StudyCopy c;
  fs::create_symlink("data", c.study_dir() / "link-to-data");
  const fs::path cwd = c.root() / h.cwd;
  const auto before = c.Snapshot();
  const std::string study = fs::relative(c.study(), cwd).string();
  const std::string out = Expand(h.out, c.root());
  for (const char* extra : {" --overwrite", ""}) {
    const Outcome r = c.Run(cwd, "fit " + Quote(study) + " --out " + Quote(out) + " -q" + extra);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_NE(r.err.find("porofit: error: refusing output folder '" + out + "'"), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(Expand(h.resolved, c.root())), std::string::npos) << r.err;
    EXPECT_NE(r.err.find(Expand(h.why, c.root())), std::string::npos) << r.err;
    // Every input byte-identical, no output folder, no staging folder.
    EXPECT_EQ(c.Snapshot(), before) << extra;
  }
}

INSTANTIATE_TEST_SUITE_P(
    Cases, HarmfulOutput,
    ::testing::Values(
        Harm{"DataFolder", "study", "data", "$ROOT/study/data/QV14-2231V-loading.csv", "contains the input data file"},
        Harm{"CurrentFolderAsPwd", "study", "$ROOT/study", "$ROOT/study", "it is the current folder"},
        Harm{"StudyFolderByParent", "study", "../study", "$ROOT/study", "it is the current folder"},
        Harm{"StudyFolderFromOutside", "", "study", "$ROOT/study/invented-field-study.yaml",
             "contains the input study file"},
        Harm{"StudyFolderFromTheDataFolder", "study/data", "../../study", "$ROOT/study/data",
             "an ancestor of the current folder"},
        Harm{"AbsoluteDataFolder", "study", "$ROOT/study/data", "$ROOT/study/data/QV14-2231V-loading.csv",
             "contains the input data file"},
        Harm{"AbsoluteDataFolderFromElsewhere", "", "$ROOT/study/data", "$ROOT/study/data/QV14-2231V-loading.csv",
             "contains the input data file"},
        Harm{"SymlinkToDataFolder", "study", "link-to-data", "$ROOT/study/data/QV14-2231V-loading.csv",
             "contains the input data file"},
        Harm{"AncestorOfCwd", "study", "$ROOT", "$ROOT/study", "an ancestor of the current folder"},
        Harm{"InsideDataFolder", "study", "data/results", "$ROOT/study/data",
             "lies inside '$ROOT/study/data', the folder of the input data file"},
        Harm{"InsideDataFolderThroughSymlink", "study", "link-to-data/results", "$ROOT/study/data",
             "lies inside '$ROOT/study/data'"},
        Harm{"TheLasLog", "study", "data/QV-14-density.las", "$ROOT/study/data/QV-14-density.las",
             "it is the input data file"}),
    [](const ::testing::TestParamInfo<Harm>& i) { return i.param.name; });

// The sample table and its data CSV are inputs like any other: their folder
// is protected, the study file's folder is not.
TEST(SampleTableStudy, ItsTablesFolderIsProtectedAndTheStudyFolderIsNot) {
  StudyCopy c;
  const fs::path tables = c.study_dir() / "tables";
  fs::create_directories(tables);
  std::ofstream(tables / "samples.csv") << "id,lithology,porosity [%],bulk_density [g/cc]\n"
                                           "A-1,invented sandstone,20,2.30\n";
  std::ofstream(tables / "points.csv") << "sample,P [MPa],K [GPa]\nA-1,5,10\nA-1,10,12\nA-1,20,14\nA-1,30,15\n";
  std::ofstream(c.study_dir() / "batch.yaml") << "name: batch (invented)\n"
                                                 "defaults:\n  models: [linear]\n"
                                                 "sample_table:\n  file: tables/samples.csv\n  data: tables/points.csv\n";
  const auto before = c.Snapshot();
  for (const char* out : {"tables", "tables/results"}) {
    const Outcome r = c.Run(c.study_dir(), std::string("fit batch.yaml -q --overwrite --out ") + out);
    EXPECT_EQ(r.exit_code, 2) << out << ": " << r.err;
    EXPECT_NE(r.err.find((tables / "samples.csv").string()), std::string::npos) << r.err;
    EXPECT_EQ(c.Snapshot(), before) << out;
  }
  const Outcome ok = c.Run(c.study_dir(), "fit batch.yaml -q --out results");
  EXPECT_EQ(ok.exit_code, 0) << ok.err;
}

// ---------------------------------------------------------------- --overwrite

TEST(Overwrite, AFolderPorofitDidNotWriteIsRefusedAndLeftIntact) {
  StudyCopy c;
  const fs::path mine = c.study_dir() / "my-notes";
  fs::create_directories(mine);
  { std::ofstream(mine / "notes.txt") << "my own notes"; }
  const auto before = c.Snapshot();
  for (const char* extra : {" --overwrite", ""}) {
    const Outcome r = c.Run(c.study_dir(), std::string("fit invented-field-study.yaml --out my-notes -q") + extra);
    EXPECT_EQ(r.exit_code, 2) << r.err;
    EXPECT_NE(r.err.find("output folder 'my-notes' already exists and was not written by porofit"), std::string::npos)
        << r.err;
    EXPECT_NE(r.err.find("Choose a new output folder, or move or delete this one yourself"), std::string::npos) << r.err;
    EXPECT_EQ(c.Snapshot(), before);
  }
}

TEST(Overwrite, APorofitFolderIsReplacedWholeAndCarriesTheMarker) {
  StudyCopy c;
  const std::string fit = "fit invented-field-study.yaml --out results -q";
  ASSERT_EQ(c.Run(c.study_dir(), fit).exit_code, 0);
  const fs::path out = c.study_dir() / "results";
  EXPECT_EQ(Slurp(out / kOutputMarkerName), std::string("porofit output folder\ntool: porofit ") + kVersion +
                                                "\nrun: " + kFixedTime +
                                                "\nThis folder was written by porofit; 'porofit fit --overwrite' "
                                                "may replace it as a whole.\n");
  { std::ofstream(out / "stray.txt") << "added later"; }
  const Outcome refused = c.Run(c.study_dir(), fit);
  EXPECT_EQ(refused.exit_code, 2);
  EXPECT_NE(refused.err.find("output folder 'results' already exists; pass --overwrite to replace it"),
            std::string::npos)
      << refused.err;
  EXPECT_TRUE(fs::exists(out / "stray.txt"));
  const Outcome replaced = c.Run(c.study_dir(), fit + " --overwrite");
  EXPECT_EQ(replaced.exit_code, 0) << replaced.err;
  EXPECT_FALSE(fs::exists(out / "stray.txt"));
  EXPECT_TRUE(fs::exists(out / "results.json"));
  // Nothing else next to it: no staging, no old folder.
  std::vector<std::string> entries;
  for (const auto& e : fs::directory_iterator(c.study_dir())) entries.push_back(e.path().filename().string());
  std::sort(entries.begin(), entries.end());
  EXPECT_EQ(entries, (std::vector<std::string>{"data", "invented-field-study.yaml", "results"}));
}

// ---------------------------------------------------------------- failed and killed runs

// A run that fails at any step of the folder write (test hook
// POROFIT_TEST_FAIL_STEP) exits 3 and leaves the previous output as it was.
TEST(FailedRun, ExitsThreeAndLeavesTheOldFolderIntactAndNoStaging) {
  StudyCopy c;
  const std::string fit = "fit invented-field-study.yaml --out results -q";
  ASSERT_EQ(c.Run(c.study_dir(), fit).exit_code, 0);
  const auto before = c.Snapshot();
  for (const char* step : {"stage", "sync", "exchange"}) {
    const Outcome r = c.Run(c.study_dir(), fit + " --overwrite", std::string("POROFIT_TEST_FAIL_STEP=") + step + " ");
    EXPECT_EQ(r.exit_code, 3) << step << ": " << r.err;
    EXPECT_NE(r.err.find("porofit: internal error: test hook POROFIT_TEST_FAIL_STEP"), std::string::npos) << r.err;
    EXPECT_EQ(c.Snapshot(), before) << step;
  }
  // A fresh output folder: none appears.
  const Outcome r = c.Run(c.study_dir(), "fit invented-field-study.yaml --out fresh -q", "POROFIT_TEST_FAIL_STEP=sync ");
  EXPECT_EQ(r.exit_code, 3) << r.err;
  EXPECT_EQ(c.Snapshot(), before);
}

// What a run killed with SIGKILL leaves (a staging folder named after its
// PID) is removed by the next run for the same output folder; the staging
// folder of a live process is not.
TEST(KilledRun, TheNextRunRemovesItsStagingFolderButNotThoseOfLiveProcesses) {
  StudyCopy c;
  const pid_t dead = [] {
    const pid_t pid = ::fork();
    if (pid == 0) ::_exit(0);
    int status = 0;
    ::waitpid(pid, &status, 0);
    return pid;
  }();
  const fs::path stale = c.study_dir() / (".results.porofit-staging-" + std::to_string(dead) + "-0");
  const fs::path live = c.study_dir() / (".results.porofit-staging-" + std::to_string(::getpid()) + "-0");
  for (const fs::path& p : {stale, live}) {
    fs::create_directories(p);
    std::ofstream(p / "parameters.csv") << "half written";
  }
  const Outcome r = c.Run(c.study_dir(), "fit invented-field-study.yaml --out results -q");
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_FALSE(fs::exists(stale));
  EXPECT_TRUE(fs::exists(live / "parameters.csv"));  // this test process is alive
  EXPECT_TRUE(fs::exists(c.study_dir() / "results" / "results.json"));
}

// ---------------------------------------------------------------- exit status

TEST(ExitStatus, ZeroWhenAFitConverged) {
  StudyCopy c;
  const Outcome r = c.Run(c.study_dir(), "fit invented-field-study.yaml --out results -q");
  EXPECT_EQ(r.exit_code, 0) << r.err;
}

// Two data points and a four-parameter model: the fit cannot be made
// (too-few-points). The run completes and writes its report; exit status 1.
TEST(ExitStatus, OneWhenTheRunCompletedButNoFitIsUsable) {
  StudyCopy c;
  {
    std::ofstream y(c.study_dir() / "unfittable.yaml");
    y << "version: 1\n"
         "name: two points, four parameters (invented)\n"
         "samples:\n"
         "  - id: S1\n"
         "    lithology: invented sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.2 g/cc\n"
         "    measurement: static\n"
         "    data:\n"
         "      columns: [P MPa, K GPa]\n"
         "      rows:\n"
         "        - [10, 12.0]\n"
         "        - [20, 14.0]\n"
         "    models: [linear-exp]\n";
  }
  const Outcome r = c.Run(c.study_dir(), "fit unfittable.yaml --out results -q");
  EXPECT_EQ(r.exit_code, 1) << r.err;
  EXPECT_NE(r.err.find("no usable fit: none of the 1 fits converged"), std::string::npos) << r.err;
  EXPECT_TRUE(fs::exists(c.study_dir() / "results" / "fits.csv"));
  EXPECT_NE(Slurp(c.study_dir() / "results" / "fits.csv").find("too-few-points"), std::string::npos);
}

// "results/" names the folder "results" (as in the README's examples).
TEST(Overwrite, ATrailingSeparatorNamesTheSameFolder) {
  StudyCopy c;
  ASSERT_EQ(c.Run(c.study_dir(), "fit invented-field-study.yaml --out results/ -q").exit_code, 0);
  EXPECT_TRUE(fs::exists(c.study_dir() / "results" / kOutputMarkerName));
  const Outcome r = c.Run(c.study_dir(), "fit invented-field-study.yaml --out results/ -q --overwrite");
  EXPECT_EQ(r.exit_code, 0) << r.err;
}

TEST(ExitStatus, TwoForBadInputAndNothingIsWritten) {
  StudyCopy c;
  const auto before = c.Snapshot();
  const Outcome r = c.Run(c.study_dir(), "fit absent.yaml --out results -q");
  EXPECT_EQ(r.exit_code, 2) << r.err;
  EXPECT_EQ(c.Snapshot(), before);
}

TEST(ExitStatus, HelpDocumentsEveryStatus) {
  StudyCopy c;
  for (const char* args : {"--help", "fit --help"}) {
    const Outcome r = c.Run(c.root(), args);
    EXPECT_EQ(r.exit_code, 0);
    for (const char* line : {"  0  the run completed and at least one fit converged",
                             "  1  the run completed and wrote its report, but no fit converged",
                             "  2  bad input (study file, data, command line) or a refused output folder",
                             "  3  internal error"})
      EXPECT_NE(r.out.find(line), std::string::npos) << args << ": " << r.out;
  }
}

}  // namespace
}  // namespace porofit

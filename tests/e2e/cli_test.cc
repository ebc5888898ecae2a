// End-to-end tests of the porofit command line on the invented sample study.
// The bad-input corpus runs in bad_input_corpus_test.cc.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "porofit/io/study_loader.h"
#include "porofit/models/registry.h"
#include "porofit/report/report.h"
#include "porofit/report/sha256.h"
#include "porofit/version.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;
using nlohmann::json;

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

// A fresh scratch folder per test.
class Scratch {
 public:
  Scratch() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    std::string name = std::string(info->test_suite_name()) + "-" + info->name();
    for (char& c : name) {
      if (c == '/') c = '_';
    }
    dir_ = fs::temp_directory_path() / ("porofit-e2e-" + std::to_string(::getpid()) + "-" + name);
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  ~Scratch() { fs::remove_all(dir_); }
  const fs::path& dir() const { return dir_; }

  // Runs `porofit <args>` (args already shell-quoted) with the fixed timestamp.
  Outcome Run(const std::string& args) const {
    const fs::path o = dir_ / "stdout.txt", e = dir_ / "stderr.txt";
    const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=") + kFixedTime + " " + Quote(POROFIT_EXE) + " " +
                            args + " >" + Quote(o.string()) + " 2>" + Quote(e.string()) + " </dev/null";
    const int status = std::system(cmd.c_str());
    Outcome r;
    r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = Slurp(o);
    r.err = Slurp(e);
    fs::remove(o);
    fs::remove(e);
    return r;
  }

 private:
  fs::path dir_;
};

const std::vector<std::string> kReportFiles = {"summary.txt", "parameters.csv",    "fits.csv",
                                               "residuals.csv", "alpha.csv",        "grain_modulus.csv",
                                               "alpha_vti.csv", "moduli.csv", "strain_residuals.csv", "comparison.csv", "nested_tests.csv",
                                               "comparison_groups.csv", "branch_tests.csv", "hysteresis.csv", "joint_fits.csv", "joint_tests.csv", "joint_alpha.csv",
                                               "depth_QV-14.csv",  // the sample study's depth table
                                               "results.json", "report.html"};

// ---------------------------------------------------------------- command line

TEST(Cli, VersionPrintsTheToolVersion) {
  Scratch s;
  const Outcome r = s.Run("--version");
  EXPECT_EQ(r.exit_code, 0);
  EXPECT_EQ(r.out, std::string("porofit ") + kVersion + "\n");
}

TEST(Cli, HelpNamesEveryCommand) {
  Scratch s;
  const Outcome r = s.Run("--help");
  EXPECT_EQ(r.exit_code, 0);
  for (const char* c : {"fit", "check", "models"}) EXPECT_NE(r.out.find(c), std::string::npos) << c;
  const Outcome f = s.Run("fit --help");
  EXPECT_EQ(f.exit_code, 0);
  for (const char* o : {"--out", "--overwrite", "--threads", "--quiet"}) EXPECT_NE(f.out.find(o), std::string::npos) << o;
}

TEST(Cli, NoArgumentsPrintsUsageAndExitsTwo) {
  Scratch s;
  const Outcome r = s.Run("");
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("usage: porofit"), std::string::npos);
}

TEST(Cli, UnknownOptionIsNamedAndExitsTwo) {
  Scratch s;
  const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote((s.dir() / "o").string()) +
                          " --frobnicate");
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("--frobnicate"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(s.dir() / "o"));
}

TEST(Cli, MissingOutOptionIsNamedAndExitsTwo) {
  Scratch s;
  const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY));
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("--out"), std::string::npos) << r.err;
}

TEST(Cli, BadThreadCountIsNamedAndExitsTwo) {
  Scratch s;
  for (const char* bad : {"0", "two"}) {
    const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote((s.dir() / "o").string()) +
                            " --threads " + bad);
    EXPECT_EQ(r.exit_code, 2) << bad;
    EXPECT_NE(r.err.find("--threads"), std::string::npos) << r.err;
    EXPECT_FALSE(fs::exists(s.dir() / "o"));
  }
}

TEST(Cli, ThreadCountOverTheLimitIsNamedAndExitsTwo) {
  Scratch s;
  const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote((s.dir() / "o").string()) +
                          " --threads 100000");
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("--threads = 100000 exceeds the limit of 1024"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(s.dir() / "o"));
}

// Inputs that used to crash the tool (SIGSEGV in the formula parser) or end in
// an uncaught exception (exit 3) are located input errors for check and fit.
TEST(Cli, FormerCrashesAreLocatedInputErrors) {
  Scratch s;
  const std::string head =
      "name: former crashes (invented)\nsamples:\n  - id: S1\n    lithology: sandstone\n    porosity: 0.2\n"
      "    bulk_density: 2.2 g/cc\n    measurement: static\n    models: [linear]\n";
  std::ofstream(s.dir() / "deep.yaml") << "user_models:\n  - id: deep\n    formula: \"" << std::string(20000, '(')
                                       << "a*P" << std::string(20000, ')') << "\"\n    parameters: {a: {unit: GPa, start: 1}}\n"
                                       << head << "    data: {columns: [P MPa, K GPa], rows: [[5, 9], [10, 11]]}\n";
  std::ofstream(s.dir() / "zero.yaml") << head << "    data: {columns: [P MPa, K GPa], file: /dev/zero}\n";
  std::ofstream(s.dir() / "misspelt.yaml") << head << "    data: {columns: [P MPa, K GPa], rows: [[5, 9], [10, 11]]}\n"
                                           << "  - ID: S2\n    lithology: sandstone\n";
  for (const char* name : {"deep.yaml", "zero.yaml", "misspelt.yaml"}) {
    const std::string study = (s.dir() / name).string();
    for (const std::string& cmd : {"check " + Quote(study), "fit " + Quote(study) + " --out " + Quote((s.dir() / "o").string())}) {
      const Outcome r = s.Run(cmd);
      EXPECT_EQ(r.exit_code, 2) << cmd << "\n" << r.err;
      EXPECT_EQ(r.err.rfind(study + ":", 0), 0u) << r.err;
      EXPECT_EQ(r.err.find("internal error"), std::string::npos) << r.err;
      EXPECT_FALSE(fs::exists(s.dir() / "o"));
    }
  }
}

TEST(Cli, UnknownCommandSuggestsTheNearestOne) {
  Scratch s;
  const Outcome r = s.Run("fti");
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("unknown command 'fti' (did you mean 'fit'?)"), std::string::npos) << r.err;
}

TEST(Cli, MissingStudyFileExitsTwoAndCreatesNothing) {
  Scratch s;
  const fs::path out = s.dir() / "o";
  const Outcome r = s.Run("fit " + Quote((s.dir() / "absent.yaml").string()) + " --out " + Quote(out.string()));
  EXPECT_EQ(r.exit_code, 2);
  EXPECT_NE(r.err.find("absent.yaml"), std::string::npos) << r.err;
  EXPECT_FALSE(fs::exists(out));
}

TEST(Cli, ModelsListsEveryCatalogueId) {
  Scratch s;
  const Outcome r = s.Run("models");
  EXPECT_EQ(r.exit_code, 0);
  const std::vector<std::string> expected = {"linear",    "exp-modulus",  "exp-compliance", "linear-exp",
                                             "power-ref", "power-offset", "grain-contact"};
  EXPECT_EQ(ModelRegistry::Builtin().ids(), expected);
  for (const std::string& id : expected) EXPECT_NE(r.out.find(id), std::string::npos) << id;
}

// ---------------------------------------------------------------- sample study

TEST(SampleStudy, CheckValidatesWithoutWriting) {
  Scratch s;
  const Outcome r = s.Run("check " + Quote(POROFIT_SAMPLE_STUDY));
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find(": ok - study"), std::string::npos) << r.out;
  // The sample study's depth table is listed with the file it would be written to.
  EXPECT_NE(r.out.find("depth table QV-14: "), std::string::npos) << r.out;
  EXPECT_NE(r.out.find("written as depth_QV-14.csv"), std::string::npos) << r.out;
  EXPECT_TRUE(fs::is_empty(s.dir()));
}

TEST(SampleStudy, FitWritesEveryFileAndTheSummaryShowsEverySample) {
  Scratch s;
  const fs::path out = s.dir() / "out";
  const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(out.string()));
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_EQ(r.err, "");  // nothing from the solver's logging either
  for (const std::string& f : kReportFiles) EXPECT_TRUE(fs::is_regular_file(out / f)) << f;
  const Study study = LoadStudy(POROFIT_SAMPLE_STUDY);
  EXPECT_EQ(ReportFileNames(study), kReportFiles);  // the fixed files plus one per depth table
  ASSERT_FALSE(study.samples.empty());
  for (const StudySample& ss : study.samples) {
    EXPECT_NE(r.out.find("Sample " + ss.sample.id), std::string::npos) << ss.sample.id;
    for (const ModelChoice& m : ss.models) EXPECT_NE(r.out.find("  " + m.model_id + " "), std::string::npos);
  }
  EXPECT_NE(r.out.find("decision support only"), std::string::npos);
  EXPECT_NE(r.out.find("invented"), std::string::npos);
  EXPECT_EQ(Slurp(out / "summary.txt") +
                "\nwrote summary.txt, parameters.csv, fits.csv, residuals.csv, alpha.csv, grain_modulus.csv, "
                "alpha_vti.csv, moduli.csv, strain_residuals.csv, comparison.csv, nested_tests.csv, comparison_groups.csv, "
                "branch_tests.csv, hysteresis.csv, joint_fits.csv, joint_tests.csv, joint_alpha.csv, depth_QV-14.csv, results.json, report.html to " +
                out.string() + "\n",
            r.out);
  // Only the report files: no staging folder left next to it.
  std::vector<std::string> names;
  for (const auto& e : fs::directory_iterator(s.dir())) names.push_back(e.path().filename().string());
  EXPECT_EQ(names, std::vector<std::string>{"out"});
}

TEST(SampleStudy, EveryFitConvergesAndRecordsProvenance) {
  Scratch s;
  const fs::path out = s.dir() / "out";
  ASSERT_EQ(s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(out.string()) + " --quiet").exit_code, 0);
  std::ifstream in(out / "results.json");
  const json j = json::parse(in);
  int fits = 0;
  for (const json& sample : j["samples"]) {
    for (const json& f : sample["fits"]) {
      ++fits;
      EXPECT_EQ(f["status"], "converged") << sample["id"] << " " << f["model"] << ": " << f["message"];
    }
  }
  EXPECT_GT(fits, 0);
  const json& p = j["provenance"];
  EXPECT_EQ(p["started_utc"], kFixedTime);
  EXPECT_EQ(p["tool_version"], kVersion);
  const Study study = LoadStudy(POROFIT_SAMPLE_STUDY);
  ASSERT_EQ(p["input_files"].size(), study.inputs.size());
  for (size_t i = 0; i < study.inputs.size(); ++i) {
    EXPECT_EQ(p["input_files"][i]["sha256"], Sha256File(study.inputs[i].path).sha256);
  }
  EXPECT_NE(p["command_line"].get<std::string>().find("--quiet"), std::string::npos);
}

TEST(SampleStudy, OutputIsIdenticalForOneAndTwoThreads) {
  Scratch s;
  const fs::path a = s.dir() / "one", b = s.dir() / "two";
  ASSERT_EQ(s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(a.string()) + " --threads 1 -q").exit_code, 0);
  ASSERT_EQ(s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(b.string()) + " --threads 2 -q").exit_code, 0);
  // report.html records the command line (and so the output folder): drop that row.
  auto without_command_line = [](const std::string& text) {
    std::istringstream in(text);
    std::string line, out;
    while (std::getline(in, line))
      if (line.find(">command line</th>") == std::string::npos) out += line + "\n";
    return out;
  };
  for (const std::string& f : kReportFiles) {
    if (f == "results.json") continue;
    if (f == "report.html") {
      EXPECT_EQ(without_command_line(Slurp(a / f)), without_command_line(Slurp(b / f)));
      continue;
    }
    EXPECT_EQ(Slurp(a / f), Slurp(b / f)) << f;
  }
  // The JSON differs only in the recorded command line and thread count.
  json ja = json::parse(Slurp(a / "results.json")), jb = json::parse(Slurp(b / "results.json"));
  EXPECT_NE(ja["provenance"]["command_line"], jb["provenance"]["command_line"]);
  for (json* j : {&ja, &jb}) {
    (*j)["provenance"].erase("command_line");
    (*j)["provenance"].erase("threads");
  }
  EXPECT_EQ(ja.dump(1), jb.dump(1));
}

TEST(SampleStudy, ExistingOutputFolderIsRefusedThenReplacedWithOverwrite) {
  Scratch s;
  const fs::path out = s.dir() / "out";
  const std::string base = "fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(out.string()) + " -q";
  ASSERT_EQ(s.Run(base).exit_code, 0);  // a folder porofit wrote (only those are replaced)
  { std::ofstream(out / "keep.txt") << "mine"; }
  const Outcome refused = s.Run(base);
  EXPECT_EQ(refused.exit_code, 2);
  EXPECT_NE(refused.err.find("output folder '" + out.string() + "' already exists; pass --overwrite to replace it"),
            std::string::npos)
      << refused.err;
  EXPECT_EQ(Slurp(out / "keep.txt"), "mine");
  const Outcome replaced = s.Run(base + " --overwrite");
  EXPECT_EQ(replaced.exit_code, 0) << replaced.err;
  EXPECT_FALSE(fs::exists(out / "keep.txt"));
  EXPECT_TRUE(fs::exists(out / "results.json"));
  size_t entries = 0;
  for (const auto& e : fs::directory_iterator(s.dir())) entries += e.path() == out ? 0 : 1;
  EXPECT_EQ(entries, 0u);
}

TEST(SampleStudy, FitCreatesMissingParentFoldersOfTheOutput) {
  Scratch s;
  const fs::path out = s.dir() / "results" / "plugs";
  const Outcome r = s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(out.string()) + " -q");
  EXPECT_EQ(r.exit_code, 0) << r.err;
  EXPECT_TRUE(fs::exists(out / "results.json"));
}

TEST(SampleStudy, InputsAreNotModified) {
  Scratch s;
  const Study study = LoadStudy(POROFIT_SAMPLE_STUDY);
  std::map<std::string, std::string> before;
  for (const InputFile& f : study.inputs) before[f.path] = Sha256File(f.path).sha256;
  ASSERT_EQ(s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote((s.dir() / "o").string()) + " -q").exit_code, 0);
  ASSERT_EQ(s.Run("check " + Quote(POROFIT_SAMPLE_STUDY)).exit_code, 0);
  for (const auto& [path, digest] : before) EXPECT_EQ(Sha256File(path).sha256, digest) << path;
}

TEST(SampleStudy, EveryOutputFileOpensWithTheCaution) {
  Scratch s;
  const fs::path out = s.dir() / "out";
  ASSERT_EQ(s.Run("fit " + Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote(out.string()) + " -q").exit_code, 0);
  for (const std::string& f : kReportFiles) {
    const std::string text = Slurp(out / f);
    const std::string head = text.substr(0, 1200);
    EXPECT_NE(head.find("decision support only"), std::string::npos) << f;
    EXPECT_NE(head.find("local regulations and operator standards"), std::string::npos) << f;
    EXPECT_NE(head.find("invented"), std::string::npos) << f;
    if (f.size() > 4 && f.substr(f.size() - 4) == ".csv") {
      EXPECT_EQ(text.rfind("# porofit ", 0), 0u) << f;
    }
  }
}

TEST(SampleStudy, BadTimestampOverrideIsRejected) {
  Scratch s;
  const std::string cmd = "POROFIT_FIXED_TIMESTAMP=yesterday " + Quote(POROFIT_EXE) + " fit " +
                          Quote(POROFIT_SAMPLE_STUDY) + " --out " + Quote((s.dir() / "o").string()) +
                          " >/dev/null 2>&1";
  const int status = std::system(cmd.c_str());
  EXPECT_EQ(WEXITSTATUS(status), 2);
  EXPECT_FALSE(fs::exists(s.dir() / "o"));
}

}  // namespace
}  // namespace porofit

// The malformed-input corpus, end to end: every row of tests/data/bad/cases.tsv
// (a study with one defect) and of tests/data/bad/cli-cases.tsv (a command line
// with one defect) runs the real `porofit` binary and must
//   - exit with the expected status (2 = bad input unless the row says otherwise),
//   - print, on the first line of stderr, the expected location followed by ':',
//   - name the rule broken (the row's fragment, on that first line),
//   - leave every file of tests/data/bad as it was (SHA-256 before and after),
//   - leave the fresh scratch folder that holds the --out path as it was: no
//     output folder and no hidden staging folder next to it.
// Layout of the manifests and how to add a case: tests/data/bad/README.md.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cctype>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <ostream>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "porofit_test/folder_snapshot.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

const fs::path kBadDir = fs::path(POROFIT_TEST_DATA_DIR) / "bad";

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

std::string Replace(std::string text, const std::string& from, const std::string& to) {
  for (size_t at = text.find(from); at != std::string::npos; at = text.find(from, at + to.size()))
    text.replace(at, from.size(), to);
  return text;
}

// Tab-separated rows after the header line; '#' lines and blank lines skipped.
std::vector<std::vector<std::string>> ReadTsv(const fs::path& file) {
  std::ifstream in(file);
  EXPECT_TRUE(in.good()) << file;
  std::vector<std::vector<std::string>> rows;
  std::string line;
  std::getline(in, line);  // header
  while (std::getline(in, line)) {
    if (!line.empty() && line.back() == '\r') line.pop_back();
    if (line.empty() || line[0] == '#') continue;
    std::vector<std::string> cols;
    std::stringstream ss(line);
    for (std::string c; std::getline(ss, c, '\t');) cols.push_back(c);
    rows.push_back(cols);
  }
  return rows;
}

// One case: the command (placeholders unexpanded) and what it must produce.
struct CorpusCase {
  std::string name;      // unique; the gtest parameter name
  std::string env;       // NAME='value' words set before the executable (shell-quoted)
  std::string args;      // after the executable, shell-quoted, with {bad}, {out}, {tmp}
  int exit_code = 2;
  std::string location;  // prefix of stderr's first line (before ':'), with {bad}, {tmp}
  std::string fragment;  // must appear on stderr's first line
  bool existing_out = false;  // {out} is created (with one file) before the run
};

void PrintTo(const CorpusCase& c, std::ostream* os) { *os << c.name; }

std::string Sanitize(std::string s) {
  for (char& ch : s)
    if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
  return s;
}

// cases.tsv: study, location, fragment[, exit]. Each study runs through both
// `check` and `fit --out`.
std::vector<CorpusCase> StudyCases() {
  std::vector<CorpusCase> out;
  for (const auto& cols : ReadTsv(kBadDir / "cases.tsv")) {
    if (cols.size() < 3) continue;  // reported by BadInputCorpusManifests
    const std::string stem = Sanitize(cols[0].substr(0, cols[0].rfind('.')));
    const int exit_code = cols.size() > 3 ? std::stoi(cols[3]) : 2;
    const std::string study = Quote("{bad}/" + cols[0]);
    const std::string where = "{bad}/" + cols[1];
    out.push_back({"check_" + stem, "", "check " + study, exit_code, where, cols[2], false});
    out.push_back({"fit_" + stem, "", "fit " + study + " --out " + Quote("{out}"), exit_code, where, cols[2], false});
  }
  return out;
}

// cli-cases.tsv: name, exit, arguments, location, fragment. Arguments are
// split at spaces; '' is an empty argument; leading NAME=value words set the
// environment of the run.
std::vector<CorpusCase> CommandLineCases() {
  std::vector<CorpusCase> out;
  for (const auto& cols : ReadTsv(kBadDir / "cli-cases.tsv")) {
    if (cols.size() != 5) continue;  // reported by BadInputCorpusManifests
    std::string env, args;
    std::istringstream words(cols[2]);
    bool leading = true;
    for (std::string w; words >> w;) {
      const size_t eq = w.find('=');
      if (leading && eq != std::string::npos && eq > 0 && std::isupper(static_cast<unsigned char>(w[0])) &&
          w.find_first_not_of("ABCDEFGHIJKLMNOPQRSTUVWXYZ_") == eq) {
        env += w.substr(0, eq + 1) + Quote(w.substr(eq + 1)) + " ";
        continue;
      }
      leading = false;
      args += " " + (w == "''" ? std::string("''") : Quote(w));
    }
    CorpusCase c{"cli_" + Sanitize(cols[0]), env, args, std::stoi(cols[1]), cols[3], cols[4], false};
    c.existing_out = cols[2].find("{existing-out}") != std::string::npos;
    c.args = Replace(c.args, "{existing-out}", "{out}");
    out.push_back(c);
  }
  return out;
}

std::vector<CorpusCase> AllCases() {
  std::vector<CorpusCase> all = StudyCases();
  for (CorpusCase& c : CommandLineCases()) all.push_back(c);
  return all;
}

struct Outcome {
  int exit_code = -1;
  std::string out, err;
};

// A fresh folder per case: root/work holds the --out path; the captured
// stdout and stderr stay in root, outside the watched work folder.
class CaseFolder {
 public:
  explicit CaseFolder(const std::string& name) {
    root_ = fs::temp_directory_path() / ("porofit-corpus-" + std::to_string(::getpid()) + "-" + name);
    fs::remove_all(root_);
    fs::create_directories(root_ / "work");
  }
  ~CaseFolder() {
    std::error_code ec;
    fs::remove_all(root_, ec);
  }
  fs::path work() const { return root_ / "work"; }
  fs::path out() const { return work() / "out"; }
  std::string Expand(const std::string& s) const {
    return Replace(Replace(Replace(s, "{bad}", kBadDir.string()), "{out}", out().string()), "{tmp}", work().string());
  }

  Outcome Run(const std::string& env, const std::string& args) const {
    const fs::path o = root_ / "stdout.txt", e = root_ / "stderr.txt";
    const std::string cmd = "cd " + Quote(work().string()) + " && env -u POROFIT_FIXED_TIMESTAMP " + Expand(env) +
                            Quote(POROFIT_EXE) + " " + Expand(args) + " >" + Quote(o.string()) + " 2>" +
                            Quote(e.string()) + " </dev/null";
    const int status = std::system(cmd.c_str());
    Outcome r;
    r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
    r.out = Slurp(o);
    r.err = Slurp(e);
    return r;
  }

 private:
  fs::path root_;
};

TEST(BadInputCorpusManifests, HoldAtLeast150DistinctWellFormedCases) {
  std::set<std::string> studies, names;
  for (const auto& cols : ReadTsv(kBadDir / "cases.tsv")) {
    EXPECT_TRUE(cols.size() == 3 || cols.size() == 4) << "cases.tsv row needs 3 or 4 columns: " << cols.at(0);
    EXPECT_TRUE(studies.insert(cols.at(0)).second) << "listed twice: " << cols[0];
  }
  for (const auto& cols : ReadTsv(kBadDir / "cli-cases.tsv")) {
    EXPECT_EQ(cols.size(), 5u) << "cli-cases.tsv row needs 5 columns: " << cols.at(0);
    EXPECT_TRUE(names.insert(cols.at(0)).second) << "listed twice: " << cols[0];
  }
  EXPECT_GE(studies.size() + names.size(), 150u);
}

TEST(BadInputCorpusManifests, EveryStudyInTheFolderIsListed) {
  std::set<std::string> listed;
  for (const auto& cols : ReadTsv(kBadDir / "cases.tsv")) listed.insert(cols.at(0));
  for (const auto& e : fs::recursive_directory_iterator(kBadDir)) {
    const std::string rel = fs::relative(e.path(), kBadDir).generic_string();
    if (e.path().extension() != ".yaml" || rel.rfind("cli/", 0) == 0) continue;  // cli/: command-line fixtures
    EXPECT_EQ(listed.count(rel), 1u) << rel << " has no row in cases.tsv";
  }
}

class Corpus : public ::testing::TestWithParam<CorpusCase> {};

TEST_P(Corpus, FailsWithStatusLocationAndRuleAndTouchesNothing) {
  const CorpusCase& c = GetParam();
  CaseFolder folder(c.name);
  if (c.existing_out) {
    fs::create_directories(folder.out());
    std::ofstream(folder.out() / "keep.txt") << "an earlier run's file\n";
  }
  const test::FolderSnapshot inputs_before = test::SnapshotFolder(kBadDir);
  const test::FolderSnapshot work_before = test::SnapshotFolder(folder.work());

  const Outcome r = folder.Run(c.env, c.args);

  EXPECT_EQ(r.exit_code, c.exit_code) << r.err;
  const std::string first = r.err.substr(0, r.err.find('\n'));
  const std::string where = folder.Expand(c.location) + ":";
  EXPECT_EQ(first.rfind(where, 0), 0u) << "expected the first line of stderr to start with " << where << "\n" << r.err;
  EXPECT_NE(first.find(c.fragment), std::string::npos) << "expected '" << c.fragment << "' in: " << first;
  EXPECT_EQ(r.out, "") << "nothing on stdout when the input is bad";
  EXPECT_EQ(test::SnapshotFolder(kBadDir), inputs_before) << "an input file was created, changed or removed";
  if (!c.existing_out) {
    EXPECT_FALSE(fs::exists(fs::symlink_status(folder.out()))) << "an output folder was written";
  }
  EXPECT_EQ(test::SnapshotFolder(folder.work()), work_before) << "something was left next to the --out path";
}

std::string CaseName(const ::testing::TestParamInfo<CorpusCase>& info) { return info.param.name; }

INSTANTIATE_TEST_SUITE_P(Manifest, Corpus, ::testing::ValuesIn(AllCases()), CaseName);

}  // namespace
}  // namespace porofit

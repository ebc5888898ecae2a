// End to end: the HTML report of `porofit fit` on the invented sample study
// and on a study with a failed fit, checked as HTML (tests/e2e/html_check.py)
// and rendered in headless Chromium (Debian's `chromium`, installed by
// scripts/setup.sh from config/debian-packages.txt). A missing Chromium or
// Python fails these tests with a message; they are never skipped.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

const char* kChromium = "/usr/bin/chromium";
const char* kPython = "/usr/bin/python3";
const std::string kChecker = std::string(POROFIT_SOURCE_DIR) + "/tests/e2e/html_check.py";

std::string Quote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

struct Outcome {
  int exit_code = -1;
  std::string out, err;
};

fs::path Scratch() {
  static const fs::path d = [] {
    const fs::path p = fs::temp_directory_path() / ("porofit-html-e2e-" + std::to_string(::getpid()));
    fs::remove_all(p);
    fs::create_directories(p);
    return p;
  }();
  return d;
}

struct Cleanup : ::testing::Environment {
  void TearDown() override { fs::remove_all(Scratch()); }
};
const auto* const kCleanup = ::testing::AddGlobalTestEnvironment(new Cleanup);

Outcome Shell(const std::string& cmd) {
  static int k = 0;
  const fs::path o = Scratch() / ("out-" + std::to_string(k)), e = Scratch() / ("err-" + std::to_string(k));
  ++k;
  const int status = std::system((cmd + " >" + Quote(o.string()) + " 2>" + Quote(e.string()) + " </dev/null").c_str());
  Outcome r;
  r.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  r.out = Slurp(o);
  r.err = Slurp(e);
  return r;
}

// `porofit fit STUDY --out <scratch>/<name>`, once per name.
fs::path Fit(const std::string& study, const std::string& name) {
  const fs::path out = Scratch() / name;
  if (!fs::exists(out)) {
    const Outcome r = Shell("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z " + Quote(POROFIT_EXE) + " fit " +
                            Quote(study) + " --out " + Quote(out.string()) + " --quiet");
    EXPECT_EQ(r.exit_code, 0) << r.err;
  }
  return out;
}

fs::path SampleOutput() { return Fit(POROFIT_SAMPLE_STUDY, "sample"); }
fs::path FailedOutput() { return Fit(std::string(POROFIT_TEST_DATA_DIR) + "/good/comparison.yaml", "failed"); }

// The figure keys the sample study must produce, from the study itself:
// three per sample, plus alpha where the sample has a grain modulus.
std::vector<std::string> ExpectedFigures(const std::string& study_path) {
  const Study study = LoadStudy(study_path);
  std::vector<std::string> keys;
  for (const StudySample& ss : study.samples) {
    std::string slug;
    for (char c : ss.sample.id)
      slug += std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' ? c : '_';
    for (const char* f : {"k-fit", "residuals", "std-residuals"}) keys.push_back(slug + "_" + f);
    if (ss.grain.given) keys.push_back(slug + "_alpha");
  }
  for (const DepthTableChoice& t : study.depth_tables) {
    std::string slug;
    for (char c : t.spec.name)
      slug += std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' ? c : '_';
    for (const char* f : {"stress", "alpha", "k"}) keys.push_back("depth-" + slug + "_" + f);
  }
  return keys;
}

void RequireTools() {
  ASSERT_TRUE(fs::exists(kChromium)) << kChromium
                                     << " is missing: run scripts/setup.sh (installs Debian's chromium, listed in "
                                        "config/debian-packages.txt)";
  ASSERT_TRUE(fs::exists(kPython)) << kPython << " is missing: run scripts/setup.sh";
}

// Headless Chromium with the fixed flag set and a fresh empty profile.
Outcome Chromium(const std::string& args) {
  static int k = 0;
  const fs::path profile = Scratch() / ("chromium-profile-" + std::to_string(k++));
  fs::remove_all(profile);
  fs::create_directories(profile);
  return Shell(std::string("timeout 150 ") + kChromium +
               " --headless --no-sandbox --disable-gpu --no-first-run --disable-background-networking"
               " --disable-component-update --disable-sync --user-data-dir=" + Quote(profile.string()) + " " + args);
}

TEST(HtmlCli, ReportIsValidHtmlWithEveryFigureAndTable) {
  RequireTools();
  const fs::path out = SampleOutput();
  ASSERT_TRUE(fs::is_regular_file(out / "report.html"));
  std::string cmd = std::string(kPython) + " " + Quote(kChecker) + " structure " + Quote((out / "report.html").string());
  for (const std::string& f : ExpectedFigures(POROFIT_SAMPLE_STUDY)) cmd += " --figure " + Quote(f);
  for (const char* t : {"provenance", "inputs", "fits", "parameters", "correlation", "comparison", "overview",
                        "comparison-groups"})
    cmd += std::string(" --table ") + t;
  const Outcome r = Shell(cmd);
  EXPECT_EQ(r.exit_code, 0) << r.out << r.err;
}

TEST(HtmlCli, EveryFigureIsAlsoAStandaloneSvgFile) {
  RequireTools();
  const fs::path out = SampleOutput();
  std::string cmd = std::string(kPython) + " " + Quote(kChecker) + " svg";
  std::set<std::string> files;
  for (const auto& e : fs::directory_iterator(out / "figures")) files.insert(e.path().filename().string());
  for (const std::string& f : ExpectedFigures(POROFIT_SAMPLE_STUDY)) {
    EXPECT_EQ(files.count(f + ".svg"), 1u) << f;
    cmd += " " + Quote((out / "figures" / (f + ".svg")).string());
  }
  EXPECT_EQ(files.size(), ExpectedFigures(POROFIT_SAMPLE_STUDY).size());
  const Outcome r = Shell(cmd);
  EXPECT_EQ(r.exit_code, 0) << r.out << r.err;
}

TEST(HtmlCli, ChromiumRendersEveryFigureIntoTheDom) {
  RequireTools();
  const fs::path out = SampleOutput();
  const Outcome r = Chromium("--virtual-time-budget=5000 --dump-dom " + Quote("file://" + (out / "report.html").string()));
  ASSERT_EQ(r.exit_code, 0) << r.err;
  const std::string& dom = r.out;
  ASSERT_NE(dom.find("<html lang=\"en\">"), std::string::npos) << dom.substr(0, 500);
  for (const std::string& f : ExpectedFigures(POROFIT_SAMPLE_STUDY)) {
    const size_t at = dom.find("data-figure=\"" + f + "\"");
    ASSERT_NE(at, std::string::npos) << f;
    const size_t open = dom.rfind('<', at);
    EXPECT_EQ(dom.compare(open, 4, "<svg"), 0) << f << ": " << dom.substr(open, 80);
  }
  EXPECT_NE(dom.find("id=\"caution-bottom\""), std::string::npos);
}

TEST(HtmlCli, ChromiumScreenshotIsNotBlank) {
  RequireTools();
  const fs::path out = SampleOutput();
  const fs::path png = Scratch() / "report.png";
  fs::remove(png);
  const Outcome r = Chromium("--screenshot=" + Quote(png.string()) + " --window-size=1200,2000 --hide-scrollbars " +
                             Quote("file://" + (out / "report.html").string()));
  ASSERT_EQ(r.exit_code, 0) << r.err;
  ASSERT_TRUE(fs::is_regular_file(png)) << r.err;
  // Text, tables and the first sample's figures: well above 2 % ink and many colours.
  const Outcome c = Shell(std::string(kPython) + " " + Quote(kChecker) + " png " + Quote(png.string()) +
                          " --min-nonwhite 0.03 --min-colours 16");
  EXPECT_EQ(c.exit_code, 0) << c.out << c.err;
}

TEST(HtmlCli, ReportWithAFailedFitRendersAndShowsTheFailure) {
  RequireTools();
  // tests/data/good/comparison.yaml: the power-offset fit of CMP-3 runs to
  // the P_r -> 0 limit, status at-limit (see comparison_test.cc).
  const fs::path out = FailedOutput();
  const Outcome v = Shell(std::string(kPython) + " " + Quote(kChecker) + " structure " +
                          Quote((out / "report.html").string()) + " --table parameters");
  EXPECT_EQ(v.exit_code, 0) << v.out << v.err;
  const Outcome r = Chromium("--dump-dom " + Quote("file://" + (out / "report.html").string()));
  ASSERT_EQ(r.exit_code, 0) << r.err;
  EXPECT_NE(r.out.find("<strong>Fit failed: power-offset — at-limit</strong>"), std::string::npos)
      << r.out.substr(0, 2000);
  EXPECT_NE(r.out.find("data-figure=\"CMP-3_k-fit\""), std::string::npos);  // the other models are still drawn
}

}  // namespace
}  // namespace porofit

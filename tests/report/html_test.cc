// The HTML report (porofit/report/html.h): document structure, figures,
// tables, failed fits, escaping, limits, streaming identity and depth tables.
#include "porofit/report/html.h"

#include <gtest/gtest.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <map>
#include <regex>
#include <set>
#include <sstream>

#include "fixture.h"
#include "porofit/core/units.h"
#include "porofit/io/study_loader.h"
#include "porofit/report/stream.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

size_t Count(const std::string& text, const std::string& what) {
  size_t n = 0;
  for (size_t at = text.find(what); at != std::string::npos; at = text.find(what, at + what.size())) ++n;
  return n;
}

// A small structural checker: every non-void element closed in order, and
// every id unique. Returns the problems found ("" = none).
std::string CheckStructure(const std::string& html) {
  static const std::set<std::string> kVoid = {"area", "base", "br", "col", "embed", "hr", "img",
                                              "input", "link", "meta", "source", "track", "wbr"};
  std::vector<std::string> stack;
  std::set<std::string> ids;
  std::string problems;
  size_t i = 0;
  while ((i = html.find('<', i)) != std::string::npos) {
    if (html.compare(i, 4, "<!--") == 0) {
      i = html.find("-->", i);
      continue;
    }
    if (html.compare(i, 2, "<!") == 0 || html.compare(i, 2, "<?") == 0) {
      i = html.find('>', i);
      continue;
    }
    const size_t end = html.find('>', i);
    if (end == std::string::npos) return problems + "unterminated tag; ";
    std::string tag = html.substr(i + 1, end - i - 1);
    const bool closing = !tag.empty() && tag[0] == '/';
    const bool self_closed = !tag.empty() && tag.back() == '/';
    std::string name = tag.substr(closing ? 1 : 0, tag.find_first_of(" \t\n/", closing ? 1 : 0) - (closing ? 1 : 0));
    if (closing) {
      if (stack.empty() || stack.back() != name)
        problems += "</" + name + "> closes <" + (stack.empty() ? std::string("nothing") : stack.back()) + ">; ";
      else
        stack.pop_back();
    } else {
      const size_t id = tag.find(" id=\"");
      if (id != std::string::npos) {
        const std::string v = tag.substr(id + 5, tag.find('"', id + 5) - id - 5);
        if (!ids.insert(v).second) problems += "duplicate id " + v + "; ";
      }
      if (!self_closed && kVoid.count(name) == 0) stack.push_back(name);
      if (name == "style") {  // skip the style sheet's text
        i = html.find("</style>", end);
        continue;
      }
    }
    i = end + 1;
  }
  for (const std::string& s : stack) problems += "<" + s + "> never closed; ";
  return problems;
}

const Study& SampleStudy() {
  static const Study s = LoadStudy(std::string(POROFIT_SOURCE_DIR) + "/samples/invented-field-study.yaml");
  return s;
}

RunOptions Fixed(int threads) {
  RunOptions o;
  o.threads = threads;
  o.timestamp_utc = "2026-02-03T04:05:06Z";
  o.command_line = "porofit fit study.yaml --out 'x y'";
  return o;
}

const StudyRun& SampleRun() {
  static const StudyRun r = RunStudy(SampleStudy(), Fixed(1));
  return r;
}

struct Rendered {
  std::string html;
  std::vector<HtmlFigure> figures;
};

const Rendered& SampleReport() {
  static const Rendered r = [] {
    Rendered out;
    std::ostringstream s;
    const std::vector<InputDigest> inputs = DigestInputs(SampleStudy());
    WriteHtmlReport(SampleRun(), inputs, s, &out.figures);
    out.html = s.str();
    return out;
  }();
  return r;
}

TEST(HtmlReport, IsAWellFormedHtml5DocumentWithTitleLanguageAndCharset) {
  const std::string& h = SampleReport().html;
  EXPECT_EQ(h.rfind("<!DOCTYPE html>\n<!--\n", 0), 0u);  // the cautions as a comment, then the document
  EXPECT_NE(h.find("-->\n<html lang=\"en\">"), std::string::npos);
  EXPECT_NE(h.find("<meta charset=\"utf-8\">"), std::string::npos);
  EXPECT_NE(h.find("<title>porofit report: " + HtmlEscape(SampleStudy().name) + "</title>"), std::string::npos);
  EXPECT_EQ(CheckStructure(h), "");
  EXPECT_EQ(h.substr(h.size() - 8), "</html>\n");
}

TEST(HtmlReport, IsSelfContained) {
  const std::string& h = SampleReport().html;
  EXPECT_EQ(h.find(" src="), std::string::npos);
  EXPECT_EQ(h.find("href=\"http"), std::string::npos);
  EXPECT_EQ(h.find("<link"), std::string::npos);
  // url(...) only for references within the page (SVG clip paths: "url(#...").
  for (size_t at = h.find("url("); at != std::string::npos; at = h.find("url(", at + 4))
    EXPECT_EQ(h[at + 4], '#') << h.substr(at, 40);
  EXPECT_EQ(h.find("<script"), std::string::npos);  // nothing to run: the content is plain markup
}

TEST(HtmlReport, CarriesTheCautionTopAndBottomAndTheInventedNotice) {
  const std::string& h = SampleReport().html;
  EXPECT_EQ(Count(h, HtmlEscape(CautionText())), 3u);  // opening comment, top and footer
  EXPECT_EQ(h.find("<!--\n" + CautionText() + "\n"), 16u);
  EXPECT_NE(h.find("id=\"caution-top\""), std::string::npos);
  EXPECT_NE(h.find("id=\"caution-bottom\""), std::string::npos);
  ASSERT_TRUE(IsInventedStudy(SampleStudy()));
  EXPECT_NE(h.find(HtmlEscape(InventedNotice(SampleStudy()))), std::string::npos);
  // A study that is not declared invented gets no notice.
  const StudyRun plain = testing::HandBuiltRun("Plain study", false);
  std::ostringstream s;
  WriteHtmlReport(plain, {}, s);
  EXPECT_EQ(s.str().find("id=\"invented-notice\""), std::string::npos);
}

TEST(HtmlReport, RecordsProvenanceWithInputDigests) {
  const std::string& h = SampleReport().html;
  EXPECT_NE(h.find(HtmlEscape(Fixed(1).command_line)), std::string::npos);  // quoted, escaped
  EXPECT_NE(h.find("2026-02-03T04:05:06Z"), std::string::npos);
  EXPECT_NE(h.find(SampleRun().metadata.tool_version), std::string::npos);
  EXPECT_NE(h.find(SampleRun().metadata.build_type), std::string::npos);
  for (const InputDigest& d : DigestInputs(SampleStudy())) {
    EXPECT_EQ(d.sha256.size(), 64u);
    EXPECT_NE(h.find(d.sha256), std::string::npos) << d.path;
  }
}

TEST(HtmlReport, HasAContentsEntryAndASectionPerSample) {
  const std::string& h = SampleReport().html;
  const std::regex section("<section class=\"sample\" id=\"s-([^\"]+)\"");
  std::set<std::string> sections;
  for (auto it = std::sregex_iterator(h.begin(), h.end(), section); it != std::sregex_iterator(); ++it)
    sections.insert((*it)[1]);
  EXPECT_EQ(sections.size(), SampleStudy().samples.size());
  for (const std::string& slug : sections) EXPECT_NE(h.find("<a href=\"#s-" + slug + "\">"), std::string::npos) << slug;
}

TEST(HtmlReport, DrawsTheExpectedFiguresOfEverySample) {
  const Rendered& r = SampleReport();
  std::set<std::string> keys;
  for (const HtmlFigure& f : r.figures) {
    keys.insert(f.key);
    EXPECT_EQ(f.file_name, "figures/" + f.key + ".svg");
    EXPECT_NE(f.svg.find("<svg"), std::string::npos);
    EXPECT_NE(f.svg.find("xmlns=\"http://www.w3.org/2000/svg\""), std::string::npos);
    // Inline once, with its key.
    EXPECT_EQ(Count(r.html, "<svg xmlns=\"http://www.w3.org/2000/svg\" class=\"porofit-figure\" data-figure=\"" + f.key + "\""), 1u) << f.key;
    EXPECT_NE(r.html.find("<figure id=\"fig-" + f.key + "\">"), std::string::npos) << f.key;
  }
  EXPECT_EQ(keys.size(), r.figures.size());
  for (const StudySample& ss : SampleStudy().samples) {
    std::string slug;
    for (char c : ss.sample.id) slug += std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' ? c : '_';
    for (const char* name : {"k-fit", "residuals", "std-residuals"})
      EXPECT_EQ(keys.count(slug + "_" + name), 1u) << slug << " " << name;
    EXPECT_EQ(keys.count(slug + "_alpha"), ss.grain.given ? 1u : 0u) << slug;
  }
}

TEST(HtmlReport, CaptionsNameTheBandLevelAndMethod) {
  const std::string& h = SampleReport().html;
  // The sample study asks for 95 % delta-method bands (samples/invented-field-study.yaml).
  EXPECT_NE(h.find("95&nbsp;% delta-method confidence band"), std::string::npos);
  EXPECT_NE(h.find("prediction band"), std::string::npos);
  EXPECT_GE(Count(h, "<figcaption>"), SampleReport().figures.size());
}

TEST(HtmlReport, ShowsParameterStandardErrorsCorrelationsAndComparison) {
  const std::string& h = SampleReport().html;
  EXPECT_EQ(Count(h, "<table class=\"parameters\">"), SampleStudy().samples.size());
  EXPECT_GE(Count(h, "<table class=\"correlation\">"), SampleStudy().samples.size());
  EXPECT_EQ(Count(h, "<table class=\"comparison\">"), SampleStudy().samples.size());
  EXPECT_NE(h.find("id=\"comparison-groups\""), std::string::npos);
  EXPECT_NE(h.find("id=\"overview-table\""), std::string::npos);
  // Every converged parameter's standard error is on the page, in working units.
  const FitResult& f = SampleRun().samples[0].fits[0];
  ASSERT_EQ(f.status, FitStatus::kConverged);
  char se[32];
  std::snprintf(se, sizeof se, "%.3g", f.parameters[0].std_error / f.parameters[0].si_factor);
  EXPECT_NE(h.find(std::string("<td class=\"num\">") + se + "</td>"), std::string::npos) << se;
}

TEST(HtmlReport, FailedFitIsShownPlainlyAndTheOtherModelIsStillDrawn) {
  const StudyRun run = testing::HandBuiltRun();
  std::ostringstream s;
  std::vector<HtmlFigure> figures;
  WriteHtmlReport(run, {}, s, &figures);
  const std::string h = s.str();
  EXPECT_EQ(CheckStructure(h), "");
  EXPECT_NE(h.find("<div class=\"warning fit-failed\" role=\"alert\" data-model=\"power-ref\"><strong>Fit failed: "
                   "power-ref &mdash; too-few-points</strong><br>3 points for 2 free parameters"),
            std::string::npos)
      << h;
  EXPECT_EQ(h.find("data-model=\"exp-modulus\""), std::string::npos);
  // The converged model is drawn, the failed one is not (legend names).
  ASSERT_FALSE(figures.empty());
  EXPECT_EQ(figures[0].key, "PLUG-1_k-fit");
  EXPECT_NE(figures[0].svg.find("exp-modulus"), std::string::npos);
  EXPECT_EQ(figures[0].svg.find("power-ref"), std::string::npos);
  EXPECT_NE(h.find("power-ref (too-few-points)"), std::string::npos);  // overview row
}

TEST(HtmlReport, EscapesTextFromTheStudy) {
  StudyRun run = testing::HandBuiltRun();
  run.study.samples[0].sample.id = "A<b>&\"c'";
  run.study.name = "<script>alert(1)</script> invented";
  run.samples[0].fits[1].message = "bad <value> & more";
  std::ostringstream s;
  WriteHtmlReport(run, {}, s);
  const std::string h = s.str();
  EXPECT_EQ(h.find("<script>"), std::string::npos);
  EXPECT_NE(h.find("&lt;script&gt;alert(1)&lt;/script&gt;"), std::string::npos);
  EXPECT_NE(h.find("A&lt;b&gt;&amp;&quot;c&#39;"), std::string::npos);
  EXPECT_NE(h.find("bad &lt;value&gt; &amp; more"), std::string::npos);
  EXPECT_NE(h.find("id=\"s-A_b___c_\""), std::string::npos);
  EXPECT_EQ(CheckStructure(h), "");
}

TEST(HtmlReport, SlugsOfIdsThatDifferOnlyInReplacedCharactersAreMadeUnique) {
  StudyRun run = testing::HandBuiltRun();
  run.study.samples.push_back(run.study.samples[0]);
  run.samples.push_back(run.samples[0]);
  run.study.samples[0].sample.id = "P 1";
  run.study.samples[1].sample.id = "P/1";
  const HtmlReport r(run.study, run.metadata, {}, ModelRegistry::Builtin());
  EXPECT_EQ(r.Slug(0), "P_1");
  EXPECT_EQ(r.Slug(1), "P_1-2");
}

// Figure files are figures/<slug>_<figure>.svg: a slug never holds a path
// separator or a leading dot and stays short even for the longest valid id of
// multi-byte characters (64 characters, 128 bytes here).
TEST(HtmlReport, SlugsAreSafeBoundedFileNames) {
  StudyRun run = testing::HandBuiltRun();
  run.study.samples.push_back(run.study.samples[0]);
  run.samples.push_back(run.samples[0]);
  std::string wide;
  for (size_t i = 0; i < kMaxSampleIdLength; ++i) wide += "\xC3\x9C";
  run.study.samples[0].sample.id = wide;
  run.study.samples[1].sample.id = "../.hidden/" + wide;
  const HtmlReport r(run.study, run.metadata, {}, ModelRegistry::Builtin());
  for (size_t i = 0; i < 2; ++i) {
    EXPECT_LE(r.Slug(i).size(), kMaxSampleIdLength + 3) << r.Slug(i);
    EXPECT_EQ(r.Slug(i).find_first_not_of("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789_-"),
              std::string::npos) << r.Slug(i);
  }
  EXPECT_NE(r.Slug(0), r.Slug(1));
}

TEST(HtmlReport, FigureAndSectionLimitsBoundTheDocument) {
  const StudyRun& run = SampleRun();
  ASSERT_GE(run.samples.size(), 3u);
  HtmlOptions o;
  o.figure_sample_limit = 1;
  o.section_sample_limit = 2;
  std::ostringstream s;
  std::vector<HtmlFigure> figures;
  WriteHtmlReport(run, DigestInputs(run.study), s, &figures, {}, o);
  const std::string h = s.str();
  EXPECT_EQ(CheckStructure(h), "");
  const HtmlReport r(run.study, run.metadata, {}, ModelRegistry::Builtin(), o);
  // Only the first sample's figures (depth-table figures are not per sample).
  for (const HtmlFigure& f : figures)
    if (f.key.rfind("depth-", 0) != 0) {
      EXPECT_EQ(f.key.rfind(r.Slug(0) + "_", 0), 0u) << f.key;
    }
  EXPECT_FALSE(figures.empty());
  EXPECT_NE(h.find("id=\"figure-limit\""), std::string::npos);
  EXPECT_NE(h.find("id=\"section-limit\""), std::string::npos);
  EXPECT_EQ(Count(h, "<section class=\"sample\""), 2u);
  EXPECT_EQ(h.find("id=\"s-" + r.Slug(2) + "\""), std::string::npos);
  // Every sample still has an overview row.
  for (const StudySample& ss : run.study.samples) EXPECT_NE(h.find(">" + HtmlEscape(ss.sample.id) + "<"), std::string::npos);
}

TEST(HtmlReport, StreamedFolderHasTheSameReportAndFigureFilesAsTheInMemoryOne) {
  const fs::path a = fs::temp_directory_path() / ("porofit-html-whole-" + std::to_string(::getpid()));
  const fs::path b = fs::temp_directory_path() / ("porofit-html-stream-" + std::to_string(::getpid()));
  fs::remove_all(a);
  fs::remove_all(b);
  WriteReportFolder(SampleRun(), a);
  StreamOptions window;
  window.window = 1;
  RunAndWriteReportFolder(SampleStudy(), Fixed(2), b, {}, {}, window);
  EXPECT_EQ(Slurp(a / "report.html"), Slurp(b / "report.html"));
  std::set<std::string> fa, fb;
  for (const auto& e : fs::directory_iterator(a / "figures")) fa.insert(e.path().filename().string());
  for (const auto& e : fs::directory_iterator(b / "figures")) fb.insert(e.path().filename().string());
  EXPECT_EQ(fa, fb);
  EXPECT_EQ(fa.size(), SampleReport().figures.size());
  for (const std::string& f : fa) EXPECT_EQ(Slurp(a / "figures" / f), Slurp(b / "figures" / f)) << f;
  fs::remove_all(a);
  fs::remove_all(b);
}

// A hand-built depth table: 5 steps, the deepest two flagged.
depth::DepthTable HandBuiltDepthTable() {
  depth::DepthTable t;
  t.spec.name = "QV-14 demo";
  t.spec.top = 2000;
  t.spec.base = 2400;
  t.spec.step = 100;
  t.spec.band_level = 0.8;
  depth::FittedCurve c;
  c.sample_id = "PLUG-1";
  c.model_id = "exp-modulus";
  t.spec.curves.push_back(c);
  for (int i = 0; i < 5; ++i) {
    depth::DepthRow r;
    r.depth = 2000 + 100.0 * i;
    r.vertical_stress = 22.6e3 * r.depth;  // 2.3 g/cc overburden, Pa
    r.pore_pressure = 10.2e3 * r.depth;
    r.evaluation_pressure = r.vertical_stress - r.pore_pressure;
    r.curve = 0;
    r.k_dry = 15e9 + 0.1e9 * i;
    r.k_dry_lower = r.k_dry - 0.5e9;
    r.k_dry_upper = r.k_dry + 0.5e9;
    r.alpha = 0.6 - 0.01 * i;
    r.alpha_lower = r.alpha - 0.03;
    r.alpha_upper = r.alpha + 0.03;
    if (i >= 3) r.flags = depth::kAboveLabRange | (i == 4 ? depth::kAlphaOutsideBounds : 0u);
    t.rows.push_back(r);
  }
  t.assumptions = {"datum: MSL", "overburden: constant gradient 22.6 kPa/m"};
  return t;
}

TEST(HtmlDepthSection, DrawsProfilesAgainstDepthAndMarksFlaggedRows) {
  const std::string h = RenderDepthTableSection(HandBuiltDepthTable(), false);
  EXPECT_EQ(CheckStructure(h), "");
  for (const char* f : {"stress", "alpha", "k"})
    EXPECT_EQ(Count(h, std::string("class=\"porofit-figure\" data-figure=\"depth-QV-14_demo_") + f + "\""), 1u) << f;
  EXPECT_EQ(Count(h, "<tr class=\"flagged\">"), 2u);
  EXPECT_NE(h.find("above-lab-range;alpha-outside-bounds"), std::string::npos);
  EXPECT_NE(h.find("datum: MSL"), std::string::npos);
  EXPECT_NE(h.find("depth (m)"), std::string::npos);
  // 2000 m: S_v = 45.2 MPa.
  EXPECT_NE(h.find("<td class=\"num\">45.20</td>"), std::string::npos);
  EXPECT_NE(h.find("80&nbsp;%"), std::string::npos);
}

TEST(HtmlDepthSection, FieldUnitsShowFeetAndPsi) {
  const std::string h = RenderDepthTableSection(HandBuiltDepthTable(), true);
  EXPECT_NE(h.find("depth (ft)"), std::string::npos);
  EXPECT_NE(h.find("S_v (psi)"), std::string::npos);
  // 2000 m = 6561.7 ft; 45.2 MPa = 6556 psi (units::kFoot, units::kPsi).
  EXPECT_NE(h.find("<td class=\"num\">6561.7</td>"), std::string::npos);
  EXPECT_NE(h.find("<td class=\"num\">6556</td>"), std::string::npos);
}

}  // namespace
}  // namespace porofit

namespace porofit {
namespace {

// K_dry above K_s inside the data (here: a grain modulus below the plug's own
// stiffest points) is a warning in the summary and in the report, not only a
// flag in alpha.csv.
TEST(KDryAboveKs, IsAWarningInTheSummaryAndTheReport) {
  const std::string text = R"(name: K_dry above K_s
samples:
  - id: S1
    lithology: clean sandstone
    porosity: 0.2
    bulk_density: 2.12 g/cc
    measurement: static
    data:
      columns: [P MPa, K GPa]
      rows: [[5, 20.1], [10, 26.0], [20, 31.2], [30, 33.6], [40, 34.9], [60, 35.8]]
    models: [exp-modulus]
    grain_modulus:
      measured: {K_s: 30 GPa, sigma: 1 GPa, source: invented for this test}
)";
  const StudyRun run = RunStudy(ParseStudy(text, "kdry.yaml", ModelRegistry::Builtin()), Fixed(1));
  std::ostringstream summary, html;
  WriteSummary(run, summary);
  WriteHtmlReport(run, {}, html);
  const std::string expected = "K_dry reaches or exceeds K_s = 30.0 ± 1.0 GPa inside the data range (data: 4 of 6 points";
  EXPECT_NE(summary.str().find("  WARNING: " + expected), std::string::npos) << summary.str();
  EXPECT_NE(html.str().find("<strong>Warning:</strong> " + expected), std::string::npos);
  EXPECT_NE(summary.str().find("fits: exp-modulus at "), std::string::npos) << summary.str();
}

TEST(KDryAboveKs, NoWarningWhenKDryStaysBelowKs) {
  const StudyRun& run = SampleRun();
  std::ostringstream summary;
  WriteSummary(run, summary);
  EXPECT_EQ(summary.str().find("K_dry reaches or exceeds K_s"), std::string::npos);
}

// Human-facing numbers are rounded: no 7+ decimals, no 9+ digit runs, no
// printf exponents ("2.07496e+10"), no "+-" in the summary of the sample study.
TEST(SummaryNumbers, AreRoundedToMeaningfulDigits) {
  std::ostringstream summary;
  WriteSummary(SampleRun(), summary);
  const std::string s = summary.str();
  std::smatch m;
  EXPECT_FALSE(std::regex_search(s, m, std::regex("[0-9]\\.[0-9]{7,}"))) << m.str(0);
  EXPECT_FALSE(std::regex_search(s, m, std::regex("[0-9]{9,}"))) << m.str(0);
  EXPECT_FALSE(std::regex_search(s, m, std::regex("[0-9]e[+-][0-9]"))) << m.str(0);
  EXPECT_EQ(s.find("+-"), std::string::npos);
  EXPECT_NE(s.find("K_s = "), std::string::npos);
}

}  // namespace
}  // namespace porofit

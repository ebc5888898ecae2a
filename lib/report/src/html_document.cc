// The HTML report's frame: head with the style sheet, cautions, provenance,
// table of contents, the across-sample tables and the footer
// (porofit/report/html.h). Sample sections: html_sample.cc.
#include <cmath>
#include <fstream>
#include <map>
#include <sstream>

#include "format.h"
#include "html_figures.h"
#include "html_util.h"
#include "porofit/report/html.h"

namespace porofit {
namespace {

using detail::Esc;
using detail::HtmlNum;

// Print-friendly, light only: no dark backgrounds, one sample per printed
// page, figures never split. Colours of the series are set by the plots.
const char* kStyle = R"css(
:root { color-scheme: light; }
body { font-family: "DejaVu Sans", Arial, Helvetica, sans-serif; font-size: 14px; line-height: 1.4;
       color: #111; background: #fff; margin: 1.5em auto; max-width: 1150px; padding: 0 1em; }
h1 { font-size: 1.6em; margin-bottom: 0.2em; }
h2 { font-size: 1.3em; border-bottom: 2px solid #555; padding-bottom: 0.15em; margin-top: 1.6em; }
h3 { font-size: 1.08em; margin: 1.1em 0 0.4em; }
.caution { border: 2px solid #b36b00; background: #fff6e0; padding: 0.6em 0.9em; font-weight: bold; }
.invented { border: 2px dashed #444; background: #f4f4f4; padding: 0.5em 0.9em; }
.warning { border: 2px solid #b00020; background: #fdecee; padding: 0.5em 0.9em; margin: 0.5em 0; }
.warning strong { color: #8a0018; }
.note { color: #333; font-size: 0.95em; }
table { border-collapse: collapse; margin: 0.4em 0 0.9em; font-size: 0.92em; }
th, td { border: 1px solid #999; padding: 0.2em 0.5em; text-align: left; vertical-align: top; }
th { background: #eee; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr.failed td { background: #fdecee; }
tr.flagged td { background: #fff6e0; }
td.digest { font-family: "DejaVu Sans Mono", monospace; font-size: 0.85em; word-break: break-all; }
code, .mono { font-family: "DejaVu Sans Mono", monospace; font-size: 0.92em; }
figure { margin: 0.8em 0; page-break-inside: avoid; break-inside: avoid; }
figure svg { max-width: 100%; height: auto; border: 1px solid #ddd; background: #fff; }
figcaption { font-size: 0.9em; color: #222; margin-top: 0.3em; max-width: 60em; }
.figures { display: flex; flex-wrap: wrap; gap: 0 1.2em; }
.figures figure { flex: 1 1 520px; max-width: 560px; }
nav.toc ol { columns: 3; column-gap: 2em; }
section.sample, section.across, section.depth { page-break-before: always; break-before: page; }
details > summary { cursor: pointer; font-weight: bold; }
footer { margin-top: 2em; border-top: 2px solid #555; padding-top: 0.5em; }
@media print {
  body { max-width: none; margin: 0; font-size: 11px; }
  nav.toc { page-break-after: always; break-after: page; }
  a { color: #000; text-decoration: none; }
  .figures figure { max-width: 48%; }
  details { display: block; }
}
)css";

}  // namespace

void WriteHtmlFigureFiles(const std::filesystem::path& folder, const std::vector<HtmlFigure>& figures) {
  const std::filesystem::path dir = folder / "figures";
  std::error_code ec;
  std::filesystem::create_directories(dir, ec);
  if (ec) throw OutputError("cannot create '" + dir.string() + "': " + ec.message());
  for (const HtmlFigure& f : figures) {
    const std::filesystem::path p = folder / f.file_name;
    std::ofstream out(p, std::ios::binary | std::ios::trunc);
    out << f.svg;
    out.close();
    if (!out) throw OutputError("cannot write '" + p.string() + "' (disk full?)");
  }
}

std::string HtmlEscape(std::string_view text) {
  std::string out;
  out.reserve(text.size() + text.size() / 8);
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&#39;"; break;
      default: out += c;
    }
  }
  return out;
}

HtmlReport::HtmlReport(const Study& study, const RunMetadata& metadata, const std::vector<InputDigest>& inputs,
                       const ModelRegistry& registry, HtmlOptions options)
    : study_(study), metadata_(metadata), inputs_(inputs), registry_(registry), options_(options) {
  // Slugs: the id made safe for anchors and file names; a clash (two ids
  // differing only in replaced characters) gets "-<n>" until unique.
  std::map<std::string, int> used;
  slugs_.reserve(study.samples.size());
  for (const StudySample& ss : study.samples) {
    std::string s;
    for (char c : ss.sample.id) {
      const bool ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' ||
                      c == '-';
      s += ok ? c : '_';
    }
    if (s.empty()) s = "sample";
    // Bounded (figure file names are "<slug>_<figure>.svg"); the loader already
    // limits ids to kMaxSampleIdLength characters, which may be several bytes each.
    if (s.size() > kMaxSampleIdLength) s.resize(kMaxSampleIdLength);
    std::string candidate = s;
    for (int k = 2; used.count(candidate) > 0; ++k) candidate = s + "-" + std::to_string(k);
    used[candidate] = 1;
    slugs_.push_back(candidate);
  }
}

std::string HtmlReport::Head() const {
  std::ostringstream o;
  // The cautions open the file itself too (as they open every output file),
  // for anyone who reads the source rather than the rendered page.
  auto comment = [](std::string text) {
    for (size_t k = text.find("--"); k != std::string::npos; k = text.find("--", k)) text.replace(k, 2, "- -");
    return text;
  };
  o << "<!DOCTYPE html>\n<!--\n" << comment(CautionText()) << "\n";
  const std::string notice = InventedNotice(study_);
  if (!notice.empty()) o << comment(notice) << "\n";
  o << "-->\n";
  o << "<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
    << "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
    << "<meta name=\"generator\" content=\"porofit " << Esc(metadata_.tool_version) << "\">\n"
    << "<title>porofit report: " << Esc(study_.name) << "</title>\n<style>" << kStyle << "</style>\n</head>\n<body>\n";
  o << "<header>\n<h1>" << Esc(study_.name) << "</h1>\n";
  o << "<p class=\"caution\" id=\"caution-top\" role=\"note\">" << Esc(CautionText()) << "</p>\n";
  const std::string invented = InventedNotice(study_);
  if (!invented.empty()) o << "<p class=\"invented\" id=\"invented-notice\">" << Esc(invented) << "</p>\n";
  if (!study_.description.empty()) o << "<p>" << Esc(study_.description) << "</p>\n";
  for (const std::string& w : study_.warnings) o << "<p class=\"warning\">" << Esc(w) << "</p>\n";
  o << "</header>\n";

  o << "<section class=\"provenance\" id=\"provenance\">\n<h2>Run and provenance</h2>\n<table class=\"provenance\">\n";
  auto row = [&](const char* name, const std::string& value) {
    o << "<tr><th scope=\"row\">" << name << "</th><td>" << value << "</td></tr>\n";
  };
  row("tool", "porofit " + Esc(metadata_.tool_version));
  row("build type", Esc(metadata_.build_type));
  row("command line", "<code>" + Esc(metadata_.command_line) + "</code>");
  row("started (UTC)", Esc(metadata_.started_utc));
  row("study file", "<code>" + Esc(study_.path) + "</code>");
  row("samples", std::to_string(study_.samples.size()));
  o << "</table>\n<h3>Input files</h3>\n<table class=\"inputs\" id=\"inputs\">\n"
    << "<tr><th>role</th><th>path</th><th>bytes</th><th>SHA-256</th></tr>\n";
  for (const InputDigest& d : inputs_) {
    o << "<tr><td>" << Esc(d.role) << "</td><td><code>" << Esc(d.path) << "</code></td><td class=\"num\">"
      << d.size_bytes << "</td><td class=\"digest\">" << Esc(d.sha256) << "</td></tr>\n";
  }
  o << "</table>\n";
  o << "<p class=\"note\">Every number of this page is also in the CSV files and results.json of the same folder "
       "(docs/outputs.md). Pressures are differential pressures in MPa, moduli in GPa, parameters in each model's "
       "working unit. Figures are also written one per file under <code>figures/</code>.</p>\n";
  if (study_.samples.size() > options_.figure_sample_limit) {
    o << "<p class=\"note\" id=\"figure-limit\">Figures are drawn for the first " << options_.figure_sample_limit
      << " of " << study_.samples.size()
      << " samples (figure limit); the later sections show their tables only.</p>\n";
  }
  if (study_.samples.size() > options_.section_sample_limit) {
    o << "<p class=\"note\" id=\"section-limit\">Sections are written for the first " << options_.section_sample_limit
      << " samples (section limit); every sample has a row in the overview table at the end, and its full results "
         "are in the CSV files and results.json.</p>\n";
  }
  o << "</section>\n";

  o << "<nav class=\"toc\" id=\"contents\">\n<h2>Contents</h2>\n<ol>\n";
  for (size_t i = 0; i < study_.samples.size() && i < options_.section_sample_limit; ++i) {
    const Sample& s = study_.samples[i].sample;
    o << "<li><a href=\"#s-" << slugs_[i] << "\">" << Esc(s.id) << "</a>";
    if (!s.lithology.empty()) o << " <span class=\"note\">" << Esc(s.lithology) << "</span>";
    o << "</li>\n";
  }
  o << "</ol>\n<p><a href=\"#across\">Across samples: overview and model comparison</a></p>\n</nav>\n<main>\n";
  return o.str();
}

std::string HtmlReport::Tail(const StudyRun& across, const std::string& overview_rows,
                             std::vector<HtmlFigure>* figures) const {
  std::ostringstream o;
  o << "</main>\n<section class=\"across\" id=\"across\">\n<h2>Across samples</h2>\n";
  o << "<h3>Overview</h3>\n<table class=\"overview\" id=\"overview-table\">\n"
    << "<tr><th>sample</th><th>lithology</th><th>fits</th><th>converged</th><th>best model</th>"
       "<th>Akaike weight of best</th><th>next model, &Delta;</th><th>not converged</th></tr>\n"
    << overview_rows << "</table>\n";

  const compare::ComparisonSummary& cs = across.comparison_summary;
  const std::string crit(compare::ToString(cs.criterion));
  o << "<h3>Model comparison by group</h3>\n";
  if (cs.groups.empty()) {
    o << "<p>No model comparison across samples (no samples compared).</p>\n";
  } else {
    o << "<p class=\"note\">Groups by " << (cs.group_by.empty() ? std::string("(none: all samples)") : Esc(detail::Join(cs.group_by, ", ")))
      << ". Criterion " << Esc(crit)
      << ": wins = samples where the model ranked first; summed " << Esc(crit)
      << " over the group's complete samples (every model usable); median Akaike weight and mean difference to "
         "each sample's best over the samples where the model was usable. Compare criteria only between fits of "
         "the same sample.</p>\n";
    o << "<table class=\"comparison-groups\" id=\"comparison-groups\">\n<tr><th>group</th><th>samples</th>"
         "<th>complete</th><th>model</th><th>with model</th><th>usable</th><th>wins</th><th>summed "
      << Esc(crit) << "</th><th>median weight</th><th>mean &Delta;" << Esc(crit) << "</th></tr>\n";
    for (const compare::GroupSummary& g : cs.groups) {
      for (size_t m = 0; m < g.models.size(); ++m) {
        const compare::GroupModelSummary& gm = g.models[m];
        o << "<tr>";
        if (m == 0) {
          const std::string span = " rowspan=\"" + std::to_string(g.models.size()) + "\"";
          o << "<td" << span << ">" << Esc(g.label) << "</td><td class=\"num\"" << span << ">" << g.samples
            << "</td><td class=\"num\"" << span << ">" << g.complete_samples << "</td>";
        }
        o << "<td>" << Esc(gm.model_id) << "</td><td class=\"num\">" << gm.samples_with_model
          << "</td><td class=\"num\">" << gm.samples_usable << "</td><td class=\"num\">" << gm.wins
          << "</td><td class=\"num\">" << HtmlNum("%.2f", gm.summed_score) << "</td><td class=\"num\">"
          << HtmlNum("%.3f", gm.median_weight) << "</td><td class=\"num\">" << HtmlNum("%.2f", gm.mean_delta)
          << "</td></tr>\n";
      }
    }
    o << "</table>\n";
  }
  if (!across.branches.empty() || !across.joint_fits.empty()) {
    o << "<p class=\"note\">Branch (hysteresis) tests and joint fits are reported in summary.txt, "
         "branch_tests.csv, hysteresis.csv, joint_fits.csv and joint_tests.csv.</p>\n";
  }
  o << "</section>\n";
  for (size_t t = 0; t < across.depth_tables.size() && t < across.study.depth_tables.size(); ++t) {
    const DepthTableRun& table = across.depth_tables[t];
    const DepthTableChoice& choice = across.study.depth_tables[t];
    if (table.computed) {
      o << RenderDepthTableSection(table.table, choice.units == DepthUnits::kField, figures);
    } else {
      o << "<section class=\"depth\" id=\"depth-" << detail::DepthSlug(choice.spec.name) << "\">\n<h2>Depth table "
        << Esc(choice.spec.name) << "</h2>\n<div class=\"warning\" role=\"alert\"><strong>Not computed:</strong> "
        << Esc(table.message) << "</div>\n" << RenderDepthInputWarnings(choice.spec.warnings) << "</section>\n";
    }
  }
  o << "<footer>\n<p class=\"caution\" id=\"caution-bottom\" role=\"note\">" << Esc(CautionText()) << "</p>\n";
  const std::string invented = InventedNotice(study_);
  if (!invented.empty()) o << "<p class=\"invented\">" << Esc(invented) << "</p>\n";
  o << "<p class=\"note\">AICc: lower is better; compare only fits of the same sample; a difference under 2 does "
       "not separate two models (Burnham &amp; Anderson 2002). alpha = 1 &minus; K_dry/K_s; "
    << Esc(detail::CorrelationCaveat())
    << ". Bands are statistical statements about the fit and K_s; they do not cover the limits of plug data "
       "(scale, coring damage, fractures, temperature, loading path). Flags are explained in docs/outputs.md.</p>\n";
  o << "<p class=\"note\">porofit " << Esc(metadata_.tool_version) << ", run " << Esc(metadata_.started_utc)
    << ".</p>\n</footer>\n</body>\n</html>\n";
  return o.str();
}

void WriteHtmlReport(const StudyRun& run, const std::vector<InputDigest>& inputs, std::ostream& html,
                     std::vector<HtmlFigure>* figures, const ReportOptions& options, const HtmlOptions& html_options) {
  const ModelRegistry& registry = options.registry != nullptr ? *options.registry
                                  : run.registry        ? *run.registry
                                                        : ModelRegistry::Builtin();
  const HtmlReport report(run.study, run.metadata, inputs, registry, html_options);
  html << report.Head();
  std::string overview;
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i) {
    HtmlSection s = report.Section(i, run.samples[i]);
    html << s.html;
    overview += s.overview_row;
    if (figures != nullptr)
      for (HtmlFigure& f : s.figures) figures->push_back(std::move(f));
  }
  html << report.Tail(run, overview, figures);
}

}  // namespace porofit

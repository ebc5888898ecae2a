#pragma once
// The HTML report: one self-contained file per run (report.html), plus each
// figure as its own SVG file (figures/<sample>_<figure>.svg) for papers.
//
// report.html opens offline: inline CSS, inline SVG figures, no script needed
// to read it, no external file or network resource. It holds, in order:
//   - title, the caution (CautionText()), the invented-data notice when the
//     study declares its data invented, study warnings;
//   - run provenance: tool version, build type, command line, start time,
//     every input file with its SHA-256;
//   - a table of contents with one anchor per sample;
//   - one section per sample: data with error bars and each model's fitted
//     curve with its confidence and prediction bands; residuals against
//     pressure; standardised residuals; alpha(P) with bands per model, flagged
//     grid points marked and listed in words; the parameter table (estimate,
//     standard error, bounds) and each fit's correlation matrix; the model
//     comparison (criterion, difference, Akaike weight, rank). A fit that did
//     not converge is shown in a warning box with its status and message and
//     no curve is drawn for it; the sample's other models are still drawn;
//   - across samples: one overview row per sample and the comparison summary
//     per group (wins, summed criterion, median weight);
//   - the caution again in the footer.
//
// Units on the page: pressures in MPa, moduli in GPa, parameters in each
// model's working unit (as in the CSV files). Text from the study (ids,
// names, messages) is HTML-escaped.
//
// Size: sections of samples beyond HtmlOptions::figure_sample_limit (200)
// carry their tables but no figures (and no SVG files), and samples beyond
// section_sample_limit (2000) are one row of the overview table only, so the
// page stays usable (and its size bounded: about 60 kB per sample with
// figures, 6 kB with tables only, 0.3 kB per overview row) for batches of
// thousands of samples; the page says so. Both the in-memory
// writer (WriteReportFolder) and the streaming one (RunAndWriteReportFolder)
// render the same bytes through HtmlReport.
//
// Determinism: the output depends on the study, the results and the metadata
// fields listed above only (not on thread count or wall time).
#include <cstddef>
#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

#include "porofit/depth/table.h"
#include "porofit/models/registry.h"
#include "porofit/report/report.h"
#include "porofit/run/run.h"

namespace porofit {

struct HtmlOptions {
  /// Samples (the first ones, in study order) whose sections carry figures
  /// and whose SVG files are written. Later sections show tables only.
  size_t figure_sample_limit = 200;
  /// Samples (the first ones) that get a section at all; later samples
  /// appear as a row of the overview table only (every sample's numbers are
  /// in the CSV files and results.json). >= figure_sample_limit is sensible.
  size_t section_sample_limit = 2000;
};

/// One figure: `key` is "<sample-slug>_<figure>" (figure one of k-fit,
/// residuals, std-residuals, alpha); the inline <svg> carries
/// data-figure="<key>" and the file is figures/<key>.svg.
struct HtmlFigure {
  std::string key;
  std::string file_name;  ///< "figures/<key>.svg", relative to the report folder
  std::string svg;        ///< standalone SVG document (XML declaration, xmlns)
};

/// A rendered sample section.
struct HtmlSection {
  std::string html;                 ///< the <section> element
  std::vector<HtmlFigure> figures;  ///< its figures (empty beyond the figure limit)
  std::string overview_row;         ///< one <tr> of the across-sample overview table
};

/// Renders a run piece by piece (the streaming writer calls Section() as each
/// sample finishes). Section() is const and thread-safe.
class HtmlReport {
 public:
  /// `registry` must outlive the object (model titles and curves).
  HtmlReport(const Study& study, const RunMetadata& metadata, const std::vector<InputDigest>& inputs,
             const ModelRegistry& registry, HtmlOptions options = {});

  /// Everything before the first sample section: doctype, head with the
  /// style sheet, cautions, provenance, table of contents.
  std::string Head() const;
  /// Sample `index` of the study with its results.
  HtmlSection Section(size_t index, const SampleRun& run) const;
  /// Everything after the last section: the overview table (the
  /// concatenated HtmlSection::overview_row of every sample, in order), the
  /// across-sample comparison of `across` (comparison_summary is used), and
  /// the footer.
  /// The depth tables of `across` (StudyRun::depth_tables) follow the
  /// comparison, one section each (RenderDepthTableSection); a table that was
  /// not computed shows its reason in a warning box. Their figures are
  /// appended to `figures` when given (files figures/depth-<slug>_<name>.svg).
  std::string Tail(const StudyRun& across, const std::string& overview_rows,
                   std::vector<HtmlFigure>* figures = nullptr) const;

  /// The anchor slug of sample `index`: the id with characters outside
  /// [A-Za-z0-9_-] replaced by '_' (so it is a valid plot::Figure id and a safe file name: no path separator,
  /// no leading dot), cut to kMaxSampleIdLength bytes, made unique with "-<n>" where needed.
  const std::string& Slug(size_t index) const { return slugs_[index]; }

 private:
  const Study& study_;
  const RunMetadata& metadata_;
  const std::vector<InputDigest>& inputs_;
  const ModelRegistry& registry_;
  HtmlOptions options_;
  std::vector<std::string> slugs_;
};

/// The whole report of an in-memory run: report.html into `html`, and the
/// figures (to be written as separate files) appended to `figures` when given.
void WriteHtmlReport(const StudyRun& run, const std::vector<InputDigest>& inputs, std::ostream& html,
                     std::vector<HtmlFigure>* figures = nullptr, const ReportOptions& options = {},
                     const HtmlOptions& html_options = {});

/// Creates `folder`/figures (also when `figures` is empty) and writes each
/// figure's SVG there. Throws OutputError naming the file on failure. The
/// files are not fsynced one by one: WriteFolderAtomically syncs the tree.
void WriteHtmlFigureFiles(const std::filesystem::path& folder, const std::vector<HtmlFigure>& figures);

/// One depth table as an HTML <section>: its input warnings, its assumptions; figures of S_v,
/// P_p and the evaluation pressure against depth, alpha(z) and K_dry(z) with
/// their bands (depth increasing downward, flagged rows marked); a table of
/// the rows with their flags. `field_units`: depth in ft, stresses in psi;
/// otherwise m and MPa (K in GPa either way). Figures carry
/// data-figure="depth-<slug>_<stress|alpha|k>".
/// The figures are also appended to `figures` when given, as standalone SVG
/// documents for figures/<key>.svg.
std::string RenderDepthTableSection(const depth::DepthTable& table, bool field_units,
                                    std::vector<HtmlFigure>* figures = nullptr);

/// The depth table's input warnings (DepthTableSpec::warnings) as an alert
/// block; "" when there are none. Part of RenderDepthTableSection, and shown
/// for a table that was not computed.
std::string RenderDepthInputWarnings(const std::vector<std::string>& warnings);

/// Escapes &, <, >, " and ' for HTML text and attribute values.
std::string HtmlEscape(std::string_view text);

}  // namespace porofit

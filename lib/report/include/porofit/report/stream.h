#pragma once
// The report, one sample at a time.
//
// Two levels:
//  - Row writers: each report file as a header (written once) plus the rows
//    of one sample. The whole-run writers of report.h are exactly these in a
//    loop over the samples, so both paths give the same bytes.
//  - RunAndWriteReportFolder(): runs the study with RunStudyStreaming() and
//    appends each sample's rows to the files in the staging folder as soon as
//    the sample is done, in sample order, then drops the sample's results.
//    Memory stays bounded for any number of samples (the study's inputs, the
//    reorder window and the summary's first blocks are all that is held). The
//    folder still appears atomically (WriteFolderAtomically): nothing partial
//    on failure.
//
// summary.txt for a study of at most StreamReportOptions::summary_sample_limit
// samples is byte-identical to WriteSummary(); a larger one shows the first
// `summary_sample_limit` samples' blocks, then one table of counts per model
// (fits, converged, flagged, lowest-AICc wins); every sample's full results
// are in the CSV files and results.json.
#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "porofit/report/report.h"
#include "porofit/run/stream.h"

namespace porofit {

// ---- row writers (header once, then rows per sample, in sample order)

void WriteParametersCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteParametersCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteFitsCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteFitsCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteResidualsCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteResidualsCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteAlphaCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteAlphaCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteVtiAlphaCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteVtiAlphaCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteModuliCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteModuliCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteStrainResidualsCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteStrainResidualsCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteComparisonCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteComparisonCsvRows(const Study& study, const StudySample& sample, const SampleRun& run, std::ostream& out);
void WriteNestedTestsCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteNestedTestsCsvRows(const StudySample& sample, const SampleRun& run, std::ostream& out);
/// grain_modulus.csv needs no fit results; `shared_with` = the other samples
/// of the sample's grain-modulus group, in study order.
void WriteGrainModulusCsvHeader(const Study& study, const RunMetadata& metadata, std::ostream& out);
void WriteGrainModulusCsvRow(const StudySample& sample, const std::vector<std::string>& shared_with,
                             std::ostream& out);

/// results.json without "samples" and the fields after it.
nlohmann::ordered_json ResultsJsonHead(const Study& study, const RunMetadata& metadata,
                                       const std::vector<InputDigest>& inputs);
/// One element of results.json "samples" (`run` nullptr: no fits).
nlohmann::ordered_json SampleResultsJson(const StudySample& sample, const SampleRun* run,
                                         const std::vector<std::string>& shared_with,
                                         const ReportOptions& options = {});
/// Appends the fields that follow "samples" ("mineral_overrides", "alpha_notes").
void AddResultsJsonTail(const StudyRun& run, nlohmann::ordered_json& results);

/// Counts in the summary's first line.
struct SummaryCounts {
  size_t fits = 0, converged = 0, flagged = 0;
  void Add(const StudySample& sample, const SampleRun& run);
};
void WriteSummaryHead(const Study& study, const RunMetadata& metadata, const SummaryCounts& counts, std::ostream& out);
void WriteSummarySample(const StudySample& sample, const SampleRun& run, std::ostream& out);
/// The across-sample blocks (comparison groups, branch tests, joint fits).
void WriteSummaryAcross(const StudyRun& run, std::ostream& out);
void WriteSummaryFoot(const Study& study, std::ostream& out);

// ---- streaming run + report folder

struct StreamReportOptions {
  ReportOptions report;
  /// Samples shown with their own block in summary.txt; beyond this, counts
  /// per model only. >= 0.
  size_t summary_sample_limit = 100;
};

struct StreamReportResult {
  RunMetadata metadata;  ///< with wall_seconds
  std::string summary;   ///< the text written to summary.txt
  size_t fits = 0;            ///< per-sample fits run (sample x model)
  size_t converged_fits = 0;  ///< of those, status converged (usable; flags may still apply)
};

/// Digests the inputs (before anything is written), then runs the study and
/// writes every file of ReportFileNames() into `folder` as samples finish.
/// The folder is checked (StudyFolderOptions, PrepareOutputFolder) before
/// any fitting. Throws OutputError / InputError like WriteReportFolder(); on
/// failure no partial folder remains.
StreamReportResult RunAndWriteReportFolder(const Study& study, const RunOptions& run_options,
                                           const std::filesystem::path& folder,
                                           const AtomicFolderOptions& folder_options = {},
                                           const StreamReportOptions& options = {}, const StreamOptions& stream = {});

}  // namespace porofit

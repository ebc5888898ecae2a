#pragma once
// Rendering a StudyRun: parameter, fit-statistic and residual tables (CSV), a
// complete JSON record with provenance, and a terminal summary.
//
// Every writer takes a std::ostream& so tests see exactly what users see.
// Units: the data types are SI; tables show parameters in each model's
// working unit (ParameterResult::unit, e.g. GPa, MPa, 1/GPa), pressures in MPa
// and moduli in GPa, with the unit in the column name where one unit serves a
// whole column and in a `unit` column where it varies by row. Numbers are
// written in shortest round-trip form; a number that was not computed (NaN) is
// an empty CSV field and JSON null. File layouts: docs/outputs.md.
//
// Every CSV starts with '#' comment lines (read with e.g. pandas
// `comment='#'`) and the JSON with a "caution" field: decision support only,
// review by qualified engineers, local regulations and operator standards
// govern; plus a notice when the study's data are invented.
#include <cstdint>
#include <filesystem>
#include <ostream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "porofit/models/registry.h"
#include "porofit/report/output_folder.h"
#include "porofit/run/run.h"

namespace porofit {

/// Version of the JSON layout; bumped when a field changes meaning or goes away.
/// 2: adds per-sample "grain_modulus", "fluid_modulus", "band_settings",
/// "vti_alpha", per-fit "alpha", top-level "mineral_overrides" and "alpha_notes".
/// 3: adds per-sample "comparison" and top-level "comparison_summary".
/// 4: adds top-level "depth_tables" (alpha-versus-depth tables, lib/report/src/depth_writer.cc).
inline constexpr int kResultsSchemaVersion = 4;

/// An input file with its digest, for provenance.
struct InputDigest {
  std::string path;
  std::string role;        ///< "study" or "data"
  std::string sha256;      ///< lower-case hex
  std::uint64_t size_bytes = 0;
};

/// SHA-256 of every Study::inputs entry, in order. Throws InputError if a file
/// cannot be read.
std::vector<InputDigest> DigestInputs(const Study& study);

/// Every Study::inputs entry as a ProtectedInput (role "study": data = false;
/// "data": data = true), for CheckOutputLocation (output_folder.h).
std::vector<ProtectedInput> ProtectedInputs(const Study& study);

/// `options` with the study's inputs appended to protected_inputs and, when
/// run_stamp is empty, the run's start time (metadata.started_utc) as the
/// marker's run stamp. Every report-folder writer passes its options through
/// this, so no caller can write an output folder over the study's inputs.
AtomicFolderOptions StudyFolderOptions(const Study& study, const RunMetadata& metadata, AtomicFolderOptions options);

struct ReportOptions {
  /// Catalogue for model titles, formulas and references. nullptr: the run's
  /// own (StudyRun::registry: built-ins plus the study's user models), else Builtin().
  const ModelRegistry* registry = nullptr;
};

/// The caution sentence printed at the top of every output.
std::string CautionText();
/// True if the study declares its data invented with the top-level key
/// `invented: true` (Study::invented). Words in the name or description do
/// not count. The sample study declares it.
bool IsInventedStudy(const Study& study);
/// The notice printed when IsInventedStudy(); empty otherwise.
std::string InventedNotice(const Study& study);

/// parameters.csv: one row per (sample, model, parameter).
void WriteParametersCsv(const StudyRun& run, std::ostream& out);
/// fits.csv: one row per (sample, model): statistics, flags, status.
void WriteFitsCsv(const StudyRun& run, std::ostream& out);
/// residuals.csv: one row per (sample, model, data point) for fits that
/// produced residuals.
void WriteResidualsCsv(const StudyRun& run, std::ostream& out);

/// alpha.csv: one row per (sample with K_s, model, method, grid pressure).
void WriteAlphaCsv(const StudyRun& run, std::ostream& out);
/// grain_modulus.csv: one row per sample (method none when it has no K_s).
void WriteGrainModulusCsv(const StudyRun& run, std::ostream& out);
/// alpha_vti.csv: one row per VTI stiffness row of a sample with K_s.
void WriteVtiAlphaCsv(const StudyRun& run, std::ostream& out);

/// moduli.csv: tangent (with band), secant and chord moduli of strain samples
/// (SampleRun::strain_moduli); only the header for studies without any.
void WriteModuliCsv(const StudyRun& run, std::ostream& out);
/// strain_residuals.csv: residuals of strain-form fits, in strain units
/// (residuals.csv lists the modulus fits only).
void WriteStrainResidualsCsv(const StudyRun& run, std::ostream& out);
/// comparison.csv: one row per (sample, model): criteria, differences,
/// weights, rank and cross-validation scores.
void WriteComparisonCsv(const StudyRun& run, std::ostream& out);
/// nested_tests.csv: one row per (sample, pair of models): F test or why not.
void WriteNestedTestsCsv(const StudyRun& run, std::ostream& out);
/// comparison_groups.csv: one row per (group of samples, model).
void WriteComparisonGroupsCsv(const StudyRun& run, std::ostream& out);
/// branch_tests.csv: one row per (branch set, model, scope): joint (pooled,
/// for the test only) against separate fits (porofit/run/branches.h).
void WriteBranchTestsCsv(const StudyRun& run, std::ostream& out);
/// hysteresis.csv: one row per (branch set, model, compared pair, grid
/// pressure), or one row with the reason for a pair not compared.
void WriteHysteresisCsv(const StudyRun& run, std::ostream& out);
/// joint_fits.csv: one row per (joint fit, member sample, model parameter),
/// shared = yes/no (lib/report/src/joint_writer.cc).
void WriteJointFitsCsv(const StudyRun& run, std::ostream& out);
/// joint_tests.csv: one row per joint fit: F test and AICc against the separate fits.
void WriteJointTestsCsv(const StudyRun& run, std::ostream& out);
/// joint_alpha.csv: alpha bands of joint-fit members with K_s.
void WriteJointAlphaCsv(const StudyRun& run, std::ostream& out);
/// The "joint_fits" array of results.json.
nlohmann::ordered_json JointFitsJson(const StudyRun& run);
/// The joint-fit lines of the terminal summary (nothing without joint fits).
void WriteJointSummary(const StudyRun& run, std::ostream& out);

/// depth_<name>.csv of Study::depth_tables[table]: '#' header lines with every
/// assumption, the datum, the units, the band convention and the cautions,
/// then one row per depth step in the table's output units (a table not
/// computed has its reason in the header and no rows).
/// lib/report/src/depth_writer.cc; layout in docs/outputs.md.
void WriteDepthTableCsv(const StudyRun& run, size_t table, std::ostream& out);
/// "depth_<name>.csv".
std::string DepthTableFileName(const DepthTableChoice& table);
/// The "depth_tables" array of results.json (m, MPa, GPa in the field names).
nlohmann::ordered_json DepthTablesJson(const StudyRun& run);
/// The depth-table lines of the terminal summary (nothing without tables).
void WriteDepthSummary(const StudyRun& run, std::ostream& out);

/// results.json as a value (ordered keys). NaN and infinities become null
/// when dumped.
nlohmann::ordered_json ResultsJson(const StudyRun& run, const std::vector<InputDigest>& inputs,
                                   const ReportOptions& options = {});
void WriteResultsJson(const StudyRun& run, const std::vector<InputDigest>& inputs, std::ostream& out,
                      const ReportOptions& options = {});

/// The terminal summary: a fixed-width table per sample (model, status, RMSE,
/// AICc, flags, parameters +/- 1 SE), notes for flagged or failed fits, the
/// lowest-AICc model, and the caution lines.
void WriteSummary(const StudyRun& run, std::ostream& out);

/// Names of the files WriteReportFolder() creates for every study, in writing order.
std::vector<std::string> ReportFileNames();
/// All files written for `study`: ReportFileNames() plus one depth_<name>.csv
/// per depth table (before results.json), in writing order.
std::vector<std::string> ReportFileNames(const Study& study);

/// Digests the inputs and writes every report file into `folder` atomically
/// (WriteFolderAtomically, with StudyFolderOptions: a folder that would harm
/// an input is refused). Throws OutputError / InputError; on failure no
/// partial folder remains.
void WriteReportFolder(const StudyRun& run, const std::filesystem::path& folder,
                       const AtomicFolderOptions& folder_options = {}, const ReportOptions& options = {});

}  // namespace porofit

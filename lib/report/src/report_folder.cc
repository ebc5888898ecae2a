#include <algorithm>
#include <sstream>

#include "porofit/report/html.h"
#include "porofit/report/report.h"
#include "porofit/report/sha256.h"

namespace porofit {

std::vector<InputDigest> DigestInputs(const Study& study) {
  std::vector<InputDigest> out;
  out.reserve(study.inputs.size());
  for (const InputFile& f : study.inputs) {
    const FileDigest d = Sha256File(f.path);
    out.push_back({f.path, f.role, d.sha256, d.size});
  }
  return out;
}

std::vector<ProtectedInput> ProtectedInputs(const Study& study) {
  std::vector<ProtectedInput> out;
  out.reserve(study.inputs.size());
  for (const InputFile& f : study.inputs) out.push_back({f.path, f.role != "study"});
  return out;
}

AtomicFolderOptions StudyFolderOptions(const Study& study, const RunMetadata& metadata, AtomicFolderOptions options) {
  for (ProtectedInput& in : ProtectedInputs(study)) options.protected_inputs.push_back(std::move(in));
  if (options.run_stamp.empty()) options.run_stamp = metadata.started_utc;
  return options;
}

std::vector<std::string> ReportFileNames() {
  return {"summary.txt", "parameters.csv", "fits.csv",          "residuals.csv",
          "alpha.csv",   "grain_modulus.csv", "alpha_vti.csv", "moduli.csv", "strain_residuals.csv",
          "comparison.csv", "nested_tests.csv", "comparison_groups.csv", "branch_tests.csv", "hysteresis.csv",
          "joint_fits.csv", "joint_tests.csv", "joint_alpha.csv", "results.json", "report.html"};
}

std::vector<std::string> ReportFileNames(const Study& study) {
  std::vector<std::string> names = ReportFileNames();
  std::vector<std::string> depth;
  for (const DepthTableChoice& t : study.depth_tables) depth.push_back(DepthTableFileName(t));
  // Before results.json, in writing order.
  names.insert(std::find(names.begin(), names.end(), "results.json"), depth.begin(), depth.end());
  return names;
}

void WriteReportFolder(const StudyRun& run, const std::filesystem::path& folder,
                       const AtomicFolderOptions& folder_options, const ReportOptions& options) {
  // Digest before writing anything: an unreadable input stops the run with
  // nothing on disk.
  const std::vector<InputDigest> inputs = DigestInputs(run.study);
  const AtomicFolderOptions checked = StudyFolderOptions(run.study, run.metadata, folder_options);
  WriteFolderAtomically(
      folder,
      [&](const std::filesystem::path& staging) {
        auto emit = [&](const std::string& name, auto&& writer) {
          std::ostringstream s;
          writer(s);
          WriteFileDurably(staging / name, s.str());
        };
        emit("summary.txt", [&](std::ostream& o) { WriteSummary(run, o); });
        emit("parameters.csv", [&](std::ostream& o) { WriteParametersCsv(run, o); });
        emit("fits.csv", [&](std::ostream& o) { WriteFitsCsv(run, o); });
        emit("residuals.csv", [&](std::ostream& o) { WriteResidualsCsv(run, o); });
        emit("alpha.csv", [&](std::ostream& o) { WriteAlphaCsv(run, o); });
        emit("grain_modulus.csv", [&](std::ostream& o) { WriteGrainModulusCsv(run, o); });
        emit("alpha_vti.csv", [&](std::ostream& o) { WriteVtiAlphaCsv(run, o); });
        emit("moduli.csv", [&](std::ostream& o) { WriteModuliCsv(run, o); });
        emit("strain_residuals.csv", [&](std::ostream& o) { WriteStrainResidualsCsv(run, o); });
        emit("comparison.csv", [&](std::ostream& o) { WriteComparisonCsv(run, o); });
        emit("nested_tests.csv", [&](std::ostream& o) { WriteNestedTestsCsv(run, o); });
        emit("comparison_groups.csv", [&](std::ostream& o) { WriteComparisonGroupsCsv(run, o); });
        emit("branch_tests.csv", [&](std::ostream& o) { WriteBranchTestsCsv(run, o); });
        emit("hysteresis.csv", [&](std::ostream& o) { WriteHysteresisCsv(run, o); });
        emit("joint_fits.csv", [&](std::ostream& o) { WriteJointFitsCsv(run, o); });
        emit("joint_tests.csv", [&](std::ostream& o) { WriteJointTestsCsv(run, o); });
        emit("joint_alpha.csv", [&](std::ostream& o) { WriteJointAlphaCsv(run, o); });
        for (size_t t = 0; t < run.study.depth_tables.size(); ++t)
          emit(DepthTableFileName(run.study.depth_tables[t]), [&](std::ostream& o) { WriteDepthTableCsv(run, t, o); });
        emit("results.json", [&](std::ostream& o) { WriteResultsJson(run, inputs, o, options); });
        std::vector<HtmlFigure> figures;
        emit("report.html", [&](std::ostream& o) { WriteHtmlReport(run, inputs, o, &figures, options); });
        WriteHtmlFigureFiles(staging, figures);
      },
      checked);
}

}  // namespace porofit

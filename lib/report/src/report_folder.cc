#include <sstream>

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

std::vector<std::string> ReportFileNames() {
  return {"summary.txt", "parameters.csv", "fits.csv",          "residuals.csv",
          "alpha.csv",   "grain_modulus.csv", "alpha_vti.csv", "moduli.csv", "strain_residuals.csv",
          "results.json"};
}

void WriteReportFolder(const StudyRun& run, const std::filesystem::path& folder,
                       const AtomicFolderOptions& folder_options, const ReportOptions& options) {
  // Digest before writing anything: an unreadable input stops the run with
  // nothing on disk.
  const std::vector<InputDigest> inputs = DigestInputs(run.study);
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
        emit("results.json", [&](std::ostream& o) { WriteResultsJson(run, inputs, o, options); });
      },
      folder_options);
}

}  // namespace porofit

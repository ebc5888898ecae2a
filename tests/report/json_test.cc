#include <gtest/gtest.h>

#include <filesystem>
#include <fstream>
#include <set>
#include <sstream>
#include <string>

#include "fixture.h"
#include "porofit/report/report.h"
#include "porofit/report/sha256.h"
#include "porofit_test/folder_snapshot.h"

namespace porofit {
namespace {
using nlohmann::json;

std::vector<InputDigest> Inputs() { return {{"demo/study.yaml", "study", std::string(64, 'a'), 123}}; }

json RoundTrip(const StudyRun& run) {
  std::ostringstream s;
  WriteResultsJson(run, Inputs(), s);
  return json::parse(s.str());  // throws if the text is not valid JSON
}

TEST(ResultsJson, RoundTripsThroughNlohmannWithTheSameContent) {
  const StudyRun run = testing::HandBuiltRun();
  const json j = RoundTrip(run);
  // Parsing the dump and dumping again is stable.
  EXPECT_EQ(json::parse(j.dump()), j);
  EXPECT_EQ(j["schema"], "porofit-results");
  EXPECT_EQ(j["schema_version"], kResultsSchemaVersion);
  const json& fit = j["samples"][0]["fits"][0];
  EXPECT_EQ(fit["model"], "exp-modulus");
  EXPECT_EQ(fit["status"], "converged");
  EXPECT_EQ(fit["parameters"][0]["name"], "K_inf");
  EXPECT_EQ(fit["parameters"][0]["unit"], "GPa");
  EXPECT_DOUBLE_EQ(fit["parameters"][0]["estimate"].get<double>(), 20.0);
  EXPECT_DOUBLE_EQ(fit["parameters"][2]["std_error"].get<double>(), 2.0);
  EXPECT_EQ(fit["parameters"][0]["upper"], nullptr);  // +inf bound
  // Covariance in working units: (K_inf, P_close) = -0.25 * 0.5 GPa * 2 MPa.
  EXPECT_EQ(fit["covariance"]["parameters"], json({"K_inf", "K_0", "P_close"}));
  EXPECT_EQ(fit["covariance"]["units"], json({"GPa", "GPa", "MPa"}));
  EXPECT_DOUBLE_EQ(fit["covariance"]["matrix"][0][2].get<double>(), -0.25);
  EXPECT_DOUBLE_EQ(fit["covariance"]["matrix"][1][1].get<double>(), 0.0625);
  EXPECT_DOUBLE_EQ(fit["correlation"]["matrix"][1][2].get<double>(), 0.8);
  EXPECT_DOUBLE_EQ(fit["residuals"]["durbin_watson"].get<double>(), 2.5);
  EXPECT_EQ(fit["residuals"]["runs_test"]["runs"], 3);
  EXPECT_DOUBLE_EQ(fit["residuals"]["points"][1]["fitted_K_GPa"].get<double>(), 15.52);
  EXPECT_DOUBLE_EQ(fit["settings"]["K_0"]["lower"].get<double>(), 1.0);
  EXPECT_EQ(fit["settings"]["K_0"]["unit"], "GPa");
  EXPECT_EQ(fit["warnings"], json({"demo warning"}));
  EXPECT_DOUBLE_EQ(j["samples"][0]["data"][2]["pressure_MPa"].get<double>(), 30.0);
  EXPECT_DOUBLE_EQ(j["samples"][0]["data"][2]["sigma_K_GPa"].get<double>(), 0.25);
}

TEST(ResultsJson, NotANumberIsWrittenAsNull) {
  const json j = RoundTrip(testing::HandBuiltRun());
  const json& ok = j["samples"][0]["fits"][0]["statistics"];
  EXPECT_TRUE(ok["aicc"].is_null());
  EXPECT_TRUE(ok["chi2_reduced"].is_null());
  EXPECT_DOUBLE_EQ(ok["aic"].get<double>(), -12.5);
  const json& bad = j["samples"][0]["fits"][1];
  EXPECT_EQ(bad["status"], "too-few-points");
  EXPECT_TRUE(bad["parameters"][0]["estimate"].is_null());
  EXPECT_TRUE(bad["parameters"][0]["std_error"].is_null());
  EXPECT_TRUE(bad["statistics"]["rmse_GPa"].is_null());
  std::ostringstream s;
  WriteResultsJson(testing::HandBuiltRun(), Inputs(), s);
  EXPECT_EQ(s.str().find(": nan"), std::string::npos);
  EXPECT_EQ(s.str().find(": -nan"), std::string::npos);
  EXPECT_EQ(s.str().find("NaN"), std::string::npos);
  EXPECT_EQ(s.str().find("Infinity"), std::string::npos);
  EXPECT_EQ(s.str().find(": inf"), std::string::npos);
  EXPECT_EQ(s.str().find(": -inf"), std::string::npos);
}

TEST(ResultsJson, StartsWithTheCautionAndCarriesProvenance) {
  std::ostringstream s;
  WriteResultsJson(testing::HandBuiltRun(), Inputs(), s);
  const std::string text = s.str();
  EXPECT_EQ(text.rfind("{\n  \"caution\": \"CAUTION: decision support only.", 0), 0u);
  const json j = json::parse(text);
  EXPECT_NE(j["invented_data"].get<std::string>().find("invented"), std::string::npos);
  const json& p = j["provenance"];
  EXPECT_EQ(p["tool"], "porofit");
  EXPECT_EQ(p["tool_version"], "9.9.9");
  EXPECT_EQ(p["build_type"], "Release");
  EXPECT_EQ(p["started_utc"], "2026-01-31T12:00:00Z");
  EXPECT_EQ(p["command_line"], "porofit fit demo/study.yaml --out x");
  EXPECT_EQ(p["input_files"][0]["sha256"], std::string(64, 'a'));
  EXPECT_EQ(p["input_files"][0]["size_bytes"], 123);
  const json& o = j["samples"][0]["options"];
  EXPECT_EQ(o["multistart"], FitOptions{}.multistart);
  EXPECT_EQ(o["loss"], "none");
}

// Every number must say its unit: in its name (suffix), through a sibling
// "unit"/"units"/"entry_unit" field, or by being a count or a dimensionless
// ratio listed here.
bool UnitKnown(const std::string& key, bool sibling_unit) {
  static const std::set<std::string> kDimensionless = {
      "schema_version", "threads", "point", "cycle", "size_bytes", "effective_pressure_coefficient",
      "poisson_ratio", "iterations", "starts_tried", "starts_converged", "si_factor", "durbin_watson",
      "leverage", "standardized_residual", "robust_weight"};
  static const std::vector<std::string> kSuffixes = {"_MPa", "_GPa", "_m_per_s", "_kg_per_m3", "_fraction",
                                                     "_percent", "_ratio"};
  if (sibling_unit || kDimensionless.count(key)) return true;
  for (const std::string& s : kSuffixes) {
    if (key.size() > s.size() && key.compare(key.size() - s.size(), s.size(), s) == 0) return true;
  }
  return false;
}

void CheckUnits(const json& j, const std::string& key, bool sibling_unit, std::vector<std::string>* bad,
                const std::string& path) {
  if (j.is_object()) {
    const bool here = j.contains("unit") || j.contains("units") || j.contains("entry_unit");
    for (auto it = j.begin(); it != j.end(); ++it) CheckUnits(it.value(), it.key(), here, bad, path + "/" + it.key());
  } else if (j.is_array()) {
    for (size_t i = 0; i < j.size(); ++i) CheckUnits(j[i], key, sibling_unit, bad, path + "/" + std::to_string(i));
  } else if (j.is_number() && !UnitKnown(key, sibling_unit)) {
    bad->push_back(path);
  }
}

TEST(ResultsJson, EveryNumberNamesItsUnit) {
  const json j = RoundTrip(testing::HandBuiltRun());
  std::vector<std::string> bad;
  CheckUnits(j, "", false, &bad, "");
  EXPECT_TRUE(bad.empty()) << "numbers without a unit: " << ::testing::PrintToString(bad);
}

TEST(ReportFolder, WritesEveryFileAndHashesTheInputs) {
  namespace fs = std::filesystem;
  const fs::path root = fs::temp_directory_path() / "porofit-report-folder-test";
  fs::remove_all(root);
  fs::create_directories(root);
  StudyRun run = testing::HandBuiltRun();
  run.study.path = (root / "study.yaml").string();
  { std::ofstream(run.study.path) << "name: x\n"; }
  run.study.inputs = {{run.study.path, "study"}};
  WriteReportFolder(run, root / "out");
  for (const std::string& f : ReportFileNames()) EXPECT_TRUE(fs::exists(root / "out" / f)) << f;
  std::ifstream in(root / "out" / "results.json");
  const json j = json::parse(in);
  EXPECT_EQ(j["provenance"]["input_files"][0]["sha256"], Sha256Hex("name: x\n"));
  EXPECT_EQ(j["provenance"]["input_files"][0]["role"], "study");
  fs::remove_all(root);
}

TEST(ReportFolder, UnreadableInputLeavesNoFolder) {
  namespace fs = std::filesystem;
  const fs::path root = fs::temp_directory_path() / "porofit-report-folder-missing-test";
  fs::remove_all(root);
  fs::create_directories(root);
  StudyRun run = testing::HandBuiltRun();
  run.study.inputs = {{(root / "gone.yaml").string(), "study"}};
  EXPECT_THROW(WriteReportFolder(run, root / "out"), InputError);
  EXPECT_FALSE(fs::exists(root / "out"));
  fs::remove_all(root);
}

// Library callers get the location rule too: WriteReportFolder refuses a
// folder that would harm the study's inputs, whatever options they pass.
TEST(ReportFolder, RefusesAFolderThatWouldHarmTheStudysInputs) {
  namespace fs = std::filesystem;
  const fs::path root = fs::temp_directory_path() / "porofit-report-folder-harm-test";
  fs::remove_all(root);
  fs::create_directories(root / "data");
  StudyRun run = testing::HandBuiltRun();
  run.study.path = (root / "study.yaml").string();
  { std::ofstream(run.study.path) << "name: x\n"; }
  { std::ofstream(root / "data" / "a.csv") << "P,K\n"; }
  run.study.inputs = {{run.study.path, "study"}, {(root / "data" / "a.csv").string(), "data"}};
  const auto before = test::SnapshotFolder(root);
  AtomicFolderOptions o;
  o.overwrite = true;
  for (const fs::path& out : {root / "data", root / "data" / "out", root}) {
    EXPECT_THROW(WriteReportFolder(run, out, o), OutputError) << out;
    EXPECT_EQ(test::SnapshotFolder(root), before) << out;
  }
  WriteReportFolder(run, root / "out", o);  // next to the study file: allowed
  EXPECT_TRUE(fs::exists(root / "out" / kOutputMarkerName));
  fs::remove_all(root);
}

}  // namespace
}  // namespace porofit

// Lab CSV files read as they are written: the data.columns map from porofit's
// roles to a file's own header names, units from the header or the map, and
// the same reading for sample_table files (lib/io/src/csv_columns.cc).
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

class Folder {
 public:
  Folder() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("porofit-labcsv-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  ~Folder() { fs::remove_all(dir_); }
  std::string Write(const std::string& name, const std::string& text) const {
    std::ofstream(dir_ / name, std::ios::binary) << text;
    return (dir_ / name).string();
  }
  // A one-sample static study reading `csv` with the given `data:` keys.
  std::string Study(const std::string& csv, const std::string& data_keys) const {
    Write("plug.csv", csv);
    return Write("study.yaml", "name: lab csv test (invented)\nsamples:\n  - id: S1\n    lithology: sandstone\n"
                               "    porosity: 0.2\n    bulk_density: 2.3 g/cc\n    measurement: static\n"
                               "    models: [linear]\n    data:\n      file: plug.csv\n" + data_keys);
  }

 private:
  fs::path dir_;
};

std::string ErrorOf(const std::string& study) {
  try {
    LoadStudy(study);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

constexpr double kPsiPa = 6894.757;  // 1 psi in Pa (common practice, 4 significant decimals)

TEST(LabCsv, TheInventedSpreadsheetExportLoadsWithTheNumbersOfTheFile) {
  const Study s = LoadStudy(std::string(POROFIT_SOURCE_DIR) + "/samples/lab-export-study.yaml");
  ASSERT_EQ(s.samples.size(), 1u);
  const Sample& a = s.samples[0].sample;
  // samples/data/QV14-2602V-export.csv: "2;7,74;0,25;..." on line 4, "60;15,94;0,25;..." on line 12.
  ASSERT_EQ(a.points.size(), 9u);
  EXPECT_DOUBLE_EQ(a.points[0].pressure, 2e6);
  EXPECT_DOUBLE_EQ(a.points[0].modulus, 7.74e9);
  EXPECT_DOUBLE_EQ(a.points[0].sigma, 0.25e9);
  EXPECT_EQ(a.points[0].where.line, 4);
  EXPECT_DOUBLE_EQ(a.points[4].pressure, 20e6);
  EXPECT_DOUBLE_EQ(a.points[4].modulus, 14.58e9);
  EXPECT_DOUBLE_EQ(a.points[8].pressure, 60e6);
  EXPECT_DOUBLE_EQ(a.points[8].modulus, 15.94e9);
  EXPECT_EQ(a.points[8].where.line, 12);
  EXPECT_TRUE(a.sigma_absolute);
}

TEST(LabCsv, UnitsComeFromTheHeaderInEveryForm) {
  Folder f;
  // name_UNIT, name (UNIT), name [UNIT]; the map names the header by name or whole text.
  const Study s = LoadStudy(f.Study("pressure_MPa,Kdry (ksi),sigma [GPa],temperature_C\n5,1000,0.1,20\n10,1200,0.2,21\n",
                                    "      columns:\n        P: pressure\n        K: Kdry (ksi)\n"
                                    "        sigma_K: sigma\n    uncertainty: {calibrated: true}\n"));
  const Sample& a = s.samples[0].sample;
  ASSERT_EQ(a.points.size(), 2u);
  EXPECT_DOUBLE_EQ(a.points[1].pressure, 10e6);
  EXPECT_NEAR(a.points[1].modulus, 1200e3 * kPsiPa, 1e-6 * 1200e3 * kPsiPa);
  EXPECT_DOUBLE_EQ(a.points[1].sigma, 0.2e9);
}

TEST(LabCsv, TheIssueHeaderReadsWithoutRenaming) {
  Folder f;
  const Study s = LoadStudy(f.Study("pressure_MPa,K_GPa,sigma_GPa\n5,10,0.3\n20,14,0.3\n",
                                    "      columns: {P: pressure_MPa, K: K, sigma_K: sigma}\n"
                                    "    uncertainty: {calibrated: true}\n"));
  const Sample& a = s.samples[0].sample;
  EXPECT_DOUBLE_EQ(a.points[1].pressure, 20e6);
  EXPECT_DOUBLE_EQ(a.points[1].modulus, 14e9);
  EXPECT_DOUBLE_EQ(a.points[1].sigma, 0.3e9);
}

TEST(LabCsv, UnitsFromTheMapAndAgreeingUnitsInBothPlaces) {
  Folder f;
  const Study s = LoadStudy(f.Study("Pc\tPp\tK [GPa]\n1450\t145\t10\n2900\t145\t12\n",
                                    "      columns:\n        P_c: {column: Pc, unit: psi}\n"
                                    "        P_p: {column: Pp, unit: psi}\n"
                                    "        K: {column: K, unit: GPa}\n"));
  const Sample& a = s.samples[0].sample;
  EXPECT_NEAR(a.points[0].confining, 1450 * kPsiPa, 1e-6 * 1450 * kPsiPa);
  EXPECT_NEAR(a.points[0].pore, 145 * kPsiPa, 1e-6 * 145 * kPsiPa);
  EXPECT_DOUBLE_EQ(a.points[0].modulus, 10e9);
}

TEST(LabCsv, ExtraColumnsAreIgnoredUnderAMapButNotUnderTheList) {
  Folder f;
  const std::string csv = "P [MPa],K [GPa],operator\n5,10,A. B.\n10,12,C. D.\n";
  EXPECT_EQ(LoadStudy(f.Study(csv, "      columns: {P: P, K: K}\n")).samples[0].sample.points.size(), 2u);
  const std::string e = ErrorOf(f.Study(csv, "      columns: [P MPa, K GPa]\n"));
  EXPECT_NE(e.find("plug.csv:1:17: error: header mismatch: column 'operator'"), std::string::npos) << e;
}

TEST(LabCsv, MapErrorsAreLocated) {
  Folder f;
  std::string e = ErrorOf(f.Study("P [MPa],K [GPa]\n5,10\n", "      columns: {P: P, Kdry: K}\n"));
  EXPECT_NE(e.find("study.yaml:11:23: error: unknown column 'Kdry'"), std::string::npos) << e;
  e = ErrorOf(f.Study("P [MPa],K [GPa],K (MPa)\n5,10,1\n", "      columns: {P: P, K: K}\n"));
  EXPECT_NE(e.find("plug.csv:1:17: error: header fields 'K [GPa]' and 'K (MPa)' both name column 'K'"),
            std::string::npos) << e;
  e = ErrorOf(f.Study("P [MPa],K [GPa]\n5,10\n", "      columns: {P: P, K: {column: K, unit: GPA}}\n"));
  EXPECT_NE(e.find("study.yaml:11:44: error: unknown modulus unit 'GPA'"), std::string::npos) << e;
  e = ErrorOf(f.Study("P [MPa],K [GPa]\n5,10\n", "      columns: {P: P, K: {column: K, units: GPa}}\n"));
  EXPECT_NE(e.find("unknown key 'units'"), std::string::npos) << e;
}

TEST(LabCsv, AColumnsMapNeedsAFile) {
  Folder f;
  f.Write("plug.csv", "");
  const std::string study = f.Write(
      "study.yaml", "name: t\nsamples:\n  - id: S1\n    lithology: s\n    porosity: 0.2\n    bulk_density: 2.3 g/cc\n"
                    "    measurement: static\n    models: [linear]\n    data:\n      columns: {P: P, K: K}\n"
                    "      rows: [[5, 10]]\n");
  const std::string e = ErrorOf(study);
  EXPECT_NE(e.find("study.yaml:10:16: error: a 'data.columns' map names columns of a file"), std::string::npos) << e;
}

TEST(LabCsv, SampleTableFilesUseTheSameDialectAndColumnMap) {
  Folder f;
  f.Write("samples.csv", "\xEF\xBB\xBFid;lithology;porosity [%];bulk_density [g/cc]\r\nA-1;sand, fine;20,5;2,30\r\n");
  f.Write("points.csv", "plug\tPressure (MPa)\tK_dry [GPa]\tnote\n# acquisition note\nA-1\t5\t10,5\tx\n"
                        "A-1\t10\t12,25\ty\n\t\t\t\n");
  const Study s = LoadStudy(f.Write("study.yaml", "name: t (invented)\ndefaults: {models: [linear]}\n"
                                                  "sample_table:\n  file: samples.csv\n  data: points.csv\n"
                                                  "  sample_column: plug\n"
                                                  "  columns: {P: Pressure, K: K_dry}\n"));
  ASSERT_EQ(s.samples.size(), 1u);
  const Sample& a = s.samples[0].sample;
  EXPECT_EQ(a.lithology, "sand, fine");
  EXPECT_DOUBLE_EQ(a.porosity, 0.205);
  EXPECT_DOUBLE_EQ(a.bulk_density, 2300);
  ASSERT_EQ(a.points.size(), 2u);
  EXPECT_DOUBLE_EQ(a.points[1].pressure, 10e6);
  EXPECT_DOUBLE_EQ(a.points[1].modulus, 12.25e9);
  EXPECT_EQ(a.points[1].where.line, 4);
}

TEST(LabCsv, SampleTableDataHeaderTakesTheUnitSuffixForm) {
  Folder f;
  f.Write("samples.csv", "id,lithology,porosity,bulk_density [g/cc]\nA-1,sst,0.2,2.3\n");
  f.Write("points.csv", "sample,P_MPa,K_GPa\nA-1,5,10\nA-1,10,12\n");
  const Study s = LoadStudy(
      f.Write("study.yaml", "name: t\ndefaults: {models: [linear]}\nsample_table: {file: samples.csv, data: points.csv}\n"));
  EXPECT_DOUBLE_EQ(s.samples[0].sample.points[1].modulus, 12e9);
  EXPECT_DOUBLE_EQ(s.samples[0].sample.points[1].pressure, 10e6);
}

TEST(LabCsv, SampleTableMapErrorsAreLocated) {
  Folder f;
  f.Write("samples.csv", "id,lithology,porosity,bulk_density [g/cc]\nA-1,sst,0.2,2.3\n");
  f.Write("points.csv", "sample;Pressure;K [GPa]\nA-1;5;10,5\n");
  std::string e = ErrorOf(f.Write("study.yaml", "name: t\ndefaults: {models: [linear]}\nsample_table:\n"
                                                "  file: samples.csv\n  data: points.csv\n  columns: {P: Pressure}\n"));
  EXPECT_NE(e.find("points.csv:1:8: error: column 'Pressure' (P) needs a unit"), std::string::npos) << e;
  e = ErrorOf(f.Write("study.yaml", "name: t\ndefaults: {models: [linear]}\nsample_table:\n"
                                    "  file: samples.csv\n  data: points.csv\n  columns: {P: Presure}\n"));
  EXPECT_NE(e.find("study.yaml:6:16: error: column 'Presure' (mapped to P) is not in the header"), std::string::npos)
      << e;
  EXPECT_NE(e.find("did you mean 'Pressure'?"), std::string::npos) << e;
  e = ErrorOf(f.Write("study.yaml", "name: t\ndefaults: {models: [linear]}\nsample_table:\n"
                                    "  file: samples.csv\n  data: points.csv\n  columns: {P: {column: Pressure, unit: MPa}}\n"
                                    "  decimal: point\n"));
  EXPECT_NE(e.find("points.csv:2:7: error: non-numeric value '10,5' in column 'K'; the decimal mark of this file is a point"),
            std::string::npos) << e;
}

}  // namespace
}  // namespace porofit

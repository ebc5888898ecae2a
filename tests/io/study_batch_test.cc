// The sample_table batch form of a study file (lib/io/src/study_batch.cc).
#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

// A study folder in the temp dir with a study file and its two CSVs.
class BatchFolder {
 public:
  BatchFolder() {
    const auto* info = ::testing::UnitTest::GetInstance()->current_test_info();
    dir_ = fs::temp_directory_path() / ("porofit-batch-" + std::to_string(::getpid()) + "-" + info->name());
    fs::remove_all(dir_);
    fs::create_directories(dir_);
  }
  ~BatchFolder() { fs::remove_all(dir_); }
  std::string Write(const std::string& name, const std::string& text) const {
    std::ofstream(dir_ / name, std::ios::binary) << text;
    return (dir_ / name).string();
  }
  std::string Path(const std::string& name) const { return (dir_ / name).string(); }
  // Study with the given sample table and data text.
  std::string Study(const std::string& table, const std::string& data, const std::string& extra = "") const {
    Write("samples.csv", table);
    Write("points.csv", data);
    return Write("study.yaml", "name: batch test (invented)\n"
                               "defaults:\n  models: [exp-modulus, linear]\n  fit: {multistart: 2}\n" + extra +
                               "sample_table:\n  file: samples.csv\n  data: points.csv\n");
  }

 private:
  fs::path dir_;
};

const char* kTable =
    "id,lithology,porosity [%],bulk_density [g/cc],branch,cycle,well,zone\n"
    "A-1,sandstone,20,2.30,loading,1,W-7,upper\n"
    "A-2,\"shale, laminated\",5.5,2.55,unloading,2,W-7,lower\n";
const char* kData =
    "sample,P [MPa],K [GPa]\n"
    "A-1,5,10\nA-2,5,20\nA-1,10,12\nA-1,20,14\nA-2,10,21\nA-2,20,22\n";

std::string ErrorOf(const std::string& study) {
  try {
    LoadStudy(study);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TEST(SampleTable, ReadsOneSamplePerRowWithUnitsFromTheHeader) {
  BatchFolder f;
  const Study s = LoadStudy(f.Study(kTable, kData));
  ASSERT_EQ(s.samples.size(), 2u);
  const Sample& a = s.samples[0].sample;
  EXPECT_EQ(a.id, "A-1");
  EXPECT_EQ(a.lithology, "sandstone");
  EXPECT_DOUBLE_EQ(a.porosity, 0.20);
  EXPECT_DOUBLE_EQ(a.bulk_density, 2300);  // 2.30 g/cc
  EXPECT_EQ(a.where.file, f.Path("samples.csv"));
  EXPECT_EQ(a.where.line, 2);
  const Sample& b = s.samples[1].sample;
  EXPECT_EQ(b.lithology, "shale, laminated");
  EXPECT_EQ(b.branch, Branch::kUnloading);
  EXPECT_EQ(b.cycle, 2);
  EXPECT_DOUBLE_EQ(b.porosity, 0.055);
}

TEST(SampleTable, GroupsDataRowsBySampleIdKeepingFileOrder) {
  BatchFolder f;
  const Study s = LoadStudy(f.Study(kTable, kData));
  const Sample& a = s.samples[0].sample;
  ASSERT_EQ(a.points.size(), 3u);
  EXPECT_DOUBLE_EQ(a.points[0].pressure, 5e6);
  EXPECT_DOUBLE_EQ(a.points[2].pressure, 20e6);
  EXPECT_DOUBLE_EQ(a.points[1].modulus, 12e9);
  EXPECT_EQ(a.points[1].where.line, 4);
  EXPECT_EQ(a.points[0].sigma, 0);
  ASSERT_EQ(s.samples[1].sample.points.size(), 3u);
  EXPECT_DOUBLE_EQ(s.samples[1].sample.points[2].modulus, 22e9);
  ASSERT_EQ(s.inputs.size(), 3u);
  EXPECT_EQ(s.inputs[1].path, f.Path("samples.csv"));
  EXPECT_EQ(s.inputs[2].path, f.Path("points.csv"));
}

TEST(SampleTable, KeepsExtraColumnsAsSampleFields) {
  BatchFolder f;
  const Study s = LoadStudy(f.Study(kTable, kData));
  const auto& fields = s.samples[1].fields;
  ASSERT_EQ(fields.size(), 2u);
  EXPECT_EQ(fields[0].first, "well");
  EXPECT_EQ(fields[0].second, "W-7");
  EXPECT_EQ(fields[1].first, "zone");
  EXPECT_EQ(fields[1].second, "lower");
}

TEST(SampleTable, UsesTheStudyDefaultsForModelsAndFitOptions) {
  BatchFolder f;
  const Study s = LoadStudy(f.Study(kTable, kData));
  ASSERT_EQ(s.samples[0].models.size(), 2u);
  EXPECT_EQ(s.samples[0].models[0].model_id, "exp-modulus");
  EXPECT_EQ(s.samples[0].options.multistart, 2);
  EXPECT_TRUE(s.samples[0].options.scale_covariance);
}

TEST(SampleTable, ModelsColumnOverridesTheDefaultsPerSample) {
  BatchFolder f;
  const Study s = LoadStudy(f.Study("id,lithology,porosity,bulk_density [kg/m3],models\n"
                                    "A-1,sst,0.2,2300,power-offset; linear-exp\nA-2,sh,0.1,2500,\n",
                                    kData));
  ASSERT_EQ(s.samples[0].models.size(), 2u);
  EXPECT_EQ(s.samples[0].models[0].model_id, "power-offset");
  EXPECT_EQ(s.samples[0].models[1].model_id, "linear-exp");
  EXPECT_EQ(s.samples[1].models.size(), 2u);  // empty cell: the defaults
}

TEST(SampleTable, RelativeSigmaColumnWithCalibrationFlag) {
  BatchFolder f;
  f.Write("samples.csv", kTable);
  f.Write("points.csv", "sample,P [MPa],K [GPa],sigma_K [%]\nA-1,5,10,2\nA-1,10,12,2\nA-2,5,20,1\nA-2,10,21,1\n");
  const std::string study = f.Write("study.yaml",
                                    "name: t\ndefaults: {models: [linear]}\nsample_table:\n  file: samples.csv\n"
                                    "  data: points.csv\n  uncertainty_calibrated: true\n");
  const Study s = LoadStudy(study);
  EXPECT_DOUBLE_EQ(s.samples[0].sample.points[0].sigma, 0.2e9);
  EXPECT_TRUE(s.samples[0].sample.sigma_absolute);
  EXPECT_FALSE(s.samples[0].options.scale_covariance);
}

TEST(SampleTable, YamlSamplesAndATableMayBeCombined) {
  BatchFolder f;
  const std::string extra =
      "samples:\n  - id: Y-1\n    lithology: limestone\n    porosity: 0.1\n    bulk_density: 2.6 g/cc\n"
      "    measurement: static\n    data:\n      columns: [P MPa, K GPa]\n      rows: [[5, 30], [10, 31], [20, 33]]\n";
  const Study s = LoadStudy(f.Study(kTable, kData, extra));
  ASSERT_EQ(s.samples.size(), 3u);
  EXPECT_EQ(s.samples[0].sample.id, "Y-1");
  EXPECT_EQ(s.samples[2].sample.id, "A-2");
}

TEST(SampleTable, BadPorosityCellIsLocatedAtLineAndColumn) {
  BatchFolder f;
  const std::string e = ErrorOf(f.Study("id,lithology,porosity,bulk_density [g/cc]\nA-1,sst,1.3,2.3\n", kData));
  EXPECT_NE(e.find("samples.csv:2:9: error: porosity = 1.3 is outside [0, 1)"), std::string::npos) << e;
}

TEST(SampleTable, NonNumericModulusIsLocatedInTheDataFile) {
  BatchFolder f;
  const std::string e = ErrorOf(f.Study(kTable, "sample,P [MPa],K [GPa]\nA-1,5,10\nA-1,10,ten\nA-2,5,3\n"));
  EXPECT_NE(e.find("points.csv:3:8: error: non-numeric value 'ten' in column 'K'"), std::string::npos) << e;
}

TEST(SampleTable, DataRowOfAnUnknownSampleIsAnError) {
  BatchFolder f;
  const std::string e = ErrorOf(f.Study(kTable, "sample,P [MPa],K [GPa]\nA-1,5,10\nB-9,5,10\nA-2,5,3\n"));
  EXPECT_NE(e.find("points.csv:3:1: error: sample 'B-9' is not in the sample table"), std::string::npos) << e;
}

TEST(SampleTable, SampleWithoutDataRowsIsAnError) {
  BatchFolder f;
  const std::string e = ErrorOf(f.Study(kTable, "sample,P [MPa],K [GPa]\nA-1,5,10\n"));
  EXPECT_NE(e.find("samples.csv:3: error: sample 'A-2' has no rows in the sample data file"), std::string::npos) << e;
}

TEST(SampleTable, DuplicateIdAndUnknownModelAndMissingUnitAreReported) {
  BatchFolder f;
  std::string e = ErrorOf(f.Study("id,lithology,porosity,bulk_density [g/cc]\nA-1,a,0.1,2\nA-1,b,0.1,2\n", kData));
  EXPECT_NE(e.find("samples.csv:3:1: error: duplicate sample id 'A-1'"), std::string::npos) << e;
  e = ErrorOf(f.Study("id,lithology,porosity,bulk_density [g/cc],models\nA-1,a,0.1,2,exp-modulos\n", kData));
  EXPECT_NE(e.find("model 'exp-modulos' is not in the catalogue"), std::string::npos) << e;
  EXPECT_NE(e.find("did you mean 'exp-modulus'?"), std::string::npos) << e;
  e = ErrorOf(f.Study("id,lithology,porosity,bulk_density\nA-1,a,0.1,2\n", kData));
  EXPECT_NE(e.find("samples.csv:1:23: error: column 'bulk_density' needs a unit"), std::string::npos) << e;
  e = ErrorOf(f.Study(kTable, "sample,P [MPa],K\nA-1,5,10\n"));
  EXPECT_NE(e.find("points.csv:1:16: error: column 'K' needs a unit"), std::string::npos) << e;
}

TEST(SampleTable, SigmaWithoutCalibrationFlagIsAnError) {
  BatchFolder f;
  const std::string e = ErrorOf(f.Study(kTable, "sample,P [MPa],K [GPa],sigma_K [GPa]\nA-1,5,10,0.1\n"));
  EXPECT_NE(e.find("uncertainty_calibrated' is not set"), std::string::npos) << e;
}

TEST(SampleTable, UnknownKeyUnderSampleTableIsReported) {
  BatchFolder f;
  f.Write("samples.csv", kTable);
  f.Write("points.csv", kData);
  const std::string e = ErrorOf(f.Write(
      "study.yaml", "name: t\ndefaults: {models: [linear]}\nsample_table:\n  file: samples.csv\n  dta: points.csv\n"));
  EXPECT_NE(e.find("study.yaml:5:3"), std::string::npos) << e;
  EXPECT_NE(e.find("dta"), std::string::npos) << e;
}

}  // namespace
}  // namespace porofit

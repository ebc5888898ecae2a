// Loaders are total: inputs that cannot be a static file in tests/data/bad
// (directories, devices, FIFOs, generated formulas far over the limits, NUL
// bytes in a CSV, a sample table over the sample limit) end in a located
// InputError, never a crash, a hang or unbounded memory. Every study here is
// invented for the test.
#include <gtest/gtest.h>
#include <sys/stat.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <string>

#include "porofit/core/sample.h"
#include "porofit/io/study.h"
#include "porofit/io/study_loader.h"
#include "porofit/models/expression.h"

namespace porofit {
namespace {

namespace fs = std::filesystem;

class Folder {
 public:
  Folder() {
    std::random_device rd;
    dir_ = fs::temp_directory_path() / ("porofit-loader-limits-" + std::to_string(::getpid()) + "-" + std::to_string(rd()));
    fs::create_directories(dir_);
  }
  ~Folder() {
    std::error_code ec;
    fs::remove_all(dir_, ec);
  }
  std::string Write(const std::string& name, const std::string& text) const {
    std::ofstream(dir_ / name, std::ios::binary) << text;
    return Path(name);
  }
  std::string Path(const std::string& name) const { return (dir_ / name).string(); }
  const fs::path& dir() const { return dir_; }

 private:
  fs::path dir_;
};

// A valid one-sample study whose data come from `data_file`.
std::string StudyWithDataFile(const std::string& data_file) {
  return "name: limits test (invented)\n"
         "samples:\n"
         "  - id: S1\n"
         "    lithology: sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.2 g/cc\n"
         "    measurement: static\n"
         "    data:\n"
         "      columns: [P MPa, K GPa]\n"
         "      file: " + data_file + "\n"
         "    models: [linear]\n";
}

// A valid one-sample study fitting the user model with `formula`.
std::string StudyWithFormula(const std::string& formula) {
  return "name: limits test (invented)\n"
         "user_models:\n"
         "  - id: mine\n"
         "    formula: \"" + formula + "\"\n"
         "    parameters:\n"
         "      a: {unit: GPa, start: 1}\n"
         "samples:\n"
         "  - id: S1\n"
         "    lithology: sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.2 g/cc\n"
         "    measurement: static\n"
         "    data: {columns: [P MPa, K GPa], rows: [[5, 9.1], [10, 11.8], [20, 14.9]]}\n"
         "    models: [mine]\n";
}

InputError LoadError(const std::string& study) {
  try {
    LoadStudy(study);
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << study << " loaded";
  return InputError({}, "");
}

TEST(LoaderLimits, StudyFileThatIsADirectoryIsNamedSo) {
  Folder f;
  const InputError e = LoadError(f.dir().string());
  EXPECT_EQ(e.location().ToString(), f.dir().string());
  EXPECT_NE(e.message().find("study file '" + f.dir().string() + "' is a directory, not a file"), std::string::npos)
      << e.message();
}

TEST(LoaderLimits, DataFileThatIsADirectoryIsLocatedAtItsKey) {
  Folder f;
  fs::create_directories(f.dir() / "data");
  const InputError e = LoadError(f.Write("study.yaml", StudyWithDataFile("data/")));
  EXPECT_EQ(e.location().ToString(), f.Path("study.yaml") + ":10:7");
  EXPECT_NE(e.message().find("data file 'data/'"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("is a directory, not a file"), std::string::npos) << e.message();
}

TEST(LoaderLimits, DataFileOnACharacterDeviceIsRefusedUnread) {
  Folder f;
  const InputError e = LoadError(f.Write("study.yaml", StudyWithDataFile("/dev/zero")));
  EXPECT_EQ(e.location().ToString(), f.Path("study.yaml") + ":10:7");
  EXPECT_NE(e.message().find("'/dev/zero' is a character device, not a file"), std::string::npos) << e.message();
}

TEST(LoaderLimits, DataFileThatIsAFifoIsRefusedWithoutBlocking) {
  Folder f;
  ASSERT_EQ(::mkfifo(f.Path("points.csv").c_str(), 0600), 0);
  const InputError e = LoadError(f.Write("study.yaml", StudyWithDataFile("points.csv")));
  EXPECT_EQ(e.location().ToString(), f.Path("study.yaml") + ":10:7");
  EXPECT_NE(e.message().find("is a named pipe (FIFO), not a file"), std::string::npos) << e.message();
}

TEST(LoaderLimits, SampleTableThatIsADirectoryIsLocatedAtItsKey) {
  Folder f;
  fs::create_directories(f.dir() / "samples");
  f.Write("points.csv", "sample,P [MPa],K [GPa]\nA,5,10\n");
  const InputError e = LoadError(f.Write("study.yaml",
                                         "name: t\ndefaults:\n  models: [linear]\n"
                                         "sample_table:\n  file: samples\n  data: points.csv\n"));
  EXPECT_EQ(e.location().ToString(), f.Path("study.yaml") + ":5:9");
  EXPECT_NE(e.message().find("sample table 'samples' (looked for"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("is a directory, not a file"), std::string::npos) << e.message();
}

TEST(LoaderLimits, LasFileThatIsADirectoryIsLocatedAtItsKey) {
  Folder f;
  fs::create_directories(f.dir() / "well.las");
  f.Write("points.csv", "P,K\n5,9.1\n10,11.8\n20,14.9\n");
  const std::string text = StudyWithDataFile("points.csv") +
                           "    grain_modulus: {measured: {K_s: 37 GPa, sigma: 1 GPa, source: invented}}\n"
                           "depth_tables:\n"
                           "  - name: well-A\n"
                           "    units: si\n"
                           "    datum: {reference: MSL, water_depth: 100 m, water_density: 1.03 g/cc}\n"
                           "    depths: {top: 1100 m, base: 1200 m, step: 50 m}\n"
                           "    overburden: {log: {file: well.las, curve: RHOB, index_offset: 0 m}}\n"
                           "    pore_pressure: {hydrostatic: 10.1 kPa/m}\n"
                           "    stress: {measure: mean, law: biot, horizontal: {ratio: 0.6}}\n"
                           "    intervals:\n"
                           "      - {top: 1100 m, base: 1200 m, sample: S1, model: linear}\n"
                           "    bands: {level: 0.80, convention: non-exceedance}\n";
  const InputError e = LoadError(f.Write("study.yaml", text));
  EXPECT_EQ(e.location().line, 18) << e.what();
  EXPECT_NE(e.message().find("LAS file 'well.las'"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("is a directory, not a file"), std::string::npos) << e.message();
}

// The three inputs that used to overflow the parser's stack (SIGSEGV in check
// and fit) are refused by the length limit...
TEST(LoaderLimits, HugeGeneratedFormulasAreRefusedNotCrashing) {
  const std::string deep_parens = std::string(20000, '(') + "a*P" + std::string(20000, ')');
  const std::string minus_chain = std::string(100000, '-') + "a*P";
  std::string power_chain = "a*P";
  for (int i = 0; i < 100000; ++i) power_chain += "^1";
  for (const std::string& formula : {deep_parens, minus_chain, power_chain}) {
    Folder f;
    const InputError e = LoadError(f.Write("study.yaml", StudyWithFormula(formula)));
    EXPECT_EQ(e.location().line, 4) << e.what();
    EXPECT_NE(e.message().find("over the limit of " + std::to_string(kMaxFormulaLength)), std::string::npos)
        << e.message();
  }
}

// ...and the same shapes within the length limit by the depth limit, counted on
// every recursive path (parentheses, unary minus, the right side of '^').
TEST(LoaderLimits, DeepFormulasWithinTheLengthLimitAreRefusedByDepth) {
  const int n = kMaxFormulaDepth + 50;
  std::string power_chain = "a*P";
  for (int i = 0; i < n; ++i) power_chain += "^1";
  for (const std::string& formula : {std::string(n, '(') + "a*P" + std::string(n, ')'),
                                     std::string(n, '-') + "a*P", power_chain,
                                     std::string(n / 2, '-') + std::string(n / 2, '(') + "a*P" + std::string(n / 2, ')')}) {
    ASSERT_LE(formula.size(), kMaxFormulaLength);
    Folder f;
    const InputError e = LoadError(f.Write("study.yaml", StudyWithFormula(formula)));
    EXPECT_EQ(e.location().line, 4) << e.what();
    EXPECT_NE(e.message().find("nests deeper than the limit of " + std::to_string(kMaxFormulaDepth)), std::string::npos)
        << e.message();
  }
}

TEST(LoaderLimits, NulByteInASampleTableIdIsLocated) {
  Folder f;
  using namespace std::string_literals;  // "..."s keeps the NUL bytes
  f.Write("samples.csv", "id,lithology,porosity,bulk_density [g/cc]\nA\0B,sandstone,0.2,2.3\n"s);
  f.Write("points.csv", "sample,P [MPa],K [GPa]\nA\0B,5,10\nA\0B,10,12\n"s);
  const InputError e = LoadError(f.Write("study.yaml",
                                         "name: t\ndefaults:\n  models: [linear]\n"
                                         "sample_table:\n  file: samples.csv\n  data: points.csv\n"));
  EXPECT_EQ(e.location().ToString(), f.Path("samples.csv") + ":2:1");
  EXPECT_NE(e.message().find("'id' = 'A\\x00B' contains the control character \\x00"), std::string::npos)
      << e.message();
}

TEST(LoaderLimits, SampleTableOverTheSampleLimitIsRefused) {
  Folder f;
  {
    std::ofstream out(f.Path("samples.csv"), std::ios::binary);
    out << "id,lithology,porosity,bulk_density [g/cc]\n";
    for (size_t i = 0; i <= kMaxStudySamples; ++i) out << "x\n";
  }
  f.Write("points.csv", "sample,P [MPa],K [GPa]\nx,5,10\n");
  const InputError e = LoadError(f.Write("study.yaml",
                                         "name: t\ndefaults:\n  models: [linear]\n"
                                         "sample_table:\n  file: samples.csv\n  data: points.csv\n"));
  EXPECT_EQ(e.location().ToString(), f.Path("samples.csv") + ":" + std::to_string(kMaxStudySamples + 2)) << e.what();
  EXPECT_NE(e.message().find("over the limit of " + std::to_string(kMaxStudySamples)), std::string::npos)
      << e.message();
}

TEST(LoaderLimits, HundredThousandSamplesInASampleTableLoad) {
  Folder f;
  {
    std::ofstream table(f.Path("samples.csv"), std::ios::binary), points(f.Path("points.csv"), std::ios::binary);
    table << "id,lithology,porosity,bulk_density [g/cc]\n";
    points << "sample,P [MPa],K [GPa]\n";
    for (int i = 0; i < 100000; ++i) {
      table << "W7-" << i << ",sandstone,0.2,2.3\n";
      points << "W7-" << i << ",5,10\nW7-" << i << ",10,12\nW7-" << i << ",20,14\n";
    }
  }
  const Study s = LoadStudy(f.Write("study.yaml",
                                    "name: t\ndefaults:\n  models: [linear]\n"
                                    "sample_table:\n  file: samples.csv\n  data: points.csv\n"));
  EXPECT_EQ(s.samples.size(), 100000u);
}

TEST(LoaderLimits, EmptySecondDocumentIsStillASecondDocument) {
  Folder f;
  const InputError e = LoadError(f.Write("study.yaml", StudyWithFormula("a*P") + "---\n"));
  EXPECT_EQ(e.location().ToString(), f.Path("study.yaml") + ":15:1");
  EXPECT_NE(e.message().find("more than one YAML document"), std::string::npos) << e.message();
}

TEST(LoaderLimits, InvalidUtf8InTheStudyIsEscapedInTheMessage) {
  Folder f;
  std::string text = StudyWithFormula("a*P");
  text.replace(text.find("porosity"), 8, "porosit\xE9");  // a misspelt key with a Latin-1 byte
  const InputError e = LoadError(f.Write("study.yaml", text));
  EXPECT_NE(e.message().find("unknown key 'porosit\\xE9'"), std::string::npos) << e.message();
  EXPECT_EQ(PrintableText(e.what()), e.what());
}

}  // namespace
}  // namespace porofit

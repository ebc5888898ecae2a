// The `depth_tables:` section of a study file: what it reads (in SI) and
// every mistake reported at its file:line:column with the rule broken. All
// well data here are invented for the tests.
#include <gtest/gtest.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <string>
#include <tuple>
#include <vector>

#include "porofit/core/units.h"
#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

namespace fs = std::filesystem;

// Line numbers below refer to this text (1-based).
const char* const kBase = R"(name: depth config test (invented)
samples:
  - id: S1
    lithology: sandstone
    porosity: 0.2
    bulk_density: 2.2 g/cc
    measurement: static
    data: {columns: [P MPa, K GPa], rows: [[5, 9.1], [10, 11.8], [20, 14.9], [40, 17.2]]}
    models: [exp-modulus]
    grain_modulus: {measured: {K_s: 37 GPa, sigma: 1 GPa, source: invented}}
  - id: S2
    lithology: shale
    porosity: 0.1
    bulk_density: 2.4 g/cc
    measurement: static
    data: {columns: [P MPa, K GPa], rows: [[5, 9.1], [10, 11.8], [20, 14.9], [40, 17.2]]}
    models: [exp-modulus, linear]
    grain_modulus: none
depth_tables:
  - name: well-A
    units: field
    datum: {reference: MSL, water_depth: 1000 m, water_density: 1.03 g/cc}
    depths: {top: 1100 m, base: 3000 m, step: 50 m}
    overburden: {gradient: 1.0 psi/ft}
    pore_pressure: {hydrostatic: 10.1 kPa/m}
    stress: {measure: mean, law: biot, horizontal: {ratio: 0.6}}
    intervals:
      - {top: 1100 m, base: 2200 m, sample: S1, model: exp-modulus}
    bands: {level: 0.80, convention: non-exceedance}
    depletion: [{name: "10 MPa drawdown", drop: 10 MPa}]
)";

// A scratch folder for LAS files, removed at the end.
class Scratch {
 public:
  Scratch() {
    std::random_device rd;
    dir_ = fs::temp_directory_path() / ("porofit_depth_config_" + std::to_string(rd()) + std::to_string(rd()));
    fs::create_directories(dir_);
  }
  ~Scratch() {
    std::error_code ec;
    fs::remove_all(dir_, ec);
  }
  std::string Write(const std::string& name, const std::string& text) const {
    std::ofstream(dir_ / name, std::ios::binary) << text;
    return (dir_ / name).string();
  }
  std::string Study() const { return (dir_ / "study.yaml").string(); }

 private:
  fs::path dir_;
};

// A LAS 2.0 density log from 1000 to 3100 m (index below MSL), RHOB 2.1 ->
// 2.5 g/cc, one NULL at 1500 m. Line 15 is the RHOB ~C line.
std::string DensityLas() {
  std::string s =
      "~VERSION INFORMATION\n"
      " VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0\n"
      " WRAP.   NO  : ONE LINE PER DEPTH STEP\n"
      "~WELL INFORMATION\n"
      " STRT.M  1000.0 : START DEPTH\n"
      " STOP.M  3100.0 : STOP DEPTH\n"
      " STEP.M  100.0 : STEP\n"
      " NULL.   -999.25 : NULL VALUE\n"
      " COMP.   INVENTED : COMPANY\n"
      " WELL.   T-1 : WELL\n"
      " FLD .   TEST : FIELD\n"
      " LOC .   NONE : LOCATION\n"
      "~CURVE INFORMATION\n"
      " DEPT.M    : DEPTH\n"
      " RHOB.G/C3 : BULK DENSITY\n"
      "~A\n";
  for (int i = 0; i <= 21; ++i) {
    const double z = 1000 + 100 * i;
    const double rho = z == 1500 ? -999.25 : 2.1 + 0.4 * (z - 1000) / 2100;
    s += std::to_string(z) + " " + std::to_string(rho) + "\n";
  }
  return s;
}

std::string Replace(std::string text, const std::string& from, const std::string& to) {
  const size_t at = text.find(from);
  EXPECT_NE(at, std::string::npos) << from;
  if (at != std::string::npos) text.replace(at, from.size(), to);
  return text;
}

TEST(DepthTablesSection, ReadsEveryKeyInSi) {
  const Study s = ParseStudy(kBase, "mem/depth.yaml", ModelRegistry::Builtin());
  ASSERT_EQ(s.depth_tables.size(), 1u);
  const DepthTableChoice& t = s.depth_tables[0];
  EXPECT_EQ(t.spec.name, "well-A");
  EXPECT_EQ(t.units, DepthUnits::kField);
  EXPECT_EQ(t.spec.datum.kind, depth::DatumKind::kMeanSeaLevel);
  EXPECT_DOUBLE_EQ(t.spec.datum.water_depth, 1000);
  EXPECT_DOUBLE_EQ(t.spec.datum.water_density, 1030);
  EXPECT_DOUBLE_EQ(t.spec.top, 1100);
  EXPECT_DOUBLE_EQ(t.spec.step, 50);
  // 1 psi/ft = 22.6206 kPa/m (check value 8 [computed; docs/check-values.md]).
  EXPECT_NEAR(t.spec.overburden.gradient, 22620.6, 0.05);
  EXPECT_DOUBLE_EQ(t.spec.pore_pressure.gradient, 10100);
  EXPECT_DOUBLE_EQ(t.spec.pore_pressure.zero_depth, 0);  // the sea surface of an MSL datum
  EXPECT_EQ(t.spec.stress.measure, depth::StressMeasure::kMeanEffective);
  EXPECT_EQ(t.spec.stress.law, depth::EffectiveStressLaw::kBiot);
  EXPECT_EQ(t.spec.stress.horizontal, depth::HorizontalStressKind::kRatio);
  EXPECT_DOUBLE_EQ(t.spec.stress.ratio, 0.6);
  ASSERT_EQ(t.spec.curves.size(), 1u);
  EXPECT_EQ(t.spec.curves[0].sample_id, "S1");
  EXPECT_DOUBLE_EQ(t.spec.curves[0].k_s, 37e9);
  EXPECT_DOUBLE_EQ(t.spec.curves[0].sigma_k_s, 1e9);
  EXPECT_DOUBLE_EQ(t.spec.curves[0].lab_min, 5e6);
  EXPECT_DOUBLE_EQ(t.spec.curves[0].lab_max, 40e6);
  EXPECT_EQ(t.curves[0].sample, 0u);
  EXPECT_EQ(t.curves[0].model, 0u);
  ASSERT_EQ(t.spec.intervals.size(), 1u);
  EXPECT_DOUBLE_EQ(t.spec.intervals[0].base, 2200);
  EXPECT_DOUBLE_EQ(t.spec.band_level, 0.8);
  EXPECT_EQ(t.convention, BandConvention::kNonExceedance);
  ASSERT_EQ(t.spec.depletion.size(), 1u);
  EXPECT_DOUBLE_EQ(t.spec.depletion[0].drop, 10e6);
}

TEST(DepthTablesSection, FieldUnitsAndDensityEquivalentGradientsConvert) {
  std::string text = Replace(kBase, "{top: 1100 m, base: 3000 m, step: 50 m}", "{top: 3609 ft, base: 9843 ft, step: 50 ft}");
  text = Replace(text, "{hydrostatic: 10.1 kPa/m}", "{hydrostatic: 8.6 ppg}");
  text = Replace(text, "{gradient: 1.0 psi/ft}", "{gradient: 2.3 g/cc}");
  const Study s = ParseStudy(text, "mem/depth.yaml", ModelRegistry::Builtin());
  const DepthTableChoice& t = s.depth_tables[0];
  EXPECT_NEAR(t.spec.top, 3609 * 0.3048, 1e-9);
  EXPECT_NEAR(t.spec.step, 15.24, 1e-12);
  // 1 ppg = 0.051948 psi/ft (check value 8): 8.6 ppg = 0.44675 psi/ft = 10.106 kPa/m.
  EXPECT_NEAR(t.spec.pore_pressure.gradient / (units::kPsi / units::kFoot), 8.6 * 0.051948, 5e-6);
  EXPECT_NEAR(t.spec.overburden.gradient, 2300 * 9.80665, 1e-6);
}

struct BadCase {
  const char* what;
  const char* from;
  const char* to;
  int line, column;
  const char* message;  // a part of InputError::message()
};

class DepthTablesBadConfig : public ::testing::TestWithParam<BadCase> {};

TEST_P(DepthTablesBadConfig, IsRejectedAtItsPlaceWithTheRule) {
  const BadCase& c = GetParam();
  const std::string text = Replace(kBase, c.from, c.to);
  try {
    ParseStudy(text, "mem/depth.yaml", ModelRegistry::Builtin());
    FAIL() << c.what << ": loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().file, "mem/depth.yaml") << c.what;
    EXPECT_EQ(e.location().line, c.line) << c.what << ": " << e.what();
    EXPECT_EQ(e.location().column, c.column) << c.what << ": " << e.what();
    EXPECT_NE(e.message().find(c.message), std::string::npos) << c.what << ": " << e.message();
  }
}

const BadCase kBadCases[] = {
    {"unknown reference", "reference: MSL", "reference: MLS", 22, 24,
     "'depth_tables[1].datum.reference' = 'MLS' is not one of KB, MSL, GL; did you mean 'MSL'?"},
    {"missing water_density offshore", ", water_density: 1.03 g/cc}", "}", 22, 12,
     "offshore datum (water_depth 1000 m) needs 'water_density'"},
    {"step <= 0", "step: 50 m", "step: 0 m", 23, 47, "'depth_tables[1].depths.step' = 0 m must be > 0"},
    {"base above top", "base: 3000 m", "base: 1000 m", 23, 33, "is above top 1100 m"},
    {"unknown unit", "top: 1100 m, base: 3000", "top: 1100 yd, base: 3000", 23, 19,
     "unknown length unit 'yd' for 'depth_tables[1].depths.top'; accepted: m, km, ft"},
    {"gradient with a pressure unit", "{gradient: 1.0 psi/ft}", "{gradient: 1.0 psi}", 24, 28,
     "'depth_tables[1].overburden.gradient' = '1.0 psi' is a pressure, not a gradient"},
    {"mean without horizontal", ", horizontal: {ratio: 0.6}}", "}", 26, 13,
     "measure 'mean' needs 'horizontal'"},
    {"biot with a sample lacking K_s", "sample: S1, model: exp-modulus}", "sample: S2, model: exp-modulus}", 28, 45,
     "sample 'S2' has no grain modulus (K_s): law 'biot' and alpha need one"},
    {"unknown sample", "sample: S1, model", "sample: S9, model", 28, 45,
     "sample 'S9' of 'depth_tables[1].intervals[1].sample' is not in the study"},
    {"model the sample does not fit", "sample: S1, model: exp-modulus}", "sample: S1, model: linear}", 28, 56,
     "sample 'S1' does not fit model 'linear' (its models: exp-modulus)"},
    {"overlapping intervals", "      - {top: 1100 m, base: 2200 m, sample: S1, model: exp-modulus}\n",
     "      - {top: 1100 m, base: 2200 m, sample: S1, model: exp-modulus}\n"
     "      - {top: 2100 m, base: 2500 m, sample: S1, model: exp-modulus}\n",
     29, 9, "overlaps interval 1 (1100 m to 2200 m)"},
    {"both intervals and facies", "    bands: {level", "    facies: {file: f.las, curve: FAC, codes: []}\n    bands: {level",
     29, 5, "give either 'intervals' or 'facies', not both"},
    {"missing band convention", "{level: 0.80, convention: non-exceedance}", "{level: 0.80}", 29, 12,
     "missing required key 'depth_tables[1].bands.convention'"},
    {"missing pore pressure", "    pore_pressure: {hydrostatic: 10.1 kPa/m}\n", "", 20, 5,
     "missing required key 'depth_tables[1].pore_pressure'"},
    {"ratio out of range", "{ratio: 0.6}", "{ratio: -0.6}", 26, 60, "must be in (0, 10)"},
    {"air gap on an MSL datum", "{reference: MSL,", "{reference: MSL, air_gap: 25 m,", 22, 29,
     "applies to a KB datum only"},
};

INSTANTIATE_TEST_SUITE_P(Cases, DepthTablesBadConfig, ::testing::ValuesIn(kBadCases));

TEST(DepthTablesSection, DensityLogIsReadRelativeToTheStudyAndRecordedAsAnInput) {
  Scratch dir;
  dir.Write("well.las", DensityLas());
  const std::string text = Replace(kBase, "{gradient: 1.0 psi/ft}",
                                   "{log: {file: well.las, curve: RHOB, index_offset: 0 m}}");
  const Study s = ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
  const DepthTableChoice& t = s.depth_tables[0];
  EXPECT_EQ(t.spec.overburden.kind, depth::OverburdenKind::kDensityProfile);
  ASSERT_FALSE(t.spec.overburden.profile.depth.empty());
  EXPECT_GE(t.spec.overburden.profile.depth.back(), 3000.0);
  bool recorded = false;
  for (const InputFile& f : s.inputs) recorded = recorded || (f.role == "data" && f.path.find("well.las") != std::string::npos);
  EXPECT_TRUE(recorded);
}

TEST(DepthTablesSection, LasWarningsReachTheTableAndThePlausibleRangeKeysAreRead) {
  Scratch dir;
  const std::string las = dir.Write("well.las", Replace(DensityLas(), " STOP.M  3100.0 :", " STOP.M  3000.0 :"));
  // RHOB runs 2.1 -> 2.5 g/cc: with [2.2, 3.0] g/cc the samples at 1000 to 1500 m lie below the range.
  const std::string text =
      Replace(kBase, "{gradient: 1.0 psi/ft}",
              "{log: {file: well.las, curve: RHOB, index_offset: 0 m, plausible_range: [2.2 g/cc, 3.0 g/cc], "
              "outside_range: keep}}");
  const Study s = ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
  const depth::DepthTableSpec& t = s.depth_tables[0].spec;
  ASSERT_EQ(t.warnings.size(), 2u);
  EXPECT_EQ(t.warnings[0].rfind(las + ":6: warning: STOP = 3000.0 disagrees with the last index value 3100", 0), 0u)
      << t.warnings[0];
  EXPECT_EQ(t.warnings[1].rfind(las + ":17: warning: 5 RHOB sample(s) outside the plausible range 2.2 g/cc to 3 g/cc", 0),
            0u)
      << t.warnings[1];
  EXPECT_NE(t.warnings[1].find("kept as measured"), std::string::npos) << t.warnings[1];
  EXPECT_EQ(t.overburden.profile.source.front(), depth::DensitySource::kOutOfRangeKept);

  // By default (1.0 to 3.3 g/cc, screen) a 0.5 g/cc sample at 1500 m is rejected and bridged.
  dir.Write("well.las", Replace(DensityLas(), "1500.000000 -999.250000", "1500.000000 0.500000"));
  const Study d = ParseStudy(Replace(text, ", plausible_range: [2.2 g/cc, 3.0 g/cc], outside_range: keep", ""),
                             dir.Study(), ModelRegistry::Builtin());
  ASSERT_EQ(d.depth_tables[0].spec.warnings.size(), 1u);
  EXPECT_NE(d.depth_tables[0].spec.warnings[0].find(":22: warning: 1 RHOB sample(s) outside the plausible range 1 g/cc "
                                                    "to 3.3 g/cc"),
            std::string::npos)
      << d.depth_tables[0].spec.warnings[0];
  EXPECT_EQ(d.depth_tables[0].spec.overburden.profile.source[5], depth::DensitySource::kOutOfRange);

  for (const auto& [from, to, message] : std::vector<std::tuple<std::string, std::string, std::string>>{
           {"[2.2 g/cc, 3.0 g/cc]", "[3.0 g/cc, 2.2 g/cc]", "must have 0 < min < max"},
           {"[2.2 g/cc, 3.0 g/cc]", "[2.2 g/cc]", "must be a pair [min, max] of densities"},
           {"[2.2 g/cc, 3.0 g/cc]", "[2.2 g/cc, 3.0 MPa]", "plausible_range[2]"},
           {"outside_range: keep", "outside_range: drop", "is not one of screen, keep"}}) {
    try {
      ParseStudy(Replace(text, from, to), dir.Study(), ModelRegistry::Builtin());
      ADD_FAILURE() << to << ": loaded";
    } catch (const InputError& e) {
      EXPECT_EQ(e.location().file, dir.Study()) << e.what();
      EXPECT_EQ(e.location().line, 24) << e.what();
      EXPECT_NE(e.message().find(message), std::string::npos) << e.what();
    }
  }
}

TEST(DepthTablesSection, MissingLasFileIsReportedAtItsKey) {
  Scratch dir;
  const std::string text = Replace(kBase, "{gradient: 1.0 psi/ft}",
                                   "{log: {file: none.las, curve: RHOB, index_offset: 0 m}}");
  try {
    ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().line, 24) << e.what();
    EXPECT_EQ(e.location().column, 30) << e.what();
    EXPECT_NE(e.message().find("cannot open LAS file 'none.las'"), std::string::npos) << e.message();
  }
}

TEST(DepthTablesSection, BadLasFilePassesItsOwnErrorThrough) {
  Scratch dir;
  std::string las = DensityLas();
  las = Replace(las, " NULL.   -999.25 : NULL VALUE\n", "");
  const std::string path = dir.Write("well.las", las);
  const std::string text = Replace(kBase, "{gradient: 1.0 psi/ft}",
                                   "{log: {file: well.las, curve: RHOB, index_offset: 0 m}}");
  try {
    ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(fs::path(e.location().file).filename(), "well.las") << e.what();
    EXPECT_EQ(e.location().line, 4) << e.what();  // the ~W line
    EXPECT_NE(e.message().find("~W has no NULL line"), std::string::npos) << e.message();
  }
}

TEST(DepthTablesSection, MissingDensityCurveNamesTheLasFile) {
  Scratch dir;
  dir.Write("well.las", DensityLas());
  const std::string text = Replace(kBase, "{gradient: 1.0 psi/ft}",
                                   "{log: {file: well.las, curve: RHOZ, index_offset: 0 m}}");
  try {
    ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(fs::path(e.location().file).filename(), "well.las") << e.what();
    EXPECT_NE(e.message().find("RHOZ"), std::string::npos) << e.message();
  }
}

TEST(DepthTablesSection, LogEndingAboveTheTableBaseIsRejected) {
  Scratch dir;
  dir.Write("well.las", DensityLas());
  std::string text = Replace(kBase, "{gradient: 1.0 psi/ft}", "{log: {file: well.las, curve: RHOB, index_offset: 0 m}}");
  text = Replace(text, "base: 3000 m, step", "base: 3500 m, step");
  try {
    ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().line, 24) << e.what();
    EXPECT_NE(e.message().find("above the table base 3500 m (a log is never extrapolated)"), std::string::npos)
        << e.message();
  }
}

TEST(DepthTablesSection, PorePressureTableMustCoverTheTable) {
  const std::string text = Replace(kBase, "{hydrostatic: 10.1 kPa/m}", "{table: [[1000 m, 10 MPa], [2500 m, 26 MPa]]}");
  try {
    ParseStudy(text, "mem/depth.yaml", ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().line, 25) << e.what();
    EXPECT_NE(e.message().find("pore pressure is never extrapolated"), std::string::npos) << e.message();
  }
}

// A facies log (invented): code 1 from 1000 to 1900 m, code 2 from 2000 m,
// with one fractional value at 2500 m when `bad`.
std::string FaciesLas(bool bad) {
  std::string s =
      "~VERSION INFORMATION\n"
      " VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0\n"
      " WRAP.   NO  : ONE LINE PER DEPTH STEP\n"
      "~WELL INFORMATION\n"
      " STRT.M  1000.0 : START DEPTH\n"
      " STOP.M  3100.0 : STOP DEPTH\n"
      " STEP.M  100.0 : STEP\n"
      " NULL.   -999.25 : NULL VALUE\n"
      " COMP.   INVENTED : COMPANY\n"
      " WELL.   T-1 : WELL\n"
      " FLD .   TEST : FIELD\n"
      " LOC .   NONE : LOCATION\n"
      "~CURVE INFORMATION\n"
      " DEPT.M    : DEPTH\n"
      " FAC .     : FACIES CODE\n"
      "~A\n";
  for (int i = 0; i <= 21; ++i) {
    const double z = 1000 + 100 * i;
    const double code = bad && z == 2500 ? 1.5 : (z < 2000 ? 1 : 2);
    s += std::to_string(z) + " " + std::to_string(code) + "\n";
  }
  return s;
}

const char* const kFacies =
    "    facies:\n"
    "      file: facies.las\n"
    "      curve: FAC\n"
    "      index_offset: 0 m\n"
    "      codes:\n"
    "        - {code: 1, sample: S1, model: exp-modulus}\n"
    "        - {code: 2, sample: S1, model: exp-modulus}\n";

const char* const kIntervals =
    "    intervals:\n"
    "      - {top: 1100 m, base: 2200 m, sample: S1, model: exp-modulus}\n";

TEST(DepthTablesSection, FaciesCurveAndCodesAreRead) {
  Scratch dir;
  dir.Write("facies.las", FaciesLas(false));
  const Study s = ParseStudy(Replace(kBase, kIntervals, kFacies), dir.Study(), ModelRegistry::Builtin());
  const DepthTableChoice& t = s.depth_tables[0];
  ASSERT_TRUE(t.spec.facies.has_value());
  EXPECT_TRUE(t.spec.intervals.empty());
  ASSERT_EQ(t.spec.facies->depth.size(), 22u);
  EXPECT_DOUBLE_EQ(t.spec.facies->depth.front(), 1000.0);
  EXPECT_EQ(t.spec.facies->code.front(), 1);
  EXPECT_EQ(t.spec.facies->code[10], 2);  // 2000 m
  ASSERT_EQ(t.spec.facies_rules.size(), 2u);
  EXPECT_EQ(t.spec.facies_rules[0].code, 1);
  EXPECT_EQ(t.spec.facies_rules[1].code, 2);
  EXPECT_EQ(t.spec.facies_rules[0].curve, t.spec.facies_rules[1].curve);  // one curve, S1 exp-modulus
  bool recorded = false;
  for (const InputFile& f : s.inputs) recorded = recorded || (f.role == "data" && f.path.find("facies.las") != std::string::npos);
  EXPECT_TRUE(recorded);
}

TEST(DepthTablesSection, FractionalFaciesCodeIsRejectedAtItsCurveLine) {
  Scratch dir;
  const std::string las = dir.Write("facies.las", FaciesLas(true));
  try {
    ParseStudy(Replace(kBase, kIntervals, kFacies), dir.Study(), ModelRegistry::Builtin());
    FAIL() << "expected an error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().file, las);
    EXPECT_EQ(e.location().line, 15);  // the FAC line of ~C
    EXPECT_NE(e.message().find("facies curve 'FAC' holds 1.5, not a whole-number code"), std::string::npos)
        << e.message();
  }
}

TEST(DepthTablesSection, FaciesCodeMappedTwiceIsRejectedAtTheCode) {
  Scratch dir;
  dir.Write("facies.las", FaciesLas(false));
  const std::string text = Replace(Replace(kBase, kIntervals, kFacies), "{code: 2, sample", "{code: 1, sample");
  try {
    ParseStudy(text, dir.Study(), ModelRegistry::Builtin());
    FAIL() << "expected an error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().line, 33);  // the second code of the study text
    EXPECT_NE(e.message().find("facies code 1 is mapped twice"), std::string::npos) << e.message();
  }
}

}  // namespace
}  // namespace porofit

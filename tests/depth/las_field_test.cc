// The LAS reader on the quirks of field files: LAS 1.2 wrapped and
// unwrapped, STRT/STOP/STEP that disagree with the data, byte-order marks and
// UTF-16, duplicate mnemonics, non-numbers in curves, density unit spellings
// and implausible densities. Every fixture in tests/data/las/field/ is
// invented (each says so in its first line). For each file that loads, the
// expected S_v is the trapezoid sum of the file's own values, written out
// here, so it does not depend on the code under test.
#include <gtest/gtest.h>

#include <cmath>
#include <functional>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/depth/las.h"
#include "porofit/depth/profile.h"

namespace porofit::depth {
namespace {

constexpr double g = 9.80665;  // m/s^2, standard gravity

std::string Fixture(const std::string& name) { return std::string(POROFIT_TEST_DATA_DIR) + "/las/field/" + name; }

// S_v (Pa) from the rock top (the first depth) to the last depth of `rho`
// samples in g/cc every 0.5 m: the trapezoid rule, trapezoid by trapezoid.
double Trapezoid(const std::vector<double>& rho_gcc) {
  double sum = 0;
  for (size_t i = 1; i < rho_gcc.size(); ++i) sum += 0.5 * (rho_gcc[i - 1] + rho_gcc[i]) * 0.5;
  return g * 1000.0 * sum;
}

// The five samples most fixtures carry (1000 to 1002 m), by hand:
// g * 1000 kg/m^3 * 0.5 m * ((2.30+2.35)/2 + (2.35+2.40)/2 + (2.40+2.38)/2 + (2.38+2.42)/2)
// = 9.80665 * 1000 * 0.5 * 9.49 = 46532.554... Pa.
const double kFiveSampleLoad = g * 1000.0 * 0.5 * ((2.30 + 2.35) / 2 + (2.35 + 2.40) / 2 + (2.40 + 2.38) / 2 + (2.38 + 2.42) / 2);

double LoadAt(const DensityProfile& p, double z) { return CumulativeLoad(p, {z})[0]; }

DensityProfile Profile(const LasFile& las, const std::string& curve = "RHOB") {
  DensityLogSpec spec;
  spec.curve = curve;
  spec.rock_top = 1000.0;
  return BuildDensityProfile(las, spec);
}

// `warnings` holds one warning at file:line (and :col when col > 0) containing `text`.
void ExpectWarning(const std::vector<std::string>& warnings, const std::string& file, int line, int col,
                   const std::string& text) {
  std::string where = Fixture(file) + ":" + std::to_string(line) + ":";
  if (col > 0) where += std::to_string(col) + ":";
  int hits = 0;
  for (const std::string& w : warnings) hits += w.rfind(where, 0) == 0 && w.find(text) != std::string::npos ? 1 : 0;
  std::string all;
  for (const std::string& w : warnings) all += "\n  " + w;
  EXPECT_EQ(hits, 1) << "expected '" << where << " ... " << text << "' among:" << all;
}

void ExpectError(const std::function<void()>& f, const std::string& file, int line, int col, const std::string& text) {
  try {
    f();
    ADD_FAILURE() << file << ": no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().file, Fixture(file)) << e.what();
    EXPECT_EQ(e.location().line, line) << e.what();
    if (col > 0) EXPECT_EQ(e.location().column, col) << e.what();
    EXPECT_NE(e.message().find(text), std::string::npos) << e.what();
  }
}

TEST(LasField, Las12UnwrappedReadsTextItemsAfterTheColonAndNumbersBeforeIt) {
  const LasFile las = ReadLas(Fixture("las12_unwrapped.las"));
  EXPECT_EQ(las.version, "1.2");
  EXPECT_TRUE(las.warnings.empty()) << las.warnings.front().ToString();
  ASSERT_NE(las.FindWell("COMP"), nullptr);
  EXPECT_EQ(las.FindWell("COMP")->value, "INVENTED OIL CO. LTD.");
  EXPECT_EQ(las.FindWell("COMP")->description, "COMPANY");
  EXPECT_EQ(las.FindWell("DATE")->value, "02-DEC-26 12:30");  // first-colon rule for 1.2 text items
  EXPECT_EQ(las.FindWell("FLD")->value, "NOWHERE");
  EXPECT_EQ(las.null_value, -999.25);
  ASSERT_EQ(las.parameters.size(), 1u);
  EXPECT_EQ(las.parameters[0].value, "35.5000");
  const DensityProfile p = Profile(las);
  EXPECT_TRUE(p.warnings.empty());
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
}

TEST(LasField, Las12WrappedGivesTheSameCurvesAsUnwrapped) {
  const LasFile wrapped = ReadLas(Fixture("las12_wrapped.las"));
  const LasFile flat = ReadLas(Fixture("las12_unwrapped.las"));
  EXPECT_TRUE(wrapped.wrapped);
  ASSERT_EQ(wrapped.curves.size(), 4u);
  for (size_t c = 0; c < 4; ++c) EXPECT_EQ(wrapped.curves[c].values, flat.curves[c].values) << c;
  EXPECT_EQ(wrapped.row_line, (std::vector<int>{18, 21, 23, 25, 28}));
  EXPECT_NEAR(LoadAt(Profile(wrapped), 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
}

TEST(LasField, Las12TextInOddPlacesWarnsAndChangesNoNumber) {
  const std::string f = "las12_odd_places.las";
  const LasFile las = ReadLas(Fixture(f));
  const DensityProfile p = Profile(las);
  ExpectWarning(p.warnings, f, 6, 0, "STRT written after the colon (as some LAS 1.2 writers do); read as 1000");
  ExpectWarning(p.warnings, f, 7, 0, "header line for STOP has no ':'");
  ExpectWarning(p.warnings, f, 9, 0, "NULL written after the colon (as some LAS 1.2 writers do); read as -999.25");
  ExpectWarning(p.warnings, f, 10, 0, "header line has no '.' after the mnemonic");
  ExpectWarning(p.warnings, f, 13, 0, "curve DEPT: unit 'M' written after a space; read as the unit");
  ExpectWarning(p.warnings, f, 14, 0, "curve RHOB: unit 'GM/CC' written after a space; read as the unit");
  ExpectWarning(p.warnings, f, 17, 0, "second ~O section (the first is at line 15)");
  EXPECT_EQ(p.warnings.size(), 7u);
  EXPECT_EQ(las.other, "invented remarks\na second remarks section");
  // The NULL at 1000.5 m is bridged between 2.30 and 2.40: 2.35, the same five-sample load.
  EXPECT_EQ(p.source[1], DensitySource::kBridged);
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
}

TEST(LasField, StrtStopStepThatDisagreeWithTheDataWarnAndTheDataGovern) {
  const std::string f = "las20_range_disagrees.las";
  const DensityProfile p = Profile(ReadLas(Fixture(f)));
  ExpectWarning(p.warnings, f, 6, 0, "STRT = 999.0000 disagrees with the first index value 1000 (line 15); the data govern");
  ExpectWarning(p.warnings, f, 7, 0, "STOP = 1500.0000 disagrees with the last index value 1002 (line 19); the data govern");
  ExpectWarning(p.warnings, f, 16, 1, "index 1000.5 is off the regular STEP = 0.2500 (line 8) grid, which expects 1000.25");
  EXPECT_EQ(p.warnings.size(), 3u);
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);  // GM/CC read as g/cc
}

TEST(LasField, Utf8ByteOrderMarkIsSkippedWithAWarning) {
  const std::string f = "utf8_bom.las";
  const DensityProfile p = Profile(ReadLas(Fixture(f)));
  ExpectWarning(p.warnings, f, 1, 1, "UTF-8 byte-order mark at the start of the file skipped");
  EXPECT_EQ(p.warnings.size(), 1u);
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
}

TEST(LasField, Utf16InEitherByteOrderIsRefusedNamingTheEncodingAndTheConversion) {
  ExpectError([] { ReadLas(Fixture("utf16le_bom.las")); }, "utf16le_bom.las", 1, 1,
              "the file is UTF-16 text (little-endian); LAS files are read as ASCII or UTF-8. Convert it first, e.g. "
              "'iconv -f UTF-16LE -t UTF-8 in.las > out.las'");
  ExpectError([] { ReadLas(Fixture("utf16be.las")); }, "utf16be.las", 1, 1, "UTF-16 text (big-endian)");
}

TEST(LasField, DuplicateMnemonicWarnsWhenUnusedAndIsAnErrorWhenRequested) {
  const std::string f = "duplicate_unused.las";
  const LasFile las = ReadLas(Fixture(f));
  EXPECT_EQ(las.Count("gr"), 2u);
  const DensityProfile p = Profile(las);
  ExpectWarning(p.warnings, f, 14, 0, "curve GR appears twice in ~C (first at line 12); not used, so not read");
  EXPECT_EQ(p.warnings.size(), 1u);
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
  ExpectError([&] { ExtractCurve(las, "GR"); }, f, 14, 0,
              "requested curve GR is ambiguous: GR appears twice in ~C (first at line 12)");
  ExpectError([] { Profile(ReadLas(Fixture("duplicate_density.las"))); }, "duplicate_density.las", 13, 0,
              "density curve RHOB is ambiguous: RHOB appears twice in ~C (first at line 12)");
}

TEST(LasField, NonNumbersWarnInUnusedCurvesAndFailInUsedOnesAtTheirLineAndColumn) {
  const std::string f = "nonnumeric_unused.las";
  const LasFile las = ReadLas(Fixture(f));
  DensityLogSpec spec;
  spec.rock_top = 1000.0;
  spec.correction_curve = "DRHO";
  spec.correction_limit = 100.0;  // kg/m^3; every DRHO here is smaller
  const DensityProfile p = BuildDensityProfile(las, spec);
  ExpectWarning(p.warnings, f, 18, 13, "curve ILD holds 2 value(s) that are not numbers (the first, '****'); not used");
  ExpectWarning(p.warnings, f, 18, 30, "curve SP holds 2 value(s) that are not numbers (the first, '-1.#IND0000')");
  EXPECT_EQ(p.warnings.size(), 2u);
  EXPECT_NEAR(LoadAt(p, 1002.0), kFiveSampleLoad, 1e-9 * kFiveSampleLoad);
  ExpectError([&] { ExtractCurve(las, "ILD"); }, f, 18, 13,
              "value '****' of the requested curve ILD is not a number (2 such value(s) in that curve)");
  ExpectError([] { Profile(ReadLas(Fixture("nonnumeric_density.las"))); }, "nonnumeric_density.las", 16, 13,
              "value '******' of the density curve RHOB is not a number");
  ExpectError([] { BuildDensityProfile(ReadLas(Fixture("nonnumeric_drho.las")), [] {
                 DensityLogSpec s;
                 s.rock_top = 1000.0;
                 s.correction_curve = "DRHO";
                 s.correction_limit = 100.0;
                 return s;
               }()); },
              "nonnumeric_drho.las", 16, 22, "value '-1.#IND0000' of the correction curve DRHO is not a number");
  // Unused there, the same DRHO only warns.
  const DensityProfile q = Profile(ReadLas(Fixture("nonnumeric_drho.las")));
  ExpectWarning(q.warnings, "nonnumeric_drho.las", 16, 22, "curve DRHO holds 1 value(s) that are not numbers");
  ExpectError([] { ReadLas(Fixture("nonnumeric_depth.las")); }, "nonnumeric_depth.las", 15, 2,
              "index value '1000.5O0' in ~A is not a number");
}

TEST(LasField, ImplausibleDensitiesAreScreenedByDefaultOrKeptAndAlwaysCounted) {
  const std::string f = "implausible_density.las";
  const LasFile las = ReadLas(Fixture(f));
  const DensityProfile screened = Profile(las);
  ExpectWarning(screened.warnings, f, 15, 0,
                "2 RHOB sample(s) outside the plausible range 1 g/cc to 3.3 g/cc (lowest 0.12 g/cc at index 1000.5 m "
                "(line 15), highest 5.99 g/cc at index 1002 m (line 18)); rejected and bridged like NULLs");
  EXPECT_EQ(screened.source[1], DensitySource::kOutOfRange);
  EXPECT_EQ(screened.source[4], DensitySource::kOutOfRange);
  // 0.12 -> (2.30 + 2.40)/2 = 2.35; 5.99 -> (2.38 + 2.44)/2 = 2.41.
  const double screened_load = g * 1000.0 * 0.5 *
                               ((2.30 + 2.35) / 2 + (2.35 + 2.40) / 2 + (2.40 + 2.38) / 2 + (2.38 + 2.41) / 2 +
                                (2.41 + 2.44) / 2 + (2.44 + 2.42) / 2);
  EXPECT_NEAR(LoadAt(screened, 1003.0), screened_load, 1e-9 * screened_load);
  EXPECT_NEAR(LoadAt(screened, 1003.0), Trapezoid({2.30, 2.35, 2.40, 2.38, 2.41, 2.44, 2.42}), 1e-6);

  DensityLogSpec keep;
  keep.rock_top = 1000.0;
  keep.screen_implausible = false;
  const DensityProfile kept = BuildDensityProfile(las, keep);
  ExpectWarning(kept.warnings, f, 15, 0, "2 RHOB sample(s) outside the plausible range 1 g/cc to 3.3 g/cc");
  EXPECT_EQ(kept.source[1], DensitySource::kOutOfRangeKept);
  const double kept_load = Trapezoid({2.30, 0.12, 2.40, 2.38, 5.99, 2.44, 2.42});
  EXPECT_NEAR(LoadAt(kept, 1003.0), kept_load, 1e-9 * kept_load);

  // A range the study sets: [0.1, 6] g/cc takes every sample as measured.
  DensityLogSpec wide = keep;
  wide.plausible_min = 100.0;
  wide.plausible_max = 6000.0;
  const DensityProfile all = BuildDensityProfile(las, wide);
  EXPECT_TRUE(all.warnings.empty());
  EXPECT_NEAR(LoadAt(all, 1003.0), kept_load, 1e-9 * kept_load);
}

TEST(LasField, Las30AndTimeIndexAreRefused) {
  ExpectError([] { ReadLas(Fixture("las30.las")); }, "las30.las", 3, 0,
              "LAS 3.0 files are not read (their log data sections differ); export the log as LAS 2.0");
  ExpectError([] { ReadLas(Fixture("depth_unit_time.las")); }, "depth_unit_time.las", 11, 0,
              "index curve DEPT unit 'S' is not a length");
}

TEST(LasField, EveryDensityUnitSpellingOfTheFieldIsRead) {
  // Spellings found in field files (common practice); lower case and mixed case too.
  const std::vector<std::pair<std::string, double>> units = {
      {"G/CC", 1000}, {"G/C3", 1000}, {"GM/CC", 1000}, {"GM/C3", 1000}, {"G/CM3", 1000}, {"GR/CC", 1000},
      {"g/cc", 1000}, {"gm/cc", 1000}, {"g/cm3", 1000}, {"Gr/Cc", 1000}, {"KG/M3", 1},  {"K/M3", 1},
      {"kg/m3", 1},   {"Kg/m3", 1}};
  for (const auto& [unit, factor] : units) {
    const double v = factor == 1 ? 2300.0 : 2.3;
    const std::string text = "~V\nVERS. 2.0 :\nWRAP. NO :\n~W\nSTRT.M 1000 :\nSTOP.M 1001 :\nSTEP.M 1 :\nNULL. -999.25 :\n"
                             "~C\nDEPT.M :\nRHOB." + unit + " :\n~A\n1000 " + std::to_string(v) + "\n1001 " +
                             std::to_string(v) + "\n";
    const DensityProfile p = Profile(ParseLas(text, "units.las"));
    EXPECT_NEAR(LoadAt(p, 1001.0), g * 2300.0, 1e-9) << unit;
  }
  EXPECT_EQ(LasDensityFactor("GM/CM"), 0.0);
  EXPECT_EQ(LasDensityFactor("API"), 0.0);
}

}  // namespace
}  // namespace porofit::depth

// The LAS 2.0 reader and the density profile built from a LAS density curve.
// Rules checked here come from the LAS 2.0 standard of the Canadian Well
// Logging Society (sections ~V, ~W, ~C, ~A; header-line delimiters) as
// as recalled [from memory] (docs/las.md); the profile rules (bridging,
// bad-hole screen, fill) from docs/depth-method.md (common practice). All well
// data below are invented for the tests.
#include "porofit/depth/las.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <functional>
#include <random>

#include "porofit/core/error.h"
#include "porofit/depth/profile.h"

namespace porofit::depth {
namespace {

namespace fs = std::filesystem;

// A scratch directory removed at the end of the test.
class TempDir {
 public:
  TempDir() {
    std::random_device rd;
    path_ = fs::temp_directory_path() / ("porofit_las_test_" + std::to_string(rd()) + "_" + std::to_string(rd()));
    fs::create_directories(path_);
  }
  ~TempDir() {
    std::error_code ec;
    fs::remove_all(path_, ec);
  }
  std::string Write(const std::string& name, const std::string& text) const {
    const fs::path p = path_ / name;
    std::ofstream(p, std::ios::binary) << text;
    return p.string();
  }

 private:
  fs::path path_;
};

std::string Num(double v) {
  char buf[40];
  std::snprintf(buf, sizeof buf, "%.17g", v);
  return buf;
}

// What a test LAS file holds: cols[0] is the index in `unit`; NaN is written as NULL.
struct LasSpec {
  std::string unit = "M";
  bool wrap = false;
  double null = -999.25;
  double step = 0;  // written as STEP; 0 = irregular
  std::vector<std::string> names = {"DEPT", "RHOB"};
  std::vector<std::string> units = {"M", "G/CC"};
  std::vector<std::vector<double>> cols;
  std::string eol = "\n";
};

std::string LasText(const LasSpec& s) {
  const std::string& e = s.eol;
  std::string t;
  t += "~VERSION INFORMATION" + e;
  t += "VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0" + e;
  t += std::string("WRAP.   ") + (s.wrap ? "YES" : "NO") + " : LINE MODE" + e;
  t += "~WELL INFORMATION" + e;
  t += "STRT." + s.unit + "  " + Num(s.cols[0].front()) + " : START DEPTH" + e;
  t += "STOP." + s.unit + "  " + Num(s.cols[0].back()) + " : STOP DEPTH" + e;
  t += "STEP." + s.unit + "  " + Num(s.step) + " : STEP" + e;
  t += "NULL.  " + Num(s.null) + " : NULL VALUE" + e;
  t += "WELL.  INVENTED TEST WELL : WELL" + e;
  t += "~CURVE INFORMATION" + e;
  for (size_t c = 0; c < s.names.size(); ++c) t += s.names[c] + "." + s.units[c] + "  : curve " + std::to_string(c) + e;
  t += "~A" + e;
  for (size_t r = 0; r < s.cols[0].size(); ++r) {
    auto val = [&](size_t c) { return Num(std::isnan(s.cols[c][r]) ? s.null : s.cols[c][r]); };
    if (!s.wrap) {
      std::string line;
      for (size_t c = 0; c < s.cols.size(); ++c) line += (c ? " " : "") + val(c);
      t += line + e;
      continue;
    }
    t += val(0) + e;
    std::string line;
    for (size_t c = 1; c < s.cols.size(); ++c) {
      const std::string v = val(c);
      if (!line.empty() && line.size() + 1 + v.size() > 80) {
        t += line + e;
        line.clear();
      }
      line += (line.empty() ? "" : " ") + v;
    }
    if (!line.empty()) t += line + e;
  }
  return t;
}

// Samples z0, z0 + dz, ..., z1 of rho(z) in kg/m^3, written in G/CC.
LasSpec DensityLas(double z0, double z1, double dz, const std::function<double(double)>& rho) {
  LasSpec s;
  s.step = dz;
  s.cols.assign(2, {});
  const int n = static_cast<int>(std::lround((z1 - z0) / dz));
  for (int i = 0; i <= n; ++i) {
    const double z = z0 + dz * i;
    s.cols[0].push_back(z);
    s.cols[1].push_back(rho(z) / 1000.0);
  }
  return s;
}

TEST(DensityLog, LinearDensityFromAFileIntegratesToTheAnalyticVerticalStress) {
  // rho(z) = 1900 + 0.25 (z - z0) kg/m^3: S_v = g (1900 h + 0.125 h^2) [calculus; the
  // trapezoid rule is exact on a linear profile, computed].
  const double z0 = 300.0;
  TempDir dir;
  const std::string path =
      dir.Write("linear.las", LasText(DensityLas(z0, 2300.0, 0.5, [&](double z) { return 1900.0 + 0.25 * (z - z0); })));
  const LasFile las = ReadLas(path);
  DensityLogSpec spec;
  spec.rock_top = z0;
  const DensityProfile p = BuildDensityProfile(las, spec);
  ASSERT_EQ(p.depth.size(), 4001u);
  const std::vector<double> at = {300.0, 300.25, 777.7, 1500.0, 2299.9, 2300.0};
  const std::vector<double> s = CumulativeLoad(p, at);
  for (size_t i = 0; i < at.size(); ++i) {
    const double h = at[i] - z0;
    const double expected = kGravity * (1900.0 * h + 0.125 * h * h);
    EXPECT_NEAR(s[i], expected, 1e-9 * std::max(expected, 1.0)) << at[i];
  }
  for (const DensitySource src : p.source) EXPECT_EQ(src, DensitySource::kMeasured);
}

TEST(DensityLog, TrapezoidErrorOnACompactionTrendShrinksFourfoldWhenTheStepHalves) {
  // rho(z) = 2650 - 700 exp(-z / 1200) kg/m^3 (an exponential compaction trend, common practice);
  // exact load from z0 to z1: g [2650 h + 700 * 1200 (exp(-z1/1200) - exp(-z0/1200))] [calculus].
  // The composite trapezoid rule's error is O(dz^2) (standard numerical analysis).
  const double z0 = 0.0, z1 = 1000.0;
  auto rho = [](double z) { return 2650.0 - 700.0 * std::exp(-z / 1200.0); };
  const double exact = kGravity * (2650.0 * (z1 - z0) + 700.0 * 1200.0 * (std::exp(-z1 / 1200.0) - std::exp(-z0 / 1200.0)));
  TempDir dir;
  std::vector<double> err;
  for (const double dz : {20.0, 10.0, 5.0}) {
    const LasFile las = ReadLas(dir.Write("exp" + Num(dz) + ".las", LasText(DensityLas(z0, z1, dz, rho))));
    DensityLogSpec spec;
    const DensityProfile p = BuildDensityProfile(las, spec);
    err.push_back(std::fabs(CumulativeLoad(p, {z1})[0] - exact));
  }
  ASSERT_GT(err[2], 0.0);
  EXPECT_NEAR(err[0] / err[1], 4.0, 0.01);
  EXPECT_NEAR(err[1] / err[2], 4.0, 0.01);
  EXPECT_LT(err[0] / exact, 1e-5);
}

LasSpec FiveCurves(bool wrap) {
  // 5 curves of 17 significant digits each do not fit on one 80-character line.
  LasSpec s;
  s.wrap = wrap;
  s.step = 0.1524;
  s.names = {"DEPT", "RHOB", "DRHO", "GR", "NPHI", "DT"};
  s.units = {"M", "G/CC", "G/CC", "GAPI", "V/V", "US/M"};
  s.cols.assign(6, {});
  std::mt19937_64 rng(42);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int i = 0; i < 400; ++i) {
    s.cols[0].push_back(1200.0 + 0.1524 * i);
    s.cols[1].push_back((i >= 100 && i < 110) ? NAN : 2.1 + 0.4 * u(rng));
    s.cols[2].push_back(0.2 * (u(rng) - 0.5));
    s.cols[3].push_back(150 * u(rng));
    s.cols[4].push_back(0.4 * u(rng));
    s.cols[5].push_back(200 + 200 * u(rng));
  }
  return s;
}

TEST(LasReader, WrappedAndUnwrappedFilesGiveIdenticalCurvesAndLoads) {
  TempDir dir;
  const std::string wrapped_text = LasText(FiveCurves(true));
  const LasFile a = ReadLas(dir.Write("flat.las", LasText(FiveCurves(false))));
  const LasFile b = ReadLas(dir.Write("wrapped.las", wrapped_text));
  EXPECT_FALSE(a.wrapped);
  EXPECT_TRUE(b.wrapped);
  // The wrapped writer really wrapped: more lines than rows, each at most 80 characters.
  EXPECT_GT(std::count(wrapped_text.begin(), wrapped_text.end(), '\n'), 3 * 400);
  ASSERT_EQ(a.curves.size(), b.curves.size());
  for (size_t c = 0; c < a.curves.size(); ++c) {
    ASSERT_EQ(a.curves[c].values.size(), 400u);
    ASSERT_EQ(a.curves[c].values.size(), b.curves[c].values.size());
    EXPECT_EQ(std::memcmp(a.curves[c].values.data(), b.curves[c].values.data(), 400 * sizeof(double)), 0)
        << a.curves[c].header.mnemonic;
  }
  EXPECT_TRUE(std::isnan(a.Find("rhob")->values[105]));
  DensityLogSpec spec;
  spec.rock_top = 1200.0;
  const DensityProfile pa = BuildDensityProfile(a, spec);
  const DensityProfile pb = BuildDensityProfile(b, spec);
  std::vector<double> at;
  for (double z = 1200.0; z < 1260.0; z += 0.37) at.push_back(z);
  const std::vector<double> la = CumulativeLoad(pa, at), lb = CumulativeLoad(pb, at);
  ASSERT_EQ(la.size(), lb.size());
  EXPECT_EQ(std::memcmp(la.data(), lb.data(), la.size() * sizeof(double)), 0);
}

TEST(LasReader, DepthsInFeetAndInMetresGiveTheSameProfile) {
  // 1 ft = 0.3048 m exactly (international foot, 1959 agreement; common practice).
  LasSpec m = DensityLas(500.0, 800.0, 0.25, [](double z) { return 2000.0 + 0.3 * (z - 500.0); });
  LasSpec ft = m;
  ft.unit = "FT";
  ft.units[0] = "FT";
  ft.step = m.step / 0.3048;
  for (double& z : ft.cols[0]) z /= 0.3048;
  TempDir dir;
  const LasFile lm = ReadLas(dir.Write("m.las", LasText(m)));
  const LasFile lf = ReadLas(dir.Write("ft.las", LasText(ft)));
  EXPECT_EQ(lf.index_unit, "FT");
  DensityLogSpec spec;
  spec.rock_top = 500.0;
  const DensityProfile pm = BuildDensityProfile(lm, spec);
  const DensityProfile pf = BuildDensityProfile(lf, spec);
  ASSERT_EQ(pm.depth.size(), pf.depth.size());
  for (size_t i = 0; i < pm.depth.size(); ++i) {
    EXPECT_NEAR(pm.depth[i], pf.depth[i], 1e-9);
    EXPECT_EQ(pm.density[i], pf.density[i]);
  }
}

bool HasNote(const DensityProfile& p, const std::string& fragment) {
  for (const std::string& n : p.notes) {
    if (n.find(fragment) != std::string::npos) return true;
  }
  return false;
}

TEST(DensityLog, BridgesNullsScreensBadHoleFillsAboveTheTopAndSaysSo) {
  // Rows every 1 m from 100 to 110 m; NULL at 102-103, |DRHO| 0.15 g/cc at 106 (> 0.1 g/cc
  // screen, common practice [from memory]), trailing NULLs at 109-110.
  LasSpec s;
  s.step = 1.0;
  s.names = {"DEPT", "RHOB", "DRHO"};
  s.units = {"M", "G/CC", "G/CC"};
  s.cols = {{100, 101, 102, 103, 104, 105, 106, 107, 108, 109, 110},
            {2.0, 2.1, NAN, NAN, 2.4, 2.5, 1.7, 2.5, 2.6, NAN, NAN},
            {0.0, 0.01, NAN, NAN, -0.02, 0.05, -0.15, 0.0, 0.0, NAN, NAN}};
  TempDir dir;
  const LasFile las = ReadLas(dir.Write("gaps.las", LasText(s)));
  DensityLogSpec spec;
  spec.correction_curve = "DRHO";
  spec.correction_limit = 100.0;  // 0.1 g/cc
  spec.rock_top = 20.0;
  spec.fill_above = DensityTrend{{0.0, 50.0}, {1800.0, 1900.0}, "1.80 g/cc at 0 m to 1.90 g/cc at 50 m (invented)"};
  const DensityProfile p = BuildDensityProfile(las, spec);

  // Fill: 20 m (trend 1840), the trend point at 50 m, the trend held to 99.99 m, then the log from 100 m.
  ASSERT_EQ(p.depth.size(), 3u + 9u);
  EXPECT_EQ(p.depth[0], 20.0);
  EXPECT_NEAR(p.density[0], 1840.0, 1e-9);
  EXPECT_EQ(p.source[0], DensitySource::kFilled);
  EXPECT_EQ(p.depth[1], 50.0);
  EXPECT_EQ(p.source[1], DensitySource::kFilled);
  EXPECT_NEAR(p.depth[2], 99.99, 1e-12);
  EXPECT_EQ(p.density[2], 1900.0);
  EXPECT_EQ(p.source[2], DensitySource::kFilled);
  EXPECT_EQ(p.source[3], DensitySource::kMeasured);
  // NULL run 102-103 bridged between 2.1 (101) and 2.4 (104).
  EXPECT_EQ(p.source[5], DensitySource::kBridged);
  EXPECT_NEAR(p.density[5], 2200.0, 1e-9);
  EXPECT_NEAR(p.density[6], 2300.0, 1e-9);
  // Bad hole at 106 bridged between 2.5 and 2.5.
  EXPECT_EQ(p.depth[9], 106.0);
  EXPECT_EQ(p.source[9], DensitySource::kBadHole);
  EXPECT_NEAR(p.density[9], 2500.0, 1e-9);
  // The profile ends at the last valid sample.
  EXPECT_EQ(p.depth.back(), 108.0);
  EXPECT_THROW(CumulativeLoad(p, {109.0}), InputError);
  // Load to the log top: trapezoids 20-50 (1840 -> 1900), 50-99.99 at 1900, 0.01 m join to 2000.
  EXPECT_NEAR(CumulativeLoad(p, {100.0})[0],
              kGravity * (30.0 * 1870.0 + 49.99 * 1900.0 + 0.01 * 1950.0), 1e-6);

  EXPECT_TRUE(HasNote(p, "RHOB NULL from 102 m to 103 m (2 samples), bridged linearly between 101 m and 104 m"));
  EXPECT_TRUE(HasNote(p, "rejected by the DRHO screen from 106 m to 106 m (1 samples)"));
  EXPECT_TRUE(HasNote(p, "filled from the rock top at 20 m to the first valid RHOB at 100 m"));
  EXPECT_TRUE(HasNote(p, "(invented)"));
  EXPECT_TRUE(HasNote(p, "profile ends at the last valid RHOB sample at 108 m; 2 NULL or screened samples"));

  const SourceIndex idx(p);
  EXPECT_EQ(idx.SourcesAbove(101.0), (1 << 0) | (1 << 2));
  EXPECT_EQ(idx.SourcesAbove(107.0), 0x0F);

  // Without the trend the same log is an error naming both depths.
  spec.fill_above.reset();
  try {
    BuildDensityProfile(las, spec);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("starts at 100 m, below the rock top at 20 m"), std::string::npos) << e.what();
  }
}

TEST(DensityLog, DecreasingIndexIsReversedAndSurveyMapsMeasuredDepthToTvd) {
  LasSpec s;
  s.step = -10.0;
  s.units = {"M", "K/M3"};
  s.cols = {{1040, 1030, 1020, 1010, 1000}, {2400, 2350, 2300, 2250, 2200}};
  const LasFile las = ParseLas(LasText(s), "down.las");
  EXPECT_TRUE(las.reversed);
  EXPECT_EQ(las.curves[0].values.front(), 1000.0);
  EXPECT_EQ(las.curves[1].values.front(), 2200.0);
  DensityLogSpec spec;
  spec.index_offset = -25.0;  // KB 25 m above the table datum (invented)
  spec.survey_md = {0.0, 975.0, 2000.0};
  spec.survey_tvd = {0.0, 975.0, 1487.5};  // 60 degrees below 975 m: dTVD = dMD / 2
  spec.rock_top = 975.0;
  const DensityProfile p = BuildDensityProfile(las, spec);
  ASSERT_EQ(p.depth.size(), 5u);
  EXPECT_NEAR(p.depth[0], 975.0, 1e-12);
  EXPECT_NEAR(p.depth[4], 975.0 + 20.0, 1e-12);
  // Load: TVD interval 20 m of densities 2200 -> 2400 linear = 20 * 2300.
  EXPECT_NEAR(CumulativeLoad(p, {995.0})[0], kGravity * 20.0 * 2300.0, 1e-6);

  spec.survey_md = {0.0, 1000.0};
  spec.survey_tvd = {0.0, 1000.0};
  try {
    BuildDensityProfile(las, spec);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("outside the survey"), std::string::npos) << e.what();
  }
}

TEST(DensityLog, StartsAtTheRockTopWhenTheLogCrossesItAndIgnoresNullsBelowTheSurvey) {
  // Log from 90 to 130 m; rock top at 95 m; trailing NULLs at 120-130 m lie below the survey.
  LasSpec s;
  s.step = 10.0;
  s.names = {"DEPT", "RHOB", "DRHO"};
  s.units = {"M", "G/CC", "G/CC"};
  s.cols = {{90, 100, 110, 120, 130}, {2.0, 2.2, 2.3, NAN, NAN}, {0.0, NAN, 0.0, NAN, NAN}};
  const LasFile las = ParseLas(LasText(s), "cross.las");
  DensityLogSpec spec;
  spec.rock_top = 95.0;
  spec.survey_md = {0.0, 115.0};
  spec.survey_tvd = {0.0, 115.0};
  spec.correction_curve = "DRHO";
  spec.correction_limit = 100.0;
  const DensityProfile p = BuildDensityProfile(las, spec);
  ASSERT_EQ(p.depth, (std::vector<double>{95.0, 100.0, 110.0}));
  EXPECT_NEAR(p.density[0], 2100.0, 1e-9);  // halfway between 2.0 and 2.2 g/cc
  EXPECT_TRUE(HasNote(p, "1 valid RHOB samples above the rock top at 95 m ignored"));
  EXPECT_TRUE(HasNote(p, "1 RHOB samples kept unscreened because DRHO is NULL there"));
  EXPECT_TRUE(HasNote(p, "2 NULL or screened samples below it, down to 130 m"));
  EXPECT_NEAR(CumulativeLoad(p, {110.0})[0], kGravity * (5.0 * 2150.0 + 10.0 * 2250.0), 1e-6);
}

TEST(DensityLog, InventedFixtureInFeetFromKbIntegratesToTheAnalyticLoad) {
  // tests/data/las/invented_density_ft.las (invented): RHOB = 2.0 + 0.0002 (z - 457.2 m) g/cc,
  // z = MD from KB in metres, with a NULL run and a bad-hole stretch whose garbage values the
  // screen must remove. Linear bridging of a linear log is exact, so S_v is analytic [calculus]:
  // fill 400 m -> log top at constant 1900 kg/m^3 (plus the 0.01 m join), then g (2000 h + 0.1 h^2).
  const LasFile las = ReadLas(std::string(POROFIT_TEST_DATA_DIR) + "/las/invented_density_ft.las");
  EXPECT_EQ(las.index_unit, "FT");
  ASSERT_EQ(las.curves.size(), 4u);
  EXPECT_EQ(las.curves[0].values.size(), 751u);
  const LasHeaderItem* date = las.FindWell("DATE");
  ASSERT_NE(date, nullptr);
  EXPECT_EQ(date->value, "2026-12-02 12:30");
  DensityLogSpec spec;
  spec.index_offset = -80.0 * 0.3048;  // EKB 80 ft above MSL, table datum MSL
  spec.rock_top = 400.0;
  spec.correction_curve = "DRHO";
  spec.correction_limit = 100.0;
  spec.fill_above = DensityTrend{{0.0}, {1900.0}, "1.90 g/cc constant (invented)"};
  const DensityProfile p = BuildDensityProfile(las, spec);
  const double top = 1500 * 0.3048 + spec.index_offset, h = 1500 * 0.3048;
  ASSERT_NEAR(p.depth.back(), top + h, 1e-9);
  const double fill = (top - 0.01 - 400.0) * 1900.0 + 0.01 * 1950.0;
  const double expected = kGravity * (fill + 2000.0 * h + 0.1 * h * h);
  // RHOB is printed with 6 decimals (5e-4 kg/m^3 rounding).
  EXPECT_NEAR(CumulativeLoad(p, {p.depth.back()})[0], expected, 1e-6 * expected);
  EXPECT_TRUE(HasNote(p, "RHOB NULL from"));
  EXPECT_TRUE(HasNote(p, "rejected by the DRHO screen from"));
  const SourceIndex idx(p);
  EXPECT_EQ(idx.SourcesAbove(p.depth.back()), 0x0F);
}

TEST(LasReader, ParsesATenThousandRowFileWrappedAndUnwrappedAlike) {
  LasSpec s = FiveCurves(false);
  for (auto& c : s.cols) c.clear();
  std::mt19937_64 rng(7);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  for (int i = 0; i < 10000; ++i) {
    s.cols[0].push_back(1000.0 + 0.1524 * i);
    for (size_t c = 1; c < 6; ++c) s.cols[c].push_back(2.0 + u(rng));
  }
  // Tests never assert wall-clock times (speed is a benchmark's job).
  std::vector<LasFile> parsed;
  for (const bool wrap : {false, true}) {
    s.wrap = wrap;
    parsed.push_back(ParseLas(LasText(s), "big.las"));
    ASSERT_EQ(parsed.back().curves.size(), 6u);
    EXPECT_EQ(parsed.back().curves[5].values.size(), 10000u);
  }
  for (size_t c = 0; c < 6; ++c) EXPECT_EQ(parsed[0].curves[c].values, parsed[1].curves[c].values) << c;
}

TEST(LasReader, ExtractCurveDropsNullRowsAndKeepsTheUnit) {
  LasSpec s;
  s.step = 5.0;
  s.names = {"DEPT", "PP"};
  s.units = {"M", "MPA"};
  s.cols = {{100, 105, 110, 115}, {1.0, NAN, 1.2, 1.3}};
  const LasFile las = ParseLas(LasText(s), "pp.las");
  const CurveSeries c = ExtractCurve(las, "pp", 10.0);
  EXPECT_EQ(c.mnemonic, "PP");
  EXPECT_EQ(c.unit, "MPA");
  EXPECT_EQ(c.line, 12);
  EXPECT_EQ(c.depth, (std::vector<double>{110, 120, 125}));
  EXPECT_EQ(c.value, (std::vector<double>{1.0, 1.2, 1.3}));
  EXPECT_THROW(ExtractCurve(las, "GR"), InputError);
}

TEST(LasReader, AcceptsCrlfTabsLowerCaseAndColonsInsideValues) {
  // Last-colon rule (LAS 2.0 standard, header lines): "12:30" stays in the value.
  const std::string text =
      "~version information\r\n"
      " vers.   2.0 : cwls log ascii standard - version 2.0\r\n"
      " wrap.\tno : one line per step\r\n"
      "# a comment line\r\n"
      "~well\r\n"
      "strt.m\t100.0 : start\r\n"
      "stop.m\t101.0 : stop\r\n"
      "step.m\t0.5 : step\r\n"
      "null.\t-9999 : null\r\n"
      "date.   2026-12-02 12:30 : log date, run 1.5\r\n"
      "comp.   INVENTED CO. LTD. : company\r\n"
      "\r\n"
      "~curve\r\n"
      "dept.m : depth\r\n"
      "rhob.g/c3 : density\r\n"
      "~a\r\n"
      "100.0\t2.2\r\n"
      "  100.5   -9999\r\n"
      "101.0 2.4\r\n";
  const LasFile las = ParseLas(text, "crlf.las");
  const LasHeaderItem* date = las.FindWell("DATE");
  ASSERT_NE(date, nullptr);
  EXPECT_EQ(date->value, "2026-12-02 12:30");
  EXPECT_EQ(date->description, "log date, run 1.5");
  EXPECT_EQ(date->line, 10);
  const LasHeaderItem* comp = las.FindWell("comp");
  ASSERT_NE(comp, nullptr);
  EXPECT_EQ(comp->unit, "");
  EXPECT_EQ(comp->value, "INVENTED CO. LTD.");
  EXPECT_EQ(las.index_unit, "M");
  EXPECT_EQ(las.null_value, -9999.0);
  ASSERT_EQ(las.curves.size(), 2u);
  EXPECT_EQ(las.curves[1].header.unit, "g/c3");
  EXPECT_EQ(las.curves[1].values[0], 2.2);
  EXPECT_TRUE(std::isnan(las.curves[1].values[1]));
  DensityLogSpec spec;
  spec.rock_top = 100.0;
  const DensityProfile p = BuildDensityProfile(las, spec);
  EXPECT_EQ(p.source[1], DensitySource::kBridged);
  EXPECT_NEAR(p.density[1], 2300.0, 1e-9);
}

// ---- malformed files: the error names the file, the 1-based line and the rule ----

const std::vector<std::string> kGood = {
    "~VERSION INFORMATION",                              // 1
    "VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0",  // 2
    "WRAP.   NO  : ONE LINE PER DEPTH STEP",             // 3
    "~WELL INFORMATION",                                 // 4
    "STRT.M   1000.0 : START DEPTH",                     // 5
    "STOP.M   1001.0 : STOP DEPTH",                      // 6
    "STEP.M   0.5 : STEP",                               // 7
    "NULL.    -999.25 : NULL VALUE",                     // 8
    "WELL.    INVENTED WELL 1 : WELL",                   // 9
    "~CURVE INFORMATION",                                // 10
    "DEPT.M    : DEPTH",                                 // 11
    "RHOB.G/CC : BULK DENSITY",                          // 12
    "DRHO.G/CC : DENSITY CORRECTION",                    // 13
    "~PARAMETER INFORMATION",                            // 14
    "BHT.DEGC  60 : BOTTOM HOLE TEMPERATURE",            // 15
    "~OTHER",                                            // 16
    "invented data for tests",                           // 17
    "~A DEPT RHOB DRHO",                                 // 18
    "1000.0 2.30 0.01",                                  // 19
    "1000.5 2.31 0.02",                                  // 20
    "1001.0 2.32 0.01",                                  // 21
};

std::string Join(const std::vector<std::string>& lines) {
  std::string t;
  for (const std::string& l : lines) t += l + "\n";
  return t;
}

struct Malformed {
  const char* name;
  std::function<void(std::vector<std::string>&)> edit;
  int line;
  int column;  // 0: not checked
  const char* rule;
};

void Set(std::vector<std::string>& l, int line, const std::string& text) { l[static_cast<size_t>(line - 1)] = text; }
void Erase(std::vector<std::string>& l, int from, int to) {
  l.erase(l.begin() + (from - 1), l.begin() + to);
}

TEST(LasReader, TheGoodTemplateParses) {
  const LasFile las = ParseLas(Join(kGood), "good.las");
  EXPECT_EQ(las.curves.size(), 3u);
  EXPECT_EQ(las.data_line, 18);
  EXPECT_EQ(las.curve_section_line, 10);
  EXPECT_EQ(las.other, "invented data for tests");
  ASSERT_EQ(las.parameters.size(), 1u);
  EXPECT_EQ(las.parameters[0].unit, "DEGC");
}

TEST(LasReader, MalformedFilesReportFileLineAndRule) {
  // Each rule: LAS 2.0 standard (CWLS) as recalled [from memory] (docs/las.md).
  const std::vector<Malformed> cases = {
      {"missing ~V", [](auto& l) { Erase(l, 1, 1); }, 1, 0, "text before the ~V section"},
      {"~V not first", [](auto& l) { std::rotate(l.begin(), l.begin() + 3, l.begin() + 9); }, 1, 0,
       "~V must be the first section, found ~W"},
      {"VERS 1.2", [](auto& l) { Set(l, 2, "VERS.   1.2 : CWLS LOG ASCII STANDARD - VERSION 1.2"); }, 2, 0,
       "only LAS 2.0 files are read"},
      {"VERS 3.0", [](auto& l) { Set(l, 2, "VERS.   3.0 : CWLS LOG ASCII STANDARD - VERSION 3.0"); }, 2, 0,
       "only LAS 2.0 files are read"},
      {"WRAP missing", [](auto& l) { Erase(l, 3, 3); }, 1, 0, "~V has no WRAP line"},
      {"WRAP MAYBE", [](auto& l) { Set(l, 3, "WRAP.   MAYBE : ?"); }, 3, 0, "WRAP = MAYBE must be YES or NO"},
      {"missing ~A", [](auto& l) { Erase(l, 18, 21); }, 17, 0, "no ~A section"},
      {"section after ~A", [](auto& l) { l.push_back("~OTHER"); }, 22, 0, "section ~O after ~A"},
      {"duplicate ~C", [](auto& l) { Set(l, 16, "~C"); }, 16, 0,
       "second ~C section (each section appears at most once; the first is at line 10)"},
      {"non-numeric value", [](auto& l) { Set(l, 20, "1000.5 2.3x 0.02"); }, 20, 8, "value '2.3x' in ~A is not a number"},
      {"wrong column count", [](auto& l) { Set(l, 20, "1000.5 2.31"); }, 20, 0,
       "row has 2 values but ~C declares 3 curves"},
      {"index not monotonic", [](auto& l) { Set(l, 21, "1000.5 2.32 0.01"); }, 21, 0,
       "index 1000.5 does not increase from 1000.5 (line 20); the index must be strictly monotonic"},
      {"STRT disagrees", [](auto& l) { Set(l, 5, "STRT.M   999.0 : START DEPTH"); }, 5, 0,
       "STRT = 999.0 disagrees with the first index value 1000 (line 19)"},
      {"unit mismatch", [](auto& l) {
         Set(l, 5, "STRT.F   1000.0 : START DEPTH");
         Set(l, 6, "STOP.F   1001.0 : STOP DEPTH");
         Set(l, 7, "STEP.F   0.5 : STEP");
       }, 11, 0, "index curve unit M differs from STRT/STOP/STEP unit F (line 5)"},
      {"missing NULL", [](auto& l) { Erase(l, 8, 8); }, 4, 0, "~W has no NULL line"},
      {"wrapped line over 80", [](auto& l) {
         Set(l, 3, "WRAP.   YES : WRAPPED");
         Set(l, 19, "1000.0");
         Set(l, 20, "2.30" + std::string(80, ' ') + "0.01");
         Set(l, 21, "1000.5");
         l.push_back("2.31 0.02");
         l.push_back("1001.0");
         l.push_back("2.32 0.01");
       }, 20, 0, "line is 88 characters long; wrapped LAS data lines are at most 80"},
      {"index not alone when wrapped", [](auto& l) { Set(l, 3, "WRAP.   YES : WRAPPED"); }, 19, 8,
       "in a wrapped file the index is alone on its line"},
      {"LAS 1.2 value after the colon", [](auto& l) { Set(l, 5, "STRT.M       : 1000.0"); }, 5, 0,
       "STRT has its value after the colon, as LAS 1.2 writes it"},
      {"time index", [](auto& l) { Set(l, 11, "TIME.S    : TIME"); }, 11, 0,
       "index curve TIME is time; a depth index (DEPT or DEPTH) is needed"},
      {"off the STEP grid", [](auto& l) { Set(l, 7, "STEP.M   0.25 : STEP"); }, 20, 1, "is off the regular STEP = 0.25"},
      {"header line without colon", [](auto& l) { Set(l, 9, "WELL.    INVENTED WELL 1"); }, 9, 0,
       "header line for WELL has no ':'"},
      {"duplicate STRT", [](auto& l) { Set(l, 9, "STRT.M   1000.0 : AGAIN"); }, 9, 0,
       "STRT appears twice in ~W (first at line 5)"},
      {"index is NULL", [](auto& l) { Set(l, 21, "-999.25 2.32 0.01"); }, 21, 1, "index value -999.25 is the NULL value"},
  };
  for (size_t i = 0; i < cases.size(); ++i) {
    const Malformed& c = cases[i];
    std::vector<std::string> lines = kGood;
    c.edit(lines);
    const std::string file = "malformed_" + std::to_string(i) + ".las";
    try {
      ParseLas(Join(lines), file);
      ADD_FAILURE() << c.name << ": no error";
    } catch (const InputError& e) {
      const std::string what = e.what();
      std::string where = file + ":" + std::to_string(c.line) + ":";
      if (c.column > 0) where += std::to_string(c.column) + ":";
      EXPECT_EQ(what.rfind(where, 0), 0u) << c.name << ": " << what;
      EXPECT_EQ(e.location().line, c.line) << c.name << ": " << what;
      EXPECT_NE(what.find(c.rule), std::string::npos) << c.name << ": " << what;
    }
  }
}

TEST(DensityLog, MissingOrNonDensityCurveNamesTheCurveSectionLine) {
  const LasFile las = ParseLas(Join(kGood), "good.las");
  DensityLogSpec spec;
  spec.rock_top = 1000.0;
  spec.curve = "RHOZ";
  try {
    BuildDensityProfile(las, spec);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()).rfind("good.las:10:", 0), 0u) << e.what();
    EXPECT_NE(e.message().find("density curve RHOZ is not in ~C (curves: DEPT, RHOB, DRHO); did you mean RHOB?"),
              std::string::npos)
        << e.what();
  }
  std::vector<std::string> lines = kGood;
  Set(lines, 12, "RHOB.API : NOT A DENSITY");
  const LasFile bad = ParseLas(Join(lines), "api.las");
  spec.curve = "rhob";
  try {
    BuildDensityProfile(bad, spec);
    FAIL();
  } catch (const InputError& e) {
    EXPECT_EQ(std::string(e.what()).rfind("api.las:12:", 0), 0u) << e.what();
    EXPECT_NE(e.message().find("unit 'API' is not a density unit"), std::string::npos) << e.what();
  }
}

TEST(LasReader, ReadLasNamesAFileThatCannotBeOpened) {
  TempDir dir;
  try {
    ReadLas((fs::temp_directory_path() / "porofit_no_such_dir_x" / "none.las").string());
    FAIL();
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("none.las"), std::string::npos);
    EXPECT_NE(e.message().find("cannot open LAS file"), std::string::npos);
  }
}

}  // namespace
}  // namespace porofit::depth

// depth_<name>.csv, the results.json "depth_tables" section and the summary
// lines, from a hand-built table (no solver, no engine): the expected numbers
// are the ones written here, converted with the factors of porofit::units.
#include <gtest/gtest.h>

#include <sstream>
#include <string>
#include <vector>

#include "fixture.h"
#include "porofit/core/units.h"
#include "porofit/report/html.h"
#include "porofit/report/report.h"

namespace porofit {
namespace {

std::vector<std::string> Lines(const std::string& text) {
  std::vector<std::string> out;
  std::istringstream in(text);
  for (std::string l; std::getline(in, l);) out.push_back(l);
  return out;
}

bool HasLine(const std::string& text, const std::string& line) {
  for (const std::string& l : Lines(text))
    if (l == line) return true;
  return false;
}

// Offshore table: 1000 m water, rows at 1500 m and 2000 m, one depletion scenario.
StudyRun WithDepthTable(DepthUnits units, BandConvention convention, bool computed = true) {
  StudyRun run = testing::HandBuiltRun();
  DepthTableChoice c;
  c.spec.name = "w1";
  c.spec.datum.kind = depth::DatumKind::kMeanSeaLevel;
  c.spec.datum.water_depth = 1000;
  c.spec.datum.water_density = 1030;
  c.spec.top = 1500;
  c.spec.base = 2000;
  c.spec.step = 500;
  c.spec.overburden.source = "constant gradient 1.0 psi/ft below the rock top";
  c.spec.pore_pressure.source = "hydrostatic 10.1 kPa/m from the sea surface below datum";
  c.spec.stress.measure = depth::StressMeasure::kMeanEffective;
  c.spec.stress.law = depth::EffectiveStressLaw::kBiot;
  c.spec.stress.horizontal = depth::HorizontalStressKind::kRatio;
  c.spec.stress.ratio = 0.6;
  depth::FittedCurve f;
  f.sample_id = "PLUG-1";
  f.model_id = "exp-modulus";
  f.k_s = 37e9;
  f.sigma_k_s = 1e9;
  f.porosity = 0.2;
  f.lab_min = 5e6;
  f.lab_max = 30e6;
  c.spec.curves = {f};
  c.curves = {{0, 0, {}}};
  c.spec.intervals = {{1500, 1800, 0}};
  c.spec.band_level = 0.8;
  c.spec.depletion = {{"10 MPa drawdown", 10e6}};
  c.units = units;
  c.convention = convention;
  run.study.depth_tables.push_back(c);

  DepthTableRun r;
  r.computed = computed;
  r.table.spec = c.spec;
  if (!computed) {
    r.message = "not computed: the fit of sample 'PLUG-1' model 'exp-modulus' did not converge (status max-iterations)";
  } else {
    r.table.assumptions = {"datum MSL (stated by the engine)"};
    depth::DepthRow a;
    a.depth = 1500;
    a.vertical_stress = 30e6;
    a.pore_pressure = 15e6;
    a.horizontal_stress = 22e6;
    a.horizontal_stress_max = 22e6;
    a.evaluation_pressure = 8e6;
    a.biot_vertical_effective = 19e6;
    a.curve = 0;
    a.k_dry = 14e9;
    a.k_dry_lower = 13e9;
    a.k_dry_upper = 15e9;
    a.alpha = 0.62;
    a.alpha_lower = 0.59;
    a.alpha_upper = 0.65;
    a.iterations = 6;
    a.flags = depth::kBelowLabRange;
    depth::DepletionValues d;
    d.pore_pressure = 5e6;
    d.evaluation_pressure = 15e6;
    d.alpha = 0.55;
    d.k_dry = 16.6e9;
    d.vertical_effective = 27e6;
    a.depletion = {d};
    depth::DepthRow b;  // below the last interval: unmapped
    b.depth = 2000;
    b.vertical_stress = 41e6;
    b.pore_pressure = 20.2e6;
    b.evaluation_pressure = 12e6;
    b.flags = depth::kUnmapped;
    b.depletion = {depth::DepletionValues{}};
    b.depletion[0].pore_pressure = 10.2e6;
    b.depletion[0].k_dry = std::nan("");
    b.depletion[0].alpha = std::nan("");
    b.depletion[0].flags = depth::kUnmapped;
    r.table.rows = {a, b};
  }
  run.depth_tables.push_back(r);
  return run;
}

TEST(DepthTableCsv, FieldUnitsHeaderNamesEveryUnitAndTheConvention) {
  std::ostringstream out;
  WriteDepthTableCsv(WithDepthTable(DepthUnits::kField, BandConvention::kNonExceedance), 0, out);
  const std::string s = out.str();
  EXPECT_TRUE(HasLine(s, "# " + CautionText())) << s;
  EXPECT_TRUE(HasLine(s, "# k_dry_p10 / k_dry_p90 and alpha_p10 / alpha_p90: two-sided 80 % band; convention "
                         "non-exceedance: p10 = 10 % non-exceedance (the low value), p90 = 90 % non-exceedance (the "
                         "high value); mid = plug-in value; alpha = 1 - K_dry/K_s falls where K_dry rises, so "
                         "alpha_p10 pairs with k_dry_p90"))
      << s;
  EXPECT_NE(s.find("# CAUTION: any operational use needs review and sign-off by qualified geomechanics or petroleum "
                   "engineers\n"),
            std::string::npos);
  EXPECT_NE(s.find("# CAUTION: local regulations and operator standards govern"), std::string::npos);
  EXPECT_NE(s.find("# datum: MSL, offshore: water depth 3280.84 ft, seawater density 1.03 g/cc, mudline 3280.84 ft"),
            std::string::npos) << s;
  EXPECT_NE(s.find("# K_dry evaluated at sigma_eval = mean effective stress (S_v + S_H + S_h)/3 - alpha P_p (Biot"),
            std::string::npos);
  EXPECT_NE(s.find("# assumption: datum MSL (stated by the engine)\n"), std::string::npos);
  EXPECT_NE(s.find("# depletion d1 = '10 MPa drawdown': P_p lowered by 1450.38 psi at every step"), std::string::npos)
      << s;
  EXPECT_TRUE(HasLine(s, "tvd_ft,sample,model,sv_psi,sv_gradient_psi_per_ft,pp_psi,pp_emw_ppg,sh_psi,sh_max_psi,"
                         "sigma_eval_psi,sigma_v_biot_psi,k_dry_p10_mpsi,k_dry_mid_mpsi,k_dry_p90_mpsi,alpha_p10,"
                         "alpha_mid,alpha_p90,iterations,pp_source,flags,d1_pp_psi,d1_sigma_eval_psi,"
                         "d1_sigma_v_biot_psi,d1_k_dry_mid_mpsi,d1_alpha_mid,d1_flags"))
      << s;
  // Data rows: the non-comment lines after the column header.
  std::vector<std::string> rows;
  for (const std::string& l : Lines(s))
    if (!l.empty() && l[0] != '#') rows.push_back(l);
  ASSERT_EQ(rows.size(), 3u);
  std::vector<std::string> cells;
  std::stringstream row(rows[1]);
  for (std::string c; std::getline(row, c, ',');) cells.push_back(c);
  ASSERT_GE(cells.size(), 20u);
  EXPECT_NEAR(std::stod(cells[0]), 1500 / 0.3048, 1e-9);
  EXPECT_EQ(cells[1], "PLUG-1");
  EXPECT_NEAR(std::stod(cells[3]), 30e6 / units::kPsi, 1e-9);
  // S_v gradient 30 MPa / 1500 m = 20 kPa/m = 0.88419 psi/ft (1 psi/ft = 22.6206 kPa/m, check value 8).
  EXPECT_NEAR(std::stod(cells[4]), 20.0 / 22.6206, 1e-5);
  // P_p 15 MPa at 1500 m: 10 kPa/m = 10 / (0.051948 * 22.6206) ppg [check value 8].
  EXPECT_NEAR(std::stod(cells[6]), 10.0 / (0.051948 * 22.6206), 1e-3);
  EXPECT_NEAR(std::stod(cells[11]), 13e9 / (1e6 * units::kPsi), 1e-12);  // p10 = lower under non-exceedance
  EXPECT_NEAR(std::stod(cells[13]), 15e9 / (1e6 * units::kPsi), 1e-12);
  EXPECT_EQ(cells[14], "0.59");
  EXPECT_EQ(cells[16], "0.65");
  EXPECT_EQ(cells[19], "below-lab-range");
  // The unmapped row keeps its stresses and leaves K and alpha blank.
  EXPECT_NE(rows[2].find(",,,unmapped"), std::string::npos) << rows[2];
}

TEST(DepthTableCsv, ExceedanceConventionSwapsWhichLimitIsP10) {
  std::ostringstream out;
  WriteDepthTableCsv(WithDepthTable(DepthUnits::kSi, BandConvention::kExceedance), 0, out);
  const std::string s = out.str();
  EXPECT_NE(s.find("convention exceedance: p10 = 10 % exceedance (the high value)"), std::string::npos) << s;
  EXPECT_NE(s.find("tvd_m,sample,model,sv_mpa,sv_gradient_kpa_per_m,pp_mpa,pp_emw_g_cc,"), std::string::npos);
  EXPECT_NE(s.find(",k_dry_p10_gpa,k_dry_mid_gpa,k_dry_p90_gpa,"), std::string::npos);
  // SI row: 1500 m, S_v 30 MPa, gradient 20 kPa/m, P_p EMW 15e6/(9.80665*1500) g/cc; p10 = upper (15 GPa).
  EXPECT_NE(s.find("\n1500,PLUG-1,exp-modulus,30,20,15,"), std::string::npos) << s;
  EXPECT_NE(s.find(",15,14,13,0.65,0.62,0.59,6,"), std::string::npos) << s;
}

TEST(DepthTableCsv, TableNotComputedSaysWhyAndHasNoRows) {
  std::ostringstream out;
  WriteDepthTableCsv(WithDepthTable(DepthUnits::kSi, BandConvention::kNonExceedance, false), 0, out);
  const std::string s = out.str();
  EXPECT_NE(s.find("# NOT COMPUTED: not computed: the fit of sample 'PLUG-1' model 'exp-modulus' did not converge"),
            std::string::npos) << s;
  size_t data = 0;
  for (const std::string& l : Lines(s)) data += (!l.empty() && l[0] != '#') ? 1 : 0;
  EXPECT_EQ(data, 1u);  // the column header only
}

TEST(DepthTableJson, SectionCarriesRowsInSiUnitsAndTheConvention) {
  const StudyRun run = WithDepthTable(DepthUnits::kField, BandConvention::kNonExceedance);
  const nlohmann::ordered_json j = ResultsJson(run, {});
  EXPECT_EQ(j["schema_version"], 4);
  const auto& t = j["depth_tables"][0];
  EXPECT_EQ(t["name"], "w1");
  EXPECT_EQ(t["file"], "depth_w1.csv");
  EXPECT_EQ(t["computed"], true);
  EXPECT_EQ(t["band"]["convention"], "non-exceedance");
  EXPECT_DOUBLE_EQ(t["band"]["low_percentile"].get<double>(), 10.0);
  EXPECT_DOUBLE_EQ(t["datum"]["water_density_kg_per_m3"].get<double>(), 1030.0);
  EXPECT_DOUBLE_EQ(t["rows"][0]["tvd_m"].get<double>(), 1500.0);
  EXPECT_DOUBLE_EQ(t["rows"][0]["k_dry_lower_GPa"].get<double>(), 13.0);
  EXPECT_DOUBLE_EQ(t["rows"][0]["depletion"][0]["pp_MPa"].get<double>(), 5.0);
  EXPECT_TRUE(t["rows"][1]["alpha"].is_null());
  EXPECT_EQ(t["rows"][1]["flags"], "unmapped");
  EXPECT_EQ(t["flagged_rows"], 2);
  EXPECT_EQ(t["cautions"][0], CautionText());
}

TEST(DepthTableSummary, ShowsRangeDefinitionAlphaRangeAndFlaggedRows) {
  std::ostringstream out;
  WriteSummary(WithDepthTable(DepthUnits::kSi, BandConvention::kNonExceedance), out);
  const std::string s = out.str();
  EXPECT_NE(s.find("Depth table w1 (depth_w1.csv): 1500 m to 2000 m below MSL, step 500 m"), std::string::npos) << s;
  EXPECT_NE(s.find("  2 rows, 1 with alpha: alpha 0.62 to 0.62 (plug-in), 80 % band 0.59 to 0.65"), std::string::npos)
      << s;
  EXPECT_NE(s.find("  flagged rows 2 of 2 (below-lab-range 1, unmapped 1)"), std::string::npos) << s;
  EXPECT_NE(s.find("  depletion '10 MPa drawdown': alpha 0.55 to 0.55"), std::string::npos) << s;
  EXPECT_NE(s.find("qualified geomechanics or petroleum engineers"), std::string::npos);
}

// The input warnings of a table (from the LAS reader) reach every output that shows the table.
TEST(DepthTableWarnings, AppearInTheCsvHeaderJsonSummaryAndReport) {
  const std::vector<std::string> warnings = {
      "well.las:6: warning: STOP = 3000.0 disagrees with the last index value 3100 (line 38); the data govern",
      "well.las:1:1: warning: UTF-8 byte-order mark at the start of the file skipped"};
  for (const bool computed : {true, false}) {
    StudyRun run = WithDepthTable(DepthUnits::kSi, BandConvention::kNonExceedance, computed);
    run.study.depth_tables[0].spec.warnings = warnings;
    run.depth_tables[0].table.spec.warnings = warnings;
    std::ostringstream csv, summary;
    WriteDepthTableCsv(run, 0, csv);
    WriteSummary(run, summary);
    const nlohmann::ordered_json j = ResultsJson(run, {});
    for (const std::string& w : warnings) {
      EXPECT_TRUE(HasLine(csv.str(), "# " + w)) << csv.str();
      EXPECT_NE(summary.str().find("  " + w + "\n"), std::string::npos) << summary.str();
    }
    EXPECT_EQ(j["depth_tables"][0]["warnings"], warnings);
  }
  const StudyRun run = WithDepthTable(DepthUnits::kSi, BandConvention::kNonExceedance);
  depth::DepthTable table = run.depth_tables[0].table;
  table.spec.warnings = warnings;
  const std::string html = RenderDepthTableSection(table, false);
  EXPECT_NE(html.find("2 input warning(s)"), std::string::npos) << html;
  EXPECT_NE(html.find("<li>well.las:6: warning: STOP = 3000.0 disagrees"), std::string::npos) << html;
  table.spec.warnings.clear();
  EXPECT_EQ(RenderDepthTableSection(table, false).find("input warning"), std::string::npos);
}

TEST(DepthTableFiles, ReportFileNamesListTheTablesBeforeResultsJson) {
  const StudyRun run = WithDepthTable(DepthUnits::kSi, BandConvention::kNonExceedance);
  const std::vector<std::string> names = ReportFileNames(run.study);
  ASSERT_EQ(names.size(), ReportFileNames().size() + 1);
  EXPECT_EQ(names[names.size() - 3], "depth_w1.csv");
  EXPECT_EQ(names[names.size() - 2], "results.json");
  EXPECT_EQ(names.back(), "report.html");
}

}  // namespace
}  // namespace porofit

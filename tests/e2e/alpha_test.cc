// End-to-end checks of the alpha outputs on the sample study, and the VTI
// relations through the loader and runner.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <algorithm>
#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <nlohmann/json.hpp>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/io/csv.h"
#include "porofit/io/study_loader.h"
#include "porofit/report/report.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

// Runs the sample study once for every test in this file.
const fs::path& SampleOutput() {
  static const fs::path out = [] {
    const fs::path dir = fs::temp_directory_path() / ("porofit-e2e-alpha-" + std::to_string(::getpid()));
    fs::remove_all(dir);
    const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                            POROFIT_SAMPLE_STUDY + "' --out '" + dir.string() + "' --quiet";
    const int status = std::system(cmd.c_str());
    EXPECT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << cmd;
    return dir;
  }();
  return out;
}

struct Cleanup : ::testing::Environment {
  void TearDown() override { fs::remove_all(SampleOutput()); }
};
const auto* const kCleanup = ::testing::AddGlobalTestEnvironment(new Cleanup);

csv::Table Read(const std::string& name) { return csv::ReadCsvFile((SampleOutput() / name).string()); }

double Cell(const csv::Table& t, const csv::Row& r, const std::string& column) {
  const int k = t.ColumnIndex(column);
  EXPECT_GE(k, 0) << column;
  double v = std::nan("");
  if (k >= 0 && !r.fields[static_cast<size_t>(k)].empty()) csv::ParseNumber(r.fields[static_cast<size_t>(k)], v);
  return v;
}
std::string Text(const csv::Table& t, const csv::Row& r, const std::string& column) {
  const int k = t.ColumnIndex(column);
  return k >= 0 ? r.fields[static_cast<size_t>(k)] : std::string("<missing>");
}

TEST(AlphaOutputs, AlphaCsvHasTheDocumentedColumns) {
  const csv::Table t = Read("alpha.csv");
  const std::vector<std::string> expected = {
      "sample",        "model",          "method",         "pressure_MPa",   "K_GPa",          "K_lo_GPa",
      "K_hi_GPa",      "alpha",          "alpha_conf_lo",  "alpha_conf_hi",  "alpha_pred_lo",  "alpha_pred_hi",
      "alpha_simul_lo", "alpha_simul_hi", "ks_variance_share", "M_GPa",       "M_lo_GPa",       "M_hi_GPa",
      "K_u_GPa",       "K_u_lo_GPa",     "K_u_hi_GPa",     "B",              "B_lo",           "B_hi",
      "flags"};
  EXPECT_EQ(t.header.fields, expected);
}

TEST(AlphaOutputs, EveryConvergedFitOfASampleWithGrainModulusHasRowsPerMethodAndGridPoint) {
  const Study study = LoadStudy(POROFIT_SAMPLE_STUDY);
  const csv::Table t = Read("alpha.csv");
  std::map<std::string, size_t> rows;
  for (const auto& r : t.rows) ++rows[Text(t, r, "sample") + "/" + Text(t, r, "model") + "/" + Text(t, r, "method")];
  size_t expected_total = 0;
  for (const StudySample& ss : study.samples) {
    const bands::BandOptions& o = ss.bands.options;
    for (const ModelChoice& m : ss.models) {
      for (const auto& [method, on] : std::vector<std::pair<std::string, bool>>{
               {"delta", o.delta}, {"monte-carlo", o.monte_carlo}, {"bootstrap", o.bootstrap}}) {
        // The sample study's grid is 61 points; every fit converges (EveryFitConverges test).
        const size_t want = ss.grain.given && on ? 61u : 0u;
        EXPECT_EQ(rows[ss.sample.id + "/" + m.model_id + "/" + method], want) << ss.sample.id << " " << m.model_id;
        expected_total += want;
      }
    }
  }
  EXPECT_EQ(t.rows.size(), expected_total);
  // At least one plug has all three methods (sample-study requirement).
  EXPECT_GT(rows["QV14-2231V-unload/exp-modulus/bootstrap"], 0u);
  EXPECT_GT(rows["QV14-2231V-unload/exp-modulus/monte-carlo"], 0u);
}

TEST(AlphaOutputs, BandsAreOrderedAndAlphaIsOneMinusKOverKs) {
  const csv::Table t = Read("alpha.csv");
  const csv::Table g = Read("grain_modulus.csv");
  std::map<std::string, double> ks;
  for (const auto& r : g.rows) ks[Text(g, r, "sample")] = Cell(g, r, "K_s_GPa");
  int checked = 0;
  for (const auto& r : t.rows) {
    const std::string where = Text(t, r, "sample") + " " + Text(t, r, "model") + " " + Text(t, r, "method") + " P " +
                              Text(t, r, "pressure_MPa");
    const double k = Cell(t, r, "K_GPa"), a = Cell(t, r, "alpha");
    if (Text(t, r, "flags").find("model-undefined") != std::string::npos) {
      // e.g. a power law at P = 0: no number, flagged instead.
      EXPECT_TRUE(std::isnan(k)) << where;
      continue;
    }
    EXPECT_TRUE(std::isfinite(k)) << where << " (unflagged rows have numbers)";
    EXPECT_NEAR(a, 1 - k / ks[Text(t, r, "sample")], 1e-12) << where;
    EXPECT_LE(Cell(t, r, "K_lo_GPa"), k) << where;
    EXPECT_LE(k, Cell(t, r, "K_hi_GPa")) << where;
    const double clo = Cell(t, r, "alpha_conf_lo"), chi = Cell(t, r, "alpha_conf_hi");
    EXPECT_LT(clo, chi) << where;
    if (Text(t, r, "method") == "delta") {
      // Delta bands are symmetric about the plug-in value; prediction and
      // whole-curve bands contain the pointwise confidence band.
      EXPECT_LE(clo, a) << where;
      EXPECT_LE(a, chi) << where;
      EXPECT_LE(Cell(t, r, "alpha_pred_lo"), clo) << where;
      EXPECT_GE(Cell(t, r, "alpha_pred_hi"), chi) << where;
      EXPECT_LE(Cell(t, r, "alpha_simul_lo"), clo) << where;
      EXPECT_GE(Cell(t, r, "alpha_simul_hi"), chi) << where;
      const double share = Cell(t, r, "ks_variance_share");
      EXPECT_GE(share, 0) << where;
      EXPECT_LE(share, 1) << where;
    }
    ++checked;
  }
  EXPECT_GT(checked, 1000);
}

TEST(AlphaOutputs, ExtrapolatedFlagMarksExactlyThePressuresOutsideTheData) {
  const Study study = LoadStudy(POROFIT_SAMPLE_STUDY);
  std::map<std::string, std::pair<double, double>> range;
  for (const StudySample& ss : study.samples) {
    double lo = INFINITY, hi = -INFINITY;
    for (const DataPoint& p : ss.sample.points) lo = std::min(lo, p.pressure / 1e6), hi = std::max(hi, p.pressure / 1e6);
    range[ss.sample.id] = {lo, hi};
  }
  const csv::Table t = Read("alpha.csv");
  int flagged = 0;
  for (const auto& r : t.rows) {
    const double p = Cell(t, r, "pressure_MPa");
    const auto [lo, hi] = range[Text(t, r, "sample")];
    const bool outside = p < lo - 1e-9 || p > hi + 1e-9;
    const bool flag = Text(t, r, "flags").find("extrapolated") != std::string::npos;
    EXPECT_EQ(flag, outside) << Text(t, r, "sample") << " P " << p;
    flagged += flag ? 1 : 0;
  }
  EXPECT_GT(flagged, 0);
}

TEST(AlphaOutputs, GrainModulusTableNamesTheSharedGroupAndClayRichShaleIsWidest) {
  const csv::Table g = Read("grain_modulus.csv");
  std::map<std::string, const csv::Row*> by;
  for (const auto& r : g.rows) by[Text(g, r, "sample")] = &r;
  ASSERT_EQ(g.rows.size(), LoadStudy(POROFIT_SAMPLE_STUDY).samples.size());
  ASSERT_TRUE(by.count("QV14-2231V-unload"));
  EXPECT_EQ(Text(g, *by["QV14-2231V-unload"], "group"), "qv14-2231");
  EXPECT_EQ(Text(g, *by["QV14-2231V-unload"], "shared_with"), "QV14-2231V;QV14-2231V-dyn");
  EXPECT_EQ(Text(g, *by["QV14-2320H-dyn"], "method"), "none");
  EXPECT_EQ(Text(g, *by["QV14-2409V"], "method"), "measured");
  auto rel = [&](const std::string& id) {
    return Cell(g, *by[id], "sigma_K_s_GPa") / Cell(g, *by[id], "K_s_GPa");
  };
  EXPECT_GT(rel("QV14-2544V"), 3 * rel("QV14-2231V"));
  EXPECT_GT(rel("QV14-2544V"), rel("QV14-2409V"));
}

TEST(AlphaOutputs, ResultsJsonCarriesTheSchemaVersionAndTheCorrelationCaveat) {
  std::ifstream in(SampleOutput() / "results.json");
  const nlohmann::json j = nlohmann::json::parse(in);
  EXPECT_EQ(j["schema_version"], kResultsSchemaVersion);  // 3 since the comparison sections
  ASSERT_FALSE(j["alpha_notes"].empty());
  EXPECT_NE(j["alpha_notes"][0].get<std::string>().find("correlated"), std::string::npos);
  bool saw_group = false;
  for (const auto& s : j["samples"]) {
    if (s["grain_modulus"]["method"] == "mineralogy") {
      EXPECT_TRUE(s["grain_modulus"]["K"].contains("hs_lower"));
      EXPECT_FALSE(s["grain_modulus"]["sources"].empty());
    }
    saw_group = saw_group || s["grain_modulus"].value("group", nlohmann::json()).is_string();
  }
  EXPECT_TRUE(saw_group);
  const std::string summary = [] {
    std::ifstream f(SampleOutput() / "summary.txt");
    std::stringstream ss;
    ss << f.rdbuf();
    return ss.str();
  }();
  // The caveat is stated once in the summary.
  const std::string caveat = "alpha errors are fully correlated across pressures";
  const size_t first = summary.find(caveat);
  ASSERT_NE(first, std::string::npos);
  EXPECT_EQ(summary.find(caveat, first + 1), std::string::npos);
}

TEST(AlphaOutputs, VtiStiffnessesGiveTheCheckValues) {
  // Check value 14 [computed; docs/check-values.md]: C11 30, C12 10, C13 8, C33 20,
  // K_s 40 GPa -> alpha_h 0.600, alpha_v 0.700.
  const std::string text =
      "name: vti check\nsamples:\n  - id: S1\n    lithology: shale\n    porosity: 0.1\n    bulk_density: 2.5 g/cc\n"
      "    measurement: static\n    data:\n      columns: [P MPa, K GPa]\n"
      "      rows: [[5, 8.1], [10, 10.2], [20, 12.9], [40, 15.0]]\n    models: [linear]\n"
      "    grain_modulus: {measured: {K_s: 40 GPa, sigma: 2 GPa, source: check 14}}\n"
      "    vti_stiffness:\n      columns: [P MPa, C11 GPa, C12 GPa, C13 GPa, C33 GPa]\n"
      "      rows: [[10, 30, 10, 8, 20], [60, 30, 10, 8, 20]]\n";
  const Study study = ParseStudy(text, "vti.yaml", ModelRegistry::Builtin());
  RunOptions ro;
  ro.timestamp_utc = "2026-02-03T04:05:06Z";
  const StudyRun run = RunStudy(study, ro);
  ASSERT_EQ(run.samples[0].vti.size(), 2u);
  EXPECT_NEAR(run.samples[0].vti[0].alpha_h, 0.600, 1e-12);
  EXPECT_NEAR(run.samples[0].vti[0].alpha_v, 0.700, 1e-12);
  // d alpha = (1 - alpha) dK_s/K_s [computed from alpha = 1 - K/K_s]: 0.4 * 2/40 = 0.02.
  EXPECT_NEAR(run.samples[0].vti[0].sigma_h, 0.02, 1e-12);
  EXPECT_FALSE(run.samples[0].vti[0].extrapolated);
  EXPECT_TRUE(run.samples[0].vti[1].extrapolated);
  // One delta band per fit.
  ASSERT_EQ(run.samples[0].bands.size(), 1u);
  EXPECT_TRUE(run.samples[0].bands[0].computed) << run.samples[0].bands[0].message;
}

}  // namespace
}  // namespace porofit

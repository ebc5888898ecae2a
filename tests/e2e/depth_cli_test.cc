// End-to-end: `porofit fit` on the invented sample study, whose depth table
// (well QV-14, offshore, mean effective stress, Biot law, an invented density
// log with a NULL run, a washout and a fill trend, one depletion case) is
// written to depth_QV-14.csv, results.json and the summary.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "porofit/io/study_loader.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class DepthCli : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    dir_ = fs::temp_directory_path() / ("porofit-depth-e2e-" + std::to_string(::getpid()));
    fs::remove_all(dir_);
    fs::create_directories(dir_);
    const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                            POROFIT_SAMPLE_STUDY + "' --threads 2 --out '" + (dir_ / "out").string() + "' >'" +
                            (dir_ / "stdout.txt").string() + "' 2>&1 </dev/null";
    const int status = std::system(cmd.c_str());
    exit_code_ = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  }
  static void TearDownTestSuite() { fs::remove_all(dir_); }
  static fs::path dir_;
  static int exit_code_;
};
fs::path DepthCli::dir_;
int DepthCli::exit_code_ = -1;

TEST_F(DepthCli, WritesTheDepthTableWithItsAssumptionsAndCautions) {
  ASSERT_EQ(exit_code_, 0) << Slurp(dir_ / "stdout.txt");
  const std::string csv = Slurp(dir_ / "out" / "depth_QV-14.csv");
  ASSERT_FALSE(csv.empty());
  for (const std::string& expected :
       {std::string("# datum: MSL, offshore: water depth 2788.71 ft, seawater density 1.03 g/cc"),
        std::string("# K_dry evaluated at sigma_eval = mean effective stress (S_v + S_H + S_h)/3 - alpha P_p (Biot"),
        std::string("# horizontal stress: effective-stress ratio k = sigma'_h/sigma'_v = 0.6"),
        std::string("two-sided 80 % band; convention non-exceedance: p10 = 10 % non-exceedance (the low value)"),
        std::string("# overburden: density log data/QV-14-density.las curve RHOB"),
        std::string("# CAUTION: any operational use needs review and sign-off by qualified geomechanics"),
        std::string("# depletion d1 = '10 MPa drawdown'"),
        std::string("\ntvd_ft,sample,model,sv_psi,")}) {
    EXPECT_NE(csv.find(expected), std::string::npos) << expected;
  }
  // 1400 to 3200 m in 10 m steps: 181 rows; the NULL run and the washout are flagged below them.
  std::vector<std::string> rows;
  std::istringstream in(csv);
  bool header = true;
  for (std::string l; std::getline(in, l);) {
    if (l.empty() || l[0] == '#') continue;
    if (header) {
      header = false;
      continue;
    }
    rows.push_back(l);
  }
  ASSERT_EQ(rows.size(), 181u);
  EXPECT_EQ(rows.front().rfind("4593.175853018372,QV14-2544V,exp-modulus,", 0), 0u) << rows.front();
  EXPECT_NE(rows.back().find("log-gap"), std::string::npos) << rows.back();
  EXPECT_NE(rows.back().find("log-fill"), std::string::npos) << rows.back();
}

TEST_F(DepthCli, ResultsJsonAndSummaryCarryTheTable) {
  ASSERT_EQ(exit_code_, 0) << Slurp(dir_ / "stdout.txt");
  const nlohmann::json j = nlohmann::json::parse(Slurp(dir_ / "out" / "results.json"));
  EXPECT_EQ(j["schema_version"], 4);
  ASSERT_EQ(j["depth_tables"].size(), 1u);
  const auto& t = j["depth_tables"][0];
  EXPECT_EQ(t["computed"], true) << t["message"];
  ASSERT_EQ(t["rows"].size(), 181u);
  // Every mapped row has alpha inside its band, and the band inside [0, 1].
  size_t with_alpha = 0;
  for (const auto& r : t["rows"]) {
    if (r["alpha"].is_null()) continue;
    ++with_alpha;
    const double a = r["alpha"], lo = r["alpha_lower"], hi = r["alpha_upper"];
    EXPECT_LT(lo, a);
    EXPECT_LT(a, hi);
    EXPECT_GT(lo, 0.0);
    EXPECT_LT(hi, 1.0);
    // S_v > P_p everywhere below the mudline, and the Biot evaluation pressure is positive.
    EXPECT_GT(r["sv_MPa"].get<double>(), r["pp_MPa"].get<double>());
    EXPECT_GT(r["sigma_eval_MPa"].get<double>(), 0.0);
  }
  EXPECT_EQ(with_alpha, 181u);
  // The LAS file is an input with a digest.
  bool las = false;
  for (const auto& in : j["provenance"]["input_files"]) las = las || in["path"].get<std::string>().find("QV-14-density.las") != std::string::npos;
  EXPECT_TRUE(las);
  const std::string out = Slurp(dir_ / "stdout.txt");
  EXPECT_NE(out.find("Depth table QV-14 (depth_QV-14.csv): 4593.18 ft to 10498.7 ft below MSL"), std::string::npos)
      << out;
  EXPECT_NE(out.find("depth_QV-14.csv"), std::string::npos);
  EXPECT_TRUE(fs::exists(dir_ / "out" / "summary.txt"));
}


// Study keys -> loader -> run -> engine on the offshore column of the domain
// check value 20 [computed; docs/check-values.md]: 1000 m of sea water (1.03 g/cc) over
// 2000 m of rock at 2.30 g/cc: S_v 55.21 MPa at 3000 m TVDSS, hydrostatic P_p
// (1.03 g/cc) 30.30 MPa, sigma'_v 24.91 MPa; with k = 0.6, sigma'_m 18.27 MPa.
TEST(DepthStudy, OffshoreColumnThroughTheStudyKeysMatchesCheckValue20) {
  const char* const text = R"(name: check value 20 (invented)
samples:
  - id: S1
    lithology: sandstone
    porosity: 0.2
    bulk_density: 2.2 g/cc
    measurement: static
    data: {columns: [P MPa, K GPa], rows: [[5, 9.1], [10, 11.8], [20, 14.9], [30, 16.3], [40, 17.2], [50, 17.6]]}
    models: [exp-modulus]
    grain_modulus: {measured: {K_s: 37 GPa, sigma: 1 GPa, source: invented}}
depth_tables:
  - name: cv20
    units: si
    datum: {reference: MSL, water_depth: 1000 m, water_density: 1.03 g/cc}
    depths: {top: 2000 m, base: 3000 m, step: 500 m}
    overburden: {layers: [{base: 3000 m, density: 2.30 g/cc}]}
    pore_pressure: {hydrostatic: 1.03 g/cc}
    stress: {measure: mean, law: terzaghi, horizontal: {ratio: 0.6}}
    intervals: [{top: 1000 m, base: 3001 m, sample: S1, model: exp-modulus}]
    bands: {level: 80 %, convention: exceedance}
)";
  const Study study = ParseStudy(text, "mem/cv20.yaml", ModelRegistry::Builtin());
  RunOptions o;
  o.timestamp_utc = "2026-02-03T04:05:06Z";
  const StudyRun run = RunStudy(study, o);
  ASSERT_EQ(run.depth_tables.size(), 1u);
  ASSERT_TRUE(run.depth_tables[0].computed) << run.depth_tables[0].message;
  const auto& rows = run.depth_tables[0].table.rows;
  ASSERT_EQ(rows.size(), 3u);
  const auto& r = rows[2];
  EXPECT_DOUBLE_EQ(r.depth, 3000.0);
  EXPECT_NEAR(r.vertical_stress / 1e6, 55.21, 0.005);
  EXPECT_NEAR(r.pore_pressure / 1e6, 30.30, 0.005);
  EXPECT_NEAR((r.vertical_stress - r.pore_pressure) / 1e6, 24.91, 0.005);
  EXPECT_NEAR(r.evaluation_pressure / 1e6, 18.27, 0.005);
  EXPECT_EQ(r.flags, 0u);
  EXPECT_GT(r.alpha, r.alpha_lower);
}

}  // namespace
}  // namespace porofit

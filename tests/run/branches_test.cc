// Branch (hysteresis) tests: joint (pooled, for the test only) against
// separate fits of the samples of one plug, and K_unloading - K_loading.
#include "porofit/run/branches.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/compare/criteria.h"
#include "porofit/io/study_loader.h"
#include "porofit/models/registry.h"
#include "porofit/report/report.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

constexpr double kGPa = 1e9, kMPa = 1e6;

struct Curve {
  double k_inf, k_0, p_close;  // GPa, GPa, MPa
  double operator()(double p_mpa) const { return k_inf - (k_inf - k_0) * std::exp(-p_mpa / p_close); }
};

// Invented test data: exp-modulus (M1) curve at 12 pressures 2..46 MPa plus
// seeded Gaussian noise of `noise` GPa; sigma given (relative weights).
StudySample Plug(const std::string& id, const std::string& plug, Branch branch, int cycle, const Curve& c,
                 std::uint64_t seed, double noise = 0.15) {
  StudySample ss;
  Sample& s = ss.sample;
  s.id = id;
  s.plug = plug;
  s.lithology = "sandstone";
  s.porosity = 0.2;
  s.bulk_density = 2300;
  s.branch = branch;
  s.cycle = cycle;
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> n01(0.0, 1.0);
  for (int i = 0; i < 12; ++i) {
    DataPoint d;
    const double p = 2.0 + 4.0 * i;
    d.pressure = d.confining = p * kMPa;
    d.modulus = (c(p) + noise * n01(rng)) * kGPa;
    d.sigma = noise * kGPa;
    s.points.push_back(d);
  }
  ModelChoice m;
  m.model_id = "exp-modulus";
  ss.models = {m};
  return ss;
}

StudyRun RunOf(std::vector<StudySample> samples) {
  Study st;
  st.name = "branch test (invented data)";
  st.samples = std::move(samples);
  RunOptions ro;
  ro.timestamp_utc = "2026-01-01T00:00:00Z";
  return RunStudy(st, ro);
}

const Curve kLoading{20, 8, 10};     // check value 12 parameters (docs/check-values.md)
const Curve kUnloading{22, 13, 8};   // invented, stiffer at every pressure

TEST(BranchTests, LoadingAndStifferUnloadingDiffer) {
  const StudyRun run = RunOf({Plug("L1", "QV-1", Branch::kLoading, 1, kLoading, 11),
                              Plug("U1", "QV-1", Branch::kUnloading, 1, kUnloading, 12)});
  ASSERT_EQ(run.branches.size(), 1u);
  const BranchSetRun& b = run.branches[0];
  EXPECT_EQ(b.set.plug, "QV-1");
  ASSERT_EQ(b.tests.size(), 1u);
  const BranchTest& t = b.tests[0];
  ASSERT_TRUE(t.tested) << t.reason;
  EXPECT_EQ(t.decision, "branches differ");
  EXPECT_LT(t.f_test.p_value, 1e-6);
  EXPECT_LT(t.aicc_separate, t.aicc_joint);
  ASSERT_EQ(b.hysteresis.size(), 1u);
  const Hysteresis& h = b.hysteresis[0];
  ASSERT_TRUE(h.computed) << h.reason;
  EXPECT_TRUE(h.loading_unloading);
  EXPECT_EQ(h.pair, "unloading - loading, cycle 1");
  EXPECT_FALSE(h.unexpected_sign) << h.note;
  ASSERT_EQ(h.pressure.size(), 11u);
  EXPECT_DOUBLE_EQ(h.pressure.front(), 2 * kMPa);
  EXPECT_DOUBLE_EQ(h.pressure.back(), 46 * kMPa);
  int covered = 0;
  double true_max = 0, p_true_max = 0;
  for (size_t i = 0; i < h.pressure.size(); ++i) {
    const double p = h.pressure[i] / kMPa;
    const double truth = (kUnloading(p) - kLoading(p)) * kGPa;
    EXPECT_GT(h.dk[i], 0) << p;
    ASSERT_TRUE(std::isfinite(h.sigma_dk[i]));
    EXPECT_GT(h.sigma_dk[i], 0);
    covered += std::fabs(h.dk[i] - truth) <= 2 * h.sigma_dk[i] ? 1 : 0;
    const double rel = truth / (kLoading(p) * kGPa);
    if (rel > true_max) true_max = rel, p_true_max = p;
  }
  EXPECT_GE(covered, 9) << "2-sigma band covers the true dK at " << covered << " of 11 grid points";
  // The largest relative difference is at low pressure, where cracks are open.
  EXPECT_GT(h.max_relative, 0);
  EXPECT_NEAR(h.max_relative, true_max, 0.1);
  EXPECT_LE(h.max_relative_pressure / kMPa, 10.0);
  EXPECT_DOUBLE_EQ(p_true_max, 2.0);
}

TEST(BranchTests, SameCurveOnBothBranchesGivesNoEvidenceOfDifference) {
  const StudyRun run = RunOf({Plug("L1", "QV-2", Branch::kLoading, 1, kLoading, 21),
                              Plug("U1", "QV-2", Branch::kUnloading, 1, kLoading, 22)});
  ASSERT_EQ(run.branches.size(), 1u);
  const BranchTest& t = run.branches[0].tests[0];
  ASSERT_TRUE(t.tested) << t.reason;
  EXPECT_EQ(t.decision, "no evidence of difference");
  EXPECT_GT(t.f_test.p_value, 0.05);
  EXPECT_LT(t.aicc_joint, t.aicc_separate);
}

// Under the null (one curve for both branches) the F test at 0.95 should
// reject about 5 % of the time; 40 seeds, binomial(40, 0.05): P(X > 6) ~ 0.003.
TEST(BranchTests, FalseAlarmRateIsNearTheNominalLevel) {
  int rejected = 0, tested = 0;
  for (std::uint64_t seed = 100; seed < 140; ++seed) {
    const StudyRun run = RunOf({Plug("L1", "QV-3", Branch::kLoading, 1, kLoading, 2 * seed),
                                Plug("U1", "QV-3", Branch::kUnloading, 1, kLoading, 2 * seed + 1)});
    const BranchTest& t = run.branches.at(0).tests.at(0);
    if (!t.tested) continue;
    ++tested;
    rejected += t.f_test.reject ? 1 : 0;
  }
  EXPECT_EQ(tested, 40);
  EXPECT_LE(rejected, 6);
}

// The 2-sigma hysteresis band should cover the true dK at about the rate of
// |t_9| < 2 (0.92, each fit has 12 - 3 dof; common practice) when the model
// is right; pooled over 30 seeded plugs and 11 grid points.
TEST(BranchTests, HysteresisBandCoversTheTrueDifferenceAtNearTheNominalRate) {
  int covered = 0, total = 0;
  for (std::uint64_t seed = 300; seed < 330; ++seed) {
    const StudyRun run = RunOf({Plug("L1", "QV-C", Branch::kLoading, 1, kLoading, 2 * seed),
                                Plug("U1", "QV-C", Branch::kUnloading, 1, kUnloading, 2 * seed + 1)});
    const Hysteresis& h = run.branches.at(0).hysteresis.at(0);
    ASSERT_TRUE(h.computed) << h.reason;
    for (size_t i = 0; i < h.pressure.size(); ++i) {
      const double p = h.pressure[i] / kMPa;
      const double truth = (kUnloading(p) - kLoading(p)) * kGPa;
      covered += std::fabs(h.dk[i] - truth) <= 2 * h.sigma_dk[i] ? 1 : 0;
      ++total;
    }
  }
  EXPECT_EQ(total, 330);
  EXPECT_GE(covered, 0.85 * total) << covered << " of " << total;
  EXPECT_LE(covered, 0.99 * total) << covered << " of " << total;
}

TEST(BranchTests, PooledFitEqualsAPlainFitOnConcatenatedData) {
  const StudySample a = Plug("L1", "QV-4", Branch::kLoading, 1, kLoading, 31);
  const StudySample b = Plug("U1", "QV-4", Branch::kUnloading, 1, kUnloading, 32);
  Study st;
  st.samples = {a, b};
  const ModelSpec& model = *ModelRegistry::Builtin().Find("exp-modulus");
  const FitResult pooled = FitPooled(st, {0, 1}, a.models[0], model);

  FitRequest req;
  req.model = &model;
  req.options = a.options;
  for (const StudySample* s : {&a, &b})
    for (const DataPoint& p : s->sample.points) {
      req.data.x.push_back(p.pressure);
      req.data.y.push_back(p.modulus);
      req.data.sigma.push_back(p.sigma);
    }
  const FitResult plain = Fit(req);
  ASSERT_TRUE(plain.IsUsable());
  ASSERT_TRUE(pooled.IsUsable());
  EXPECT_EQ(pooled.n, 24);
  EXPECT_DOUBLE_EQ(pooled.ssr, plain.ssr);
  ASSERT_EQ(pooled.parameters.size(), plain.parameters.size());
  for (size_t k = 0; k < plain.parameters.size(); ++k)
    EXPECT_DOUBLE_EQ(pooled.parameters[k].estimate, plain.parameters[k].estimate) << plain.parameters[k].name;
}

TEST(BranchTests, FAndAiccMatchAHandComputationFromTheFitResults) {
  const StudyRun run = RunOf({Plug("L1", "QV-5", Branch::kLoading, 1, kLoading, 41),
                              Plug("U1", "QV-5", Branch::kUnloading, 1, kUnloading, 42, 0.4)});
  const BranchTest& t = run.branches.at(0).tests.at(0);
  ASSERT_TRUE(t.tested) << t.reason;
  const FitResult& f1 = run.samples[0].fits[0];
  const FitResult& f2 = run.samples[1].fits[0];
  const FitResult& j = t.joint;
  const int n = f1.n + f2.n, ps = f1.p + f2.p, pj = j.p;
  ASSERT_EQ(n, 24);
  ASSERT_EQ(ps, 6);
  ASSERT_EQ(pj, 3);
  const double rss_s = f1.ssr + f2.ssr;
  // Extra-sum-of-squares F (Seber & Wild 1989, Nonlinear Regression, Wiley [from memory]).
  const double f = ((j.ssr - rss_s) / (ps - pj)) / (rss_s / (n - ps));
  EXPECT_NEAR(t.f_test.f, f, 1e-12 * f);
  EXPECT_EQ(t.f_test.df1, 3);
  EXPECT_EQ(t.f_test.df2, 18);
  // AICc with one common noise variance counted in k (sigma relative; Hurvich & Tsai 1989 [from memory]).
  auto aicc = [&](double rss, int k) { return n * std::log(rss / n) + 2.0 * k + 2.0 * k * (k + 1) / (n - k - 1); };
  EXPECT_EQ(t.k_joint, 4);
  EXPECT_EQ(t.k_separate, 7);
  EXPECT_NEAR(t.aicc_joint, aicc(j.ssr, 4), 1e-9);
  EXPECT_NEAR(t.aicc_separate, aicc(rss_s, 7), 1e-9);
  // The joint fit's own AICc is the same formula on the same pooled data.
  EXPECT_NEAR(t.aicc_joint, j.aicc, 1e-9);
}

TEST(BranchTests, AbsoluteSigmaCountsNoNoiseVariance) {
  StudySample a = Plug("L1", "QV-6", Branch::kLoading, 1, kLoading, 51);
  StudySample b = Plug("U1", "QV-6", Branch::kUnloading, 1, kUnloading, 52);
  for (StudySample* s : {&a, &b}) s->sample.sigma_absolute = true, s->options.scale_covariance = false;
  const StudyRun run = RunOf({a, b});
  const BranchTest& t = run.branches.at(0).tests.at(0);
  ASSERT_TRUE(t.tested) << t.reason;
  EXPECT_FALSE(t.noise_estimated);
  EXPECT_EQ(t.k_joint, 3);
  EXPECT_EQ(t.k_separate, 6);
  EXPECT_NEAR(t.aicc_joint, t.rss_joint + 6 + compare::AiccCorrection(24, 3), 1e-9);
}

TEST(BranchTests, ThreeMembersGetPairTestsAndCycleComparisons) {
  const Curve second_loading{21, 11, 9};  // invented: later loading cycle, stiffer than the first
  const StudyRun run = RunOf({Plug("U1", "QV-7", Branch::kUnloading, 1, kUnloading, 61),
                              Plug("L2", "QV-7", Branch::kLoading, 2, second_loading, 62),
                              Plug("L1", "QV-7", Branch::kLoading, 1, kLoading, 63)});
  ASSERT_EQ(run.branches.size(), 1u);
  const BranchSetRun& b = run.branches[0];
  // Ordered by cycle, loading first: L1, U1, L2 (indices 2, 0, 1).
  EXPECT_EQ(b.set.members, (std::vector<size_t>{2, 0, 1}));
  ASSERT_EQ(b.hysteresis.size(), 2u);
  EXPECT_EQ(b.hysteresis[0].pair, "unloading - loading, cycle 1");
  EXPECT_EQ(b.hysteresis[0].a, 2u);
  EXPECT_EQ(b.hysteresis[0].b, 0u);
  EXPECT_EQ(b.hysteresis[1].pair, "cycle 2 - cycle 1, loading");
  EXPECT_FALSE(b.hysteresis[1].loading_unloading);
  ASSERT_EQ(b.tests.size(), 3u);
  EXPECT_EQ(b.tests[0].scope, "set");
  EXPECT_EQ(b.tests[0].members.size(), 3u);
  EXPECT_EQ(b.tests[0].p_separate, 9);
  EXPECT_EQ(b.tests[1].scope, "pair");
  EXPECT_EQ(b.tests[1].members, (std::vector<size_t>{2, 0}));
  EXPECT_EQ(b.tests[2].members, (std::vector<size_t>{2, 1}));
  for (const BranchTest& t : b.tests) EXPECT_EQ(t.decision, "branches differ") << t.scope;
}

TEST(BranchTests, UnloadingSofterThanLoadingIsFlagged) {
  const StudyRun run = RunOf({Plug("L1", "QV-8", Branch::kLoading, 1, kUnloading, 71),
                              Plug("U1", "QV-8", Branch::kUnloading, 1, kLoading, 72)});
  const Hysteresis& h = run.branches.at(0).hysteresis.at(0);
  ASSERT_TRUE(h.computed);
  EXPECT_TRUE(h.unexpected_sign);
  EXPECT_GT(h.softer_points, 5);
  EXPECT_NE(h.note.find("unloading softer than loading"), std::string::npos) << h.note;
  EXPECT_LT(h.max_relative, 0);
}

TEST(BranchTests, DisjointPressureRangesAreSkippedWithAReason) {
  StudySample a = Plug("L1", "QV-9", Branch::kLoading, 1, kLoading, 81);
  StudySample b = Plug("U1", "QV-9", Branch::kUnloading, 1, kUnloading, 82);
  for (DataPoint& p : b.sample.points) p.pressure = p.confining = p.pressure + 60 * kMPa;
  const StudyRun run = RunOf({a, b});
  const Hysteresis& h = run.branches.at(0).hysteresis.at(0);
  EXPECT_FALSE(h.computed);
  EXPECT_NE(h.reason.find("pressure ranges do not overlap"), std::string::npos) << h.reason;
  EXPECT_TRUE(h.pressure.empty());
}

TEST(BranchTests, UnusableSeparateFitOrMismatchedSettingsGiveAReason) {
  StudySample a = Plug("L1", "QV-10", Branch::kLoading, 1, kLoading, 91);
  StudySample b = Plug("U1", "QV-10", Branch::kUnloading, 1, kUnloading, 92);
  b.sample.points.resize(2);  // fewer points than parameters: the separate fit fails
  StudyRun run = RunOf({a, b});
  EXPECT_FALSE(run.branches.at(0).tests.at(0).tested);
  EXPECT_NE(run.branches[0].tests[0].reason.find("separate fit of 'U1' is not usable"), std::string::npos)
      << run.branches[0].tests[0].reason;
  EXPECT_FALSE(run.branches[0].hysteresis.at(0).computed);

  StudySample c = Plug("U1", "QV-10", Branch::kUnloading, 1, kUnloading, 92);
  c.models[0].settings["K_0"].fixed = 12e9;
  run = RunOf({a, c});
  EXPECT_NE(run.branches.at(0).tests.at(0).reason.find("parameter settings of 'exp-modulus' differ"),
            std::string::npos);
  EXPECT_EQ(run.branches[0].tests[0].joint.message, "fit was not run");
}

TEST(BranchTests, SamplesWithoutAPlugOrAloneFormNoSet) {
  StudySample a = Plug("L1", "", Branch::kLoading, 1, kLoading, 1);
  StudySample b = Plug("U1", "", Branch::kUnloading, 1, kUnloading, 2);
  StudySample c = Plug("L2", "solo", Branch::kLoading, 1, kLoading, 3);
  Study st;
  st.samples = {a, b, c};
  EXPECT_TRUE(FindBranchSets(st).empty());
}

// ------------------------------------------------------------------ loader

const char* kStudyHead = R"(name: plug rules (invented data)
branch_tests: {level: 0.9, grid_points: 5}
samples:
)";

std::string SampleYaml(const std::string& id, const std::string& plug, const std::string& measurement,
                       const std::string& branch, int cycle) {
  std::ostringstream y;
  y << "  - id: " << id << "\n    plug: " << plug << "\n    lithology: sandstone\n    porosity: 0.2\n"
    << "    bulk_density: 2.3 g/cc\n    measurement: " << measurement << "\n    branch: " << branch
    << "\n    cycle: " << cycle << "\n    models: [linear]\n    data:\n";
  if (measurement == "static")
    y << "      columns: [P MPa, K GPa]\n      rows: [[5, 8.0], [10, 9.1], [20, 10.9], [40, 13.0]]\n";
  else
    y << "      columns: [P MPa, Vp km/s, Vs km/s]\n      rows: [[5, 3.2, 1.9], [10, 3.4, 2.0], [20, 3.6, 2.1]]\n";
  return y.str();
}

TEST(PlugKey, MixedMeasurementKindsFormSeparateSets) {
  const std::string text = std::string(kStudyHead) + SampleYaml("S-L1", "QV14-2231", "static", "loading", 1) +
                           SampleYaml("S-U1", "QV14-2231", "static", "unloading", 1) +
                           SampleYaml("D-L1", "QV14-2231", "dynamic", "loading", 1) +
                           SampleYaml("D-U1", "QV14-2231", "dynamic", "unloading", 1) +
                           SampleYaml("X-L1", "OTHER", "static", "loading", 1);
  const Study st = ParseStudy(text, "plugs.yaml", ModelRegistry::Builtin());
  EXPECT_EQ(st.samples[0].sample.plug, "QV14-2231");
  EXPECT_DOUBLE_EQ(st.branch_tests.level, 0.9);
  EXPECT_EQ(st.branch_tests.grid_points, 5);
  const std::vector<BranchSet> sets = FindBranchSets(st);
  ASSERT_EQ(sets.size(), 2u);
  EXPECT_EQ(sets[0].kind, MeasurementKind::kStatic);
  EXPECT_EQ(sets[0].members, (std::vector<size_t>{0, 1}));
  EXPECT_EQ(sets[1].kind, MeasurementKind::kDynamic);
  EXPECT_EQ(sets[1].members, (std::vector<size_t>{2, 3}));
}

TEST(PlugKey, ADifferentDescriptionOfOnePlugIsWarnedAbout) {
  std::string second = SampleYaml("S-U1", "QV14-2231", "static", "unloading", 1);
  second.replace(second.find("porosity: 0.2"), 13, "porosity: 0.25");
  const Study st = ParseStudy(std::string(kStudyHead) + SampleYaml("S-L1", "QV14-2231", "static", "loading", 1) + second,
                              "plugs.yaml", ModelRegistry::Builtin());
  ASSERT_EQ(st.warnings.size(), 1u);
  EXPECT_EQ(st.warnings[0],
            "plugs.yaml:17:11: warning: sample 'S-U1' of plug 'QV14-2231' differs from 'S-L1' of the same plug in "
            "porosity; one plug is one piece of rock: check the sample descriptions");
  const Study same = ParseStudy(std::string(kStudyHead) + SampleYaml("S-L1", "QV14-2231", "static", "loading", 1) +
                                    SampleYaml("S-U1", "QV14-2231", "static", "unloading", 1),
                                "plugs.yaml", ModelRegistry::Builtin());
  EXPECT_TRUE(same.warnings.empty());
}

TEST(PlugKey, SameBranchAndCycleTwiceIsAmbiguous) {
  const std::string text = std::string(kStudyHead) + SampleYaml("S-L1", "QV14-2231", "static", "loading", 1) +
                           SampleYaml("S-L1b", "QV14-2231", "static", "loading", 1);
  try {
    ParseStudy(text, "plugs.yaml", ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "plugs.yaml:17:11");
    EXPECT_NE(e.message().find("plug 'QV14-2231' already has a static loading sample of cycle 1 ('S-L1', line 4)"),
              std::string::npos)
        << e.message();
  }
}

// ------------------------------------------------------------------ report

TEST(BranchReport, CsvRowsCarryTheTestAndTheHysteresisGrid) {
  const StudyRun run = RunOf({Plug("L1", "QV-1", Branch::kLoading, 1, kLoading, 11),
                              Plug("U1", "QV-1", Branch::kUnloading, 1, kUnloading, 12)});
  std::ostringstream tests, hyst;
  WriteBranchTestsCsv(run, tests);
  WriteHysteresisCsv(run, hyst);
  std::vector<std::string> rows;
  std::istringstream in(tests.str());
  for (std::string line; std::getline(in, line);)
    if (!line.empty() && line[0] != '#') rows.push_back(line);
  ASSERT_EQ(rows.size(), 2u);
  EXPECT_EQ(rows[0].rfind("plug,kind,model,scope,members,N,p_joint,p_separate,RSS_joint,", 0), 0u);
  EXPECT_EQ(rows[1].rfind("QV-1,static,exp-modulus,set,L1;U1,24,3,6,", 0), 0u) << rows[1];
  EXPECT_NE(rows[1].find(",branches differ,true,4,7,"), std::string::npos) << rows[1];
  EXPECT_NE(tests.str().find("pooled for the test only"), std::string::npos);
  int grid_rows = 0;
  std::istringstream hin(hyst.str());
  for (std::string line; std::getline(hin, line);)
    if (line.rfind("QV-1,static,exp-modulus,\"unloading - loading, cycle 1\",L1,U1,", 0) == 0) ++grid_rows;
  EXPECT_EQ(grid_rows, 11);
  const auto j = ResultsJson(run, {});
  ASSERT_EQ(j["branches"]["sets"].size(), 1u);
  EXPECT_EQ(j["branches"]["sets"][0]["tests"][0]["joint_fit"]["label"], "pooled, for the test only");
  EXPECT_EQ(j["branches"]["sets"][0]["hysteresis"][0]["points"].size(), 11u);
  std::ostringstream summary;
  WriteSummary(run, summary);
  EXPECT_NE(summary.str().find("exp-modulus [set]: branches differ"), std::string::npos) << summary.str();
  EXPECT_NE(summary.str().find("hysteresis exp-modulus, unloading - loading, cycle 1: max dK/K_a = +"),
            std::string::npos);
}

}  // namespace
}  // namespace porofit

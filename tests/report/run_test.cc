#include "porofit/run/run.h"

#include <gtest/gtest.h>

#include <cmath>

namespace porofit {
namespace {

// A study of `n_samples` exp-modulus plugs generated from K = K_inf - (K_inf - K_0) exp(-P/P_close)
// with K_inf = 20 + i GPa, K_0 = 8 GPa, P_close = 10 MPa (check value 12 of docs/check-values.md uses the
// i = 0 parameters), with a small deterministic wiggle so the SSR is not zero.
Study SyntheticStudy(int n_samples) {
  Study st;
  st.name = "synthetic";
  for (int i = 0; i < n_samples; ++i) {
    StudySample ss;
    ss.sample.id = "S" + std::to_string(i);
    for (int k = 0; k < 8; ++k) {
      const double p_mpa = 2.0 + 6.0 * k;
      const double k_gpa = (20.0 + i) - (20.0 + i - 8.0) * std::exp(-p_mpa / 10.0) + 0.01 * ((k % 3) - 1);
      DataPoint d;
      d.pressure = p_mpa * 1e6;
      d.confining = d.pressure;
      d.modulus = k_gpa * 1e9;
      ss.sample.points.push_back(d);
    }
    ModelChoice m;
    m.model_id = "exp-modulus";
    ModelChoice lin;
    lin.model_id = "linear";
    ss.models = {m, lin};
    st.samples.push_back(ss);
  }
  return st;
}

TEST(RunOptions, DefaultsAreValid) { EXPECT_EQ(RunOptions{}.Validate(), ""); }

TEST(RunOptions, ZeroThreadsIsRejectedByName) {
  RunOptions o;
  o.threads = 0;
  EXPECT_EQ(o.Validate(), "threads = 0 must be >= 1");
}

TEST(MakeFitRequest, UsesPressureModulusAndSigmaWhenEveryPointHasOne) {
  Study st = SyntheticStudy(1);
  StudySample& ss = st.samples[0];
  FitRequest unweighted = MakeFitRequest(ss, ss.models[0], nullptr);
  EXPECT_EQ(unweighted.data.x.size(), 8u);
  EXPECT_EQ(unweighted.data.x[1], 8e6);
  EXPECT_EQ(unweighted.data.y[0], ss.sample.points[0].modulus);
  EXPECT_TRUE(unweighted.data.sigma.empty());
  for (DataPoint& d : ss.sample.points) d.sigma = 0.1e9;
  FitRequest weighted = MakeFitRequest(ss, ss.models[0], nullptr);
  ASSERT_EQ(weighted.data.sigma.size(), 8u);
  EXPECT_EQ(weighted.data.sigma[3], 0.1e9);
}

TEST(RunStudy, FitsEverySampleAndModelInFileOrder) {
  RunOptions o;
  o.timestamp_utc = "2026-01-31T12:00:00Z";
  o.command_line = "test";
  const StudyRun run = RunStudy(SyntheticStudy(3), o);
  ASSERT_EQ(run.samples.size(), 3u);
  for (int i = 0; i < 3; ++i) {
    ASSERT_EQ(run.samples[i].fits.size(), 2u);
    const FitResult& r = run.samples[i].fits[0];
    EXPECT_EQ(r.model_id, "exp-modulus");
    EXPECT_EQ(run.samples[i].fits[1].model_id, "linear");
    ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
    EXPECT_NEAR(r.parameters[0].estimate / 1e9, 20.0 + i, 0.1);  // K_inf of sample i
  }
  EXPECT_EQ(run.metadata.started_utc, "2026-01-31T12:00:00Z");
  EXPECT_EQ(run.metadata.command_line, "test");
  EXPECT_FALSE(run.metadata.tool_version.empty());
}

TEST(RunStudy, ResultsDoNotDependOnTheThreadCount) {
  const Study st = SyntheticStudy(5);
  RunOptions one, three;
  three.threads = 3;
  const StudyRun a = RunStudy(st, one), b = RunStudy(st, three);
  for (size_t i = 0; i < a.samples.size(); ++i) {
    for (size_t k = 0; k < a.samples[i].fits.size(); ++k) {
      const FitResult &x = a.samples[i].fits[k], &y = b.samples[i].fits[k];
      EXPECT_EQ(x.model_id, y.model_id);
      EXPECT_EQ(x.ssr, y.ssr);  // bit-identical, not just close
      for (size_t j = 0; j < x.parameters.size(); ++j) {
        EXPECT_EQ(x.parameters[j].estimate, y.parameters[j].estimate);
        EXPECT_EQ(x.parameters[j].std_error, y.parameters[j].std_error);
      }
    }
  }
}

TEST(RunStudy, UnknownModelIsAFitStatusNotAnException) {
  Study st = SyntheticStudy(1);
  st.samples[0].models[1].model_id = "no-such-model";
  const StudyRun run = RunStudy(st, {});
  EXPECT_EQ(run.samples[0].fits[0].status, FitStatus::kConverged);
  EXPECT_EQ(run.samples[0].fits[1].status, FitStatus::kInvalidRequest);
  EXPECT_EQ(run.samples[0].fits[1].model_id, "no-such-model");
  EXPECT_NE(run.samples[0].fits[1].message.find("not in the catalogue"), std::string::npos);
}

TEST(RunStudy, SigmaOnSomePointsOnlyIsAnInvalidRequest) {
  Study st = SyntheticStudy(1);
  st.samples[0].sample.points[2].sigma = 0.1e9;
  const StudyRun run = RunStudy(st, {});
  EXPECT_EQ(run.samples[0].fits[0].status, FitStatus::kInvalidRequest);
  EXPECT_EQ(run.samples[0].fits[0].message, "sigma is given for 1 of 8 points; give it for all points or none");
}

TEST(UtcTimestampNow, HasTheIsoUtcShape) {
  const std::string t = UtcTimestampNow();
  ASSERT_EQ(t.size(), 20u);
  EXPECT_EQ(t[4], '-');
  EXPECT_EQ(t[10], 'T');
  EXPECT_EQ(t[19], 'Z');
}

}  // namespace
}  // namespace porofit

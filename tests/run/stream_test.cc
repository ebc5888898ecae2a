// RunStudyStreaming: same results as RunStudy, strictly in sample order, for
// any thread count and reorder window.
#include "porofit/run/stream.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <stdexcept>

namespace porofit {
namespace {

// Invented synthetic samples: K = 20 - 12 exp(-P / 8 MPa) GPa (varied per
// sample) plus seeded noise; a few with fewer points than parameters so that
// failures are streamed too.
Study SyntheticStudy(size_t n) {
  Study st;
  st.name = "synthetic stream test (invented)";
  std::mt19937_64 rng(20261202);
  std::normal_distribution<double> noise(0.0, 0.15);
  for (size_t i = 0; i < n; ++i) {
    StudySample ss;
    ss.sample.id = "S" + std::to_string(i);
    ss.sample.lithology = "synthetic";
    ss.sample.porosity = 0.2;
    ss.sample.bulk_density = 2300;
    const int points = i % 17 == 5 ? 2 : 10;
    const double kinf = 18 + static_cast<double>(i % 7), pc = 5 + static_cast<double>(i % 5);
    for (int k = 0; k < points; ++k) {
      DataPoint d;
      d.pressure = (2.0 + 6.0 * k) * 1e6;
      d.confining = d.pressure;
      d.modulus = (kinf - 12 * std::exp(-(2.0 + 6.0 * k) / pc) + noise(rng)) * 1e9;
      ss.sample.points.push_back(d);
    }
    ss.models = {{"exp-modulus", {}, {}}, {"linear", {}, {}}};
    ss.options.multistart = 2;
    st.samples.push_back(ss);
  }
  return st;
}

// Equal, or both NaN (not computed).
void ExpectSameNumber(double a, double b) {
  if (std::isnan(a) && std::isnan(b)) return;
  EXPECT_EQ(a, b);
}

void ExpectSame(const FitResult& a, const FitResult& b) {
  EXPECT_EQ(a.status, b.status);
  ExpectSameNumber(a.ssr, b.ssr);
  ASSERT_EQ(a.parameters.size(), b.parameters.size());
  for (size_t j = 0; j < a.parameters.size(); ++j) {
    ExpectSameNumber(a.parameters[j].estimate, b.parameters[j].estimate);
    ExpectSameNumber(a.parameters[j].std_error, b.parameters[j].std_error);
  }
}

TEST(RunStudyStreaming, HandsEverySampleInOrderWithTheResultsOfRunStudy) {
  const Study st = SyntheticStudy(60);
  RunOptions one;
  const StudyRun whole = RunStudy(st, one);
  for (int threads : {1, 2, 3}) {
    for (size_t window : {size_t{1}, size_t{4}, size_t{0}}) {
      RunOptions o;
      o.threads = threads;
      StreamOptions so;
      so.window = window;
      size_t expected = 0, progress_calls = 0;
      so.progress = [&](size_t done, size_t total) {
        EXPECT_EQ(done, expected);
        EXPECT_EQ(total, st.samples.size());
        ++progress_calls;
      };
      RunMetadata meta = StartRunMetadata(o);
      RunStudyStreaming(
          st, o,
          [&](size_t i, SampleRun&& r) {
            ASSERT_EQ(i, expected) << "threads " << threads << " window " << window;
            ++expected;
            ASSERT_EQ(r.fits.size(), whole.samples[i].fits.size());
            for (size_t k = 0; k < r.fits.size(); ++k) ExpectSame(r.fits[k], whole.samples[i].fits[k]);
          },
          so, &meta);
      EXPECT_EQ(expected, st.samples.size());
      EXPECT_EQ(progress_calls, st.samples.size());
      EXPECT_GT(meta.wall_seconds, 0);
      EXPECT_EQ(meta.threads, threads);
    }
  }
}

TEST(RunStudyStreaming, SinkExceptionStopsTheRunAndIsRethrown) {
  const Study st = SyntheticStudy(40);
  RunOptions o;
  o.threads = 2;
  size_t seen = 0;
  EXPECT_THROW(RunStudyStreaming(st, o,
                                 [&](size_t i, SampleRun&&) {
                                   ++seen;
                                   if (i == 3) throw std::runtime_error("disk full (simulated)");
                                 }),
               std::runtime_error);
  EXPECT_EQ(seen, 4u);
}

}  // namespace
}  // namespace porofit

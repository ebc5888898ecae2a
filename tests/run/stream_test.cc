// RunStudyStreaming: same results as RunStudy, strictly in sample order, for
// any thread count and reorder window.
#include "porofit/run/stream.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <mutex>
#include <random>
#include <stdexcept>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

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

TEST(RunStudyStreaming, ReportsBootstrapProgressInsideEachSampleWithoutChangingIt) {
  Study st = SyntheticStudy(6);
  for (StudySample& s : st.samples) {
    s.grain.given = true;
    s.grain.value.k_s = 37e9;
    s.grain.value.sigma_k_s = 1e9;
    s.grain.value.mu_s = std::numeric_limits<double>::quiet_NaN();
    s.bands.options.monte_carlo = false;
    s.bands.options.bootstrap = true;
    s.bands.options.bootstrap_replicates = 100;  // the smallest allowed
  }
  RunOptions o;
  o.threads = 2;
  std::vector<SampleRun> quiet;
  RunStudyStreaming(st, o, [&](size_t, SampleRun&& r) { quiet.push_back(std::move(r)); });
  std::mutex mu;
  std::map<std::pair<size_t, std::string>, size_t> last;  // (sample, stage) -> highest count heard
  StreamOptions so;
  so.sample_progress = [&](size_t i, std::string_view stage, size_t done, size_t total) {
    std::lock_guard<std::mutex> lock(mu);
    EXPECT_EQ(total, 100u);
    size_t& l = last[{i, std::string(stage)}];
    l = std::max(l, done);
  };
  size_t n = 0;
  RunStudyStreaming(
      st, o,
      [&](size_t i, SampleRun&& r) {
        ++n;
        ASSERT_EQ(r.bands.size(), quiet[i].bands.size());
        for (size_t k = 0; k < r.bands.size(); ++k) {
          EXPECT_EQ(r.bands[k].bootstrap.computed, quiet[i].bands[k].bootstrap.computed);
          EXPECT_EQ(r.bands[k].bootstrap.alpha.lower, quiet[i].bands[k].bootstrap.alpha.lower);
        }
      },
      so);
  EXPECT_EQ(n, st.samples.size());
  // Every sample whose fit converged ran its bootstrap to the end, per model.
  size_t bootstraps = 0;
  for (size_t i = 0; i < st.samples.size(); ++i) {
    for (size_t k = 0; k < st.samples[i].models.size(); ++k) {
      const std::string stage = "bootstrap " + st.samples[i].models[k].model_id;
      const bool ran = quiet[i].bands[k].bootstrap.replicates > 0;
      const auto it = last.find({i, stage});
      if (ran) {
        ++bootstraps;
        ASSERT_NE(it, last.end()) << i << " " << stage;
        EXPECT_EQ(it->second, 100u);
      } else {
        EXPECT_EQ(it, last.end()) << i << " " << stage;
      }
    }
  }
  EXPECT_GE(bootstraps, 8u);  // 6 samples x 2 models, one sample with too few points
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

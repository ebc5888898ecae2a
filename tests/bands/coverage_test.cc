// Seeded coverage check of the default delta-method alpha band: simulated
// datasets from a known truth with noise and K_s uncertainty; the share of
// datasets whose nominal 95 % band covers the true alpha(P) must lie in a
// binomial window around 0.95. The full study is bench/coverage_bench.cc
// (docs/coverage.md).
#include <gtest/gtest.h>

#include <boost/math/distributions/binomial.hpp>
#include <cstdio>
#include <random>

#include "porofit/bands/bands.h"
#include "simulate.h"

namespace porofit::bands {
namespace {

using porofit::testing::RequestFor;
using porofit::testing::Sample;
using porofit::testing::Simulate;

struct Coverage {
  std::vector<int> covered;
  int used = 0;
  int failed = 0;
};

Coverage Measure(const std::string& model, const std::vector<double>& truth, int n, int datasets,
                 DeltaQuantile rule, std::uint64_t seed) {
  const std::vector<double> pe = {5.0, 20.0, 40.0, 60.0};  // MPa
  const ModelSpec& m = *ModelRegistry::Builtin().Find(model);
  Coverage c;
  c.covered.assign(pe.size(), 0);
  std::mt19937_64 rng(seed);
  std::normal_distribution<double> z(0.0, 1.0);
  for (int d = 0; d < datasets; ++d) {
    const Sample s = Simulate(model, truth, n, 0.02, rng);
    const double ks_hat = 37.0 + 1.0 * z(rng);  // the lab's estimate of K_s = 37 +- 1 GPa
    if (!s.fit.IsUsable() || !s.fit.covariance_ok) {
      ++c.failed;
      continue;
    }
    BandRequest r = RequestFor(s, ks_hat * 1e9, 1e9, pe);
    r.options.delta_quantile = rule;
    const DeltaResult dr = ComputeDeltaBands(r);
    if (!dr.computed) {
      ++c.failed;
      continue;
    }
    ++c.used;
    for (size_t i = 0; i < pe.size(); ++i) {
      const double a_true = 1.0 - m.value(truth.data(), pe[i]) / 37.0;
      c.covered[i] += dr.alpha_confidence.lower[i] <= a_true && a_true <= dr.alpha_confidence.upper[i];
    }
  }
  return c;
}

// Two-sided 99.9 % binomial acceptance window for `used` trials at p = 0.95.
std::pair<int, int> Window(int used) {
  const boost::math::binomial_distribution<double> b(used, 0.95);
  return {static_cast<int>(boost::math::quantile(b, 0.0005)),
          static_cast<int>(boost::math::quantile(boost::math::complement(b, 0.0005)))};
}

void ExpectCalibrated(const Coverage& c, const char* what) {
  ASSERT_GT(c.used, 950) << what << ": too many failed fits (" << c.failed << ")";
  const auto [lo, hi] = Window(c.used);
  for (size_t i = 0; i < c.covered.size(); ++i) {
    std::printf("%s P#%zu: %d / %d covered (window [%d, %d])\n", what, i, c.covered[i], c.used, lo, hi);
    EXPECT_GE(c.covered[i], lo) << what << " pressure #" << i;
    EXPECT_LE(c.covered[i], hi) << what << " pressure #" << i;
  }
}

// 1,000 datasets of 12 points each; the window is 0.95 +- about 0.023
// (binomial, 99.9 % two-sided), so a recipe off by 3 points of coverage fails.
TEST(CoverageOfDeltaBand, WelchSatterthwaiteBandCoversTrueAlphaNear95PercentForExpModulus) {
  ExpectCalibrated(Measure("exp-modulus", {20.0, 8.0, 10.0}, 12, 1000, DeltaQuantile::kWelchSatterthwaite, 101),
                   "exp-modulus");
}

TEST(CoverageOfDeltaBand, WelchSatterthwaiteBandCoversTrueAlphaNear95PercentForPowerOffset) {
  // power-offset parameters in model order (K_0, n, P_r) = (9 GPa, 0.25, 5 MPa).
  ExpectCalibrated(Measure("power-offset", {9.0, 0.25, 5.0}, 12, 1000, DeltaQuantile::kWelchSatterthwaite, 202),
                   "power-offset");
}

}  // namespace
}  // namespace porofit::bands

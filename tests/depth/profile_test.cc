// Overburden integral of density profiles and the source index.
#include "porofit/depth/profile.h"

#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <random>

#include "porofit/core/error.h"

namespace porofit::depth {
namespace {

DensityProfile LinearProfile(double z0, double z1, int n, double rho0, double slope) {
  DensityProfile p;
  for (int i = 0; i < n; ++i) {
    const double z = z0 + (z1 - z0) * i / (n - 1);
    p.depth.push_back(z);
    p.density.push_back(rho0 + slope * (z - z0));
    p.source.push_back(DensitySource::kMeasured);
  }
  return p;
}

TEST(CumulativeLoad, IsExactForALinearDensityAtAnyDepth) {
  // rho(z) = 1900 + 0.25 (z - z0) kg/m^3 integrates to g (1900 h + 0.125 h^2)
  // (calculus; the trapezoid rule is exact on a linear integrand).
  const double z0 = 150.0;
  const DensityProfile p = LinearProfile(z0, 3150.0, 31, 1900.0, 0.25);
  const std::vector<double> at = {150.0, 151.3, 997.77, 1000.0, 2222.2, 3150.0};
  const std::vector<double> s = CumulativeLoad(p, at);
  ASSERT_EQ(s.size(), at.size());
  for (size_t i = 0; i < at.size(); ++i) {
    const double h = at[i] - z0;
    const double expected = kGravity * (1900.0 * h + 0.125 * h * h);
    EXPECT_NEAR(s[i], expected, 1e-9 * std::max(1.0, expected)) << "at " << at[i];
  }
}

TEST(CumulativeLoad, MatchesHandTrapezoidsOnAKinkedProfile) {
  // Two segments: 0-100 m at 2000 -> 2200, 100-300 m at 2200 -> 2000 [computed by hand]:
  // to 100 m: 100 * 2100 = 210000; to 200 m: + 100 * (2200 + 2100)/2 = 425000;
  // to 300 m: + 200 * 2100 = 630000 (kg/m^2), times g.
  DensityProfile p;
  p.depth = {0.0, 100.0, 300.0};
  p.density = {2000.0, 2200.0, 2000.0};
  p.source.assign(3, DensitySource::kMeasured);
  const std::vector<double> s = CumulativeLoad(p, {300.0, 100.0, 200.0});
  EXPECT_NEAR(s[0], kGravity * 630000.0, 1e-6);
  EXPECT_NEAR(s[1], kGravity * 210000.0, 1e-6);
  EXPECT_NEAR(s[2], kGravity * 425000.0, 1e-6);
}

TEST(CumulativeLoad, GivesZeroAboveTheProfileAndThrowsBelowIt) {
  const DensityProfile p = LinearProfile(100.0, 200.0, 11, 2000.0, 0.0);
  const std::vector<double> s = CumulativeLoad(p, {0.0, 50.0, 100.0});
  EXPECT_EQ(s[0], 0.0);
  EXPECT_EQ(s[1], 0.0);
  EXPECT_EQ(s[2], 0.0);
  // A row that overshoots the base by rounding is at the base.
  EXPECT_NEAR(CumulativeLoad(p, {200.0 + 1e-12})[0], kGravity * 2000.0 * 100.0, 1e-6);
  try {
    CumulativeLoad(p, {150.0, 200.5});
    FAIL() << "no error below the last sample";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("200.5 m"), std::string::npos) << e.message();
    EXPECT_NE(e.message().find("last sample at 200 m"), std::string::npos) << e.message();
  }
}

TEST(CumulativeLoad, RejectsProfilesThatAreNotAscendingOrNotPositive) {
  DensityProfile p;
  p.depth = {0.0, 10.0, 10.0};
  p.density = {2000.0, 2000.0, 2000.0};
  EXPECT_THROW(CumulativeLoad(p, {5.0}), InputError);
  p.depth = {0.0, 10.0, 20.0};
  p.density = {2000.0, -1.0, 2000.0};
  EXPECT_THROW(CumulativeLoad(p, {5.0}), InputError);
  p.density = {2000.0, 2000.0};
  EXPECT_THROW(CumulativeLoad(p, {5.0}), InputError);
  EXPECT_THROW(CumulativeLoad(DensityProfile{}, {5.0}), InputError);
  p.density = {2000.0, 2000.0, 2000.0};
  EXPECT_THROW(CumulativeLoad(p, {std::nan("")}), InputError);
}

TEST(CumulativeLoad, FiftyThousandDepthsOnTenThousandSamplesAgreeWithDirectSumsAndRunFast) {
  // Random but seeded profile and queries; the reference integrates each query
  // by walking the samples from the top (O(N M)) on a subset.
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  DensityProfile p;
  double z = 500.0;
  for (int i = 0; i < 10000; ++i) {
    p.depth.push_back(z);
    p.density.push_back(1800.0 + 700.0 * u(rng));
    p.source.push_back(DensitySource::kMeasured);
    z += 0.05 + 0.25 * u(rng);
  }
  std::vector<double> at(50000);
  for (double& a : at) a = p.depth.front() - 10.0 + (p.depth.back() - p.depth.front() + 10.0) * u(rng);

  // Tests never assert wall-clock times; bench/depth_bench.cc times tables on such profiles.
  const std::vector<double> s = CumulativeLoad(p, at);

  for (size_t q = 0; q < at.size(); q += 997) {
    double sum = 0;
    for (size_t i = 1; i < p.depth.size(); ++i) {
      const double a = p.depth[i - 1], b = p.depth[i];
      if (at[q] <= a) break;
      const double top = std::min(b, at[q]);
      const double rho_top = p.density[i - 1] + (p.density[i] - p.density[i - 1]) * (top - a) / (b - a);
      sum += 0.5 * (p.density[i - 1] + rho_top) * (top - a);
    }
    EXPECT_NEAR(s[q], kGravity * sum, 1e-9 * kGravity * sum + 1e-9) << "at " << at[q];
  }
}

TEST(SourceIndex, ReportsEverySourceMetFromTheTopDown) {
  DensityProfile p;
  p.depth = {0.0, 10.0, 20.0, 30.0, 40.0};
  p.density = {2000.0, 2000.0, 2000.0, 2000.0, 2000.0};
  p.source = {DensitySource::kFilled, DensitySource::kMeasured, DensitySource::kBridged, DensitySource::kMeasured,
              DensitySource::kBadHole};
  const SourceIndex idx(p);
  const auto bit = [](DensitySource s) { return static_cast<std::uint8_t>(1u << static_cast<unsigned>(s)); };
  EXPECT_EQ(idx.SourcesAbove(-1.0), 0);
  EXPECT_EQ(idx.SourcesAbove(0.0), bit(DensitySource::kFilled));
  EXPECT_EQ(idx.SourcesAbove(10.0), bit(DensitySource::kFilled) | bit(DensitySource::kMeasured));
  // Inside the 10-20 m segment the bridged sample at 20 m enters the integral.
  EXPECT_EQ(idx.SourcesAbove(15.0),
            bit(DensitySource::kFilled) | bit(DensitySource::kMeasured) | bit(DensitySource::kBridged));
  EXPECT_EQ(idx.SourcesAbove(35.0), 0x0F);
  EXPECT_EQ(idx.SourcesAbove(1000.0), 0x0F);
}

TEST(SourceIndex, RequiresOneSourcePerSample) {
  DensityProfile p;
  p.depth = {0.0, 10.0};
  p.density = {2000.0, 2000.0};
  EXPECT_THROW(SourceIndex{p}, InputError);
}

}  // namespace
}  // namespace porofit::depth

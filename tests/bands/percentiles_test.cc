// The guided percentile selection used by the Monte Carlo bands must give the
// very same numbers as the full selection, or decline. (Type-7 percentiles,
// numpy's default definition, common practice.)
#include <gtest/gtest.h>

#include <random>
#include <vector>

#include "common.h"

namespace porofit::bands::detail {
namespace {

std::vector<double> Column(std::mt19937_64& rng, size_t n, double shift) {
  std::normal_distribution<double> z(shift, 1.0);
  std::vector<double> v(n);
  for (double& x : v) x = z(rng);
  return v;
}

TEST(GuidedPercentiles, EqualTheFullSelectionBitForBitWhenTheBracketHolds) {
  std::mt19937_64 rng(7);
  int hits = 0;
  for (size_t n : {100u, 101u, 4000u, 4001u}) {
    for (int rep = 0; rep < 20; ++rep) {
      std::vector<double> v = Column(rng, n, 0.01 * rep);
      std::vector<double> w = v;
      double lo, mid, hi;
      Percentiles3(w, 0.025, lo, mid, hi);
      const double guess[3] = {lo + 0.05, mid - 0.02, hi + 0.01};
      const double half[3] = {0.2, 0.1, 0.2};
      double glo = 0, gmid = 0, ghi = 0;
      if (Percentiles3Guided(v, 0.025, guess, half, glo, gmid, ghi)) {
        ++hits;
        EXPECT_EQ(glo, lo);
        EXPECT_EQ(gmid, mid);
        EXPECT_EQ(ghi, hi);
      }
    }
  }
  EXPECT_GT(hits, 60);  // the brackets above hold the answer for nearly every column
}

TEST(GuidedPercentiles, DeclineWhenABracketMissesItsOrderStatistic) {
  std::mt19937_64 rng(8);
  const std::vector<double> v = Column(rng, 4000, 0.0);
  const double guess[3] = {5.0, 0.0, 1.96};  // the lower bracket sits far above the 2.5 % point
  const double half[3] = {0.1, 0.1, 0.1};
  double lo = -1, mid = -1, hi = -1;
  EXPECT_FALSE(Percentiles3Guided(v, 0.025, guess, half, lo, mid, hi));
  EXPECT_EQ(lo, -1);
}

TEST(GuidedPercentiles, HandleTiesAtTheBracketEdges) {
  // Many equal values: the order statistics sit on the edges of the brackets.
  std::vector<double> v;
  for (int i = 0; i < 1000; ++i) v.push_back(static_cast<double>(i % 10));
  std::vector<double> w = v;
  double lo, mid, hi;
  Percentiles3(w, 0.05, lo, mid, hi);
  // Zero-width brackets on the tied lower and upper values, and a median
  // bracket [3, 5] whose edges are tied values too.
  const double guess[3] = {lo, 4.0, hi};
  const double half[3] = {0.0, 1.0, 0.0};
  double glo = 0, gmid = 0, ghi = 0;
  ASSERT_TRUE(Percentiles3Guided(v, 0.05, guess, half, glo, gmid, ghi));
  EXPECT_EQ(glo, lo);
  EXPECT_EQ(gmid, mid);
  EXPECT_EQ(ghi, hi);
}

}  // namespace
}  // namespace porofit::bands::detail

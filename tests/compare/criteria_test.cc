#include "porofit/compare/criteria.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <vector>

namespace porofit::compare {
namespace {

// Check value 16 [computed; docs/check-values.md]: AICc correction with N 8, k 4.
TEST(AiccCorrection, MatchesCheckValueSixteen) { EXPECT_NEAR(AiccCorrection(8, 4), 13.333333333, 1e-8); }

// Hurvich & Tsai (1989): AICc is undefined for n <= k + 1.
TEST(AiccCorrection, IsUndefinedWithoutEnoughPoints) {
  EXPECT_TRUE(std::isnan(AiccCorrection(5, 4)));
  EXPECT_TRUE(std::isnan(AiccCorrection(4, 4)));
  EXPECT_NEAR(AiccCorrection(6, 4), 40.0, 1e-12);
}

// Check value 16 [computed; docs/check-values.md]: scores {10, 12, 16} give
// weights {0.7054, 0.2595, 0.0351}.
TEST(AkaikeWeights, MatchCheckValueSixteen) {
  const std::vector<double> s{10, 12, 16};
  const std::vector<double> w = AkaikeWeights(s);
  ASSERT_EQ(w.size(), 3u);
  EXPECT_NEAR(w[0], 0.7054, 5e-5);
  EXPECT_NEAR(w[1], 0.2595, 5e-5);
  EXPECT_NEAR(w[2], 0.0351, 5e-5);
  EXPECT_NEAR(w[0] + w[1] + w[2], 1.0, 1e-15);
}

TEST(AkaikeWeights, LeaveUndefinedScoresOut) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const std::vector<double> s{nan, 12, 12};
  const std::vector<double> w = AkaikeWeights(s);
  EXPECT_TRUE(std::isnan(w[0]));
  EXPECT_DOUBLE_EQ(w[1], 0.5);
  EXPECT_DOUBLE_EQ(w[2], 0.5);
  const std::vector<double> none{nan, nan};
  for (double x : AkaikeWeights(none)) EXPECT_TRUE(std::isnan(x));
}

TEST(AkaikeWeights, DoNotUnderflowForLargeScores) {
  const std::vector<double> s{1e6, 1e6 + 2};
  const std::vector<double> w = AkaikeWeights(s);
  EXPECT_NEAR(w[0], 1 / (1 + std::exp(-1.0)), 1e-15);
}

// Check value 17 [computed; critical value from a printed F table; docs/check-values.md]:
// RSS 0.50 (p 3) against 0.20 (p 4), N 10 -> F 9.0 > F_0.95(1, 6) = 5.987.
TEST(NestedFTest, MatchesCheckValueSeventeen) {
  const FTestResult r = NestedFTest(0.50, 3, 0.20, 4, 10);
  ASSERT_TRUE(r.computed) << r.reason;
  EXPECT_NEAR(r.f, 9.0, 1e-12);
  EXPECT_EQ(r.df1, 1);
  EXPECT_EQ(r.df2, 6);
  EXPECT_NEAR(r.critical, 5.987, 5e-4);
  EXPECT_TRUE(r.reject);
  EXPECT_GT(r.p_value, 0.01);  // F(1,6) = 9.0 lies between the 0.95 and 0.99 points (13.745, tables)
  EXPECT_LT(r.p_value, 0.05);
}

TEST(NestedFTest, SaysWhyItCannotBeMade) {
  EXPECT_FALSE(NestedFTest(0.5, 3, 0.2, 3, 10).computed);
  EXPECT_FALSE(NestedFTest(0.5, 3, 0.2, 4, 4).computed);
  const FTestResult exact = NestedFTest(0.5, 3, 0.0, 4, 10);
  EXPECT_FALSE(exact.computed);
  EXPECT_NE(exact.reason.find("exactly"), std::string::npos);
}

TEST(NestedFTest, KeepsTheRestrictedModelWhenTheExtraTermDoesNotHelp) {
  const FTestResult r = NestedFTest(0.21, 3, 0.20, 4, 10);
  ASSERT_TRUE(r.computed);
  EXPECT_FALSE(r.reject);
  EXPECT_GT(r.p_value, 0.5);
}

}  // namespace
}  // namespace porofit::compare

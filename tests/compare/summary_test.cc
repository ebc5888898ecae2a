#include "porofit/compare/summary.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <limits>
#include <vector>

namespace porofit::compare {
namespace {

// A hand-made comparison: models with AICc scores (NaN = fit not usable),
// weights and ranks from the criteria primitives.
SampleComparison Made(const std::vector<std::pair<std::string, double>>& scores) {
  SampleComparison c;
  c.computed = true;
  std::vector<double> v;
  for (const auto& [id, s] : scores) v.push_back(s);
  const std::vector<double> d = ScoreDifferences(v), w = AkaikeWeights(v);
  for (size_t i = 0; i < scores.size(); ++i) {
    ModelScore m;
    m.model_id = scores[i].first;
    m.aicc = scores[i].second;
    m.included = std::isfinite(m.aicc);
    m.delta_aicc = d[i];
    m.weight_aicc = w[i];
    m.rank = m.included ? 1 + static_cast<int>(std::count_if(v.begin(), v.end(), [&](double x) {
                                return std::isfinite(x) && x < v[i];
                              }))
                        : 0;
    c.models.push_back(m);
  }
  return c;
}

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct Input {
  SampleFieldMap fields;
  SampleComparison comparison;
};

std::vector<Input> HandMadeSet() {
  return {
      {{{"id", "A"}, {"lithology", "sandstone"}}, Made({{"exp-modulus", 10}, {"linear", 12}})},
      {{{"id", "B"}, {"lithology", "sandstone"}}, Made({{"exp-modulus", 20}, {"linear", 16}})},
      {{{"id", "C"}, {"lithology", "sandstone"}}, Made({{"exp-modulus", 5}, {"linear", kNaN}})},
      {{{"id", "D"}, {"lithology", "shale"}}, Made({{"exp-modulus", 1}, {"linear", 1}})},
      {{{"id", "E"}}, Made({{"exp-modulus", 3}})},
  };
}

TEST(GroupAccumulator, CountsWinsSumsCompleteSamplesAndTakesMedians) {
  GroupAccumulator acc({"lithology"}, Criterion::kAicc);
  const std::vector<Input> in = HandMadeSet();
  for (size_t i = 0; i < in.size(); ++i) acc.Add(i, in[i].fields, in[i].comparison);
  const ComparisonSummary s = acc.Finish();
  ASSERT_EQ(s.groups.size(), 3u);
  const GroupSummary& sand = s.groups[0];
  EXPECT_EQ(sand.label, "sandstone");
  EXPECT_EQ(sand.samples, 3);
  EXPECT_EQ(sand.complete_samples, 2);  // C's linear fit failed
  ASSERT_EQ(sand.models.size(), 2u);
  const GroupModelSummary& em = sand.models[0];
  const GroupModelSummary& lin = sand.models[1];
  EXPECT_EQ(em.model_id, "exp-modulus");
  EXPECT_EQ(em.wins, 2);   // A and C
  EXPECT_EQ(lin.wins, 1);  // B
  EXPECT_EQ(em.samples_usable, 3);
  EXPECT_EQ(lin.samples_usable, 2);
  EXPECT_EQ(lin.samples_with_model, 3);
  EXPECT_DOUBLE_EQ(em.summed_score, 30);  // A + B only
  EXPECT_DOUBLE_EQ(lin.summed_score, 28);
  // exp-modulus weights: A 1/(1+e^-1), B e^-2/(1+e^-2), C 1 -> median is A's.
  EXPECT_NEAR(em.median_weight, 1 / (1 + std::exp(-1.0)), 1e-15);
  // linear weights: A e^-1/(1+e^-1), B 1/(1+e^-2) -> median of two is their mean.
  EXPECT_NEAR(lin.median_weight, 0.5 * (std::exp(-1.0) / (1 + std::exp(-1.0)) + 1 / (1 + std::exp(-2.0))), 1e-15);
  EXPECT_NEAR(em.mean_delta, (0 + 4 + 0) / 3.0, 1e-15);
  EXPECT_NEAR(lin.mean_delta, (2 + 0) / 2.0, 1e-15);
  // D: a tie, both weights 1/2; the first listed ranks first.
  EXPECT_EQ(s.groups[1].label, "shale");
  EXPECT_DOUBLE_EQ(s.groups[1].models[0].median_weight, 0.5);
  // E has no lithology field.
  EXPECT_EQ(s.groups[2].label, "(none)");
  EXPECT_EQ(s.groups[2].complete_samples, 1);
}

TEST(GroupAccumulator, ResultDoesNotDependOnTheOrderOfAdd) {
  const std::vector<Input> in = HandMadeSet();
  GroupAccumulator forward({"lithology"}, Criterion::kAicc), backward({"lithology"}, Criterion::kAicc);
  for (size_t i = 0; i < in.size(); ++i) forward.Add(i, in[i].fields, in[i].comparison);
  for (size_t i = in.size(); i-- > 0;) backward.Add(i, in[i].fields, in[i].comparison);
  GroupAccumulator a({"lithology"}, Criterion::kAicc), b({"lithology"}, Criterion::kAicc);
  for (size_t i = 0; i < in.size(); ++i) (i % 2 ? a : b).Add(i, in[i].fields, in[i].comparison);
  a.Merge(b);
  const ComparisonSummary x = forward.Finish(), y = backward.Finish(), z = a.Finish();
  for (const ComparisonSummary* o : {&y, &z}) {
    ASSERT_EQ(o->groups.size(), x.groups.size());
    for (size_t g = 0; g < x.groups.size(); ++g) {
      EXPECT_EQ(o->groups[g].label, x.groups[g].label);
      ASSERT_EQ(o->groups[g].models.size(), x.groups[g].models.size());
      for (size_t m = 0; m < x.groups[g].models.size(); ++m) {
        EXPECT_EQ(o->groups[g].models[m].model_id, x.groups[g].models[m].model_id);
        EXPECT_EQ(o->groups[g].models[m].wins, x.groups[g].models[m].wins);
        EXPECT_EQ(std::isnan(o->groups[g].models[m].summed_score), std::isnan(x.groups[g].models[m].summed_score));
        if (!std::isnan(x.groups[g].models[m].summed_score)) {
          EXPECT_EQ(o->groups[g].models[m].summed_score, x.groups[g].models[m].summed_score);
        }
      }
    }
  }
}

TEST(GroupAccumulator, GroupsByAnyFieldAndByNothing) {
  const std::vector<Input> in = HandMadeSet();
  GroupAccumulator all({}, Criterion::kAicc);
  GroupAccumulator by_id({"id", "lithology"}, Criterion::kAicc);
  for (size_t i = 0; i < in.size(); ++i) {
    all.Add(i, in[i].fields, in[i].comparison);
    by_id.Add(i, in[i].fields, in[i].comparison);
  }
  const ComparisonSummary a = all.Finish();
  ASSERT_EQ(a.groups.size(), 1u);
  EXPECT_EQ(a.groups[0].label, "all samples");
  EXPECT_EQ(a.groups[0].samples, 5);
  EXPECT_EQ(a.groups[0].complete_samples, 3);  // A, B, D (C failed, E lacks linear)
  EXPECT_EQ(a.groups[0].models[0].wins, 4);    // A, C, D (tie: first listed), E
  const ComparisonSummary b = by_id.Finish();
  ASSERT_EQ(b.groups.size(), 5u);
  EXPECT_EQ(b.groups[0].label, "A / sandstone");
  EXPECT_EQ(b.groups[4].label, "E / (none)");
}

TEST(GroupAccumulatorDeathTest, AddingASampleTwiceIsAProgrammerError) {
  GroupAccumulator acc({}, Criterion::kAicc);
  const std::vector<Input> in = HandMadeSet();
  acc.Add(0, in[0].fields, in[0].comparison);
  acc.Add(0, in[1].fields, in[1].comparison);
  EXPECT_DEATH(acc.Finish(), "added twice");
}

}  // namespace
}  // namespace porofit::compare

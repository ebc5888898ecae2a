// The study file's top-level `comparison:` mapping.
#include <gtest/gtest.h>

#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

std::string StudyWith(const std::string& comparison) {
  return "name: comparison options\n" + comparison +
         "samples:\n"
         "  - id: S1\n"
         "    lithology: sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.2 g/cc\n"
         "    measurement: static\n"
         "    data:\n"
         "      columns: [P MPa, K GPa]\n"
         "      rows: [[5, 8], [10, 10], [20, 12], [40, 14]]\n"
         "    models: [exp-modulus, linear]\n";
}

Study Parse(const std::string& text) { return ParseStudy(text, "study.yaml", ModelRegistry::Builtin()); }

TEST(ComparisonOptionsLoader, AbsentMappingKeepsTheDefaults) {
  const Study s = Parse(StudyWith(""));
  const compare::ComparisonOptions d;
  EXPECT_EQ(s.comparison.criterion, d.criterion);
  EXPECT_EQ(s.comparison.group_by, d.group_by);
  EXPECT_EQ(s.comparison.f_test_level, d.f_test_level);
  EXPECT_EQ(s.comparison.cross_validation.leave_one_out, false);
  EXPECT_EQ(s.comparison.cross_validation.high_pressure_holdout, true);
  EXPECT_EQ(s.comparison.cross_validation.holdout_points, 1);
}

TEST(ComparisonOptionsLoader, ReadsEveryKey) {
  const Study s = Parse(StudyWith(
      "comparison:\n"
      "  criterion: bic\n"
      "  f_test_level: 0.99\n"
      "  group_by: [measurement, branch]\n"
      "  cross_validation: {leave_one_out: true, high_pressure_holdout: false, holdout_points: 3}\n"));
  EXPECT_EQ(s.comparison.criterion, compare::Criterion::kBic);
  EXPECT_DOUBLE_EQ(s.comparison.f_test_level, 0.99);
  EXPECT_EQ(s.comparison.group_by, (std::vector<std::string>{"measurement", "branch"}));
  EXPECT_TRUE(s.comparison.cross_validation.leave_one_out);
  EXPECT_FALSE(s.comparison.cross_validation.high_pressure_holdout);
  EXPECT_EQ(s.comparison.cross_validation.holdout_points, 3);
}

TEST(ComparisonOptionsLoader, EmptyGroupByMeansOneGroup) {
  const Study s = Parse(StudyWith("comparison:\n  group_by: []\n"));
  EXPECT_TRUE(s.comparison.group_by.empty());
}

TEST(ComparisonOptionsLoader, FieldListedTwiceIsAnErrorAtItsPlace) {
  try {
    Parse(StudyWith("comparison:\n  group_by: [lithology, lithology]\n"));
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "study.yaml:3:25");
    EXPECT_NE(e.message().find("listed twice"), std::string::npos) << e.what();
  }
}

TEST(ComparisonOptionsLoader, NonMappingIsAnError) {
  try {
    Parse(StudyWith("comparison: aicc\n"));
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "study.yaml:2:13");
    EXPECT_NE(e.message().find("must be a mapping"), std::string::npos) << e.what();
  }
}

TEST(ComparisonOptionsLoader, NonBooleanSwitchIsAnError) {
  EXPECT_THROW(Parse(StudyWith("comparison:\n  cross_validation: {leave_one_out: maybe}\n")), InputError);
}

}  // namespace
}  // namespace porofit

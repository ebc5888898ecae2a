// The `joint_fits:` section of a study file.
#include <gtest/gtest.h>

#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

std::string Good(const std::string& name) { return std::string(POROFIT_TEST_DATA_DIR) + "/good/" + name; }

TEST(JointFitsSection, ReadsExplicitAndWhereSelectedMembers) {
  const Study s = LoadStudy(Good("joint.yaml"));
  ASSERT_EQ(s.joint_fits.size(), 2u);
  const JointFitChoice& a = s.joint_fits[0];
  EXPECT_EQ(a.name, "facies-A");
  EXPECT_EQ(a.model_id, "exp-modulus");
  EXPECT_EQ(a.samples, (std::vector<size_t>{0, 1, 2, 3}));
  EXPECT_EQ(a.shared, (std::vector<std::string>{"P_close"}));
  ASSERT_EQ(a.settings.count("P_close"), 1u);
  EXPECT_DOUBLE_EQ(*a.settings.at("P_close").lower, 0.5e6);  // "0.5 MPa" in SI
  EXPECT_DOUBLE_EQ(*a.settings.at("P_close").upper, 200e6);
  EXPECT_FALSE(a.mixed_branches);
  EXPECT_EQ(a.where.ToString(), Good("joint.yaml") + ":109:5");
  const JointFitChoice& b = s.joint_fits[1];
  // where: {lithology: clean sandstone, orientation: vertical} -> F1 and F3.
  EXPECT_EQ(b.samples, (std::vector<size_t>{0, 2}));
  EXPECT_EQ(b.shared, (std::vector<std::string>{"P_close", "K_0"}));
}

const char* const kTwoBranches = R"(name: t
defaults: {models: [exp-modulus]}
samples:
  - id: A
    lithology: sandstone
    porosity: 0.2
    bulk_density: 2.2 g/cc
    measurement: static
    branch: loading
    data: {columns: [P MPa, K GPa], rows: [[5, 9.1], [10, 11.8], [20, 14.9], [40, 17.2]]}
  - id: B
    lithology: sandstone
    porosity: 0.2
    bulk_density: 2.2 g/cc
    measurement: static
    branch: unloading
    data: {columns: [P MPa, K GPa], rows: [[5, 10.1], [10, 12.8], [20, 15.3], [40, 17.6]]}
joint_fits:
  - name: both
    model: exp-modulus
    samples: [B]
    where: {lithology: sandstone}
    shared: [K_inf]
    allow_mixed_branches: true
)";

TEST(JointFitsSection, AllowMixedBranchesIsRecordedAndExplicitMembersComeFirst) {
  const Study s = ParseStudy(kTwoBranches, "mem/two.yaml", ModelRegistry::Builtin());
  ASSERT_EQ(s.joint_fits.size(), 1u);
  EXPECT_TRUE(s.joint_fits[0].allow_mixed_branches);
  EXPECT_TRUE(s.joint_fits[0].mixed_branches);
  EXPECT_EQ(s.joint_fits[0].samples, (std::vector<size_t>{1, 0}));
}

TEST(JointFitsSection, UnknownKeyInAnEntryIsRejectedWithSuggestion) {
  std::string text = kTwoBranches;
  text.replace(text.find("allow_mixed_branches"), 20, "allow_mixed_branche");
  try {
    ParseStudy(text, "mem/two.yaml", ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("allow_mixed_branches"), std::string::npos) << e.message();
  }
}

TEST(JointFitsSection, DuplicateJointFitNameIsRejected) {
  std::string text = kTwoBranches;
  text += "  - name: both\n    model: exp-modulus\n    samples: [A, B]\n    shared: [K_0]\n"
          "    allow_mixed_branches: true\n";
  try {
    ParseStudy(text, "mem/two.yaml", ModelRegistry::Builtin());
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("is used twice"), std::string::npos) << e.message();
    EXPECT_EQ(e.location().ToString(), "mem/two.yaml:25:5");
  }
}

}  // namespace
}  // namespace porofit

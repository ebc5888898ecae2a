// Strain samples in study files: column eps_v (and sigma_eps), their units,
// one response per sample, and the monotonicity warning.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "porofit/io/study_loader.h"
#include "porofit/models/expression.h"
#include "strain_columns.h"

namespace porofit {
namespace {

std::string Good(const std::string& name) { return std::string(POROFIT_TEST_DATA_DIR) + "/good/" + name; }

const StudySample& Sample1(const Study& s, size_t i) { return s.samples.at(i); }

TEST(StrainLoader, ReadsEpsVInMicrostrainAsPlainStrainWithItsUncertainty) {
  const Study s = LoadStudy(Good("strain.yaml"));
  const StudySample& ss = Sample1(s, 0);
  EXPECT_EQ(ss.sample.response, Response::kStrain);
  ASSERT_EQ(ss.sample.points.size(), 12u);
  EXPECT_DOUBLE_EQ(ss.sample.points[0].pressure, 2e6);
  EXPECT_NEAR(ss.sample.points[0].strain, 221.1e-6, 1e-15);
  EXPECT_NEAR(ss.sample.points[0].sigma, 2e-6, 1e-18);  // uncertainty.eps_v: 2 microstrain
  EXPECT_TRUE(std::isnan(ss.sample.points[0].modulus)) << "a strain sample gives no K";
  EXPECT_TRUE(ss.sample.sigma_absolute);
  EXPECT_TRUE(s.warnings.empty()) << s.warnings.front();
}

TEST(StrainLoader, ReadsPercentStrainAndASigmaColumnFromCsv) {
  const Study s = LoadStudy(Good("strain.yaml"));
  const StudySample& ss = Sample1(s, 1);
  EXPECT_EQ(ss.sample.response, Response::kStrain);
  ASSERT_EQ(ss.sample.points.size(), 11u);
  EXPECT_NEAR(ss.sample.points[0].strain, 0.019521e-2, 1e-15);  // '%' -> 0.01
  EXPECT_NEAR(ss.sample.points[0].sigma, 3e-6, 1e-18);          // sigma_eps in microstrain
  EXPECT_FALSE(ss.sample.sigma_absolute);
}

TEST(StrainLoader, ModulusSamplesKeepTheModulusResponse) {
  const Study s = LoadStudy(Good("units.yaml"));
  for (const StudySample& ss : s.samples) EXPECT_EQ(ss.sample.response, Response::kModulus) << ss.sample.id;
}

const char* kFallingStrain = R"(version: 1
name: t
samples:
  - id: F1
    lithology: sandstone
    porosity: 0.2
    bulk_density: 2.1 g/cc
    measurement: static
    data:
      columns: [P MPa, eps_v ustrain]
      rows:
        - [5, 600]
        - [10, 1100]
        - [20, 1000]
        - [40, 3300]
    models: [exp-modulus]
)";

TEST(StrainLoader, WarnsWithTheRowLocationWhenStrainFallsAsPressureRises) {
  const Study s = ParseStudy(kFallingStrain, "falling.yaml", ModelRegistry::Builtin());
  ASSERT_EQ(s.warnings.size(), 1u);
  EXPECT_EQ(s.warnings[0].rfind("falling.yaml:14:", 0), 0u) << s.warnings[0];
  EXPECT_NE(s.warnings[0].find("compression-positive strain should grow with pressure"), std::string::npos);
}

TEST(StrainLoader, RejectsAModelWithoutAStrainFormAtItsEntry) {
  // A user formula model has no strain form; a strain sample cannot use it.
  ModelRegistry registry;
  registry.Add(MakeFormulaModel("my-line", "a + b*P", {{"a", "GPa", 1e9, 0, 100, 10, ""},
                                                     {"b", "GPa/MPa", 1e3, -1, 1, 0.1, ""}}));
  std::string text = kFallingStrain;
  text.replace(text.find("[exp-modulus]"), 13, "[my-line]");
  text.replace(text.find("[20, 1000]"), 10, "[20, 1900]");
  try {
    ParseStudy(text, "formula.yaml", registry);
    FAIL() << "loaded";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "formula.yaml:16:14") << e.what();
    EXPECT_NE(e.message().find("model 'my-line' has no strain form"), std::string::npos) << e.message();
  }
}

TEST(StrainUnits, AcceptsTheDocumentedSpellings) {
  using io::detail::StrainUnitFactor;
  EXPECT_EQ(StrainUnitFactor("1"), 1.0);
  EXPECT_EQ(StrainUnitFactor("fraction"), 1.0);
  EXPECT_EQ(StrainUnitFactor("%"), 1e-2);
  EXPECT_EQ(StrainUnitFactor("millistrain"), 1e-3);
  EXPECT_EQ(StrainUnitFactor("mstrain"), 1e-3);
  EXPECT_EQ(StrainUnitFactor("microstrain"), 1e-6);
  EXPECT_EQ(StrainUnitFactor("ustrain"), 1e-6);
  EXPECT_EQ(StrainUnitFactor("\xC2\xB5strain"), 1e-6);
  EXPECT_FALSE(StrainUnitFactor("GPa").has_value());
}

}  // namespace
}  // namespace porofit

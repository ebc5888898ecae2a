#include "porofit/io/study_loader.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <sstream>
#include <string>

namespace porofit {
namespace {

// Conversion constants written out independently of porofit::units
// (check value 7, docs/check-values.md: 1 psi = 6.894757 kPa; 1 bar = 0.1 MPa; 1 ft = 0.3048 m by definition).
constexpr double kPsiPa = 6894.757;
constexpr double kFt = 0.3048;

std::string Good(const std::string& name) { return std::string(POROFIT_TEST_DATA_DIR) + "/good/" + name; }

const Study& UnitsStudy() {
  static const Study study = LoadStudy(Good("units.yaml"));
  return study;
}

const StudySample& Find(const Study& s, const std::string& id) {
  for (const auto& ss : s.samples)
    if (ss.sample.id == id) return ss;
  ADD_FAILURE() << "no sample " << id;
  return s.samples.front();
}

const ModelChoice& FindModel(const StudySample& ss, const std::string& id) {
  for (const auto& m : ss.models)
    if (m.model_id == id) return m;
  ADD_FAILURE() << "no model " << id;
  return ss.models.front();
}

std::string Slurp(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

TEST(StudyLoader, ReadsStudyHeaderAndSamplesInFileOrder) {
  const Study& s = UnitsStudy();
  EXPECT_EQ(s.name, "unit and option checks");
  EXPECT_EQ(s.description, "loader test fixture");
  ASSERT_EQ(s.samples.size(), 4u);
  EXPECT_EQ(s.samples[0].sample.id, "G1-psi");
  EXPECT_EQ(s.samples[3].sample.id, "G4-ft");
  ASSERT_EQ(s.inputs.size(), 2u);
  EXPECT_EQ(s.inputs[0].role, "study");
  EXPECT_EQ(s.inputs[0].path, Good("units.yaml"));
  EXPECT_EQ(s.inputs[1].role, "data");
  EXPECT_EQ(s.inputs[1].path, Good("crlf-quoted.csv"));
}

TEST(StudyLoader, ConvertsPsiBarAndKsiAndAppliesEffectivePressureCoefficient) {
  const Sample& g = Find(UnitsStudy(), "G1-psi").sample;
  EXPECT_DOUBLE_EQ(g.effective_pressure_coefficient, 0.8);
  ASSERT_EQ(g.points.size(), 2u);
  // Row 1: P_c 4351.13 psi, P_p 100 bar, K 1450.377 ksi.
  EXPECT_NEAR(g.points[0].confining, 4351.13 * kPsiPa, 1e-6 * 30e6);
  EXPECT_DOUBLE_EQ(g.points[0].pore, 10e6);
  EXPECT_NEAR(g.points[0].pressure, 4351.13 * kPsiPa - 0.8 * 10e6, 1e-6 * 30e6);
  EXPECT_NEAR(g.points[0].pressure, 22e6, 0.001e6);
  EXPECT_NEAR(g.points[0].modulus, 1450.377e3 * kPsiPa, 1e-6 * 10e9);
  EXPECT_NEAR(g.points[0].modulus, 10e9, 0.001e9);
  // Row 2: P_c 1450.377 psi = 10 MPa, P_p 50 bar = 5 MPa -> P = 10 - 0.8 * 5 = 6 MPa.
  EXPECT_NEAR(g.points[1].pressure, 6e6, 0.001e6);
}

TEST(StudyLoader, ReadsSampleDescriptorsWithUnits) {
  const Sample& g = Find(UnitsStudy(), "G1-psi").sample;
  EXPECT_DOUBLE_EQ(g.porosity, 0.17);  // "17 %"
  EXPECT_DOUBLE_EQ(g.bulk_density, 2200);
  EXPECT_EQ(g.orientation, Orientation::kHorizontal);
  EXPECT_EQ(g.kind, MeasurementKind::kStatic);
  EXPECT_EQ(g.branch, Branch::kUnloading);
  EXPECT_EQ(g.cycle, 2);
  const Sample& h = Find(UnitsStudy(), "G2-csv").sample;
  EXPECT_DOUBLE_EQ(h.bulk_density, 2050);  // 2.05 g/cc
  EXPECT_EQ(h.orientation, Orientation::kUnknown);
  EXPECT_EQ(h.branch, Branch::kLoading);
  EXPECT_EQ(h.cycle, 1);
}

TEST(StudyLoader, AbsoluteSampleSigmaIsUsedAsIsAndTurnsOffCovarianceScaling) {
  const StudySample& ss = Find(UnitsStudy(), "G1-psi");
  for (const auto& p : ss.sample.points) EXPECT_DOUBLE_EQ(p.sigma, 0.3e9);
  EXPECT_TRUE(ss.sample.sigma_absolute);
  EXPECT_FALSE(ss.options.scale_covariance);
}

TEST(StudyLoader, RelativeSigmaColumnIsAFractionOfEachValueAndKeepsScaling) {
  const StudySample& ss = Find(UnitsStudy(), "G2-csv");
  ASSERT_EQ(ss.sample.points.size(), 3u);
  for (const auto& p : ss.sample.points) EXPECT_NEAR(p.sigma, 0.03 * p.modulus, 1e-9 * p.modulus);
  EXPECT_FALSE(ss.sample.sigma_absolute);
  EXPECT_TRUE(ss.options.scale_covariance);
}

TEST(StudyLoader, ReadsCsvWithCrlfBomQuotedHeaderAndComments) {
  const Sample& s = Find(UnitsStudy(), "G2-csv").sample;
  ASSERT_EQ(s.points.size(), 3u);
  // Header "P_c (psi)" carries a unit that agrees with the declaration.
  EXPECT_NEAR(s.points[0].confining, 1450.377 * kPsiPa, 1e-7 * 10e6);  // kPsiPa has 7 digits
  EXPECT_NEAR(s.points[0].pressure, (1450.377 - 145.0377) * kPsiPa, 1e-7 * 10e6);
  EXPECT_NEAR(s.points[0].modulus, 1.16e6 * kPsiPa, 1e-6 * 8e9);  // 1.16 Mpsi
  EXPECT_NEAR(s.points[2].confining, 5801.51 * kPsiPa, 1e-7 * 40e6);  // quoted number cell
  // Rows keep their CSV line numbers (a comment line sits between rows 1 and 2).
  EXPECT_EQ(s.points[0].where.ToString(), Good("crlf-quoted.csv") + ":4");
  EXPECT_EQ(s.points[1].where.ToString(), Good("crlf-quoted.csv") + ":6");
  EXPECT_EQ(s.points[2].where.ToString(), Good("crlf-quoted.csv") + ":7");
}

TEST(StudyLoader, DynamicModulusAndPropagatedSigmaMatchDomainCheckValues) {
  const Sample& s = Find(UnitsStudy(), "G3-dyn").sample;
  EXPECT_EQ(s.kind, MeasurementKind::kDynamic);
  ASSERT_EQ(s.points.size(), 2u);
  const DataPoint& p = s.points[0];
  // Check value 5 [computed; docs/check-values.md]: Vp 3.50, Vs 2.10 km/s, rho 2.30 g/cc -> K 14.651 GPa.
  EXPECT_NEAR(p.modulus / 1e9, 14.651, 0.0005);
  // Check value 6 [computed; docs/check-values.md]: sigma_rho 0.01 g/cc, 1 % Vp, 2 % Vs -> sigma_K 0.784 GPa.
  EXPECT_NEAR(p.sigma / 1e9, 0.784, 0.0005);
  ASSERT_TRUE(p.waves.has_value());
  EXPECT_DOUBLE_EQ(p.waves->vp, 3500);
  EXPECT_DOUBLE_EQ(p.waves->sigma_vs, 42);
  EXPECT_DOUBLE_EQ(p.waves->rho, 2300);  // sample bulk density: no rho column
  ASSERT_TRUE(p.dynamic.has_value());
  EXPECT_NEAR(p.dynamic->shear / 1e9, 10.143, 0.0005);  // check value 5: mu 10.143 GPa
  EXPECT_TRUE(s.sigma_absolute);
  EXPECT_EQ(p.where.ToString(), Good("units.yaml") + ":71:11");
}

TEST(StudyLoader, ConvertsFeetPerSecondAndPerPointVelocitySigmas) {
  const Sample& s = Find(UnitsStudy(), "G4-ft").sample;
  ASSERT_EQ(s.points.size(), 2u);
  const DataPoint& p = s.points[0];
  EXPECT_NEAR(p.waves->vp, 11482.94 * kFt, 1e-9);
  EXPECT_NEAR(p.waves->vs, 6889.76 * kFt, 1e-9);
  EXPECT_DOUBLE_EQ(p.waves->rho, 2300);  // rho column in g/cc
  EXPECT_NEAR(p.pressure, 10e6, 1e-6);   // P_c 15 - P_p 5, n = 1
  // sigma_Vp 35 m/s absolute, sigma_Vs 2 % of Vs, no density error: by the formula in porofit/core/dynamic.h [computed].
  const double vp = p.waves->vp, vs = p.waves->vs, rho = 2300;
  const double expect = std::hypot(2 * rho * vp * 35.0, (8.0 / 3.0) * rho * vs * 0.02 * vs);
  EXPECT_NEAR(p.sigma, expect, 1e-6 * expect);
}

TEST(StudyLoader, WarnsWithLocationWhenVpOverVsIsAtMostSqrtTwo) {
  const Study& s = UnitsStudy();
  ASSERT_EQ(s.warnings.size(), 1u);
  EXPECT_EQ(s.warnings[0].rfind(Good("units.yaml") + ":83:11: warning: ", 0), 0u) << s.warnings[0];
  EXPECT_NE(s.warnings[0].find("G4-ft"), std::string::npos);
  EXPECT_NE(s.warnings[0].find("sqrt(2)"), std::string::npos);
}

TEST(StudyLoader, SamplesInheritDefaultsUnlessTheyOverride) {
  const StudySample& g1 = Find(UnitsStudy(), "G1-psi");
  const StudySample& g2 = Find(UnitsStudy(), "G2-csv");
  // Inherited by both.
  for (const StudySample* ss : {&g1, &g2}) {
    EXPECT_EQ(ss->options.loss, RobustLoss::kHuber);
    EXPECT_DOUBLE_EQ(ss->options.loss_scale, 1.5);
    EXPECT_EQ(ss->options.seed, 7u);
  }
  // Overridden key by key in G1 only.
  EXPECT_EQ(g1.options.multistart, 12);
  EXPECT_DOUBLE_EQ(g1.options.correlation_threshold, 0.95);
  EXPECT_EQ(g2.options.multistart, 4);
  EXPECT_DOUBLE_EQ(g2.options.correlation_threshold, FitOptions{}.correlation_threshold);
  // A sample's model list replaces the default list.
  ASSERT_EQ(g1.models.size(), 2u);
  EXPECT_EQ(g1.models[0].model_id, "exp-modulus");
  EXPECT_EQ(g1.models[1].model_id, "power-ref");
  ASSERT_EQ(g2.models.size(), 2u);
  EXPECT_EQ(g2.models[1].model_id, "linear-exp");
}

TEST(StudyLoader, ConvertsParameterSettingsToSi) {
  const ModelChoice& m = FindModel(Find(UnitsStudy(), "G1-psi"), "exp-modulus");
  const ParameterSetting& pc = m.settings.at("P_close");
  EXPECT_DOUBLE_EQ(*pc.lower, 1e6);
  EXPECT_NEAR(*pc.upper, 8700 * kPsiPa, 1e-6 * 60e6);
  EXPECT_DOUBLE_EQ(*pc.start, 10e6);
  EXPECT_FALSE(pc.fixed.has_value());
  EXPECT_NEAR(*m.settings.at("K_inf").upper, 5e6 * kPsiPa, 1e-6 * 35e9);  // 5 Mpsi
  EXPECT_EQ(m.settings.count("K_0"), 0u);
  EXPECT_TRUE(FindModel(Find(UnitsStudy(), "G1-psi"), "power-ref").settings.at("P_ref").free);

  const ModelChoice& le = FindModel(Find(UnitsStudy(), "G2-csv"), "linear-exp");
  EXPECT_DOUBLE_EQ(*le.settings.at("B").lower, 0.0);
  EXPECT_DOUBLE_EQ(*le.settings.at("B").upper, 0.05 * 1e9 / 1e6);  // GPa/MPa -> Pa/Pa
  EXPECT_DOUBLE_EQ(*le.settings.at("D").start, 0.1 / 1e6);          // 1/MPa -> 1/Pa
}

TEST(StudyLoader, NeverModifiesItsInputFiles) {
  const std::string before_yaml = Slurp(Good("units.yaml"));
  const std::string before_csv = Slurp(Good("crlf-quoted.csv"));
  (void)LoadStudy(Good("units.yaml"));
  EXPECT_EQ(Slurp(Good("units.yaml")), before_yaml);
  EXPECT_EQ(Slurp(Good("crlf-quoted.csv")), before_csv);
}

const char* kSmall = R"(name: small
samples:
  - id: A
    lithology: shale
    porosity: 0.05
    bulk_density: 2.55 g/cc
    measurement: static
    data:
      columns: [P MPa, K GPa]
      rows: [[40, 9.0], [5, 6.5], [20, 8.1]]
    models: [linear]
)";

TEST(StudyLoader, DifferentialPressureColumnIsUsedDirectlyAndRowsKeepFileOrder) {
  const Study s = ParseStudy(kSmall, "mem/small.yaml", ModelRegistry::Builtin());
  const Sample& a = s.samples.at(0).sample;
  ASSERT_EQ(a.points.size(), 3u);
  EXPECT_DOUBLE_EQ(a.points[0].pressure, 40e6);
  EXPECT_DOUBLE_EQ(a.points[1].pressure, 5e6);
  EXPECT_DOUBLE_EQ(a.points[0].pore, 0);
  EXPECT_EQ(a.points[1].where.ToString(), "mem/small.yaml:10:25");
}

// Regression: a real study whose description says "nothing here is invented"
// was taken as invented. Only the top-level key `invented` declares it (a
// non-boolean value is a located error: tests/data/bad/invented-not-boolean.yaml).
TEST(StudyLoader, InventedIsDeclaredByTheKeyNotByWords) {
  const std::string words = std::string("description: measured plugs; nothing here is invented\n") + kSmall;
  EXPECT_FALSE(ParseStudy(words, "small.yaml", ModelRegistry::Builtin()).invented);
  EXPECT_FALSE(ParseStudy(kSmall, "small.yaml", ModelRegistry::Builtin()).invented);
  const std::string declared = std::string("invented: true\n") + kSmall;
  EXPECT_TRUE(ParseStudy(declared, "small.yaml", ModelRegistry::Builtin()).invented);
  const std::string no = std::string("invented: false\nname: invented data\n") + (kSmall + 12);
  EXPECT_FALSE(ParseStudy(no, "small.yaml", ModelRegistry::Builtin()).invented);
}

TEST(StudyLoader, UnweightedSampleHasNoSigmasAndScalesCovariance) {
  const Study s = ParseStudy(kSmall, "small.yaml", ModelRegistry::Builtin());
  for (const auto& p : s.samples[0].sample.points) EXPECT_EQ(p.sigma, 0);
  EXPECT_FALSE(s.samples[0].sample.sigma_absolute);
  EXPECT_TRUE(s.samples[0].options.scale_covariance);
  EXPECT_TRUE(s.warnings.empty());
}

TEST(StudyLoader, ConstantPorePressureAppliesToEveryRow) {
  std::string text = kSmall;
  text.replace(text.find("[P MPa, K GPa]"), 14, "[P_c MPa, K GPa]");
  text.replace(text.find("    data:"), 0, "    pore_pressure: 2 MPa\n    effective_pressure_coefficient: 0.5\n");
  const Study s = ParseStudy(text, "small.yaml", ModelRegistry::Builtin());
  const Sample& a = s.samples[0].sample;
  EXPECT_DOUBLE_EQ(a.points[0].pore, 2e6);
  EXPECT_DOUBLE_EQ(a.points[0].pressure, 40e6 - 0.5 * 2e6);
}

TEST(StudyLoader, ExplicitCovarianceScalingWinsOverCalibratedSigmas) {
  std::string text = kSmall;
  text.replace(text.find("    data:"), 0, "    uncertainty: {K: 4 %, calibrated: true}\n    fit: {scale_covariance: true}\n");
  const Study s = ParseStudy(text, "small.yaml", ModelRegistry::Builtin());
  EXPECT_TRUE(s.samples[0].sample.sigma_absolute);
  EXPECT_TRUE(s.samples[0].options.scale_covariance);
  EXPECT_DOUBLE_EQ(s.samples[0].sample.points[0].sigma, 0.04 * 9e9);
}

TEST(StudyLoader, InvalidDefaultFitOptionsAreReportedAtTheirKey) {
  std::string text = kSmall;
  text.replace(text.find("samples:"), 0, "defaults:\n  fit:\n    closure_range_factor: 0.5\n");
  try {
    ParseStudy(text, "small.yaml", ModelRegistry::Builtin());
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "small.yaml:4:5");
    EXPECT_EQ(e.message(), "fit.closure_range_factor = 0.5 violates closure_range_factor >= 1");
  }
}

TEST(StudyLoader, ReadsEveryFitOption) {
  std::string text = kSmall;
  text += R"(    fit:
      loss: cauchy
      loss_scale: 3
      multistart: 2
      start_spread: 0.25
      seed: 99
      max_iterations: 40
      function_tolerance: 1e-10
      gradient_tolerance: 1e-11
      parameter_tolerance: 1e-12
      covariance: false
      covariance_backend: ceres
      min_reciprocal_condition: 1e-12
      correlation_threshold: 0.9
      closure_range_factor: 5
      solver: ceres
      run_every_start: true
)";
  const FitOptions o = ParseStudy(text, "small.yaml", ModelRegistry::Builtin()).samples[0].options;
  EXPECT_EQ(o.solver, SolverChoice::kCeres);
  EXPECT_FALSE(o.skip_starts_at_same_limit);
  EXPECT_EQ(o.loss, RobustLoss::kCauchy);
  EXPECT_DOUBLE_EQ(o.loss_scale, 3);
  EXPECT_EQ(o.multistart, 2);
  EXPECT_DOUBLE_EQ(o.start_spread, 0.25);
  EXPECT_EQ(o.seed, 99u);
  EXPECT_EQ(o.max_iterations, 40);
  EXPECT_DOUBLE_EQ(o.function_tolerance, 1e-10);
  EXPECT_DOUBLE_EQ(o.gradient_tolerance, 1e-11);
  EXPECT_DOUBLE_EQ(o.parameter_tolerance, 1e-12);
  EXPECT_FALSE(o.covariance);
  EXPECT_EQ(o.covariance_backend, CovarianceBackend::kCeres);
  EXPECT_DOUBLE_EQ(o.min_reciprocal_condition, 1e-12);
  EXPECT_DOUBLE_EQ(o.correlation_threshold, 0.9);
  EXPECT_DOUBLE_EQ(o.closure_range_factor, 5);
  EXPECT_TRUE(o.scale_covariance);  // unweighted sample
}

TEST(StudyLoader, SolverDefaultsToAutoAndAnUnknownSolverIsRejectedAtItsValue) {
  const FitOptions d = ParseStudy(kSmall, "small.yaml", ModelRegistry::Builtin()).samples[0].options;
  EXPECT_EQ(d.solver, SolverChoice::kAuto);
  EXPECT_TRUE(d.skip_starts_at_same_limit);
  std::string text = kSmall;
  text += "    fit: {solver: lapack}\n";
  try {
    ParseStudy(text, "small.yaml", ModelRegistry::Builtin());
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("is not one of"), std::string::npos) << e.message();
    EXPECT_NE(e.message().find("compact"), std::string::npos) << e.message();
    EXPECT_NE(e.location().ToString().find("small.yaml:"), std::string::npos);
  }
}

TEST(StudyLoader, UnknownFitOptionSuggestsTheNearestKey) {
  std::string text = kSmall;
  text += "    fit: {multistarts: 3}\n";
  try {
    ParseStudy(text, "small.yaml", ModelRegistry::Builtin());
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("did you mean 'multistart'?"), std::string::npos) << e.message();
    EXPECT_EQ(e.location().line, 12);
  }
}

TEST(StudyLoader, MissingStudyFileIsAnInputError) {
  EXPECT_THROW(LoadStudy(Good("no-such-study.yaml")), InputError);
}

TEST(StudyLoader, InventedSampleStudyLoadsWithoutWarnings) {
  const Study s = LoadStudy(std::string(POROFIT_SOURCE_DIR) + "/samples/invented-field-study.yaml");
  EXPECT_GE(s.samples.size(), 6u);
  EXPECT_TRUE(s.warnings.empty());
  EXPECT_TRUE(s.invented);  // declared with `invented: true`
  bool has_static = false, has_dynamic = false, has_unloading = false;
  for (const auto& ss : s.samples) {
    has_static |= ss.sample.kind == MeasurementKind::kStatic;
    has_dynamic |= ss.sample.kind == MeasurementKind::kDynamic;
    has_unloading |= ss.sample.branch == Branch::kUnloading;
    EXPECT_GE(ss.sample.points.size(), 8u) << ss.sample.id;
    EXPECT_GE(ss.models.size(), 2u) << ss.sample.id;
    EXPECT_LE(ss.models.size(), 4u) << ss.sample.id;
  }
  EXPECT_TRUE(has_static && has_dynamic && has_unloading);
}

}  // namespace
}  // namespace porofit

namespace porofit {
namespace {

// The example in docs/study-file.md must stay loadable. Its CSV lives in
// tests/data/good/data/P1-load.csv, so the text is parsed as if it sat there.
TEST(StudyFileDoc, ExampleLoads) {
  std::ifstream in(std::string(POROFIT_SOURCE_DIR) + "/docs/study-file.md");
  std::ostringstream doc;
  doc << in.rdbuf();
  const std::string text = doc.str();
  const size_t section = text.find("## Example");
  ASSERT_NE(section, std::string::npos);
  const size_t start = text.find("```yaml\n", section);
  ASSERT_NE(start, std::string::npos);
  const size_t end = text.find("```", start + 8);
  const std::string yaml = text.substr(start + 8, end - start - 8);
  const Study s = ParseStudy(yaml, Good("doc-example.yaml"), ModelRegistry::Builtin());
  ASSERT_EQ(s.samples.size(), 3u);
  EXPECT_EQ(s.samples[0].options.loss, RobustLoss::kCauchy);
  EXPECT_EQ(s.samples[1].sample.branch, Branch::kUnloading);
  EXPECT_EQ(s.samples[2].sample.kind, MeasurementKind::kDynamic);
  EXPECT_DOUBLE_EQ(s.samples[2].sample.points[0].pore, 2e6);
  EXPECT_TRUE(s.warnings.empty());
}

}  // namespace
}  // namespace porofit

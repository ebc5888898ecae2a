// Study-file keys for the Biot-coefficient outputs: grain moduli, fluid
// modulus, VTI stiffnesses and band options.
#include <gtest/gtest.h>

#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

// A valid static sample; `extra` is appended inside it (indented by 4).
std::string Study(const std::string& top, const std::string& extra, const std::string& defaults = "") {
  return "name: alpha keys\n" + defaults + top +
         "samples:\n"
         "  - id: S1\n"
         "    lithology: clean sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.12 g/cc\n"
         "    measurement: static\n"
         "    data:\n"
         "      columns: [P MPa, K GPa]\n"
         "      rows: [[5, 8.1], [10, 10.2], [20, 12.9], [40, 15.0]]\n"
         "    models: [exp-modulus]\n" +
         extra;
}

porofit::Study Parse(const std::string& text) { return ParseStudy(text, "alpha.yaml", ModelRegistry::Builtin()); }

std::string ErrorOf(const std::string& text) {
  try {
    Parse(text);
  } catch (const InputError& e) {
    return e.what();
  }
  return "no error";
}

TEST(AlphaInputs, StudyWithoutGrainModulusStillLoadsAndComputesNoAlpha) {
  const auto s = Parse(Study("", ""));
  EXPECT_FALSE(s.samples[0].grain.given);
  // Defaults: delta method only at the 0.95 level, grid spanning the data.
  EXPECT_TRUE(s.samples[0].bands.options.delta);
  EXPECT_FALSE(s.samples[0].bands.options.monte_carlo);
  EXPECT_FALSE(s.samples[0].bands.options.bootstrap);
  EXPECT_DOUBLE_EQ(s.samples[0].bands.options.confidence, 0.95);
  EXPECT_FALSE(s.samples[0].bands.grid.from.has_value());
}

TEST(AlphaInputs, MeasuredGrainModulusKeepsValueSigmaAndSource) {
  const auto s = Parse(Study("", "    grain_modulus:\n      measured: {K_s: 5366 ksi, sigma: 2 %, mu_s: 44 GPa, "
                                 "source: unjacketed test}\n"));
  const GrainModulusChoice& g = s.samples[0].grain;
  ASSERT_TRUE(g.given);
  EXPECT_EQ(g.value.method, poro::GrainModulusMethod::kMeasured);
  // 1 psi = 6.894757 kPa (check value 7, docs/check-values.md; 7 digits: tolerance 0.001 Pa/psi)
  EXPECT_NEAR(g.value.k_s, 5366e3 * 6894.757, 5366e3 * 1e-3);
  EXPECT_NEAR(g.value.sigma_k_s, 0.02 * g.value.k_s, 1e-3);
  EXPECT_NEAR(g.value.mu_s, 44e9, 1e-3);
  ASSERT_EQ(g.sources.size(), 1u);
  EXPECT_EQ(g.sources[0], "unjacketed test");
}

TEST(AlphaInputs, MineralogyInVolumeFractionsGivesTheHillAverage) {
  // Check value 9 [computed; docs/check-values.md]: quartz-calcite 80/20 by volume,
  // K_V 44.96, K_R 41.278, Hill 43.119 GPa. The study overrides the built-in
  // moduli with the check's inputs (K 37 / 76.8, mu 44 / 32 GPa).
  const std::string minerals =
      "minerals:\n"
      "  quartz: {bulk: 37 GPa, sigma_bulk: 0 GPa, shear: 44 GPa, sigma_shear: 0 GPa, density: 2.65 g/cc, "
      "source: check 9}\n"
      "  calcite: {bulk: 76.8 GPa, sigma_bulk: 0 GPa, shear: 32 GPa, sigma_shear: 0 GPa, density: 2.71 g/cc, "
      "source: check 9}\n";
  const auto s = Parse(Study(minerals, "    grain_modulus:\n      mineralogy:\n        basis: volume\n"
                                       "        fractions: {quartz: 80 %, calcite: 20 %}\n"));
  const poro::GrainModulus& g = s.samples[0].grain.value;
  EXPECT_NEAR(g.k_voigt / 1e9, 44.96, 1e-3);
  EXPECT_NEAR(g.k_reuss / 1e9, 41.278, 1e-3);
  EXPECT_NEAR(g.k_s / 1e9, 43.119, 1e-3);
  EXPECT_EQ(s.mineral_overrides.size(), 2u);
  EXPECT_EQ(s.samples[0].grain.sources.size(), 2u);
  EXPECT_EQ(s.samples[0].grain.sources[0], "quartz: check 9");
}

TEST(AlphaInputs, GroupGivesEverySampleTheSameGrainModulus) {
  std::string text = Study("grain_moduli:\n  g1:\n    measured: {K_s: 37 GPa, sigma: 1 GPa, source: test}\n",
                           "    grain_modulus: g1\n");
  text += "  - id: S2\n    lithology: x\n    porosity: 0.2\n    bulk_density: 2.1 g/cc\n    measurement: static\n"
          "    data:\n      columns: [P MPa, K GPa]\n      rows: [[5, 8], [10, 10], [20, 12]]\n"
          "    models: [linear]\n    grain_modulus: g1\n";
  text += "  - id: S3\n    lithology: x\n    porosity: 0.2\n    bulk_density: 2.1 g/cc\n    measurement: static\n"
          "    data:\n      columns: [P MPa, K GPa]\n      rows: [[5, 8], [10, 10], [20, 12]]\n"
          "    models: [linear]\n    grain_modulus: none\n";
  const auto s = Parse(text);
  ASSERT_EQ(s.samples.size(), 3u);
  EXPECT_EQ(s.samples[0].grain.group, "g1");
  EXPECT_EQ(s.samples[1].grain.group, "g1");
  EXPECT_EQ(s.samples[0].grain.value.k_s, s.samples[1].grain.value.k_s);
  EXPECT_EQ(s.samples[0].grain.value.sigma_k_s, s.samples[1].grain.value.sigma_k_s);
  EXPECT_FALSE(s.samples[2].grain.given);
}

TEST(AlphaInputs, FluidVtiAndBandOptionsAreRead) {
  const auto s = Parse(Study(
      "",
      "    grain_modulus:\n      measured: {K_s: 40 GPa, sigma: 1 GPa, source: test}\n"
      "    fluid_modulus: {K_f: 2.25 GPa, sigma: 0.05 GPa}\n"
      "    vti_stiffness:\n      columns: [P MPa, C11 GPa, C12 GPa, C13 GPa, C33 GPa]\n"
      "      rows: [[10, 30, 10, 8, 20]]\n"
      "    bands:\n      methods: [bootstrap, delta]\n      bootstrap_kind: wild\n      bootstrap_replicates: 300\n"
      "      seed: 7\n      grid: {from: 1 MPa, to: 50 MPa, count: 11, spacing: log}\n",
      "defaults:\n  bands: {confidence: 0.9, monte_carlo_draws: 500}\n"));
  const StudySample& ss = s.samples[0];
  ASSERT_TRUE(ss.fluid.has_value());
  EXPECT_NEAR(ss.fluid->k_f, 2.25e9, 1e-3);
  EXPECT_NEAR(ss.fluid->sigma, 0.05e9, 1e-3);
  ASSERT_EQ(ss.vti.size(), 1u);
  EXPECT_NEAR(ss.vti[0].c13, 8e9, 1e-3);
  EXPECT_NEAR(ss.vti[0].pressure, 10e6, 1e-6);
  const bands::BandOptions& o = ss.bands.options;
  EXPECT_DOUBLE_EQ(o.confidence, 0.9);  // from the defaults, kept key by key
  EXPECT_EQ(o.monte_carlo_draws, 500);
  EXPECT_TRUE(o.delta);
  EXPECT_FALSE(o.monte_carlo);
  EXPECT_TRUE(o.bootstrap);
  EXPECT_EQ(o.bootstrap_kind, bands::BootstrapKind::kWild);
  EXPECT_EQ(o.bootstrap_replicates, 300);
  EXPECT_EQ(o.seed, 7u);
  EXPECT_EQ(ss.bands.grid.spacing, bands::GridSpacing::kLog);
  EXPECT_EQ(ss.bands.grid.count, 11);
  EXPECT_NEAR(*ss.bands.grid.from, 1e6, 1e-6);
}

TEST(AlphaInputs, ExplicitGridPressuresNeedUnits) {
  const std::string e = ErrorOf(Study(
      "", "    grain_modulus: {measured: {K_s: 40 GPa, sigma: 1 GPa, source: t}}\n"
          "    bands:\n      grid: {pressures: [5 MPa, 20]}\n"));
  EXPECT_NE(e.find("alpha.yaml:14:33:"), std::string::npos) << e;
  EXPECT_NE(e.find("'bands.grid.pressures[2]' = 20 needs a unit"), std::string::npos) << e;
}

TEST(AlphaInputs, BothMeasuredAndMineralogyIsAnError) {
  const std::string e = ErrorOf(Study(
      "", "    grain_modulus:\n      measured: {K_s: 40 GPa, sigma: 1 GPa, source: t}\n"
          "      mineralogy: {basis: weight, fractions: {quartz: 1}}\n"));
  EXPECT_NE(e.find("give 'measured' or 'mineralogy'"), std::string::npos) << e;
}

TEST(AlphaInputs, MeasuredGrainModulusNeedsItsSigma) {
  const std::string e = ErrorOf(Study("", "    grain_modulus: {measured: {K_s: 40 GPa, source: t}}\n"));
  EXPECT_NE(e.find("missing required key 'grain_modulus.measured.sigma'"), std::string::npos) << e;
}

TEST(AlphaInputs, VtiColumnTypoSuggestsTheName) {
  const std::string e = ErrorOf(Study(
      "", "    grain_modulus: {measured: {K_s: 40 GPa, sigma: 1 GPa, source: t}}\n"
          "    vti_stiffness:\n      columns: [P MPa, C11 GPa, C21 GPa, C13 GPa, C33 GPa]\n"
          "      rows: [[10, 30, 10, 8, 20]]\n"));
  EXPECT_NE(e.find("unknown column 'C21'"), std::string::npos) << e;
}

}  // namespace
}  // namespace porofit

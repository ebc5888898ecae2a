// The fitted path of the VTI Biot coefficients (`vti_stiffness.fit`): each of
// C11, C12, C13, C33 is fitted against pressure and alpha_h, alpha_v are
// evaluated from the fitted curves.
#include <gtest/gtest.h>

#include <cmath>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/io/study_loader.h"
#include "porofit/report/report.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

// Exponential-modulus law C(P) = C_inf - (C_inf - C_0) exp(-P/P_close), GPa and MPa.
double Law(double c_inf, double c_0, double p_close, double p) { return c_inf - (c_inf - c_0) * std::exp(-p / p_close); }

std::string Num(double x) {
  std::ostringstream o;
  o.precision(17);
  o << x;
  return o.str();
}

// A study with one shale sample, K_s = 37 +- 1 GPa, and the given VTI rows
// (P MPa, C11, C12, C13, C33 GPa); `fit` empty: no `fit:` key.
std::string StudyText(const std::vector<std::vector<double>>& rows, const std::string& fit) {
  std::string t =
      "name: vti fit\nsamples:\n  - id: S1\n    lithology: shale\n    porosity: 0.1\n    bulk_density: 2.5 g/cc\n"
      "    measurement: static\n    data:\n      columns: [P MPa, K GPa]\n"
      "      rows: [[5, 8.1], [10, 10.2], [20, 12.9], [40, 15.0]]\n    models: [linear]\n"
      "    grain_modulus: {measured: {K_s: 37 GPa, sigma: 1 GPa, source: invented}}\n"
      "    vti_stiffness:\n      columns: [P MPa, C11 GPa, C12 GPa, C13 GPa, C33 GPa]\n";
  if (!fit.empty()) t += "      fit: " + fit + "\n";
  t += "      rows:\n";
  for (const auto& r : rows) {
    t += "        - [";
    for (size_t j = 0; j < r.size(); ++j) t += (j ? ", " : "") + Num(r[j]);
    t += "]\n";
  }
  return t;
}

StudyRun RunText(const std::string& text) {
  const Study study = ParseStudy(text, "vti-fit.yaml", ModelRegistry::Builtin());
  RunOptions ro;
  ro.timestamp_utc = "2026-02-03T04:05:06Z";
  return RunStudy(study, ro);
}

const std::vector<double> kPressures = {2, 5, 8, 12, 18, 25, 35, 50, 70};

// Invented stiffness laws, one exp-modulus law per stiffness (shale-like,
// C11 > C33 and C12 > C13; values invented for these tests): P MPa -> GPa.
std::vector<double> ExactRow(double p) {
  return {p, Law(34, 24, 12, p), Law(11, 7, 9, p), Law(9, 5, 15, p), Law(24, 14, 10, p)};
}

TEST(VtiFit, FittedStiffnessesReproduceTheGivenTableAlphaWhenTheLawIsExact) {
  std::vector<std::vector<double>> rows;
  for (double p : kPressures) rows.push_back(ExactRow(p));
  const StudyRun given = RunText(StudyText(rows, ""));
  const StudyRun fitted = RunText(StudyText(rows, "exp-modulus"));
  ASSERT_EQ(given.samples[0].vti.size(), kPressures.size());
  EXPECT_TRUE(given.samples[0].vti_fits.empty());
  const SampleRun& s = fitted.samples[0];
  ASSERT_EQ(s.vti_fits.size(), 4u);
  for (const VtiStiffnessFit& f : s.vti_fits) EXPECT_TRUE(f.fit.IsUsable()) << f.component << ": " << f.fit.message;
  ASSERT_GT(s.vti.size(), 2 * kPressures.size());
  // Band grid points: the fitted curves against the exact laws there (the
  // default grid runs 10 % beyond the K data on each side).
  size_t n_grid = 0;
  for (size_t i = 2 * kPressures.size(); i < s.vti.size(); ++i) {
    const VtiAlphaPoint& g = s.vti[i];
    ASSERT_EQ(g.source, "fitted-grid");
    ++n_grid;
    const std::vector<double> c = ExactRow(g.pressure / 1e6);
    EXPECT_NEAR(g.alpha_h, 1 - (c[1] + c[2] + c[3]) / (3 * 37), 1e-8) << "P = " << g.pressure;
    EXPECT_NEAR(g.alpha_v, 1 - (2 * c[3] + c[4]) / (3 * 37), 1e-8) << "P = " << g.pressure;
  }
  EXPECT_EQ(n_grid, 200u);  // default band grid count (docs/study-file.md, bands)
  for (size_t i = 0; i < kPressures.size(); ++i) {
    const VtiAlphaPoint& t = s.vti[i];
    const VtiAlphaPoint& f = s.vti[kPressures.size() + i];
    EXPECT_EQ(t.source, "table");
    EXPECT_EQ(f.source, "fitted");
    EXPECT_DOUBLE_EQ(f.pressure, t.pressure);
    EXPECT_NEAR(f.alpha_h, given.samples[0].vti[i].alpha_h, 1e-8) << "P = " << kPressures[i];
    EXPECT_NEAR(f.alpha_v, given.samples[0].vti[i].alpha_v, 1e-8) << "P = " << kPressures[i];
    // Exact data: the fit adds (almost) nothing to the K_s part of the sigma.
    EXPECT_NEAR(f.sigma_h, t.sigma_h, 1e-8);
    EXPECT_GE(f.sigma_h, t.sigma_h);
  }
}

TEST(VtiFit, IsotropicStiffnessesGiveEqualAlphaOnTheFittedPath) {
  // Isotropic stiffness as VTI: C11 = C33 = K + 4mu/3, C12 = C13 = K - 2mu/3,
  // so alpha_h = alpha_v = 1 - K/K_s (VTI Biot tensor, docs/poroelastic-relations.md;
  // common practice). K(P), mu(P) invented exp-modulus laws with one P_close,
  // so every stiffness follows the same law.
  std::vector<std::vector<double>> rows;
  std::vector<double> k;
  for (double p : kPressures) {
    const double kp = Law(20, 12, 15, p), mu = Law(12, 6, 15, p);
    k.push_back(kp);
    rows.push_back({p, kp + 4 * mu / 3, kp - 2 * mu / 3, kp - 2 * mu / 3, kp + 4 * mu / 3});
  }
  const SampleRun s = RunText(StudyText(rows, "exp-modulus")).samples[0];
  ASSERT_GT(s.vti.size(), 2 * kPressures.size());
  for (size_t i = 0; i < kPressures.size(); ++i) {
    const VtiAlphaPoint& f = s.vti[kPressures.size() + i];
    ASSERT_EQ(f.source, "fitted");
    EXPECT_NEAR(f.alpha_h, 1 - k[i] / 37, 1e-8) << "P = " << kPressures[i];
    EXPECT_NEAR(f.alpha_v, 1 - k[i] / 37, 1e-8) << "P = " << kPressures[i];
  }
}

TEST(VtiFit, NoisyStiffnessesAddFitUncertaintyToTheSigma) {
  // Invented law with a fixed +-0.2 GPa alternating error: the fit variance
  // must enlarge the sigma beyond the K_s-only part, by the stated formula.
  std::vector<std::vector<double>> rows;
  for (size_t i = 0; i < kPressures.size(); ++i) {
    const double p = kPressures[i], e = (i % 2 ? 0.2 : -0.2);
    rows.push_back({p, Law(34, 24, 12, p) + e, Law(11, 7, 9, p) - e, Law(9, 5, 15, p) + e, Law(24, 14, 10, p) - e});
  }
  const SampleRun s = RunText(StudyText(rows, "exp-modulus")).samples[0];
  ASSERT_GT(s.vti.size(), 2 * kPressures.size());
  for (size_t i = 0; i < kPressures.size(); ++i) {
    const VtiAlphaPoint& t = s.vti[i];
    const VtiAlphaPoint& f = s.vti[kPressures.size() + i];
    const double ks_part = (1 - f.alpha_h) / 37;  // sigma_K_s / K_s = 1/37
    EXPECT_GT(f.sigma_h_fit, 0);
    EXPECT_GT(f.sigma_v_fit, 0);
    EXPECT_NEAR(f.sigma_h * f.sigma_h, ks_part * ks_part + f.sigma_h_fit * f.sigma_h_fit, 1e-15);
    EXPECT_NEAR(t.sigma_h_fit, 0, 0);
    // Fitted stiffness within a few error sizes of the noisy value.
    EXPECT_NEAR(f.c11, t.c11, 0.6e9);
  }
}

TEST(VtiFit, FailedStiffnessFitIsReportedAndDoesNotAbort) {
  // A model id the registry of the run does not know (the loader checks ids
  // against the built-in catalogue, so set it after loading): every stiffness
  // fit fails with a message, the table rows remain, no fitted rows appear.
  std::vector<std::vector<double>> rows;
  for (double p : kPressures) rows.push_back(ExactRow(p));
  Study study = ParseStudy(StudyText(rows, "exp-modulus"), "vti-fit.yaml", ModelRegistry::Builtin());
  study.samples[0].vti_fit_model = "no-such-model";
  RunOptions ro;
  ro.timestamp_utc = "2026-02-03T04:05:06Z";
  const StudyRun run = RunStudy(study, ro);
  const SampleRun& s = run.samples[0];
  ASSERT_EQ(s.vti_fits.size(), 4u);
  for (const VtiStiffnessFit& f : s.vti_fits) {
    EXPECT_EQ(f.fit.status, FitStatus::kInvalidRequest) << f.component;
    EXPECT_NE(f.fit.message.find("no-such-model"), std::string::npos) << f.fit.message;
  }
  ASSERT_EQ(s.vti.size(), kPressures.size());
  for (const VtiAlphaPoint& a : s.vti) EXPECT_EQ(a.source, "table");
  const auto j = ResultsJson(run, {});
  ASSERT_TRUE(j["samples"][0].contains("vti_fit"));
  EXPECT_EQ(j["samples"][0]["vti_fit"]["stiffness_fits"].size(), 4u);
  EXPECT_EQ(j["samples"][0]["vti_fit"]["stiffness_fits"][2]["component"], "C13");
  EXPECT_NE(j["samples"][0]["vti_fit"]["stiffness_fits"][2]["status"].get<std::string>().size(), 0u);
}

TEST(VtiFit, OutputsNameTheSourceAndTheStiffnessFits) {
  std::vector<std::vector<double>> rows;
  for (double p : kPressures) rows.push_back(ExactRow(p));
  const StudyRun run = RunText(StudyText(rows, "exp-modulus"));
  std::ostringstream csv;
  WriteVtiAlphaCsv(run, csv);
  EXPECT_NE(csv.str().find("flags,source\n"), std::string::npos);
  EXPECT_NE(csv.str().find(",fitted\n"), std::string::npos);
  EXPECT_NE(csv.str().find(",fitted-grid\n"), std::string::npos);
  EXPECT_NE(csv.str().find(",table\n"), std::string::npos);
}

TEST(VtiFit, LoaderRejectsTooFewRowsForTheFitModel) {
  const std::vector<std::vector<double>> rows = {{5, 30, 10, 8, 20}, {10, 31, 10, 8, 21}, {20, 32, 11, 9, 22}};
  try {
    ParseStudy(StudyText(rows, "exp-modulus"), "vti-fit.yaml", ModelRegistry::Builtin());
    FAIL() << "expected an InputError";
  } catch (const InputError& e) {
    EXPECT_NE(std::string(e.what()).find("needs >= 4 rows"), std::string::npos) << e.what();
  }
}

}  // namespace
}  // namespace porofit

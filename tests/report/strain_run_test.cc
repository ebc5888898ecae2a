// Strain samples through the run layer: strain-form fits, tangent/secant/chord
// moduli, alpha bands of the tangent K, and the report files.
#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <sstream>
#include <string>

#include "porofit/models/registry.h"
#include "porofit/report/report.h"
#include "porofit/run/run.h"

namespace porofit {
namespace {

// Synthetic rock: exp-modulus with the parameters of check value 12
// [computed; docs/check-values.md] (K_inf 20 GPa, K_0 8 GPa, P_close 10 MPa).
constexpr double kKInf = 20, kK0 = 8, kPClose = 10;
double TrueK(double p_mpa) { return kKInf - (kKInf - kK0) * std::exp(-p_mpa / kPClose); }  // GPa
double TrueStrain(double p_mpa) {  // plain strain
  return 1e-3 * (p_mpa / kKInf + kPClose / kKInf * std::log(TrueK(p_mpa) / kK0));
}
const double kPressures[] = {2, 4, 6, 8, 10, 15, 20, 25, 30, 40, 50, 60};  // MPa

// Strain data with seeded Gaussian noise of `noise` (plain strain), sigma
// given and calibrated.
StudySample StrainSample(std::mt19937_64& rng, double noise, const std::string& model = "exp-modulus") {
  std::normal_distribution<double> z(0.0, 1.0);
  StudySample ss;
  ss.sample.id = "EPS";
  ss.sample.response = Response::kStrain;
  ss.sample.sigma_absolute = true;
  for (double p : kPressures) {
    DataPoint d;
    d.pressure = d.confining = p * 1e6;
    d.modulus = std::nan("");
    d.strain = TrueStrain(p) + noise * z(rng);
    d.sigma = noise;
    ss.sample.points.push_back(d);
  }
  ModelChoice m;
  m.model_id = model;
  ss.models = {m};
  ss.options.scale_covariance = false;
  return ss;
}

double Estimate(const FitResult& r, const std::string& name) {
  for (const ParameterResult& p : r.parameters)
    if (p.name == name) return p.estimate / p.si_factor;
  ADD_FAILURE() << "no parameter " << name;
  return std::nan("");
}
double StdError(const FitResult& r, const std::string& name) {
  for (const ParameterResult& p : r.parameters)
    if (p.name == name) return p.std_error / p.si_factor;
  return std::nan("");
}

TEST(StrainRun, StrainFitRecoversTheExpModulusParametersWithinThreeStandardErrors) {
  std::mt19937_64 rng(12);
  const StudySample ss = StrainSample(rng, 2e-6);
  const FitResult r = RunOne(ss, ss.models[0], ModelRegistry::Builtin());
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  EXPECT_EQ(r.model_id, "exp-modulus");
  ASSERT_TRUE(r.covariance_ok);
  EXPECT_NEAR(Estimate(r, "K_inf"), kKInf, 3 * StdError(r, "K_inf"));
  EXPECT_NEAR(Estimate(r, "K_0"), kK0, 3 * StdError(r, "K_0"));
  EXPECT_NEAR(Estimate(r, "P_close"), kPClose, 3 * StdError(r, "P_close"));
  // Residuals are in plain strain: of the order of the 2e-6 noise.
  EXPECT_LT(r.rmse, 5e-6);
  EXPECT_GT(r.rmse, 0.5e-6);
}

TEST(StrainRun, ExpComplianceStrainFitRecoversCheckValue13Parameters) {
  // Check value 13 [computed; docs/check-values.md]: C_inf 0.05, C_0 0.2 1/GPa, P_close 10 MPa.
  std::mt19937_64 rng(13);
  std::normal_distribution<double> z(0.0, 1.0);
  StudySample ss = StrainSample(rng, 2e-6, "exp-compliance");
  for (DataPoint& d : ss.sample.points) {
    const double p = d.pressure / 1e6;
    d.strain = 1e-3 * (0.05 * p + 0.15 * 10 * (1 - std::exp(-p / 10))) + 2e-6 * z(rng);
  }
  const FitResult r = RunOne(ss, ss.models[0], ModelRegistry::Builtin());
  ASSERT_EQ(r.status, FitStatus::kConverged) << r.message;
  EXPECT_NEAR(Estimate(r, "C_inf"), 0.05, 3 * StdError(r, "C_inf"));
  EXPECT_NEAR(Estimate(r, "C_0"), 0.2, 3 * StdError(r, "C_0"));
  EXPECT_NEAR(Estimate(r, "P_close"), 10, 3 * StdError(r, "P_close"));
}

// Coverage of the 95 % tangent band at 10 MPa over seeded replicates: the
// delta band with calibrated sigma is nominal for this nearly linear problem.
TEST(StrainRun, TangentBandCoversTheTrueModulusAtNominalRate) {
  std::mt19937_64 rng(2026);
  int covered = 0, used = 0;
  constexpr int kReplicates = 200;
  for (int k = 0; k < kReplicates; ++k) {
    StudySample ss = StrainSample(rng, 3e-6);
    ss.bands.grid.spacing = bands::GridSpacing::kExplicit;
    ss.bands.grid.pressures = {10e6};
    ss.bands.options.confidence = 0.95;
    const FitResult r = RunOne(ss, ss.models[0], ModelRegistry::Builtin());
    if (!r.IsUsable()) continue;
    const auto rows = RunStrainModuli(ss, {r}, ModelRegistry::Builtin());
    for (const StrainModulusPoint& p : rows) {
      if (p.source != "fitted" || p.pressure != 10e6) continue;
      ++used;
      covered += (p.tangent_lower <= TrueK(10) * 1e9 && TrueK(10) * 1e9 <= p.tangent_upper) ? 1 : 0;
    }
  }
  ASSERT_GE(used, kReplicates - 2);
  const double rate = static_cast<double>(covered) / used;
  RecordProperty("coverage", std::to_string(covered) + "/" + std::to_string(used));
  EXPECT_GT(rate, 0.90) << covered << "/" << used;
  EXPECT_LT(rate, 0.99) << covered << "/" << used;
}

TEST(StrainRun, TangentFromTheStrainFitAgreesWithTheModulusFitOfTheSameRock) {
  std::mt19937_64 rng(7);
  const StudySample strain = StrainSample(rng, 2e-6);
  // The same rock measured as K with 2 % noise.
  std::normal_distribution<double> z(0.0, 1.0);
  StudySample mod = strain;
  mod.sample.response = Response::kModulus;
  for (DataPoint& d : mod.sample.points) {
    const double k = TrueK(d.pressure / 1e6) * 1e9;
    d.modulus = k * (1 + 0.02 * z(rng));
    d.sigma = 0.02 * k;
    d.strain = std::nan("");
  }
  const FitResult rs = RunOne(strain, strain.models[0], ModelRegistry::Builtin());
  const FitResult rk = RunOne(mod, mod.models[0], ModelRegistry::Builtin());
  ASSERT_TRUE(rs.IsUsable() && rk.IsUsable());
  const ModelSpec& m = *ModelRegistry::Builtin().Find("exp-modulus");
  const std::vector<double> at = {5e6, 10e6, 30e6};
  const auto cs = bands::EvaluateCurve(rs, m, at);
  const auto ck = bands::EvaluateCurve(rk, m, at);
  for (size_t i = 0; i < at.size(); ++i) {
    // Within 5 % of each other and of the truth (both fits are unbiased here).
    EXPECT_NEAR(cs.value[i], ck.value[i], 0.05 * ck.value[i]) << at[i];
    EXPECT_NEAR(cs.value[i], TrueK(at[i] / 1e6) * 1e9, 0.05 * TrueK(at[i] / 1e6) * 1e9) << at[i];
  }
}

TEST(StrainRun, SecantIsBelowTangentAndChordsComeFromDataAndFit) {
  std::mt19937_64 rng(3);
  StudySample ss = StrainSample(rng, 2e-6);
  const FitResult r = RunOne(ss, ss.models[0], ModelRegistry::Builtin());
  ASSERT_TRUE(r.IsUsable());
  const auto rows = RunStrainModuli(ss, {r}, ModelRegistry::Builtin());
  int fitted = 0, data_chords = 0, fitted_chords = 0;
  for (const StrainModulusPoint& p : rows) {
    if (p.source == "fitted") {
      ++fitted;
      if (p.pressure > 0) {
        EXPECT_LT(p.secant, p.tangent) << "crack-closing rock: K_sec < K_t (computed: K rises with P)";
      }
      EXPECT_LE(p.tangent_lower, p.tangent);
      EXPECT_GE(p.tangent_upper, p.tangent);
    } else if (p.source == "data-chord") {
      ++data_chords;
      EXPECT_TRUE(p.model_id.empty());
      // A chord between two data steps lies near the tangent at its midpoint.
      EXPECT_NEAR(p.chord / 1e9, TrueK(p.pressure / 1e6), 0.25 * TrueK(p.pressure / 1e6)) << p.pressure;
    } else if (p.source == "fitted-chord") {
      ++fitted_chords;
      // Mean-value theorem: the chord equals K at some pressure inside the step.
      EXPECT_GT(p.chord / 1e9, 0.99 * TrueK(p.pressure_from / 1e6));
      EXPECT_LT(p.chord / 1e9, 1.01 * TrueK(p.pressure_to / 1e6));
    }
  }
  EXPECT_GT(fitted, 2);
  EXPECT_EQ(data_chords, 11);
  EXPECT_EQ(fitted_chords, 11);
}

TEST(StrainRun, AlphaBandsUseTheTangentModulusAndResampleInStrainForm) {
  std::mt19937_64 rng(5);
  StudySample ss = StrainSample(rng, 2e-6);
  ss.grain.given = true;
  ss.grain.value.k_s = 37e9;
  ss.grain.value.sigma_k_s = 0;
  ss.sample.porosity = 0.2;
  ss.bands.options.monte_carlo = true;
  ss.bands.options.bootstrap = true;
  ss.bands.options.monte_carlo_draws = 400;
  ss.bands.options.bootstrap_replicates = 100;
  const FitResult r = RunOne(ss, ss.models[0], ModelRegistry::Builtin());
  ASSERT_TRUE(r.IsUsable());
  const bands::BandResult b = RunBands(ss, ss.models[0], r, ModelRegistry::Builtin());
  ASSERT_TRUE(b.computed) << b.message;
  const ModelSpec& m = *ModelRegistry::Builtin().Find("exp-modulus");
  const auto c = bands::EvaluateCurve(r, m, b.grid.pressure);
  for (size_t i = 0; i < b.k.size(); ++i) {
    EXPECT_DOUBLE_EQ(b.k[i], c.value[i]);
    EXPECT_DOUBLE_EQ(b.alpha[i], 1 - c.value[i] / 37e9);
  }
  ASSERT_TRUE(b.delta.computed) << b.delta.message;
  ASSERT_TRUE(b.monte_carlo.computed) << b.monte_carlo.message;
  ASSERT_TRUE(b.bootstrap.computed) << b.bootstrap.message;
  EXPECT_EQ(b.bootstrap.failed(), 0);
  for (size_t i = 0; i < b.k.size(); ++i) {
    // Resampled medians sit near the plug-in tangent modulus (K, not strain).
    EXPECT_NEAR(b.monte_carlo.k.estimate[i], b.k[i], 0.02 * b.k[i]);
    EXPECT_NEAR(b.bootstrap.k.estimate[i], b.k[i], 0.02 * b.k[i]);
    EXPECT_TRUE(std::isnan(b.delta.k_prediction.lower[i])) << "no K noise level for strain data";
  }
}

TEST(StrainRun, StudyRunFillsModuliAndTheReportWritesThem) {
  std::mt19937_64 rng(9);
  Study st;
  st.name = "strain run (invented)";
  st.samples.push_back(StrainSample(rng, 2e-6));
  RunOptions o;
  o.timestamp_utc = "2026-01-01T00:00:00Z";
  const StudyRun run = RunStudy(st, o);
  ASSERT_EQ(run.samples.size(), 1u);
  EXPECT_FALSE(run.samples[0].strain_moduli.empty());
  std::ostringstream moduli, residuals, modulus_residuals;
  WriteModuliCsv(run, moduli);
  WriteStrainResidualsCsv(run, residuals);
  WriteResidualsCsv(run, modulus_residuals);
  EXPECT_NE(moduli.str().find("sample,model,source,P_MPa,P_from_MPa,P_to_MPa,eps_v_fitted,K_tangent_GPa"),
            std::string::npos);
  EXPECT_NE(moduli.str().find("EPS,,data-chord,"), std::string::npos);
  EXPECT_NE(moduli.str().find("EPS,exp-modulus,fitted,"), std::string::npos);
  EXPECT_NE(residuals.str().find("observed_eps_v,fitted_eps_v,sigma_eps_v,residual_eps_v"), std::string::npos);
  EXPECT_NE(residuals.str().find("\nEPS,exp-modulus,1,"), std::string::npos);
  EXPECT_EQ(modulus_residuals.str().find("\nEPS,"), std::string::npos) << "strain fits are not in K units";
  const auto j = ResultsJson(run, {});
  const auto& fit = j["samples"][0]["fits"][0];
  EXPECT_EQ(fit["strain"]["residual_unit"], "1 (strain)");
  EXPECT_EQ(fit["strain"]["residuals"].size(), 12u);
  EXPECT_TRUE(fit["statistics"]["rmse_GPa"].is_null());
  EXPECT_EQ(j["samples"][0]["response"], "strain");
}

}  // namespace
}  // namespace porofit

#pragma once
// Hand-built StudyRun values for the report tests: no solver involved, so the
// expected numbers are exactly the ones written here.
#include <cmath>
#include <string>

#include "porofit/run/run.h"

namespace porofit::testing {

// One static plug, 3 points with sigma, two model choices: a converged
// exp-modulus fit and a failed power-ref fit (statistics NaN / not computed).
// `invented`: the study declares its data invented (Study::invented).
inline StudyRun HandBuiltRun(const std::string& study_name = "Invented demo study", bool invented = true) {
  StudyRun run;
  Study& st = run.study;
  st.name = study_name;
  st.invented = invented;
  st.description = "hand-built test study";
  st.path = "demo/study.yaml";
  StudySample ss;
  Sample& s = ss.sample;
  s.id = "PLUG-1";
  s.lithology = "sandstone, clean";  // comma: must be quoted in CSV
  s.porosity = 0.2;
  s.bulk_density = 2300;
  const double P[3] = {5e6, 10e6, 30e6};
  const double K[3] = {12.5e9, 15.5e9, 19.4e9};
  for (int i = 0; i < 3; ++i) {
    DataPoint d;
    d.confining = P[i] + 1e6;
    d.pore = 1e6;
    d.pressure = P[i];
    d.modulus = K[i];
    d.sigma = 0.25e9;
    d.where = SourceLocation{"demo/plug1.csv", i + 2, 0};
    s.points.push_back(d);
  }
  ModelChoice m1;
  m1.model_id = "exp-modulus";
  m1.settings["K_0"].lower = 1e9;
  ModelChoice m2;
  m2.model_id = "power-ref";
  ss.models = {m1, m2};
  st.samples.push_back(ss);

  FitResult r;
  r.model_id = "exp-modulus";
  r.status = FitStatus::kConverged;
  r.message = "function tolerance reached";
  r.iterations = 7;
  r.starts_tried = 8;
  r.starts_converged = 8;
  auto param = [](std::string name, std::string unit, double f, double est, double se) {
    ParameterResult p;
    p.name = std::move(name);
    p.unit = std::move(unit);
    p.si_factor = f;
    p.estimate = est;
    p.std_error = se;
    p.start = est * 1.1;
    p.lower = 0;
    p.upper = INFINITY;
    return p;
  };
  r.parameters = {param("K_inf", "GPa", 1e9, 20e9, 0.5e9), param("K_0", "GPa", 1e9, 8e9, 0.25e9),
                  param("P_close", "MPa", 1e6, 10e6, 2e6)};
  r.free_index = {0, 1, 2};
  r.covariance.resize(3, 3);
  // SI covariance: diagonal = se^2; off-diagonals from correlations 0.5, -0.25, 0.8.
  const double se[3] = {0.5e9, 0.25e9, 2e6};
  const double c[3][3] = {{1, 0.5, -0.25}, {0.5, 1, 0.8}, {-0.25, 0.8, 1}};
  r.correlation.resize(3, 3);
  for (int i = 0; i < 3; ++i) {
    for (int j = 0; j < 3; ++j) {
      r.covariance(i, j) = c[i][j] * se[i] * se[j];
      r.correlation(i, j) = c[i][j];
    }
  }
  r.covariance_ok = true;
  r.covariance_method = "ceres-dense-svd";
  r.n = 3;
  r.p = 3;
  r.dof = 0;
  r.ssr = 0.0;
  r.chi2_reduced = NAN;  // dof = 0
  r.rmse = 0.0123e9;
  r.r_squared = 0.999;
  r.aic = -12.5;
  r.aicc = NAN;  // undefined for n <= k + 1
  r.bic = -13.25;
  r.high_correlation = false;
  r.max_abs_correlation = 0.8;
  r.warnings = {"demo warning"};
  ResidualDiagnostics& d = r.residuals;
  d.x = Eigen::Vector3d(P[0], P[1], P[2]);
  d.observed = Eigen::Vector3d(K[0], K[1], K[2]);
  d.fitted = Eigen::Vector3d(12.49e9, 15.52e9, 19.39e9);
  d.sigma = Eigen::Vector3d(0.25e9, 0.25e9, 0.25e9);
  d.raw = d.observed - d.fitted;
  d.standardized = Eigen::Vector3d(0.5, -1.0, 0.5);
  d.leverage = Eigen::Vector3d(0.9, 0.6, 0.5);
  d.runs = 3;
  d.n_positive = 2;
  d.n_negative = 1;
  d.runs_z = 0.25;
  d.runs_p = 0.8;
  d.durbin_watson = 2.5;

  FitResult bad;
  bad.model_id = "power-ref";
  bad.status = FitStatus::kTooFewPoints;
  bad.message = "3 points for 2 free parameters";
  ParameterResult pr = param("K_ref", "GPa", 1e9, NAN, NAN);
  bad.parameters = {pr};

  run.samples.resize(1);
  run.samples[0].fits = {r, bad};
  run.metadata.started_utc = "2026-01-31T12:00:00Z";
  run.metadata.tool_version = "9.9.9";
  run.metadata.build_type = "Release";
  run.metadata.command_line = "porofit fit demo/study.yaml --out x";
  return run;
}

}  // namespace porofit::testing

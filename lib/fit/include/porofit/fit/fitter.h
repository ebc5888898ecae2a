#pragma once
// Weighted nonlinear least squares with bounds, fixed parameters, robust loss
// and multi-start, on Ceres Solver (Levenberg–Marquardt, dense QR).
//
//   minimise  sum_i rho( ((y_i - f(x_i; theta)) / sigma_i)^2 )   subject to  lower <= theta <= upper
//
// Fit() never throws for a fit that fails: the status says what happened.
//
// How it works (lib/fit/src/fitter.cc):
//  - Data and settings are converted to the model's working units; the
//    solver works on the free parameters only (fixed ones are removed from
//    its vector), as u = ln(theta) for kLog parameters, with bounds on u
//    (only finite ones that can bind; see FitOptions::unbounded_first).
//  - Residuals r_i = (y_i - f(x_i)) / sigma_i with the exact Jacobian of
//    ModelSpec::value_and_gradient. Plain least squares is one Ceres residual
//    block for all points; a robust loss uses one block per point, because
//    Ceres applies a loss to the squared norm of a whole block.
//  - Starts, in order: extra_starts, the model's heuristic (with any
//    ParameterSetting::start applied, moved inside the bounds), then
//    multistart - 1 perturbations of the heuristic from std::mt19937_64(seed).
//    The lowest cost wins. A start where the model is not finite is skipped.
//  - A fixed_by_default parameter without a fixed value or start is held at
//    the heuristic's value (else the first extra start's).
//  - Covariance at the solution: see FitOptions::covariance_backend and
//    FitResult::covariance_method. Plain least squares scales by
//    s^2 = SSR/(n-p); a robust loss uses Huber's (1981) M-estimator form
//    with a robust scale instead, so an outlier's full squared residual does
//    not inflate the standard errors (FitResult::variance_factor), and
//    reports each point's IRLS weight (ResidualDiagnostics::robust_weight).
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "porofit/fit/fit_options.h"
#include "porofit/fit/fit_result.h"
#include "porofit/models/model.h"

namespace porofit {

/// Study-level settings for one parameter, in SI. Absent fields keep the
/// model's defaults (bounds from ParameterSpec, start from the heuristic).
struct ParameterSetting {
  std::optional<double> fixed;  ///< hold at this value
  std::optional<double> lower;
  std::optional<double> upper;
  std::optional<double> start;
  bool free = false;            ///< free a parameter that is fixed_by_default
};

struct FitData {
  std::vector<double> x;      ///< SI (Pa)
  std::vector<double> y;      ///< SI (Pa)
  std::vector<double> sigma;  ///< SI, 1-sigma of y; empty = unweighted (all 1 in working units)
};

struct FitRequest {
  const ModelSpec* model = nullptr;
  FitData data;
  std::map<std::string, ParameterSetting> settings;  ///< keyed by parameter name
  FitOptions options;
  /// Explicit starting points (working units, full parameter vectors), tried
  /// before the heuristic. NIST tests pass their certified Start 1 / Start 2 here.
  std::vector<std::vector<double>> extra_starts;
  /// If true, only `extra_starts` are used (no heuristic, no perturbation).
  bool only_extra_starts = false;
};

/// Runs the fit. Thread-safe: no shared mutable state.
FitResult Fit(const FitRequest& request);

}  // namespace porofit

#pragma once
// Weighted nonlinear least squares with bounds, fixed parameters, robust loss
// and multi-start, on Ceres Solver (Levenberg–Marquardt, dense QR).
//
//   minimise  sum_i rho( ((y_i - f(x_i; theta)) / sigma_i)^2 )   subject to  lower <= theta <= upper
//
// Fit() never throws for a fit that fails: the status says what happened.
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

#include "porofit/fit/fit_options.h"

#include <cmath>
#include <sstream>

#include "porofit/core/error.h"

namespace porofit {

std::string_view ToString(RobustLoss l) {
  switch (l) {
    case RobustLoss::kNone: return "none";
    case RobustLoss::kHuber: return "huber";
    case RobustLoss::kCauchy: return "cauchy";
  }
  return "unknown";
}

std::string_view ToString(CovarianceBackend b) {
  switch (b) {
    case CovarianceBackend::kCeres: return "ceres";
    case CovarianceBackend::kEigen: return "eigen";
  }
  return "unknown";
}

std::string_view ToString(SolverChoice c) {
  switch (c) {
    case SolverChoice::kAuto: return "auto";
    case SolverChoice::kCeres: return "ceres";
    case SolverChoice::kCompact: return "compact";
  }
  return "unknown";
}

namespace {

// One line per rule: "fit.<field> = <value> violates <rule>".
std::string Violation(const char* field, double value, const char* rule) {
  return std::string("fit.") + field + " = " + FormatNumber(value) + " violates " + rule;
}

std::string OverLimit(const char* field, long long value, int limit) {
  return std::string("fit.") + field + " = " + std::to_string(value) + " exceeds the limit of " + std::to_string(limit);
}

}  // namespace

std::string FitOptions::Validate() const {
  if (!(std::isfinite(loss_scale) && loss_scale > 0)) return Violation("loss_scale", loss_scale, "loss_scale > 0");
  if (multistart < 1) return Violation("multistart", multistart, "multistart >= 1");
  if (multistart > kMaxMultistart) return OverLimit("multistart", multistart, kMaxMultistart);
  if (!(std::isfinite(start_spread) && start_spread > 0))
    return Violation("start_spread", start_spread, "start_spread > 0");
  if (max_iterations < 1) return Violation("max_iterations", max_iterations, "max_iterations >= 1");
  if (max_iterations > kMaxIterations) return OverLimit("max_iterations", max_iterations, kMaxIterations);
  if (!(function_tolerance >= 0 && function_tolerance < 1))
    return Violation("function_tolerance", function_tolerance, "0 <= function_tolerance < 1");
  if (!(gradient_tolerance >= 0 && gradient_tolerance < 1))
    return Violation("gradient_tolerance", gradient_tolerance, "0 <= gradient_tolerance < 1");
  if (!(parameter_tolerance >= 0 && parameter_tolerance < 1))
    return Violation("parameter_tolerance", parameter_tolerance, "0 <= parameter_tolerance < 1");
  if (!(min_reciprocal_condition > 0 && min_reciprocal_condition < 1))
    return Violation("min_reciprocal_condition", min_reciprocal_condition, "0 < min_reciprocal_condition < 1");
  if (!(correlation_threshold > 0 && correlation_threshold <= 1))
    return Violation("correlation_threshold", correlation_threshold, "0 < correlation_threshold <= 1");
  if (!(std::isfinite(closure_range_factor) && closure_range_factor >= 1))
    return Violation("closure_range_factor", closure_range_factor, "closure_range_factor >= 1");
  return {};
}

}  // namespace porofit

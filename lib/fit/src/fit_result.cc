#include "porofit/fit/fit_result.h"

#include <cmath>
#include <cstdio>

#include "porofit/core/error.h"

namespace porofit {

std::string_view ToString(FitStatus s) {
  switch (s) {
    case FitStatus::kConverged: return "converged";
    case FitStatus::kMaxIterations: return "max-iterations";
    case FitStatus::kNumericalFailure: return "numerical-failure";
    case FitStatus::kTooFewPoints: return "too-few-points";
    case FitStatus::kInvalidRequest: return "invalid-request";
    case FitStatus::kAtLimit: return "at-limit";
  }
  return "unknown";
}

namespace {
std::string Sig(double v, int digits) {
  if (std::isnan(v)) return "nan";
  char buf[48];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}
}  // namespace

std::string FitResult::BriefReport() const {
  std::string s = model_id.empty() ? std::string("<model>") : model_id;
  s += ": ";
  s += ToString(status);
  if (status == FitStatus::kInvalidRequest || status == FitStatus::kTooFewPoints) return s + " (" + message + ")";
  s += ", n = " + std::to_string(n) + ", p = " + std::to_string(p);
  s += ", SSR = " + Sig(ssr, 6) + ", chi2_nu = " + Sig(chi2_reduced, 4);
  for (const ParameterResult& q : parameters) {
    const double f = q.si_factor != 0 ? q.si_factor : 1.0;
    s += ", " + q.name + " = " + Sig(q.estimate / f, 6);
    if (q.fixed) {
      s += " (fixed)";
    } else if (!std::isnan(q.std_error)) {
      s += " +- " + Sig(q.std_error / f, 3);
    }
    if (!q.unit.empty() && q.unit != "1") s += " " + q.unit;
    if (q.at_lower) s += " [at lower bound]";
    if (q.at_upper) s += " [at upper bound]";
  }
  if (!warnings.empty()) s += "; " + std::to_string(warnings.size()) + " warning(s)";
  return s;
}

}  // namespace porofit

#include "porofit/compare/joint_vs_separate.h"

#include <cmath>
#include <exception>
#include <limits>

namespace porofit::compare {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// AICc on N pooled points with FitResult's conventions (see the header).
double PooledAicc(double rss, int n, int k, bool scaled) {
  const double m2lnl = scaled ? n * std::log(rss / n) : rss;
  const double c = AiccCorrection(n, k);
  return std::isfinite(c) ? m2lnl + 2.0 * k + c : kNaN;
}

}  // namespace

JointVsSeparate CompareJointWithSeparate(const JointFitRequest& request, const JointFitResult& joint, double level) {
  JointVsSeparate out;
  const bool scaled = request.options.scale_covariance;
  bool all_converged = joint.IsUsable();
  size_t weighted = 0;
  for (size_t k = 0; k < request.datasets.size(); ++k) {
    FitResult f;
    try {
      f = Fit(SeparateRequest(request, k));
    } catch (const std::exception& e) {  // Fit() does not throw for a failing fit; a defect must not stop the run
      f.status = FitStatus::kNumericalFailure;
      f.message = std::string("internal error during fit: ") + e.what();
    }
    all_converged = all_converged && f.IsUsable();
    out.rss_separate += f.ssr;
    out.p_separate += f.p;
    out.separate.push_back(std::move(f));
    if (!request.datasets[k].sigma.empty()) ++weighted;
  }
  out.n = joint.n;
  out.rss_joint = joint.ssr;
  out.p_joint = joint.p;
  out.k_joint = joint.p + (scaled ? 1 : 0);
  out.k_separate = out.p_separate + (scaled ? 1 : 0);
  if (!all_converged) {
    out.reason = "the joint fit or a separate fit did not converge";
    out.rss_separate = kNaN;
    out.aicc_joint = joint.IsUsable() ? PooledAicc(out.rss_joint, out.n, out.k_joint, scaled) : kNaN;
    out.aicc_separate = kNaN;
    return out;
  }
  out.aicc_joint = PooledAicc(out.rss_joint, out.n, out.k_joint, scaled);
  out.aicc_separate = PooledAicc(out.rss_separate, out.n, out.k_separate, scaled);
  if (std::isfinite(out.aicc_joint) && std::isfinite(out.aicc_separate))
    out.aicc_prefers = out.aicc_joint <= out.aicc_separate ? "joint" : "separate";
  if (weighted != 0 && weighted != request.datasets.size()) {
    out.reason = "some data sets are weighted and some are not: the weights do not mean the same in every data set";
    return out;
  }
  out.f_test = NestedFTest(out.rss_joint, out.p_joint, out.rss_separate, out.p_separate, out.n, level);
  out.computed = out.f_test.computed;
  if (!out.computed) {
    out.reason = out.f_test.reason;
    return out;
  }
  out.decision = out.f_test.reject ? "shared rejected" : "shared accepted";
  return out;
}

}  // namespace porofit::compare

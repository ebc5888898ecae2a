#pragma once
// A joint fit with shared parameters against the separate fits of the same
// model to each data set.
//
// The separate fits are the fuller model; the joint fit is its regular
// restriction "the shared parameters are equal in every data set". Both are
// fitted to the same N pooled points with the same weights, so
//  - the extra-sum-of-squares F test (porofit::compare::NestedFTest) compares
//      RSS_joint, p_joint = p_total   with   RSS_sep = sum_k SSR_k, p_sep = sum_k p_k;
//    a rejection says the data do not support one common value of the shared
//    parameters. The F statistic estimates the noise level from RSS_sep/(N -
//    p_sep), so it is computed both for relative and for absolute sigma; it
//    needs every data set weighted, or every data set unweighted (otherwise the
//    weights do not mean the same thing across data sets) and all fits
//    converged.
//  - AICc of both on the pooled data, with FitResult's conventions: relative
//    sigma (FitOptions::scale_covariance): AIC = N ln(RSS/N) + 2k with
//    k = p + 1, the ONE common noise variance counted once for the separate
//    fits too (the F test assumes the same); absolute sigma: AIC = RSS + 2k,
//    k = p. AICc = AIC + 2k(k+1)/(N-k-1).
// Nothing here throws; a comparison that cannot be made says why.
#include <string>
#include <vector>

#include "porofit/compare/criteria.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/joint.h"

namespace porofit::compare {

struct JointVsSeparate {
  bool computed = false;
  std::string reason;                ///< why the F test was not computed ("" if it was)
  std::vector<FitResult> separate;   ///< the separate fit of each data set (SeparateRequest)
  int n = 0;                         ///< pooled points
  double rss_joint = 0, rss_separate = 0;
  int p_joint = 0, p_separate = 0;   ///< free parameters (without the variance)
  int k_joint = 0, k_separate = 0;   ///< parameters counted in AICc (see above)
  double aicc_joint = 0, aicc_separate = 0;  ///< pooled data; NaN if undefined
  FTestResult f_test;
  /// "shared accepted" (F test does not reject), "shared rejected", or
  /// "not tested".
  std::string decision = "not tested";
  /// "joint" or "separate": the lower pooled AICc ("" if either is NaN).
  std::string aicc_prefers;
};

/// Runs the separate fits of `request`'s data sets and compares them with
/// `joint` (the result of FitJoint(request)) at test level `level`.
JointVsSeparate CompareJointWithSeparate(const JointFitRequest& request, const JointFitResult& joint,
                                         double level = 0.95);

}  // namespace porofit::compare

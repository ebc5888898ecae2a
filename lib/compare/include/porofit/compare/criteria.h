#pragma once
// Statistical primitives of model comparison (Akaike 1974; Hurvich & Tsai
// 1989; Seber & Wild 1989, Nonlinear Regression, Wiley [from memory]), shared by the
// per-sample ranking, the branch (hysteresis) tests and joint fits.
//
// Conventions: scores are information criteria (AIC, AICc or BIC; lower is
// better) of fits to the SAME data; k counts every estimated quantity,
// including the noise variance when it is estimated (see FitResult::aic).
// Nothing here throws: undefined results are NaN, and a test that cannot be
// made says why in `reason`.
#include <span>
#include <string>
#include <vector>

namespace porofit::compare {

/// The small-sample term of AICc, 2k(k+1)/(n-k-1) (Hurvich & Tsai, 1989,
/// Biometrika 76, 297-307). NaN when n <= k + 1 (AICc undefined) or k < 0.
double AiccCorrection(int n, int k);

/// Akaike weights w_i = exp(-Delta_i/2) / sum_j exp(-Delta_j/2), Delta_i =
/// score_i - min score (Burnham & Anderson, 2002, Model Selection and
/// Multimodel Inference, Springer). A NaN or infinite score gets weight NaN
/// and takes no part; if no score is finite every weight is NaN.
std::vector<double> AkaikeWeights(std::span<const double> scores);

/// Delta_i = score_i - min over the finite scores (NaN where score_i is not
/// finite, or if none is).
std::vector<double> ScoreDifferences(std::span<const double> scores);

/// Extra-sum-of-squares F test of a restricted model (p_small parameters,
/// weighted residual sum of squares rss_small) nested regularly inside a
/// fuller one (p_big, rss_big), both fitted to the same n points:
///   F = [(rss_small - rss_big)/(p_big - p_small)] / [rss_big/(n - p_big)],
/// F(p_big - p_small, n - p_big) under the restricted model (Seber & Wild,
/// 1989, Nonlinear Regression, Wiley, §5.3). Valid only for a regular
/// nesting (the restriction is an interior point of the fuller model's
/// parameter space); the caller decides that.
struct FTestResult {
  bool computed = false;
  std::string reason;        ///< why not computed ("" if computed)
  double f = 0;              ///< statistic (may be slightly < 0 if the fuller fit is worse: reported as is)
  int df1 = 0, df2 = 0;      ///< p_big - p_small, n - p_big
  double p_value = 0;        ///< P(F(df1, df2) >= f)
  double critical = 0;       ///< F quantile at `level`
  double level = 0.95;
  bool reject = false;       ///< f > critical: the fuller model is needed
};
FTestResult NestedFTest(double rss_small, int p_small, double rss_big, int p_big, int n,
                        double level = 0.95);

}  // namespace porofit::compare

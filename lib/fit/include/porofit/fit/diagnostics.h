#pragma once
// Residual diagnostics of a least-squares fit, as free functions so each can
// be checked on its own (common practice; all are weak when
// n < 10). Fit() fills FitResult::residuals with them.
#include <Eigen/Core>

namespace porofit {

/// Leverages h_ii: the diagonal of the hat matrix H = J (J^T J)^+ J^T of the
/// *weighted* Jacobian J (rows J_i / sigma_i). Computed from a rank-revealing
/// orthogonal decomposition, so sum h_ii = rank(J) (= p at full rank) and
/// 0 <= h_ii <= 1. A singular value below rcond * (largest) counts as zero.
Eigen::VectorXd Leverages(const Eigen::MatrixXd& weighted_jacobian, double rcond = 1e-12);

/// Internally studentised residuals r_i / (s sigma_i sqrt(1 - h_ii)) for raw
/// residuals r, sigmas sigma (same units as r), leverages h and residual scale
/// s (s = sqrt(SSR/(n-p)) of the weighted residuals). Entries with h_ii >= 1
/// (a point that alone determines a parameter) are NaN.
Eigen::VectorXd StudentizedResiduals(const Eigen::VectorXd& raw, const Eigen::VectorXd& sigma,
                                     const Eigen::VectorXd& leverage, double s);

/// Wald–Wolfowitz runs test on the signs of residuals, in the order given
/// (Wald & Wolfowitz, 1940, Ann. Math. Stat. 11). Exact zeros are dropped.
struct RunsTest {
  int runs = 0;        ///< number of maximal same-sign stretches
  int n_positive = 0;
  int n_negative = 0;
  /// Normal approximation, no continuity correction:
  ///   mu = 2 n+ n- / N + 1,  var = 2 n+ n- (2 n+ n- - N) / (N^2 (N - 1)),
  ///   z = (runs - mu) / sqrt(var),  p = erfc(|z| / sqrt 2) (two-sided).
  /// z and p are NaN when var is not positive (all residuals of one sign, N < 2).
  double z = 0;
  double p = 0;
};
RunsTest WaldWolfowitzRuns(const Eigen::VectorXd& residuals);

/// Durbin–Watson statistic d = sum_{i>=2} (e_i - e_{i-1})^2 / sum e_i^2 of
/// residuals e in the order given (Durbin & Watson, 1950, Biometrika 37);
/// about 2 without autocorrelation, towards 0 for positive and 4 for negative
/// serial correlation. NaN if all residuals are zero or fewer than 2 are given.
double DurbinWatson(const Eigen::VectorXd& residuals);

}  // namespace porofit

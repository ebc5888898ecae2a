#pragma once
// The outcome of one fit, as a value type. All numbers in SI (the model's
// ParameterSpec::si_factor / ModelSpec::y_si_factor convert to working units
// for display). Numbers that were not computed are NaN.
#include <Eigen/Core>

#include <string>
#include <vector>

namespace porofit {

enum class FitStatus {
  kConverged,         ///< solver met a convergence tolerance
  kMaxIterations,     ///< stopped at the iteration limit: estimates unreliable
  kNumericalFailure,  ///< model undefined / non-finite everywhere tried
  kTooFewPoints,      ///< fewer points than free parameters (n < p)
  kInvalidRequest,    ///< bounds, fixed values or starts inconsistent
  /// The best fit lies at a limit of the parameter space: a parameter ran
  /// monotonically toward a bound (or 0 / infinity for a log parameter) while
  /// the cost stopped improving (relative change < 1e-6 over 10 iterations),
  /// e.g. power-offset's P_r -> 0 on saturating data, where the model turns
  /// into power-ref. The estimates are the last iterate near that limit: the
  /// running parameter (flagged at_lower / at_upper) and those traded off
  /// against it are not determined; the message names the parameter.
  kAtLimit,
};
std::string_view ToString(FitStatus s);

struct ParameterResult {
  std::string name;
  std::string unit;          ///< working unit of the model (for display)
  double si_factor = 1;      ///< SI = si_factor * working
  double estimate = 0;       ///< SI
  double std_error = 0;      ///< SI; NaN if not computed; 0 for fixed parameters
  double start = 0;          ///< SI, the start of the winning solver run
  bool fixed = false;
  bool at_lower = false;     ///< estimate within 1e-6 (relative) of its lower bound
  bool at_upper = false;
  double lower = 0, upper = 0;  ///< SI bounds used (may be +-inf)
};

struct ResidualDiagnostics {
  Eigen::VectorXd x;             ///< SI (Pa)
  Eigen::VectorXd observed;      ///< SI
  Eigen::VectorXd fitted;        ///< SI
  Eigen::VectorXd sigma;         ///< SI weights' sigma_i (1 if none given, in working units scaled to SI)
  Eigen::VectorXd raw;           ///< observed - fitted, SI
  Eigen::VectorXd standardized;  ///< raw / (s * sigma_i * sqrt(1 - h_ii)), s = FitResult::residual_scale (internally studentised; NaN where h_ii = 1)
  Eigen::VectorXd leverage;      ///< h_ii, diagonal of the weighted hat matrix
  int runs = 0;                  ///< number of sign runs of the residuals in x order (zeros dropped)
  int n_positive = 0, n_negative = 0;
  double runs_z = 0;             ///< Wald–Wolfowitz normal statistic
  double runs_p = 0;             ///< two-sided p-value (normal approximation; weak when n < 10; NaN if one sign only)
  double durbin_watson = 0;      ///< sum (e_i - e_{i-1})^2 / sum e_i^2, weighted residuals in x order
  /// Effective weight of each point in the fit, w_i = rho'(r_i^2) = psi(r_i)/r_i
  /// for the standardised residual r_i = raw_i / sigma_i: the weight of the
  /// final iteratively-reweighted least-squares step. 1 for every point of a
  /// plain least-squares fit; under a robust loss a point far outside
  /// FitOptions::loss_scale has a weight near 0 (Cauchy: 1/(1 + (r/c)^2);
  /// Huber: min(1, c/|r|)).
  Eigen::VectorXd robust_weight;
};

struct FitResult {
  std::string model_id;
  FitStatus status = FitStatus::kInvalidRequest;
  std::string message = "fit was not run";  ///< solver's or porofit's explanation
  int iterations = 0;        ///< LM iterations of the winning start
  int starts_tried = 0;
  int starts_converged = 0;  ///< starts whose solver run met a convergence tolerance

  std::vector<ParameterResult> parameters;  ///< every model parameter, in model order
  Eigen::MatrixXd covariance;   ///< free parameters only, SI, in order of `free_index`
  Eigen::MatrixXd correlation;  ///< same order
  std::vector<int> free_index;  ///< model-parameter index of each covariance row
  bool covariance_ok = false;
  /// "ceres-dense-svd" or "eigen-svd" (FitOptions::covariance_backend), or
  /// "eigen-pseudo-inverse" (fallback when the primary fails or J is rank
  /// deficient), or "" when not computed.
  std::string covariance_method;
  bool covariance_scaled = true;  ///< multiplied by s^2

  int n = 0;              ///< data points
  int p = 0;              ///< free parameters
  int dof = 0;            ///< n - p
  double ssr = 0;         ///< weighted sum of squared residuals, sum (r_i/sigma_i)^2 (dimensionless when sigma given)
  double chi2_reduced = 0;  ///< ssr / dof (plain SSR, also for robust fits)
  /// chi^2_nu from the robust weights: sum w_i r_i^2 / (sum w_i - p), with
  /// w_i = ResidualDiagnostics::robust_weight; a down-weighted outlier then
  /// neither adds its full r_i^2 nor counts as a degree of freedom (Cauchy
  /// bounds w r^2 by c^2; Huber's w r^2 = c |r| still grows with |r|). Equal to
  /// chi2_reduced for plain least squares; NaN if sum w_i <= p.
  double chi2_reduced_robust = 0;
  /// Residual scale s in standardised-residual (sigma) units, used for the
  /// studentised residuals. Plain: s^2 = SSR/(n-p). Robust loss: the
  /// M-estimator scale s^2 = [sum psi(r_i)^2 / (n-p)] / [(1/n) sum psi'(r_i)]^2
  /// (Huber 1981, Robust Statistics, Wiley, §7.6 [from memory]), in which an
  /// outlier enters through its bounded psi, not its full r^2. NaN if n = p or
  /// (robust) if mean psi' <= 0.
  double residual_scale = 0;
  /// The factor multiplying the unscaled inverse in `covariance`
  /// (1 when FitOptions::scale_covariance is false):
  ///  - plain least squares: s^2 = SSR/(n-p), Cov = s^2 (J^T W J)^-1;
  ///  - robust loss: Huber's (1981, §7.6, eq. 6.5 [from memory]) asymptotic
  ///    covariance of an M-estimator,
  ///      Cov = kappa^2 [sum psi^2/(n-p)] / [(1/n) sum psi']^2 (J^T W J)^-1,
  ///      kappa = 1 + (p/n) var(psi') / mean(psi')^2,
  ///    with J^T W J built from the sigma weights only (no loss weights).
  /// With absolute sigma (scale_covariance false) a robust fit's covariance
  /// is the IRLS-weighted (J^T W W_rob J)^-1, W_rob = diag(robust_weight).
  double variance_factor = 0;
  double rmse = 0;        ///< sqrt(mean raw residual^2), SI
  double r_squared = 0;   ///< 1 - SSR/SS_tot, SS_tot = sum w_i (y_i - ybar_w)^2, w_i = 1/sigma_i^2
  /// Information criteria from the Gaussian log-likelihood, dropping the
  /// constants shared by every model fitted to the same data (common practice;
  /// Akaike 1974, Hurvich & Tsai 1989, Schwarz 1978). Which form depends on
  /// FitOptions::scale_covariance:
  ///  - true (sigma only relative, the noise level is estimated):
  ///      AIC = n ln(SSR/n) + 2k,  BIC = n ln(SSR/n) + k ln n,  k = p + 1
  ///    (the variance counts as a parameter);
  ///  - false (sigma absolute): AIC = chi^2 + 2k, BIC = chi^2 + k ln n, k = p,
  ///    with chi^2 = ssr.
  /// AICc = AIC + 2k(k+1)/(n-k-1); NaN when n <= k + 1. Compare values only
  /// between fits of the same data with the same scale_covariance.
  double aic = 0, aicc = 0, bic = 0;

  // Flags.
  bool rank_deficient = false;
  bool closure_outside_range = false;
  bool high_correlation = false;      ///< some |corr| > threshold
  double max_abs_correlation = 0;
  std::vector<std::string> warnings;  ///< human-readable, one per raised flag

  ResidualDiagnostics residuals;

  /// True if converged and the covariance (when requested) is usable.
  bool IsUsable() const { return status == FitStatus::kConverged; }
  /// One line: model, status, SSR, parameters with standard errors.
  std::string BriefReport() const;
};

}  // namespace porofit

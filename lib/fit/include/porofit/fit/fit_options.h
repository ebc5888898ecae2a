#pragma once
// Options of one weighted nonlinear least-squares fit. Every field has a
// default; Validate() names the first field that breaks its rule.
#include <cstdint>
#include <string>
#include <string_view>

namespace porofit {

enum class RobustLoss {
  kNone,    ///< plain least squares
  kHuber,   ///< quadratic within `loss_scale`, linear outside
  kCauchy,  ///< rho(s) = c^2 log(1 + s/c^2): strongly down-weights outliers
};
std::string_view ToString(RobustLoss l);

/// How the covariance of the estimates is computed at the solution. Both work
/// on the column-equilibrated weighted Jacobian (so the rank test does not
/// depend on parameter units) and agree to rounding (max |dCov_ij| /
/// sqrt(Cov_ii Cov_jj) <= 2e-14 over every catalogue model, plain and Huber,
/// measured); Eigen is the default because it skips building a second Ceres
/// problem (about 3 us of a 15-point fit, docs/benchmarks.md). A rank-deficient
/// problem falls back to the Eigen pseudo-inverse either way.
enum class CovarianceBackend {
  kCeres,  ///< ceres::Covariance, DENSE_SVD ("ceres-dense-svd")
  kEigen,  ///< SVD of the Jacobian with Eigen ("eigen-svd"), no second Ceres problem
};
std::string_view ToString(CovarianceBackend b);

/// Which least-squares solver runs each start of a single fit (Fit; joint
/// fits always use Ceres). The default is kAuto; every NIST StRD file passes
/// the same certified gates on both solvers (tests/fit/formula_nist_test.cc).
enum class SolverChoice {
  /// The compact solver where it applies (plain least squares, 1..6 free
  /// parameters, at most 500 points), Ceres otherwise.
  kAuto,
  kCeres,    ///< always Ceres' trust-region Levenberg–Marquardt ("ceres")
  /// A dense Levenberg–Marquardt in Eigen with fixed-size buffers
  /// (lib/fit/src/compact_lm.h): the same LM strategy, exact Jacobian, bounds
  /// and convergence tolerances as the Ceres path, without Ceres' per-solve
  /// set-up and per-iteration allocation. Where it does not apply (robust
  /// loss, more than 6 free parameters or 500 points) Ceres runs; a start
  /// where it fails or hits the iteration limit is solved again with Ceres,
  /// and FitResult::message says so ("compact").
  kCompact,
};
std::string_view ToString(SolverChoice c);

/// Upper bounds of the fit counts (docs/study-file.md, "Limits"): starts
/// beyond 1000 find nothing 100 did not, and a start that has not converged in
/// 100,000 iterations will not; the bounds keep a typo from running for days.
inline constexpr int kMaxMultistart = 1000;
inline constexpr int kMaxIterations = 100000;

struct FitOptions {
  /// Robust loss on the standardised residuals r_i/sigma_i. Standard errors
  /// of a robust fit use Huber's M-estimator covariance with a robust
  /// residual scale when scale_covariance is true, the IRLS-weighted normal
  /// equations otherwise (FitResult::variance_factor); both are asymptotic
  /// and approximate for small n.
  RobustLoss loss = RobustLoss::kNone;
  /// Loss scale in standardised-residual units (sigma multiples): residuals
  /// beyond about this many sigma are down-weighted. Must be > 0.
  double loss_scale = 2.0;

  /// Number of solver starts: the heuristic start plus (multistart - 1)
  /// perturbed starts; the lowest cost wins. In [1, kMaxMultistart].
  int multistart = 8;
  /// Relative spread of the perturbed starts (log-normal factor exp(N(0, s))
  /// on positive parameters, additive s*max(|theta|,1) otherwise). > 0.
  double start_spread = 0.5;
  /// Seed of the perturbation generator. Same seed, same result.
  std::uint64_t seed = 20261201;

  /// Levenberg–Marquardt iteration limit per start. In [1, kMaxIterations].
  int max_iterations = 500;
  /// Ceres convergence tolerances (relative cost change, scaled gradient
  /// max-norm, relative step). Tight by default: small fits are cheap, and the
  /// defaults of the solver give only about 6 correct digits. The relative
  /// cost change 1e-16 (about one rounding step) rather than 1e-14: at 1e-14
  /// the solver stops early in flat valleys (NIST StRD ENSO, b8 then has only
  /// 5.8 correct digits; 6.6 at 1e-16, measured).
  double function_tolerance = 1e-15;
  double gradient_tolerance = 1e-14;
  double parameter_tolerance = 1e-16;

  /// When every finite bound of the free parameters is a lower bound of 0
  /// (positivity of moduli and compliances), solve each start without the box
  /// first and keep that run only if it converged inside the box with a
  /// full-rank Jacobian; otherwise solve the start again with the box. Saves
  /// Ceres' per-step line search of bounded problems: exp-modulus 42.5 -> 32.4
  /// us CPU, linear-exp 98 -> 57 us (docs/benchmarks.md). Off by default: the
  /// estimates then differ from the bounded path by up to ~1e-8 relative
  /// (both are within the solver's own convergence precision at these
  /// tolerances, measured against a tightly converged reference), and an
  /// unbounded run that wanders where the model is undefined makes Ceres log
  /// one line to stderr (NIST StRD BoxBOD Start 1).
  bool unbounded_first = false;

  /// Solver of each start (see SolverChoice).
  SolverChoice solver = SolverChoice::kAuto;
  /// Once two starts have ended at the same limit (status at-limit: the drift
  /// watch saw the same parameter run to the same bound) and none has
  /// converged, skip the remaining starts: they are perturbations of the same
  /// problem and, on the data where this happens (power-offset on saturating
  /// data, docs/benchmarks.md), end there too. FitResult::starts_tried and the
  /// message say how many ran. false: always run every start.
  bool skip_starts_at_same_limit = true;

  /// Compute covariance, standard errors and correlations.
  bool covariance = true;
  /// Fill FitResult::residuals (leverages, studentised residuals, runs test,
  /// Durbin–Watson). Resampling refits that only need the estimates turn it
  /// off; the residual vectors are then empty.
  bool residual_diagnostics = true;
  /// Scale the covariance by s^2 = SSR/(n-p). The loader sets this false when
  /// a sample's uncertainties are declared absolute. chi^2_nu is always reported.
  bool scale_covariance = true;
  /// Which implementation computes the covariance (see CovarianceBackend).
  CovarianceBackend covariance_backend = CovarianceBackend::kEigen;
  /// Reciprocal condition number below which J^T W J (columns equilibrated)
  /// counts as rank deficient.
  double min_reciprocal_condition = 1e-14;

  /// Identifiability flags: |correlation| above this is flagged. In (0, 1].
  double correlation_threshold = 0.99;
  /// Closure pressure outside [P_min / f, f * P_max] is flagged. >= 1.
  double closure_range_factor = 3.0;

  /// Empty if valid, otherwise "field = value violates rule".
  std::string Validate() const;
};

}  // namespace porofit

#pragma once
// Internal to the fit layer: the pieces Fit (fitter.cc) and FitJoint
// (joint.cc) share -- start placement and perturbation, the solver's
// options, run selection and status mapping, the Eigen covariance,
// information criteria, correlations, bound flags and the residual-order
// diagnostics. One definition, so a single fit and a joint fit cannot drift
// apart in how they pick a start or report a result.
#include <ceres/ceres.h>

#include <Eigen/Core>
#include <limits>
#include <string>
#include <utility>
#include <vector>

#include "porofit/fit/fit_options.h"
#include "porofit/fit/fit_result.h"

namespace porofit::fit_detail {

inline constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
inline constexpr double kInf = std::numeric_limits<double>::infinity();

using RowMajorMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

/// Moves theta strictly inside [lo, hi] (towards `base` where possible):
/// heuristic and perturbed starts must be feasible for the solver.
double IntoBounds(double t, double base, double lo, double hi, bool log);

/// The value a start outside the box is pulled towards: the box centre, or a
/// point one unit inside a one-sided box.
double BoxCentre(double lo, double hi, bool log);

/// One perturbed start value from the heuristic's b and a standard normal z:
/// log-normal factor exp(spread z) for positive parameters, additive
/// spread * max(|b|, 1) * z otherwise; then moved into the box.
double PerturbStart(double b, double z, double spread, double lo, double hi, bool log);

/// How one solver run ended, independent of the solver that ran it.
enum class RunEnd {
  kConverged,      ///< a convergence tolerance was met
  kNoConvergence,  ///< iteration limit
  kStalled,        ///< stopped by DriftWatch: a coordinate runs to a limit while the cost stalls
  kFailure,        ///< non-finite or solver failure
};
RunEnd RunEndOf(ceres::TerminationType t);
FitStatus StatusOf(RunEnd e);
/// A run whose solution can be reported (converged, iteration limit, stalled at a limit).
bool Usable(RunEnd e);

struct SolverRun {
  std::vector<double> start;  ///< theta (working) or joint coordinates
  std::vector<double> u;      ///< solution, solver coordinates
  double cost = kInf;
  RunEnd end = RunEnd::kFailure;
  int iterations = 0;
  std::string message;
  int limit_coordinate = -1;     ///< kStalled: the solver coordinate that ran
  bool limit_downwards = false;  ///< kStalled: it ran downwards
};

/// Lowest cost wins; a converged run beats a non-converged one of (nearly)
/// equal cost; among failures the first message is kept.
bool IsBetterRun(const SolverRun& run, const SolverRun& best);

/// LM, dense QR, silent, single-threaded, FitOptions' limits and tolerances.
ceres::Solver::Options CeresOptions(const FitOptions& opt);

/// Column equilibration: the rank / condition test must not depend on the
/// units of the parameters (NIST Misra1b: columns differ by 1e6, and J^T J of
/// the raw columns looks singular at a reciprocal condition of 1e-14).
Eigen::VectorXd ColumnScales(const Eigen::MatrixXd& J);

/// Covariance of the solver coordinates, unscaled (no s^2).
struct CovarianceOut {
  Eigen::MatrixXd cov_u;
  int rank = 0;
  bool ok = false;
  std::string method;
};
/// (J^T J)^+ from the SVD of the equilibrated Jacobian J C: Cov = C V S^-2 V^T C,
/// dropping singular values with (s_k / s_max)^2 below min_rcond (rank deficient).
CovarianceOut EigenCovariance(const Eigen::MatrixXd& J, double min_rcond);

/// AIC, AICc, BIC as FitResult documents (k = p + 1 when the noise level is
/// estimated, p with absolute sigma).
void InformationCriteria(double ssr, int n, int p, bool scale_covariance, double& aic, double& aicc, double& bic);

/// Weighted R^2 = 1 - SSR / sum w (y - ybar_w)^2, w = 1/sigma^2; NaN if SS_tot = 0.
double WeightedRSquared(const Eigen::VectorXd& y, const Eigen::VectorXd& sigma, double ssr);

/// Correlation matrix of `cov` and the largest off-diagonal |correlation|.
void Correlations(const Eigen::MatrixXd& cov, Eigen::MatrixXd& corr, double& max_abs);

/// at_lower / at_upper within 1e-6 (relative, at least absolute 1e-6); a log
/// parameter's lower bound of 0 is never reached, so it is not reported.
void BoundFlags(double theta, double lo, double hi, bool log, bool& at_lower, bool& at_upper);

/// Runs test and Durbin–Watson of the weighted residuals `res` in x order.
void OrderDiagnostics(const Eigen::VectorXd& x, const Eigen::VectorXd& res, ResidualDiagnostics& d);

/// Drift/stall detector. A start whose best fit lies at a limit of the
/// parameter space (power-offset on saturating data: P_r -> 0, where the model
/// becomes power-ref) never meets a convergence tolerance: the solver creeps
/// along a flat valley, the cost improving by ever smaller amounts, until the
/// iteration limit. Observe() is called after each accepted step; it asks to
/// stop when, over the last kWindow accepted steps, (a) the cost improved by
/// less than kStallRelative (relative), and (b) one solver coordinate moved
/// monotonically, by at least kMinRun in ln theta (a factor e^0.05 = 1.05):
/// only log-transformed coordinates are watched, because only they can run
/// to a limit (theta -> 0 or infinity) without reaching a bound; a linear
/// coordinate that runs into its bound is held there by the box and
/// converges normally (NIST StRD MGH10 from Start 1 crawls along a curved
/// valley in linear coordinates for hundreds of steps with a tiny relative
/// cost change, and must not be stopped). A relative SSR change of 1e-6
/// is 1e-6 * dof in chi^2 units: far below anything the data can tell apart.
class DriftWatch {
 public:
  static constexpr int kWindow = 10;
  static constexpr double kStallRelative = 1e-6;
  static constexpr double kMinRun = 0.05;

  /// watched[k]: coordinate k is ln theta (may run to a limit).
  DriftWatch(int p, std::vector<bool> watched) : p_(p), watched_(std::move(watched)) {}
  void Reset() {
    costs_.clear();
    us_.clear();
    coordinate_ = -1;
  }
  /// True when the start should stop (see the class comment).
  bool Observe(double cost, const double* u);
  /// Solver coordinate that ran, and whether downwards; -1 if none.
  int coordinate() const { return coordinate_; }
  bool downwards() const { return downwards_; }
  double from() const { return from_; }
  double to() const { return to_; }
  double relative_change() const { return relative_; }

 private:
  int p_;
  std::vector<bool> watched_;
  std::vector<double> costs_;
  std::vector<double> us_;  // kWindow + 1 rows of p values, oldest first
  int coordinate_ = -1;
  bool downwards_ = false;
  double from_ = 0, to_ = 0, relative_ = 0;
};

}  // namespace porofit::fit_detail

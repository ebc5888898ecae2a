#pragma once
// Joint fit of one model to several data sets with some parameters shared.
//
// A facies study fits, say, exp-modulus to four plugs with one closure
// pressure P* for all of them and K_0, K_inf per plug. The joint problem is
// one weighted least-squares problem over the pooled points,
//
//   minimise  sum_k sum_i ((y_ki - f(x_ki; theta_S, theta_k)) / sigma_ki)^2,
//
// with the parameter vector  [shared block theta_S | block theta_1 | ... |
// block theta_D]: the free shared parameters once, then for each data set the
// free parameters that are not shared, in model order. Parameters fixed by the
// settings (or fixed by default) take no part in the vector.
//
// How it works (lib/fit/src/joint.cc), as porofit::Fit does for one data set:
// working units, u = ln(theta) for kLog parameters, bounds only where they can
// bind, Levenberg–Marquardt with DENSE_QR and the FitOptions tolerances,
// SILENT logging. Starts: each data set's model heuristic (with the settings'
// starts applied); the shared coordinates start at the median of the data
// sets' heuristic values; then FitOptions::multistart - 1 log-normal /
// additive perturbations of that start from std::mt19937_64(FitOptions::seed)
// (deterministic). The lowest cost wins.
//
// Statistics on the pooled data, with FitResult's conventions: N points,
// p_total free parameters, dof = N - p_total, SSR, chi2_nu = SSR/dof; AIC, AICc
// and BIC as FitResult::aic with n = N and k = p_total (+1 for the variance
// when FitOptions::scale_covariance). Covariance of the full free vector
// (J^T W J)^-1 (SVD of the column-equilibrated weighted Jacobian), times
// s^2 = SSR/(N - p_total) when scale_covariance is true (sigma only relative:
// one common noise scale is estimated from the pooled residuals), unscaled
// when sigma is absolute.
//
// Limits: plain least squares only (FitOptions::loss must be kNone; a robust
// joint fit is an invalid request). Failure is a status, never an exception.
#include <Eigen/Core>

#include <map>
#include <string>
#include <vector>

#include "porofit/fit/fit_options.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/model.h"

namespace porofit {

struct JointFitRequest {
  const ModelSpec* model = nullptr;
  /// One FitData per data set (SI), each with its own sigma (or none: then
  /// 1 working unit, as in Fit). Mixing weighted and unweighted data sets is
  /// allowed by the fitter but rarely meaningful: the weights must mean the
  /// same thing in every data set.
  std::vector<FitData> datasets;
  /// Names of the data sets (e.g. sample ids) for labels; empty: "1", "2", ...
  std::vector<std::string> labels;
  /// Model parameter names estimated once for all data sets. Unknown names are
  /// an invalid request (with a suggestion). A shared parameter that is fixed
  /// is simply the same fixed value everywhere.
  std::vector<std::string> shared;
  /// Settings per parameter name (SI), applied to every data set's copy.
  std::map<std::string, ParameterSetting> settings;
  FitOptions options;
};

/// One coordinate of the joint free vector (a covariance row).
struct JointCoordinate {
  std::string label;       ///< "P_star" (shared) or "K_0[B-1]" (per data set)
  std::string name;        ///< model parameter name
  int model_index = 0;     ///< index in ModelSpec::parameters
  int dataset = -1;        ///< -1: shared; else the data set's index
  double estimate = 0;     ///< SI
  double std_error = 0;    ///< SI; NaN if the covariance was not computed
};

/// Per-data-set facts of the joint fit that FitResult has no field for.
struct JointDatasetInfo {
  std::string label;
  int n = 0;             ///< points of the data set
  int p_own = 0;         ///< free parameters of its own block
  /// Descriptive share of the joint degrees of freedom,
  ///   n - p_own - p_shared * n / N,
  /// i.e. the shared parameters charged in proportion to the points. Not a
  /// test statistic; the view's dof is the joint dof (see JointFitResult::datasets).
  double dof_share = 0;
  double chi2_share = 0;  ///< ssr of the data set / dof_share (NaN if dof_share <= 0)
  /// Index, for each entry of the view's free_index, of the joint coordinate
  /// (row of JointFitResult::covariance).
  std::vector<int> coordinate;
};

struct JointFitResult {
  std::string model_id;
  FitStatus status = FitStatus::kInvalidRequest;
  std::string message = "joint fit was not run";
  int iterations = 0;
  int starts_tried = 0;
  int starts_converged = 0;

  std::vector<std::string> shared;  ///< shared parameter names, model order
  int n = 0;          ///< N, pooled points
  int p = 0;          ///< p_total, free coordinates of the joint vector
  int dof = 0;        ///< N - p_total
  double ssr = 0;     ///< pooled weighted SSR
  double chi2_reduced = 0;  ///< ssr / dof (NaN if dof = 0)
  double residual_scale = 0;  ///< sqrt(chi2_reduced)
  double variance_factor = 0;  ///< s^2 when covariance_scaled, else 1
  double aic = 0, aicc = 0, bic = 0;  ///< pooled; k = p_total (+1 when scaled), see FitResult::aic

  std::vector<JointCoordinate> coordinates;  ///< the free vector, in covariance order
  Eigen::MatrixXd covariance;   ///< SI, over `coordinates`
  Eigen::MatrixXd correlation;
  bool covariance_ok = false;
  bool covariance_scaled = true;
  bool rank_deficient = false;
  double max_abs_correlation = 0;

  /// One FitResult "view" per data set, so that consumers of a single fit
  /// (bands, report tables) can use it:
  ///  - parameters: every model parameter of that data set, shared ones
  ///    included, with standard errors from the joint covariance;
  ///  - covariance / correlation / free_index: the sub-block of the joint
  ///    covariance over the data set's free parameters, in model order (as
  ///    FitResult's free_index), shared ones included;
  ///  - residuals, ssr, rmse, r_squared: of the data set's own points; the
  ///    leverages are the diagonal of the JOINT hat matrix at those points, the
  ///    studentised residuals use the joint s;
  ///  - n = the data set's points, p = its free parameters (shared + own), but
  ///    dof = the JOINT dof N - p_total and chi2_reduced = the joint chi2_nu,
  ///    because the common noise scale s^2 (which scales the covariance) is
  ///    estimated from the pooled residuals with that many degrees of freedom;
  ///    quantiles built from a view therefore use the joint dof;
  ///  - aic, aicc, bic are NaN: information criteria belong to the joint fit.
  /// The data sets' estimates are CORRELATED through the shared parameters:
  /// anything combined across data sets (e.g. alpha of two plugs) must use the
  /// joint covariance, not the views as if independent.
  std::vector<FitResult> datasets;
  std::vector<JointDatasetInfo> info;  ///< parallel to `datasets`
  std::vector<std::string> warnings;

  bool IsUsable() const { return status == FitStatus::kConverged; }
};

/// Runs the joint fit. Thread-safe; never throws for a failing fit.
JointFitResult FitJoint(const JointFitRequest& request);

/// The single-data-set request of data set k with the joint request's model,
/// settings and options (the "separate" fit of that data set).
FitRequest SeparateRequest(const JointFitRequest& request, size_t k);

}  // namespace porofit

#include "solve_common.h"

#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <numeric>

#include "porofit/fit/diagnostics.h"

namespace porofit::fit_detail {

double IntoBounds(double t, double base, double lo, double hi, bool log) {
  if (log && !(t > 0)) t = base > 0 ? base : (hi < kInf ? 0.5 * hi : 1.0);
  if (t >= lo && t <= hi && (!log || t > 0)) return t;
  const double b = std::clamp(base, lo, hi);
  if (t < lo) return (b > lo) ? lo + 0.5 * (b - lo) : lo;
  return (b < hi) ? hi - 0.5 * (hi - b) : hi;
}

double BoxCentre(double lo, double hi, bool log) {
  return std::isfinite(lo) && std::isfinite(hi) ? 0.5 * (lo + hi)
         : std::isfinite(lo)                    ? (log ? std::max(2 * lo, 1.0) : lo + 1)
         : std::isfinite(hi)                    ? hi - 1
                                                : 0.0;
}

double PerturbStart(double b, double z, double spread, double lo, double hi, bool log) {
  const double v = (log || (lo >= 0 && b > 0)) ? b * std::exp(spread * z) : b + spread * std::max(std::abs(b), 1.0) * z;
  return IntoBounds(v, b, lo, hi, log);
}

RunEnd RunEndOf(ceres::TerminationType t) {
  switch (t) {
    case ceres::CONVERGENCE: return RunEnd::kConverged;
    case ceres::NO_CONVERGENCE: return RunEnd::kNoConvergence;
    default: return RunEnd::kFailure;
  }
}

FitStatus StatusOf(RunEnd e) {
  switch (e) {
    case RunEnd::kConverged: return FitStatus::kConverged;
    case RunEnd::kNoConvergence: return FitStatus::kMaxIterations;
    case RunEnd::kStalled: return FitStatus::kAtLimit;
    case RunEnd::kFailure: break;
  }
  return FitStatus::kNumericalFailure;
}

bool Usable(RunEnd e) { return e == RunEnd::kConverged || e == RunEnd::kNoConvergence || e == RunEnd::kStalled; }

bool IsBetterRun(const SolverRun& run, const SolverRun& best) {
  const bool usable = Usable(run.end) && std::isfinite(run.cost);
  const bool best_usable = Usable(best.end) && std::isfinite(best.cost);
  if (usable && !best_usable) return true;
  if (usable && best_usable) {
    const double tie = 1e-12 * std::max(best.cost, 1e-300);
    return run.cost < best.cost - tie || (std::abs(run.cost - best.cost) <= tie && run.end == RunEnd::kConverged &&
                                          best.end != RunEnd::kConverged);
  }
  return !usable && !best_usable && best.message.empty();  // keep the first failure's message
}

ceres::Solver::Options CeresOptions(const FitOptions& opt) {
  ceres::Solver::Options so;
  so.minimizer_type = ceres::TRUST_REGION;
  so.trust_region_strategy_type = ceres::LEVENBERG_MARQUARDT;
  so.linear_solver_type = ceres::DENSE_QR;
  so.logging_type = ceres::SILENT;
  so.minimizer_progress_to_stdout = false;
  so.max_num_iterations = opt.max_iterations;
  so.function_tolerance = opt.function_tolerance;
  so.gradient_tolerance = opt.gradient_tolerance;
  so.parameter_tolerance = opt.parameter_tolerance;
  so.num_threads = 1;
  return so;
}

Eigen::VectorXd ColumnScales(const Eigen::MatrixXd& J) {
  Eigen::VectorXd c(J.cols());
  for (Eigen::Index k = 0; k < J.cols(); ++k) {
    const double norm = J.col(k).norm();
    c(k) = norm > 0 && std::isfinite(norm) ? 1.0 / norm : 1.0;
  }
  return c;
}

CovarianceOut EigenCovariance(const Eigen::MatrixXd& J, double min_rcond) {
  CovarianceOut out;
  const Eigen::VectorXd c = ColumnScales(J);
  const Eigen::MatrixXd Js = J * c.asDiagonal();
  Eigen::JacobiSVD<Eigen::MatrixXd> svd(Js, Eigen::ComputeThinV);
  const Eigen::VectorXd& sv = svd.singularValues();
  Eigen::VectorXd inv2 = Eigen::VectorXd::Zero(J.cols());
  for (Eigen::Index k = 0; k < sv.size(); ++k) {
    const double ratio = sv(0) > 0 ? sv(k) / sv(0) : 0.0;
    if (ratio * ratio >= min_rcond) {
      inv2(k) = 1.0 / (sv(k) * sv(k));
      ++out.rank;
    }
  }
  out.cov_u = c.asDiagonal() * (svd.matrixV() * inv2.asDiagonal() * svd.matrixV().transpose()) * c.asDiagonal();
  out.ok = out.rank == J.cols() && out.cov_u.allFinite();
  out.method = "eigen-svd";
  return out;
}

void InformationCriteria(double ssr, int n_points, int p, bool scale_covariance, double& aic, double& aicc,
                         double& bic) {
  const double n = n_points;
  double k, m2lnl;  // -2 ln L up to constants shared by every model on the same data
  if (scale_covariance) {
    k = p + 1.0;
    m2lnl = n * std::log(ssr / n);
  } else {
    k = p;
    m2lnl = ssr;
  }
  aic = m2lnl + 2 * k;
  aicc = n > k + 1 ? aic + 2 * k * (k + 1) / (n - k - 1) : kNaN;
  bic = m2lnl + k * std::log(n);
}

double WeightedRSquared(const Eigen::VectorXd& y, const Eigen::VectorXd& sigma, double ssr) {
  const Eigen::VectorXd w = sigma.cwiseAbs2().cwiseInverse();
  const double ybar = w.dot(y) / w.sum();
  const double ss_tot = w.dot((y.array() - ybar).square().matrix());
  return ss_tot > 0 ? 1.0 - ssr / ss_tot : kNaN;
}

void Correlations(const Eigen::MatrixXd& cov, Eigen::MatrixXd& corr, double& max_abs) {
  const Eigen::Index p = cov.rows();
  corr.resize(p, p);
  for (Eigen::Index a = 0; a < p; ++a)
    for (Eigen::Index b = 0; b < p; ++b) {
      const double den = std::sqrt(cov(a, a) * cov(b, b));
      corr(a, b) = a == b ? 1.0 : (den > 0 ? cov(a, b) / den : kNaN);
      if (a != b && std::isfinite(corr(a, b))) max_abs = std::max(max_abs, std::abs(corr(a, b)));
    }
}

void BoundFlags(double theta, double lo, double hi, bool log, bool& at_lower, bool& at_upper) {
  const double tol_lo = 1e-6 * std::max(std::abs(lo), 1.0);
  const double tol_hi = 1e-6 * std::max(std::abs(hi), 1.0);
  at_lower = std::isfinite(lo) && !(log && lo == 0) && theta - lo <= tol_lo;
  at_upper = std::isfinite(hi) && hi - theta <= tol_hi;
}

void OrderDiagnostics(const Eigen::VectorXd& x, const Eigen::VectorXd& res, ResidualDiagnostics& d) {
  const auto n = static_cast<int>(x.size());
  std::vector<int> order(static_cast<size_t>(n));
  std::iota(order.begin(), order.end(), 0);
  std::stable_sort(order.begin(), order.end(), [&](int a, int b) { return x[a] < x[b]; });
  Eigen::VectorXd ordered(n);
  for (int i = 0; i < n; ++i) ordered(i) = res(order[static_cast<size_t>(i)]);
  const RunsTest runs = WaldWolfowitzRuns(ordered);
  d.runs = runs.runs;
  d.n_positive = runs.n_positive;
  d.n_negative = runs.n_negative;
  d.runs_z = runs.z;
  d.runs_p = runs.p;
  d.durbin_watson = DurbinWatson(ordered);
}

bool DriftWatch::Observe(double cost, const double* u) {
  costs_.push_back(cost);
  us_.insert(us_.end(), u, u + p_);
  if (static_cast<int>(costs_.size()) > kWindow + 1) {
    costs_.erase(costs_.begin());
    us_.erase(us_.begin(), us_.begin() + p_);
  }
  if (static_cast<int>(costs_.size()) < kWindow + 1) return false;
  const double c0 = costs_.front(), c1 = costs_.back();
  if (!(c1 > 0) || !(c0 - c1 <= kStallRelative * c1)) return false;
  for (int k = 0; k < p_; ++k) {
    if (!watched_[static_cast<size_t>(k)]) continue;
    int up = 0, down = 0;
    for (int t = 0; t < kWindow; ++t) {
      const double a = us_[static_cast<size_t>(t * p_ + k)], b = us_[static_cast<size_t>((t + 1) * p_ + k)];
      up += b > a ? 1 : 0;
      down += b < a ? 1 : 0;
    }
    const double first = us_[static_cast<size_t>(k)], last = us_[static_cast<size_t>(kWindow * p_ + k)];
    if ((up == kWindow || down == kWindow) && std::abs(last - first) >= kMinRun) {
      coordinate_ = k;
      downwards_ = down == kWindow;
      from_ = first;
      to_ = last;
      relative_ = (c0 - c1) / c1;
      return true;
    }
  }
  return false;
}

}  // namespace porofit::fit_detail

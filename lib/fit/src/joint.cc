#include "porofit/fit/joint.h"

#include <ceres/ceres.h>

#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <numeric>
#include <optional>
#include <random>
#include <utility>

#include "porofit/core/error.h"
#include "porofit/fit/diagnostics.h"
#include "solve_common.h"

namespace porofit {
namespace {

using namespace fit_detail;
using RowMajor = RowMajorMatrix;

struct Dataset {
  Eigen::VectorXd x, y, sigma;  // working units
  int first = 0;                // offset in the pooled residual vector
  std::vector<double> heuristic;  // working units; empty if the heuristic failed
  std::vector<double> fixed_value;  // working units, per model parameter (valid where fixed)
  std::vector<int> coord;         // joint coordinate of each model parameter, -1 if fixed
};

// Everything the solver needs, in working units; one per FitJoint() call.
struct Setup {
  const ModelSpec* model = nullptr;
  int np = 0, n = 0, nc = 0;  // model parameters, pooled points, joint coordinates
  std::vector<double> lower, upper;
  std::vector<bool> fixed, log, shared;
  std::vector<std::optional<double>> user_fixed, user_start;
  std::vector<Dataset> data;
  std::vector<int> coord_param, coord_dataset;  // per coordinate: model index, data set (-1 shared)
};

void ThetaOf(const Setup& s, size_t k, const double* u, double* theta) {
  const Dataset& d = s.data[k];
  for (int j = 0; j < s.np; ++j) {
    const int c = d.coord[static_cast<size_t>(j)];
    if (c < 0) {
      theta[j] = d.fixed_value[static_cast<size_t>(j)];
    } else {
      theta[j] = s.log[static_cast<size_t>(j)] ? std::exp(u[c]) : u[c];
    }
  }
}

// Pooled weighted residuals of every data set with the exact Jacobian
// (row-major, N x nc; a data set's rows are zero outside its coordinates).
class JointResiduals final : public ceres::CostFunction {
 public:
  explicit JointResiduals(const Setup& s) : s_(s), theta_(static_cast<size_t>(s.np)), grad_(static_cast<size_t>(s.np)) {
    set_num_residuals(s.n);
    mutable_parameter_block_sizes()->push_back(s.nc);
  }
  bool Evaluate(double const* const* parameters, double* residuals, double** jacobians) const override {
    return EvaluateAt(parameters[0], residuals, jacobians != nullptr ? jacobians[0] : nullptr);
  }
  bool EvaluateAt(const double* u, double* residuals, double* jacobian) const {
    try {
      return EvaluateUnchecked(u, residuals, jacobian);
    } catch (const std::exception& e) {
      if (error_.empty()) error_ = std::string("model threw: ") + e.what();
      return false;
    } catch (...) {
      if (error_.empty()) error_ = "model threw an unknown exception";
      return false;
    }
  }
  const std::string& error() const { return error_; }

 private:
  bool EvaluateUnchecked(const double* u, double* residuals, double* jacobian) const {
    const ModelSpec& m = *s_.model;
    if (jacobian != nullptr) std::fill(jacobian, jacobian + static_cast<std::ptrdiff_t>(s_.n) * s_.nc, 0.0);
    for (size_t k = 0; k < s_.data.size(); ++k) {
      const Dataset& d = s_.data[k];
      ThetaOf(s_, k, u, theta_.data());
      for (Eigen::Index t = 0; t < d.x.size(); ++t) {
        const int i = d.first + static_cast<int>(t);
        const double inv_sigma = 1.0 / d.sigma[t];
        const double f = m.value_and_gradient(theta_.data(), d.x[t], grad_.data());
        residuals[i] = (d.y[t] - f) * inv_sigma;
        if (!std::isfinite(residuals[i])) return false;
        if (jacobian == nullptr) continue;
        double* row = jacobian + static_cast<std::ptrdiff_t>(i) * s_.nc;
        for (int j = 0; j < s_.np; ++j) {
          const int c = d.coord[static_cast<size_t>(j)];
          if (c < 0) continue;
          const double g = s_.log[static_cast<size_t>(j)] ? grad_[static_cast<size_t>(j)] * theta_[static_cast<size_t>(j)]
                                                          : grad_[static_cast<size_t>(j)];
          row[c] = -g * inv_sigma;
          if (!std::isfinite(row[c])) return false;
        }
      }
    }
    return true;
  }

  const Setup& s_;
  mutable std::vector<double> theta_, grad_;
  mutable std::string error_;
};

std::string Si(double working, const ParameterSpec& ps) {
  return FormatNumber(working * ps.si_factor) + " (SI)";
}

std::string Label(const JointFitRequest& req, size_t k) {
  return k < req.labels.size() && !req.labels[k].empty() ? req.labels[k] : std::to_string(k + 1);
}

double Median(std::vector<double> v) {
  if (v.empty()) return kNaN;
  std::sort(v.begin(), v.end());
  const size_t h = v.size() / 2;
  return v.size() % 2 == 1 ? v[h] : 0.5 * (v[h - 1] + v[h]);
}

// Validates the request and fills the setup (working units). Returns "" or the reason.
std::string Prepare(const JointFitRequest& req, Setup& s, FitStatus& status) {
  status = FitStatus::kInvalidRequest;
  const ModelSpec& m = *req.model;
  if (!m.value_and_gradient) return "model " + m.id + " has no value_and_gradient";
  if (!(m.x_si_factor > 0) || !(m.y_si_factor > 0)) return "model " + m.id + " has a non-positive unit factor";
  if (req.options.loss != RobustLoss::kNone)
    return "joint fits support plain least squares only (loss = " + std::string(ToString(req.options.loss)) + ")";
  if (req.datasets.empty()) return "joint fit has no data sets";
  s.model = &m;
  s.np = static_cast<int>(m.parameters.size());
  std::vector<std::string> names;
  for (const auto& p : m.parameters) names.push_back(p.name);

  s.shared.assign(static_cast<size_t>(s.np), false);
  for (const std::string& name : req.shared) {
    const int j = m.ParameterIndex(name);
    if (j < 0) {
      std::string msg = "shared parameter '" + name + "' is not a parameter of model " + m.id;
      const std::string near = NearestWord(name, names);
      if (!near.empty()) msg += " (did you mean '" + near + "'?)";
      return msg;
    }
    if (s.shared[static_cast<size_t>(j)]) return "shared parameter '" + name + "' is listed twice";
    s.shared[static_cast<size_t>(j)] = true;
  }
  std::vector<const ParameterSetting*> setting(static_cast<size_t>(s.np), nullptr);
  for (const auto& [name, value] : req.settings) {
    const int j = m.ParameterIndex(name);
    if (j < 0) {
      std::string msg = "setting for unknown parameter '" + name + "' of model " + m.id;
      const std::string near = NearestWord(name, names);
      if (!near.empty()) msg += " (did you mean '" + near + "'?)";
      return msg;
    }
    setting[static_cast<size_t>(j)] = &value;
  }

  const auto np = static_cast<size_t>(s.np);
  s.lower.resize(np);
  s.upper.resize(np);
  s.fixed.assign(np, false);
  s.log.assign(np, false);
  s.user_fixed.assign(np, std::nullopt);
  s.user_start.assign(np, std::nullopt);
  for (size_t j = 0; j < np; ++j) {
    const ParameterSpec& ps = m.parameters[j];
    const ParameterSetting* st = setting[j];
    const double f = ps.si_factor;
    const std::string who = ps.name + ": ";
    s.log[j] = ps.transform == ParameterTransform::kLog;
    s.lower[j] = ps.lower;
    s.upper[j] = ps.upper;
    if (st != nullptr) {
      if (st->lower) {
        if (std::isnan(*st->lower)) return who + "lower = nan is not a number";
        s.lower[j] = *st->lower / f;
      }
      if (st->upper) {
        if (std::isnan(*st->upper)) return who + "upper = nan is not a number";
        s.upper[j] = *st->upper / f;
      }
    }
    if (s.log[j]) s.lower[j] = std::max(s.lower[j], 0.0);
    s.fixed[j] = ps.fixed_by_default && !(st != nullptr && st->free);
    if (st != nullptr && st->fixed) {
      if (!std::isfinite(*st->fixed)) return who + "fixed value " + FormatNumber(*st->fixed) + " is not finite";
      s.fixed[j] = true;
      s.user_fixed[j] = *st->fixed / f;
    }
    if (st != nullptr && st->start) {
      if (!std::isfinite(*st->start)) return who + "start = " + FormatNumber(*st->start) + " is not finite";
      s.user_start[j] = *st->start / f;
    }
    if (s.fixed[j]) {
      if (!s.user_fixed[j] && s.user_start[j]) s.user_fixed[j] = s.user_start[j];
      if (s.user_fixed[j] && !(*s.user_fixed[j] >= s.lower[j] && *s.user_fixed[j] <= s.upper[j]))
        return who + "fixed value " + Si(*s.user_fixed[j], ps) + " is outside its bounds [" + Si(s.lower[j], ps) +
               ", " + Si(s.upper[j], ps) + "]";
      s.log[j] = false;
    } else {
      if (!(s.lower[j] < s.upper[j]))
        return who + "lower = " + Si(s.lower[j], ps) + " is not below upper = " + Si(s.upper[j], ps);
      if (s.user_start[j] && !(*s.user_start[j] >= s.lower[j] && *s.user_start[j] <= s.upper[j]))
        return who + "start = " + Si(*s.user_start[j], ps) + " is outside its bounds [" + Si(s.lower[j], ps) + ", " +
               Si(s.upper[j], ps) + "]";
      if (s.log[j] && s.user_start[j] && !(*s.user_start[j] > 0))
        return who + "start = " + Si(*s.user_start[j], ps) + " violates start > 0 (fitted as a logarithm)";
    }
  }

  // Data in working units, and each data set's heuristic start.
  s.data.resize(req.datasets.size());
  for (size_t k = 0; k < req.datasets.size(); ++k) {
    const FitData& fd = req.datasets[k];
    Dataset& d = s.data[k];
    const std::string at0 = "data set " + Label(req, k) + ": ";
    if (fd.x.size() != fd.y.size())
      return at0 + std::to_string(fd.x.size()) + " x values but " + std::to_string(fd.y.size()) + " y values";
    if (!fd.sigma.empty() && fd.sigma.size() != fd.y.size())
      return at0 + std::to_string(fd.y.size()) + " y values but " + std::to_string(fd.sigma.size()) + " sigma values";
    if (fd.x.empty()) return at0 + "has no data points";
    const auto nk = static_cast<Eigen::Index>(fd.x.size());
    d.x.resize(nk);
    d.y.resize(nk);
    d.sigma.resize(nk);
    d.first = s.n;
    for (Eigen::Index i = 0; i < nk; ++i) {
      const auto ii = static_cast<size_t>(i);
      const std::string at = at0 + "point " + std::to_string(i + 1) + ": ";
      if (!std::isfinite(fd.x[ii])) return at + "x = " + FormatNumber(fd.x[ii]) + " is not finite";
      if (!std::isfinite(fd.y[ii])) return at + "y = " + FormatNumber(fd.y[ii]) + " is not finite";
      if (m.requires_positive_x && !(fd.x[ii] > 0))
        return at + "x = " + FormatNumber(fd.x[ii]) + " violates x > 0 (model " + m.id + " is undefined at x <= 0)";
      d.x[i] = fd.x[ii] / m.x_si_factor;
      d.y[i] = fd.y[ii] / m.y_si_factor;
      if (fd.sigma.empty()) {
        d.sigma[i] = 1.0;
      } else {
        if (!(std::isfinite(fd.sigma[ii]) && fd.sigma[ii] > 0))
          return at + "sigma = " + FormatNumber(fd.sigma[ii]) + " violates sigma > 0";
        d.sigma[i] = fd.sigma[ii] / m.y_si_factor;
      }
    }
    s.n += static_cast<int>(nk);
    if (m.start) {
      try {
        std::vector<double> xs(d.x.data(), d.x.data() + nk), ys(d.y.data(), d.y.data() + nk);
        d.heuristic = m.start(xs, ys);
      } catch (const std::exception&) {
        d.heuristic.clear();
      }
      bool finite = d.heuristic.size() == np;
      for (double v : d.heuristic) finite = finite && std::isfinite(v);
      if (!finite) d.heuristic.clear();
    }
  }

  // Fixed values per data set: the setting's, else (fixed by default) the
  // heuristic's -- the median over the data sets when the parameter is shared.
  for (size_t j = 0; j < np; ++j) {
    if (!s.fixed[j]) continue;
    std::vector<double> h;
    for (const Dataset& d : s.data)
      if (!d.heuristic.empty()) h.push_back(d.heuristic[j]);
    for (size_t k = 0; k < s.data.size(); ++k) {
      Dataset& d = s.data[k];
      d.fixed_value.resize(np, kNaN);
      double v = kNaN;
      if (s.user_fixed[j]) {
        v = *s.user_fixed[j];
      } else if (s.shared[j]) {
        v = Median(h);
      } else if (!d.heuristic.empty()) {
        v = d.heuristic[j];
      }
      if (!std::isfinite(v))
        return m.parameters[j].name + " is fixed but has no value or start (data set " + Label(req, k) + ")";
      if (!(v >= s.lower[j] && v <= s.upper[j]))
        return m.parameters[j].name + ": fixed value from the start is outside its bounds";
      d.fixed_value[j] = v;
    }
  }
  for (Dataset& d : s.data) d.fixed_value.resize(np, kNaN);

  // The joint vector: free shared parameters, then each data set's own.
  for (Dataset& d : s.data) d.coord.assign(np, -1);
  for (size_t j = 0; j < np; ++j) {
    if (s.fixed[j] || !s.shared[j]) continue;
    for (Dataset& d : s.data) d.coord[j] = s.nc;
    s.coord_param.push_back(static_cast<int>(j));
    s.coord_dataset.push_back(-1);
    ++s.nc;
  }
  for (size_t k = 0; k < s.data.size(); ++k) {
    for (size_t j = 0; j < np; ++j) {
      if (s.fixed[j] || s.shared[j]) continue;
      s.data[k].coord[j] = s.nc;
      s.coord_param.push_back(static_cast<int>(j));
      s.coord_dataset.push_back(static_cast<int>(k));
      ++s.nc;
    }
  }
  if (s.n < s.nc) {
    status = FitStatus::kTooFewPoints;
    return std::to_string(s.n) + " pooled data points violate N >= p = " + std::to_string(s.nc) +
           " free parameters";
  }
  return {};
}

}  // namespace

FitRequest SeparateRequest(const JointFitRequest& request, size_t k) {
  FitRequest r;
  r.model = request.model;
  if (k < request.datasets.size()) r.data = request.datasets[k];
  r.settings = request.settings;
  r.options = request.options;
  return r;
}

JointFitResult FitJoint(const JointFitRequest& req) {
  JointFitResult r;
  if (req.model == nullptr) {
    r.message = "joint fit request has no model";
    return r;
  }
  const ModelSpec& m = *req.model;
  const FitOptions& opt = req.options;
  r.model_id = m.id;
  r.covariance_scaled = opt.scale_covariance;
  if (std::string bad = opt.Validate(); !bad.empty()) {
    r.message = bad;
    return r;
  }
  Setup s;
  FitStatus prep_status;
  if (std::string bad = Prepare(req, s, prep_status); !bad.empty()) {
    r.status = prep_status;
    r.message = bad;
    return r;
  }
  const auto np = static_cast<size_t>(s.np);
  for (size_t j = 0; j < np; ++j)
    if (s.shared[j]) r.shared.push_back(m.parameters[j].name);
  r.n = s.n;
  r.p = s.nc;
  r.dof = s.n - s.nc;

  // ---- starts (working units, per coordinate): shared = median of the data
  // sets' heuristics, own = the data set's heuristic; a user start wins.
  std::vector<double> base(static_cast<size_t>(s.nc), kNaN);
  for (int c = 0; c < s.nc; ++c) {
    const auto j = static_cast<size_t>(s.coord_param[static_cast<size_t>(c)]);
    const int k = s.coord_dataset[static_cast<size_t>(c)];
    double v = kNaN;
    if (s.user_start[j]) {
      v = *s.user_start[j];
    } else if (k < 0) {
      std::vector<double> h;
      for (const Dataset& d : s.data)
        if (!d.heuristic.empty()) h.push_back(d.heuristic[j]);
      v = Median(h);
    } else if (!s.data[static_cast<size_t>(k)].heuristic.empty()) {
      v = s.data[static_cast<size_t>(k)].heuristic[j];
    }
    if (!std::isfinite(v)) {
      r.message = "no starting point for " + m.parameters[j].name +
                  (k < 0 ? std::string(" (no data set's heuristic worked)")
                         : " of data set " + Label(req, static_cast<size_t>(k)) + " (its heuristic failed)");
      return r;
    }
    const double lo = s.lower[j], hi = s.upper[j];
    base[static_cast<size_t>(c)] = s.user_start[j] ? v : IntoBounds(v, BoxCentre(lo, hi, s.log[j]), lo, hi, s.log[j]);
  }
  std::vector<std::vector<double>> starts{base};
  {
    std::mt19937_64 rng(opt.seed);
    std::normal_distribution<double> normal(0.0, 1.0);
    for (int t = 1; t < opt.multistart; ++t) {
      std::vector<double> st = base;
      for (int c = 0; c < s.nc; ++c) {
        const auto j = static_cast<size_t>(s.coord_param[static_cast<size_t>(c)]);
        if (s.user_start[j]) continue;
        st[static_cast<size_t>(c)] =
            PerturbStart(base[static_cast<size_t>(c)], normal(rng), opt.start_spread, s.lower[j], s.upper[j], s.log[j]);
      }
      starts.push_back(std::move(st));
    }
  }

  // ---- the solver problem: one block of nc coordinates, one residual block.
  JointResiduals cost(s);
  std::vector<double> u(static_cast<size_t>(std::max(s.nc, 1)));
  auto to_u = [&](const std::vector<double>& theta_c) {
    for (int c = 0; c < s.nc; ++c) {
      const auto j = static_cast<size_t>(s.coord_param[static_cast<size_t>(c)]);
      u[static_cast<size_t>(c)] = s.log[j] ? std::log(theta_c[static_cast<size_t>(c)]) : theta_c[static_cast<size_t>(c)];
    }
  };
  ceres::Problem::Options po;
  po.cost_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  ceres::Problem problem(po);
  if (s.nc > 0) {
    problem.AddResidualBlock(&cost, nullptr, u.data());
    for (int c = 0; c < s.nc; ++c) {
      const auto j = static_cast<size_t>(s.coord_param[static_cast<size_t>(c)]);
      double lo = s.lower[j], hi = s.upper[j];
      if (s.log[j]) {
        lo = lo > 0 ? std::log(lo) : -kInf;
        hi = hi < kInf ? std::log(hi) : kInf;
      }
      if (std::isfinite(lo)) problem.SetParameterLowerBound(u.data(), c, lo);
      if (std::isfinite(hi)) problem.SetParameterUpperBound(u.data(), c, hi);
    }
  }
  const ceres::Solver::Options so = CeresOptions(opt);
  SolverRun best;
  std::vector<double> res0(static_cast<size_t>(s.n)), jac0(static_cast<size_t>(s.n) * static_cast<size_t>(std::max(s.nc, 1)));
  for (const std::vector<double>& st : starts) {
    SolverRun run;
    run.start = st;
    r.starts_tried += 1;
    to_u(st);
    if (!cost.EvaluateAt(u.data(), res0.data(), s.nc > 0 ? jac0.data() : nullptr)) {
      run.message = cost.error().empty() ? "model or its derivative is not finite at the start" : cost.error();
      if (best.message.empty() && !Usable(best.end)) best = run;
      continue;
    }
    if (s.nc == 0) {
      run.cost = 0.5 * std::inner_product(res0.begin(), res0.end(), res0.begin(), 0.0);
      run.end = RunEnd::kConverged;
      run.message = "all parameters fixed: nothing to solve";
    } else {
      ceres::Solver::Summary sum;
      ceres::Solve(so, &problem, &sum);
      run.iterations = static_cast<int>(sum.iterations.size()) - 1;
      run.end = RunEndOf(sum.termination_type);
      run.cost = sum.final_cost;
      run.message = sum.message;
      if (!cost.error().empty()) run.message = cost.error();
    }
    run.u.assign(u.begin(), u.begin() + s.nc);
    if (run.end == RunEnd::kConverged) r.starts_converged += 1;
    if (IsBetterRun(run, best)) best = std::move(run);
  }
  r.status = StatusOf(best.end);
  r.iterations = best.iterations;
  r.message = best.message;
  if (!(Usable(best.end) && std::isfinite(best.cost))) {
    r.status = FitStatus::kNumericalFailure;
    if (r.message.empty()) r.message = "no start gave a finite cost";
    return r;
  }

  // ---- solution, residuals and Jacobian.
  std::copy(best.u.begin(), best.u.end(), u.begin());
  Eigen::VectorXd res(s.n);
  RowMajor jac(s.n, std::max(s.nc, 1));
  if (!cost.EvaluateAt(u.data(), res.data(), s.nc > 0 ? jac.data() : nullptr)) {
    r.status = FitStatus::kNumericalFailure;
    r.message = "model or its derivative is not finite at the solution";
    return r;
  }
  const Eigen::MatrixXd J = jac.leftCols(s.nc);
  std::vector<std::vector<double>> theta(s.data.size(), std::vector<double>(np));
  for (size_t k = 0; k < s.data.size(); ++k) ThetaOf(s, k, u.data(), theta[k].data());

  r.ssr = res.squaredNorm();
  r.chi2_reduced = r.dof > 0 ? r.ssr / r.dof : kNaN;
  r.residual_scale = std::sqrt(r.chi2_reduced);
  r.variance_factor = opt.scale_covariance ? r.chi2_reduced : 1.0;
  InformationCriteria(r.ssr, s.n, s.nc, opt.scale_covariance, r.aic, r.aicc, r.bic);

  // ---- coordinates and the joint covariance (SI).
  Eigen::VectorXd dtheta(s.nc);
  for (int c = 0; c < s.nc; ++c) {
    const auto j = static_cast<size_t>(s.coord_param[static_cast<size_t>(c)]);
    const int k = s.coord_dataset[static_cast<size_t>(c)];
    const double t = theta[static_cast<size_t>(std::max(k, 0))][j];
    JointCoordinate q;
    q.name = m.parameters[j].name;
    q.model_index = static_cast<int>(j);
    q.dataset = k;
    q.label = k < 0 ? q.name : q.name + "[" + Label(req, static_cast<size_t>(k)) + "]";
    q.estimate = t * m.parameters[j].si_factor;
    q.std_error = kNaN;
    r.coordinates.push_back(q);
    dtheta(c) = (s.log[j] ? t : 1.0) * m.parameters[j].si_factor;
  }
  if (opt.covariance && s.nc > 0) {
    const CovarianceOut cov = EigenCovariance(J, opt.min_reciprocal_condition);
    const Eigen::MatrixXd& cov_u = cov.cov_u;
    r.rank_deficient = cov.rank < s.nc;
    r.covariance = dtheta.asDiagonal() * cov_u * dtheta.asDiagonal();
    if (opt.scale_covariance) r.covariance *= r.variance_factor;
    r.covariance_ok = !r.rank_deficient && r.covariance.allFinite();
    for (int a = 0; a < s.nc; ++a) r.coordinates[static_cast<size_t>(a)].std_error = std::sqrt(r.covariance(a, a));
    Correlations(r.covariance, r.correlation, r.max_abs_correlation);
    if (r.max_abs_correlation > opt.correlation_threshold)
      r.warnings.push_back("|correlation| = " + FormatRounded(r.max_abs_correlation) + " exceeds " +
                           FormatNumber(opt.correlation_threshold) + ": parameters are not separately identifiable");
    if (r.rank_deficient)
      r.warnings.push_back("J^T W J of the joint fit is rank deficient (reciprocal condition below " +
                           FormatNumber(opt.min_reciprocal_condition) + "): covariance from a pseudo-inverse");
  }
  if (r.status == FitStatus::kMaxIterations)
    r.warnings.push_back("stopped at the iteration limit (" + std::to_string(opt.max_iterations) + ")");

  // ---- per-data-set views.
  const Eigen::VectorXd leverage = opt.residual_diagnostics && s.nc > 0 ? Leverages(J) : Eigen::VectorXd();
  for (size_t k = 0; k < s.data.size(); ++k) {
    const Dataset& d = s.data[k];
    const auto nk = static_cast<int>(d.x.size());
    FitResult v;
    JointDatasetInfo info;
    info.label = Label(req, k);
    info.n = nk;
    v.model_id = m.id;
    v.status = r.status;
    v.message = "joint fit (" + std::to_string(s.data.size()) + " data sets): " + r.message;
    v.iterations = r.iterations;
    v.starts_tried = r.starts_tried;
    v.starts_converged = r.starts_converged;
    v.parameters.resize(np);
    for (size_t j = 0; j < np; ++j) {
      const ParameterSpec& ps = m.parameters[j];
      ParameterResult& q = v.parameters[j];
      q.name = ps.name;
      q.unit = ps.unit;
      q.si_factor = ps.si_factor;
      q.fixed = s.fixed[j];
      q.lower = s.lower[j] * ps.si_factor;
      q.upper = s.upper[j] * ps.si_factor;
      q.estimate = theta[k][j] * ps.si_factor;
      const int c = d.coord[j];
      if (c >= 0) {
        const double st = best.start[static_cast<size_t>(c)];
        q.start = st * ps.si_factor;
        q.std_error = r.coordinates[static_cast<size_t>(c)].std_error;
        BoundFlags(theta[k][j], s.lower[j], s.upper[j], s.log[j], q.at_lower, q.at_upper);
        v.free_index.push_back(static_cast<int>(j));
        info.coordinate.push_back(c);
        if (!s.shared[j]) info.p_own += 1;
      } else {
        q.start = q.estimate;
        q.std_error = 0.0;
      }
      if (q.at_lower) v.warnings.push_back(q.name + " = " + FormatNumber(theta[k][j]) + " " + q.unit + " is at its lower bound");
      if (q.at_upper) v.warnings.push_back(q.name + " = " + FormatNumber(theta[k][j]) + " " + q.unit + " is at its upper bound");
    }
    const auto pk = static_cast<Eigen::Index>(v.free_index.size());
    v.n = nk;
    v.p = static_cast<int>(pk);
    v.dof = r.dof;
    const Eigen::VectorXd rk = res.segment(d.first, nk);
    v.ssr = rk.squaredNorm();
    v.chi2_reduced = r.chi2_reduced;
    v.chi2_reduced_robust = r.chi2_reduced;
    v.residual_scale = r.residual_scale;
    v.variance_factor = r.variance_factor;
    v.covariance_scaled = r.covariance_scaled;
    v.aic = v.aicc = v.bic = kNaN;
    const Eigen::VectorXd fitted_w = d.y - rk.cwiseProduct(d.sigma);
    const Eigen::VectorXd raw = (d.y - fitted_w) * m.y_si_factor;
    v.rmse = std::sqrt(raw.squaredNorm() / nk);
    v.r_squared = WeightedRSquared(d.y, d.sigma, v.ssr);
    const int p_shared = static_cast<int>(pk) - info.p_own;
    info.dof_share = nk - info.p_own - static_cast<double>(p_shared) * nk / s.n;
    info.chi2_share = info.dof_share > 0 ? v.ssr / info.dof_share : kNaN;
    if (r.covariance.size() > 0) {
      v.covariance.resize(pk, pk);
      v.correlation.resize(pk, pk);
      for (Eigen::Index a = 0; a < pk; ++a)
        for (Eigen::Index b = 0; b < pk; ++b) {
          v.covariance(a, b) = r.covariance(info.coordinate[static_cast<size_t>(a)], info.coordinate[static_cast<size_t>(b)]);
          v.correlation(a, b) = r.correlation(info.coordinate[static_cast<size_t>(a)], info.coordinate[static_cast<size_t>(b)]);
          if (a != b && std::isfinite(v.correlation(a, b)))
            v.max_abs_correlation = std::max(v.max_abs_correlation, std::abs(v.correlation(a, b)));
        }
      v.covariance_ok = r.covariance_ok;
      v.covariance_method = "eigen-svd";
      v.rank_deficient = r.rank_deficient;
      v.high_correlation = v.max_abs_correlation > opt.correlation_threshold;
    }
    const int cp = m.closure_parameter;
    const bool closure_free = cp < 0 || cp >= s.np || !s.fixed[static_cast<size_t>(cp)];
    if (m.has_closure_pressure() && closure_free) {
      const double pc = m.ClosurePressure(theta[k].data());
      const double pmin = d.x.minCoeff(), pmax = d.x.maxCoeff(), f = opt.closure_range_factor;
      if (std::isfinite(pc) && (pc < pmin / f || pc > f * pmax)) {
        v.closure_outside_range = true;
        v.warnings.push_back("closure pressure " + FormatNumber(pc) + " " + m.x_unit + " is outside [P_min/" +
                             FormatNumber(f) + ", " + FormatNumber(f) + " P_max] of this data set");
      }
    }
    for (const std::string& w : r.warnings) v.warnings.push_back("joint fit: " + w);
    if (opt.residual_diagnostics) {
      ResidualDiagnostics& rd = v.residuals;
      rd.x = d.x * m.x_si_factor;
      rd.observed = d.y * m.y_si_factor;
      rd.fitted = fitted_w * m.y_si_factor;
      rd.sigma = d.sigma * m.y_si_factor;
      rd.raw = raw;
      rd.leverage = leverage.size() == s.n ? Eigen::VectorXd(leverage.segment(d.first, nk)) : Eigen::VectorXd::Zero(nk);
      rd.standardized = StudentizedResiduals(rd.raw, rd.sigma, rd.leverage, r.residual_scale);
      rd.robust_weight = Eigen::VectorXd::Ones(nk);
      OrderDiagnostics(d.x, rk, rd);
    }
    r.datasets.push_back(std::move(v));
    r.info.push_back(std::move(info));
  }
  return r;
}

}  // namespace porofit

#include "porofit/fit/fitter.h"

#include <ceres/ceres.h>

#include <Eigen/SVD>
#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <memory>
#include <numeric>
#include <random>
#include <utility>

#include "porofit/core/error.h"
#include "porofit/fit/diagnostics.h"
#include "compact_lm.h"
#include "solve_common.h"

namespace porofit {
namespace {

using namespace fit_detail;

// Everything the solver needs, in the model's working units. Built once per
// Fit() call from the request; never shared between calls.
struct Setup {
  const ModelSpec* model = nullptr;
  int n = 0;          // data points
  int np = 0;         // model parameters
  int nf = 0;         // free parameters = solver coordinates
  Eigen::VectorXd x, y, sigma;  // working units
  std::vector<double> lower, upper;  // working units, per model parameter
  std::vector<bool> fixed;
  std::vector<double> fixed_value;   // working units, valid where fixed
  std::vector<std::optional<double>> user_start;  // working units
  std::vector<bool> log;             // solver works on ln(theta)
  std::vector<int> free_index;       // model index of each solver coordinate
};

// theta (working) from solver coordinates u.
void ToTheta(const Setup& s, const double* u, double* theta) {
  for (int j = 0; j < s.np; ++j)
    if (s.fixed[j]) theta[j] = s.fixed_value[j];
  for (int k = 0; k < s.nf; ++k) {
    const int j = s.free_index[k];
    theta[j] = s.log[j] ? std::exp(u[k]) : u[k];
  }
}

void ToSolver(const Setup& s, const double* theta, double* u) {
  for (int k = 0; k < s.nf; ++k) {
    const int j = s.free_index[k];
    u[k] = s.log[j] ? std::log(theta[j]) : theta[j];
  }
}

// Weighted residuals r_i = (y_i - f(x_i)) / sigma_i of points [first, first +
// count), with the exact Jacobian from the model's value_and_gradient, chained
// through the log transform (dtheta/du = theta). Plain least squares uses one
// block for all n points. A robust loss needs one block per point, because
// Ceres applies the loss to the squared norm of a whole block. Scratch buffers
// are per instance: one instance belongs to one Fit() call, and the solver
// runs single-threaded.
class WeightedResiduals final : public ceres::CostFunction {
 public:
  WeightedResiduals(const Setup& s, int first, int count)
      : s_(s), first_(first), count_(count), theta_(s.np), grad_(s.np) {
    set_num_residuals(count);
    mutable_parameter_block_sizes()->push_back(s.nf);
  }
  explicit WeightedResiduals(const Setup& s) : WeightedResiduals(s, 0, s.n) {}

  bool Evaluate(double const* const* parameters, double* residuals, double** jacobians) const override {
    return EvaluateAt(parameters[0], residuals, jacobians != nullptr ? jacobians[0] : nullptr);
  }

  // Row-major jacobian (count x nf) when non-null. An exception from the
  // model is caught here and kept as the failure message.
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

  bool EvaluateUnchecked(const double* u, double* residuals, double* jacobian) const {
    ToTheta(s_, u, theta_.data());
    const ModelSpec& m = *s_.model;
    for (int t = 0; t < count_; ++t) {
      const int i = first_ + t;
      const double inv_sigma = 1.0 / s_.sigma[i];
      double f;
      if (jacobian != nullptr) {
        f = m.value_and_gradient(theta_.data(), s_.x[i], grad_.data());
        double* row = jacobian + static_cast<std::ptrdiff_t>(t) * s_.nf;
        for (int k = 0; k < s_.nf; ++k) {
          const int j = s_.free_index[k];
          const double d = s_.log[j] ? grad_[j] * theta_[j] : grad_[j];
          row[k] = -d * inv_sigma;
          if (!std::isfinite(row[k])) return false;
        }
      } else {
        f = m.value ? m.value(theta_.data(), s_.x[i]) : m.value_and_gradient(theta_.data(), s_.x[i], grad_.data());
      }
      residuals[t] = (s_.y[i] - f) * inv_sigma;
      if (!std::isfinite(residuals[t])) return false;
    }
    return true;
  }

  const std::string& error() const { return error_; }

 private:
  const Setup& s_;
  int first_, count_;
  mutable std::vector<double> theta_, grad_;
  mutable std::string error_;
};

std::string ParamLabel(const ModelSpec& m, int j) { return m.parameters[j].name; }

// "value unit" of a working-unit value shown in SI.
std::string Si(double working, double factor, const char* unit) {
  return FormatNumber(working * factor) + " " + unit;
}

FitResult Invalid(FitResult r, FitStatus status, std::string message) {
  r.status = status;
  r.message = std::move(message);
  return r;
}

// Validates the request and converts it to working units. Returns an empty
// string on success, otherwise the reason.
std::string Prepare(const FitRequest& req, Setup& s, FitStatus& status) {
  status = FitStatus::kInvalidRequest;
  const ModelSpec& m = *req.model;
  if (!m.value_and_gradient) return "model " + m.id + " has no value_and_gradient";
  if (!(m.x_si_factor > 0) || !(m.y_si_factor > 0)) return "model " + m.id + " has a non-positive unit factor";
  const FitData& d = req.data;
  if (d.x.size() != d.y.size())
    return "data have " + std::to_string(d.x.size()) + " x values but " + std::to_string(d.y.size()) + " y values";
  if (!d.sigma.empty() && d.sigma.size() != d.y.size())
    return "data have " + std::to_string(d.y.size()) + " y values but " + std::to_string(d.sigma.size()) +
           " sigma values";
  s.model = &m;
  s.n = static_cast<int>(d.x.size());
  s.np = static_cast<int>(m.parameters.size());
  s.x.resize(s.n);
  s.y.resize(s.n);
  s.sigma.resize(s.n);
  for (int i = 0; i < s.n; ++i) {
    const std::string at = "data point " + std::to_string(i + 1) + ": ";
    if (!std::isfinite(d.x[i])) return at + "x = " + FormatNumber(d.x[i]) + " is not finite";
    if (!std::isfinite(d.y[i])) return at + "y = " + FormatNumber(d.y[i]) + " is not finite";
    if (m.requires_positive_x && !(d.x[i] > 0))
      return at + "x = " + FormatNumber(d.x[i]) + " violates x > 0 (model " + m.id + " is undefined at x <= 0)";
    s.x[i] = d.x[i] / m.x_si_factor;
    s.y[i] = d.y[i] / m.y_si_factor;
    if (d.sigma.empty()) {
      s.sigma[i] = 1.0;
    } else {
      if (!(std::isfinite(d.sigma[i]) && d.sigma[i] > 0))
        return at + "sigma = " + FormatNumber(d.sigma[i]) + " violates sigma > 0";
      s.sigma[i] = d.sigma[i] / m.y_si_factor;
    }
  }

  // Settings by name; an unknown name is a typo to report, not to ignore.
  std::vector<const ParameterSetting*> setting(s.np, nullptr);
  for (const auto& [name, value] : req.settings) {
    int j = -1;
    for (int k = 0; k < s.np; ++k)
      if (m.parameters[k].name == name) j = k;
    if (j < 0) {
      std::vector<std::string> names;
      for (const auto& p : m.parameters) names.push_back(p.name);
      std::string msg = "setting for unknown parameter '" + name + "' of model " + m.id;
      const std::string near = NearestWord(name, names);
      if (!near.empty()) msg += " (did you mean '" + near + "'?)";
      return msg;
    }
    setting[j] = &value;
  }

  s.lower.resize(s.np);
  s.upper.resize(s.np);
  s.fixed.assign(s.np, false);
  s.fixed_value.assign(s.np, kNaN);
  s.user_start.assign(s.np, std::nullopt);
  s.log.assign(s.np, false);
  for (int j = 0; j < s.np; ++j) {
    const ParameterSpec& ps = m.parameters[j];
    const ParameterSetting* st = setting[j];
    const double f = ps.si_factor;
    const char* unit = "(SI)";
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
    if (s.log[j]) s.lower[j] = std::max(s.lower[j], 0.0);  // ln(theta) keeps theta > 0 anyway
    s.fixed[j] = ps.fixed_by_default && !(st != nullptr && st->free);
    if (st != nullptr && st->fixed) {
      if (!std::isfinite(*st->fixed)) return who + "fixed value " + FormatNumber(*st->fixed) + " is not finite";
      s.fixed[j] = true;
      s.fixed_value[j] = *st->fixed / f;
    }
    if (st != nullptr && st->start) {
      if (!std::isfinite(*st->start)) return who + "start = " + FormatNumber(*st->start) + " is not finite";
      s.user_start[j] = *st->start / f;
    }
    if (s.fixed[j]) {
      if (std::isnan(s.fixed_value[j]) && s.user_start[j]) s.fixed_value[j] = *s.user_start[j];
      if (!std::isnan(s.fixed_value[j]) &&
          !(s.fixed_value[j] >= s.lower[j] && s.fixed_value[j] <= s.upper[j]))
        return who + "fixed value " + Si(s.fixed_value[j], f, unit) + " is outside its bounds [" +
               Si(s.lower[j], f, unit) + ", " + Si(s.upper[j], f, unit) + "]";
      // Fixed parameters need no transform; the value may sit on a bound.
      s.log[j] = false;
    } else {
      if (!(s.lower[j] < s.upper[j]))
        return who + "lower = " + Si(s.lower[j], f, unit) + " is not below upper = " + Si(s.upper[j], f, unit);
      if (s.user_start[j] && !(*s.user_start[j] >= s.lower[j] && *s.user_start[j] <= s.upper[j]))
        return who + "start = " + Si(*s.user_start[j], f, unit) + " is outside its bounds [" +
               Si(s.lower[j], f, unit) + ", " + Si(s.upper[j], f, unit) + "]";
      if (s.log[j] && s.user_start[j] && !(*s.user_start[j] > 0))
        return who + "start = " + Si(*s.user_start[j], f, unit) + " violates start > 0 (fitted as a logarithm)";
      s.free_index.push_back(j);
    }
  }
  s.nf = static_cast<int>(s.free_index.size());

  for (size_t k = 0; k < req.extra_starts.size(); ++k) {
    const std::vector<double>& e = req.extra_starts[k];
    const std::string at = "extra start " + std::to_string(k + 1) + ": ";
    if (static_cast<int>(e.size()) != s.np)
      return at + "has " + std::to_string(e.size()) + " values, model " + m.id + " has " + std::to_string(s.np) +
             " parameters";
    for (int j = 0; j < s.np; ++j) {
      if (s.fixed[j]) continue;
      if (!std::isfinite(e[j]) || e[j] < s.lower[j] || e[j] > s.upper[j] || (s.log[j] && !(e[j] > 0)))
        return at + m.parameters[j].name + " = " + FormatNumber(e[j]) + " " + m.parameters[j].unit +
               " is outside its bounds or not finite";
    }
  }
  if (req.only_extra_starts && req.extra_starts.empty()) return "only_extra_starts is set but no extra start was given";

  if (s.n < s.nf || s.n == 0) {
    status = FitStatus::kTooFewPoints;
    return std::to_string(s.n) + " data points violate n >= p = " + std::to_string(s.nf) + " free parameters";
  }
  return {};
}

std::unique_ptr<ceres::LossFunction> MakeLoss(const FitOptions& opt) {
  // Ceres' rho(s) acts on s = r^2; HuberLoss(a) and CauchyLoss(a) bend at
  // |r| = a, so a = loss_scale is in sigma units as FitOptions documents.
  switch (opt.loss) {
    case RobustLoss::kHuber: return std::make_unique<ceres::HuberLoss>(opt.loss_scale);
    case RobustLoss::kCauchy: return std::make_unique<ceres::CauchyLoss>(opt.loss_scale);
    case RobustLoss::kNone: break;
  }
  return nullptr;
}

ceres::Problem::Options BorrowingProblemOptions() {
  ceres::Problem::Options po;
  po.cost_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  po.loss_function_ownership = ceres::DO_NOT_TAKE_OWNERSHIP;
  return po;
}

// Presents a cost function to Ceres in column-scaled coordinates v = u / c.
class ColumnScaled final : public ceres::CostFunction {
 public:
  ColumnScaled(const ceres::CostFunction& inner, const Eigen::VectorXd& c) : inner_(inner), c_(c), u_(c.size()) {
    set_num_residuals(inner.num_residuals());
    mutable_parameter_block_sizes()->push_back(static_cast<int>(c.size()));
  }
  bool Evaluate(double const* const* parameters, double* residuals, double** jacobians) const override {
    for (Eigen::Index k = 0; k < c_.size(); ++k) u_[k] = c_(k) * parameters[0][k];
    const double* up = u_.data();
    if (!inner_.Evaluate(&up, residuals, jacobians)) return false;
    if (jacobians != nullptr && jacobians[0] != nullptr) {
      const Eigen::Index nf = c_.size();
      for (int i = 0; i < num_residuals(); ++i)
        for (Eigen::Index k = 0; k < nf; ++k) jacobians[0][i * nf + k] *= c_(k);
    }
    return true;
  }

 private:
  const ceres::CostFunction& inner_;
  Eigen::VectorXd c_;
  mutable std::vector<double> u_;
};

// ceres::Covariance (DENSE_SVD) at the solution, in the same equilibrated
// coordinates as EigenCovariance, so its rank test is unit-independent.
CovarianceOut CeresCovariance(const Setup& s, const Eigen::MatrixXd& Jc, const double* u_star,
                              ceres::LossFunction* loss, double min_rcond) {
  CovarianceOut out;
  out.method = "ceres-dense-svd";
  const Eigen::VectorXd c = ColumnScales(Jc);
  std::vector<double> v(s.nf);
  for (int k = 0; k < s.nf; ++k) v[k] = u_star[k] / c(k);
  ceres::Problem problem(BorrowingProblemOptions());
  std::vector<std::unique_ptr<WeightedResiduals>> inner;
  std::vector<std::unique_ptr<ColumnScaled>> scaled;
  const int blocks = loss ? s.n : 1;
  for (int b = 0; b < blocks; ++b) {
    inner.push_back(loss ? std::make_unique<WeightedResiduals>(s, b, 1) : std::make_unique<WeightedResiduals>(s));
    scaled.push_back(std::make_unique<ColumnScaled>(*inner.back(), c));
    problem.AddResidualBlock(scaled.back().get(), loss, v.data());
  }
  ceres::Covariance::Options co;
  co.algorithm_type = ceres::DENSE_SVD;
  co.min_reciprocal_condition_number = min_rcond;
  co.null_space_rank = 0;
  co.apply_loss_function = true;
  co.num_threads = 1;
  ceres::Covariance covariance(co);
  const std::vector<std::pair<const double*, const double*>> pairs{{v.data(), v.data()}};
  if (!covariance.Compute(pairs, &problem)) return out;
  Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> cv(s.nf, s.nf);
  if (!covariance.GetCovarianceBlock(v.data(), v.data(), cv.data()) || !cv.allFinite()) return out;
  out.cov_u = c.asDiagonal() * Eigen::MatrixXd(cv) * c.asDiagonal();
  out.rank = s.nf;
  out.ok = true;
  return out;
}

// Feeds the Ceres run's accepted iterates to the drift watch (needs
// update_state_every_iteration, so that u holds the current iterate).
class DriftCallback final : public ceres::IterationCallback {
 public:
  DriftCallback(DriftWatch& watch, const double* u) : watch_(watch), u_(u) {}
  ceres::CallbackReturnType operator()(const ceres::IterationSummary& it) override {
    if (it.iteration == 0 || !it.step_is_successful) return ceres::SOLVER_CONTINUE;
    return watch_.Observe(it.cost, u_) ? ceres::SOLVER_TERMINATE_SUCCESSFULLY : ceres::SOLVER_CONTINUE;
  }

 private:
  DriftWatch& watch_;
  const double* u_;
};

class WatchObserver final : public CompactObserver {
 public:
  explicit WatchObserver(DriftWatch& watch) : watch_(watch) {}
  bool Stop(int, double cost, const double* u) override { return watch_.Observe(cost, u); }
  std::string Message() const override { return {}; }

 private:
  DriftWatch& watch_;
};

// "P_r ran from 0.0123 to 0.00045 MPa ..." for a run the drift watch stopped.
std::string DriftMessage(const Setup& s, const DriftWatch& w, int iterations) {
  const int k = w.coordinate();
  const int j = s.free_index[static_cast<size_t>(k)];
  const ParameterSpec& ps = s.model->parameters[static_cast<size_t>(j)];
  const bool lg = s.log[static_cast<size_t>(j)];
  const double a = lg ? std::exp(w.from()) : w.from(), b = lg ? std::exp(w.to()) : w.to();
  const std::string limit = w.downwards() ? (lg && !(s.lower[static_cast<size_t>(j)] > 0) ? "0" : "its lower bound")
                                          : "its upper bound";
  return "stopped after " + std::to_string(iterations) + " iterations: " + ps.name + " ran monotonically from " +
         FormatNumber(a) + " to " + FormatNumber(b) + " " + ps.unit + " over the last " +
         std::to_string(DriftWatch::kWindow) + " steps, toward " + limit + ", while the cost improved by only " +
         FormatNumber(w.relative_change()) + " (relative): the best fit lies at that limit of the model, where " +
         ps.name + " and the parameters traded off against it are not determined";
}

}  // namespace

FitResult Fit(const FitRequest& req) {
  FitResult r;
  if (req.model == nullptr) return Invalid(r, FitStatus::kInvalidRequest, "fit request has no model");
  const ModelSpec& m = *req.model;
  const FitOptions& opt = req.options;
  r.model_id = m.id;
  r.covariance_scaled = opt.scale_covariance;
  if (std::string bad = opt.Validate(); !bad.empty()) return Invalid(r, FitStatus::kInvalidRequest, bad);

  Setup s;
  FitStatus prep_status;
  if (std::string bad = Prepare(req, s, prep_status); !bad.empty()) return Invalid(r, prep_status, bad);

  // Parameter records (filled further below).
  r.parameters.resize(s.np);
  for (int j = 0; j < s.np; ++j) {
    const ParameterSpec& ps = m.parameters[j];
    ParameterResult& q = r.parameters[j];
    q.name = ps.name;
    q.unit = ps.unit;
    q.si_factor = ps.si_factor;
    q.fixed = s.fixed[j];
    q.lower = s.lower[j] * ps.si_factor;
    q.upper = s.upper[j] * ps.si_factor;
  }
  r.n = s.n;
  r.p = s.nf;
  r.dof = s.n - s.nf;
  r.free_index = s.free_index;

  // ---- starting points: extra starts, then the heuristic, then perturbations of the heuristic.
  std::vector<std::vector<double>> starts = req.extra_starts;
  std::vector<double> heuristic;
  std::string heuristic_error;
  if (!req.only_extra_starts) {
    if (m.start) {
      try {
        std::vector<double> xs(s.x.data(), s.x.data() + s.n), ys(s.y.data(), s.y.data() + s.n);
        heuristic = m.start(xs, ys);
        if (static_cast<int>(heuristic.size()) != s.np) {
          heuristic_error = "start heuristic returned " + std::to_string(heuristic.size()) + " values";
          heuristic.clear();
        }
      } catch (const std::exception& e) {
        heuristic_error = std::string("start heuristic threw: ") + e.what();
        heuristic.clear();
      }
    } else {
      heuristic_error = "model has no start heuristic";
    }
  }
  // A fixed_by_default parameter without a value takes the heuristic's (else the first start's).
  for (int j = 0; j < s.np; ++j) {
    if (!s.fixed[j] || !std::isnan(s.fixed_value[j])) continue;
    if (!heuristic.empty() && std::isfinite(heuristic[j])) {
      s.fixed_value[j] = heuristic[j];
    } else if (!starts.empty()) {
      s.fixed_value[j] = starts.front()[j];
    } else {
      return Invalid(r, FitStatus::kInvalidRequest, m.parameters[j].name + " is fixed but has no value or start");
    }
    if (!(s.fixed_value[j] >= s.lower[j] && s.fixed_value[j] <= s.upper[j]))
      return Invalid(r, FitStatus::kInvalidRequest, m.parameters[j].name + ": fixed value from the start is outside its bounds");
  }
  auto complete = [&](std::vector<double> t, const std::vector<double>& base, bool clamp) {
    for (int j = 0; j < s.np; ++j) {
      if (s.fixed[j]) {
        t[j] = s.fixed_value[j];
        continue;
      }
      if (s.user_start[j]) t[j] = *s.user_start[j];
      if (clamp) t[j] = IntoBounds(t[j], base[j], s.lower[j], s.upper[j], s.log[j]);
    }
    return t;
  };
  for (auto& e : starts) e = complete(e, e, false);
  if (!req.only_extra_starts) {
    std::vector<double> base;
    if (!heuristic.empty()) {
      bool finite = true;
      for (double v : heuristic) finite = finite && std::isfinite(v);
      if (finite) {
        // Centre of the box as the "base" when clamping a heuristic value that fell outside it.
        std::vector<double> centre(s.np);
        for (int j = 0; j < s.np; ++j) {
          const double lo = s.lower[j], hi = s.upper[j];
          centre[j] = BoxCentre(lo, hi, s.log[j]);
          if (s.user_start[j]) centre[j] = *s.user_start[j];
        }
        base = complete(heuristic, centre, true);
        starts.push_back(base);
      } else {
        heuristic_error = "start heuristic returned a non-finite value";
      }
    }
    if (base.empty() && !starts.empty()) base = starts.front();
    if (base.empty())
      return Invalid(r, FitStatus::kInvalidRequest, "no starting point: " + heuristic_error);
    std::mt19937_64 rng(opt.seed);
    std::normal_distribution<double> normal(0.0, 1.0);
    for (int k = 1; k < opt.multistart; ++k) {
      std::vector<double> t = base;
      for (int j = 0; j < s.np; ++j) {
        if (s.fixed[j] || s.user_start[j]) continue;
        t[j] = PerturbStart(base[j], normal(rng), opt.start_spread, s.lower[j], s.upper[j], s.log[j]);
      }
      starts.push_back(std::move(t));
    }
  }

  // ---- the solver problem: one parameter block of free coordinates; one residual
  // block for plain least squares, one per point under a robust loss.
  WeightedResiduals cost(s);
  std::unique_ptr<ceres::LossFunction> loss = MakeLoss(opt);
  std::vector<std::unique_ptr<WeightedResiduals>> point_costs;

  std::vector<double> u(std::max(s.nf, 1));
  std::vector<double> theta(s.np);
  // Box on the solver coordinates. A kLog parameter's lower bound of 0 and
  // infinite bounds are not passed on: they cannot bind.
  std::vector<double> box_lo(static_cast<size_t>(s.nf), -kInf), box_hi(static_cast<size_t>(s.nf), kInf);
  bool has_box = false, positivity_only = true;
  for (int k = 0; k < s.nf; ++k) {
    const int j = s.free_index[k];
    double lo = s.lower[j], hi = s.upper[j];
    if (s.log[j]) {
      lo = lo > 0 ? std::log(lo) : -kInf;
      hi = hi < kInf ? std::log(hi) : kInf;
    }
    box_lo[static_cast<size_t>(k)] = lo;
    box_hi[static_cast<size_t>(k)] = hi;
    has_box = has_box || std::isfinite(lo) || std::isfinite(hi);
    positivity_only = positivity_only && !std::isfinite(hi) && (!std::isfinite(lo) || lo == 0.0);
  }
  const bool open_first = opt.unbounded_first && has_box && positivity_only;
  auto add_blocks = [&](ceres::Problem& problem) {
    if (loss) {
      if (point_costs.empty())
        for (int i = 0; i < s.n; ++i) point_costs.push_back(std::make_unique<WeightedResiduals>(s, i, 1));
      for (int i = 0; i < s.n; ++i) problem.AddResidualBlock(point_costs[static_cast<size_t>(i)].get(), loss.get(), u.data());
    } else {
      problem.AddResidualBlock(&cost, nullptr, u.data());
    }
  };
  // A bounded Ceres problem runs a line search on every step. So, with
  // FitOptions::unbounded_first, when the box
  // is only positivity (lower bounds of 0, no upper bounds; the catalogue's
  // moduli and compliances), each start is first solved without it; that run
  // is kept if it converged inside the box with every free coordinate still
  // identified (see identified), else the start is solved again with the box.
  // Other boxes (e.g. an exponent in [0, 1]) are solved bounded directly: an
  // unbounded run there can wander where the model is undefined, and Ceres
  // then logs to stderr. NIST StRD BoxBOD Start 1 shows why
  // the second test is needed: unbounded, it converges onto the b2 -> infinity
  // plateau, where ln P_close no longer moves the model.
  ceres::Problem open_problem(BorrowingProblemOptions());
  std::unique_ptr<ceres::Problem> bounded;
  auto bounded_problem = [&]() -> ceres::Problem& {
    if (!bounded) {
      bounded = std::make_unique<ceres::Problem>(BorrowingProblemOptions());
      add_blocks(*bounded);
      for (int k = 0; k < s.nf; ++k) {
        if (std::isfinite(box_lo[static_cast<size_t>(k)])) bounded->SetParameterLowerBound(u.data(), k, box_lo[static_cast<size_t>(k)]);
        if (std::isfinite(box_hi[static_cast<size_t>(k)])) bounded->SetParameterUpperBound(u.data(), k, box_hi[static_cast<size_t>(k)]);
      }
    }
    return *bounded;
  };
  if (s.nf > 0) add_blocks(open_problem);
  // A free coordinate is identified at u when the column-equilibrated weighted
  // Jacobian has full column rank there (the covariance's rank test).
  std::vector<double> check_res, check_jac;
  auto identified = [&]() {
    check_res.resize(static_cast<size_t>(s.n));
    check_jac.resize(static_cast<size_t>(s.n) * static_cast<size_t>(s.nf));
    if (!cost.EvaluateAt(u.data(), check_res.data(), check_jac.data())) return false;
    const Eigen::Map<const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>> Jm(
        check_jac.data(), s.n, s.nf);
    return EigenCovariance(Jm, opt.min_reciprocal_condition).ok;
  };
  auto inside_box = [&]() {
    for (int k = 0; k < s.nf; ++k)
      if (!(u[static_cast<size_t>(k)] >= box_lo[static_cast<size_t>(k)] && u[static_cast<size_t>(k)] <= box_hi[static_cast<size_t>(k)])) return false;
    return true;
  };
  auto model_error = [&]() -> std::string {
    if (!cost.error().empty()) return cost.error();
    for (const auto& c : point_costs)
      if (!c->error().empty()) return c->error();
    return {};
  };

  ceres::Solver::Options so = CeresOptions(opt);
  std::vector<bool> log_coordinate(static_cast<size_t>(s.nf));
  for (int k = 0; k < s.nf; ++k) log_coordinate[static_cast<size_t>(k)] = s.log[s.free_index[k]];
  DriftWatch watch(s.nf, log_coordinate);
  DriftCallback drift_callback(watch, u.data());
  so.callbacks.push_back(&drift_callback);
  so.update_state_every_iteration = true;
  // The compact solver (FitOptions::solver) for small plain least squares.
  const bool compact_fits = !loss && s.nf >= 1 && s.nf <= kCompactMaxParameters && s.n <= kCompactMaxPoints;
  const bool use_compact = compact_fits && opt.solver != SolverChoice::kCeres;
  CompactWork work;
  WatchObserver observer(watch);
  auto eval = [&](const double* uu, double* rr, double* jj) { return cost.EvaluateAt(uu, rr, jj); };

  SolverRun best;
  std::vector<double> start_res, start_jac;
  // Starts that ended at the same limit (drift watch), while none converged:
  // after two, the rest are skipped (FitOptions::skip_starts_at_same_limit).
  int same_limit = 0, limit_coordinate = -1;
  bool limit_downwards = false;
  size_t skipped = 0;
  for (size_t si = 0; si < starts.size(); ++si) {
    const std::vector<double>& st = starts[si];
    if (opt.skip_starts_at_same_limit && same_limit >= 2 && r.starts_converged == 0) {
      skipped = starts.size() - si;
      break;
    }
    SolverRun run;
    run.start = st;
    r.starts_tried += 1;
    if (s.nf == 0) {
      std::vector<double> res(s.n);
      const bool ok = cost.EvaluateAt(u.data(), res.data(), nullptr);
      run.cost = ok ? 0.5 * std::inner_product(res.begin(), res.end(), res.begin(), 0.0) : kInf;
      run.end = ok ? RunEnd::kConverged : RunEnd::kFailure;
      run.message = ok ? "all parameters fixed: nothing to solve" : "model is not finite at the fixed parameters";
    } else {
      ToSolver(s, st.data(), u.data());
      // Reject a start where the model is undefined before Ceres sees it
      // (Ceres would log the failed evaluation to stderr).
      start_res.resize(static_cast<size_t>(s.n));
      start_jac.resize(static_cast<size_t>(s.n) * static_cast<size_t>(s.nf));
      if (!cost.EvaluateAt(u.data(), start_res.data(), start_jac.data())) {
        run.end = RunEnd::kFailure;
        run.message = cost.error().empty() ? "model or its derivative is not finite at the start" : cost.error();
        if (best.message.empty() && !Usable(best.end)) best = run;
        continue;
      }
      watch.Reset();
      bool solved = false;
      std::string note;  // why the compact solver handed over to Ceres
      if (use_compact) {
        const CompactSummary cs =
            SolveCompact(eval, s.n, s.nf, u.data(), box_lo.data(), box_hi.data(), opt, work, &observer);
        // A converged answer must also identify every coordinate (the rank
        // test of the covariance): NIST StRD BoxBOD Start 1 otherwise ends on
        // the b2 -> infinity plateau, which Ceres' bounded line search avoids.
        const bool accept = cs.end == RunEnd::kStalled || (cs.end == RunEnd::kConverged && identified());
        if (accept) {
          run.iterations = cs.iterations;
          run.end = cs.end;
          run.cost = cs.cost;
          run.message = cs.message;
          solved = true;
        } else {
          note = cs.message + (cs.end == RunEnd::kConverged ? " at a rank-deficient point" : "") +
                 "; solved again with Ceres: ";
          ToSolver(s, st.data(), u.data());
          watch.Reset();
        }
      }
      if (!solved) {
        ceres::Solver::Summary sum;
        ceres::Solve(so, open_first || !has_box ? &open_problem : &bounded_problem(), &sum);
        if (open_first && !(sum.termination_type == ceres::CONVERGENCE && inside_box() && identified())) {
          ToSolver(s, st.data(), u.data());
          watch.Reset();
          ceres::Solve(so, &bounded_problem(), &sum);
        }
        run.iterations = static_cast<int>(sum.iterations.size()) - 1;
        run.end = sum.termination_type == ceres::USER_SUCCESS && watch.coordinate() >= 0
                      ? RunEnd::kStalled
                      : RunEndOf(sum.termination_type);
        run.cost = sum.final_cost;
        run.message = note + sum.message;
      }
      if (run.end == RunEnd::kStalled) {
        run.message = DriftMessage(s, watch, run.iterations);
        run.limit_coordinate = watch.coordinate();
        run.limit_downwards = watch.downwards();
      }
      if (std::string e = model_error(); !e.empty()) run.message = e;
    }
    run.u.assign(u.begin(), u.begin() + s.nf);
    if (run.end == RunEnd::kConverged) r.starts_converged += 1;
    if (run.end == RunEnd::kStalled) {
      if (same_limit == 0) {
        limit_coordinate = run.limit_coordinate;
        limit_downwards = run.limit_downwards;
      }
      if (run.limit_coordinate == limit_coordinate && run.limit_downwards == limit_downwards) ++same_limit;
    }
    if (IsBetterRun(run, best)) best = std::move(run);
  }

  r.status = StatusOf(best.end);
  r.iterations = best.iterations;
  r.message = best.message;
  if (skipped > 0)
    r.message += "; the other " + std::to_string(skipped) + " start(s) were skipped: two starts ended at this limit";
  if (!(Usable(best.end) && std::isfinite(best.cost))) {
    r.status = FitStatus::kNumericalFailure;
    if (r.message.empty()) r.message = "no start gave a finite cost";
    return r;
  }

  // ---- solution, residuals and Jacobian (weighted, solver coordinates).
  std::copy(best.u.begin(), best.u.end(), u.begin());
  ToTheta(s, u.data(), theta.data());
  Eigen::VectorXd res(s.n);
  Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor> jac(s.n, std::max(s.nf, 1));
  if (!cost.EvaluateAt(u.data(), res.data(), s.nf > 0 ? jac.data() : nullptr)) {
    r.status = FitStatus::kNumericalFailure;
    r.message = "model or its derivative is not finite at the solution";
    return r;
  }
  const Eigen::MatrixXd J = jac.leftCols(s.nf);

  for (int j = 0; j < s.np; ++j) {
    ParameterResult& q = r.parameters[j];
    q.estimate = theta[j] * q.si_factor;
    q.start = best.start[j] * q.si_factor;
    q.std_error = q.fixed ? 0.0 : kNaN;
    if (!q.fixed) {
      BoundFlags(theta[j], s.lower[j], s.upper[j], s.log[j], q.at_lower, q.at_upper);
    }
  }
  // A run stopped at a limit: its running parameter is at (toward) that bound.
  if (best.end == RunEnd::kStalled && best.limit_coordinate >= 0) {
    ParameterResult& q = r.parameters[static_cast<size_t>(s.free_index[static_cast<size_t>(best.limit_coordinate)])];
    if (best.limit_downwards) {
      q.at_lower = true;
    } else {
      q.at_upper = true;
    }
  }

  // ---- statistics (non-robust SSR of the weighted residuals).
  r.ssr = res.squaredNorm();
  r.chi2_reduced = r.dof > 0 ? r.ssr / r.dof : kNaN;
  const Eigen::VectorXd fitted_w = s.y - res.cwiseProduct(s.sigma);
  const Eigen::VectorXd raw_si = (s.y - fitted_w) * m.y_si_factor;
  r.rmse = std::sqrt(raw_si.squaredNorm() / s.n);
  r.r_squared = WeightedRSquared(s.y, s.sigma, r.ssr);
  InformationCriteria(r.ssr, s.n, s.nf, opt.scale_covariance, r.aic, r.aicc, r.bic);

  // ---- residual scale. Plain least squares: s^2 = SSR/(n-p). Robust loss:
  // with the per-point objective (1/2) rho(r^2), psi(r) = rho'(r^2) r and
  // psi'(r) = rho'(r^2) + 2 r^2 rho''(r^2); IRLS weight w = psi(r)/r = rho'(r^2).
  // Robust scale s_psi^2 = [sum psi^2/(n-p)] / [mean psi']^2 and Huber's
  // small-sample factor kappa = 1 + (p/n) var(psi')/mean(psi')^2 (Huber 1981,
  // Robust Statistics, §7.6 [from memory]); see FitResult::variance_factor.
  const double s2 = r.dof > 0 ? r.ssr / r.dof : kNaN;
  double scale2 = s2;         // residual variance in sigma units (studentised residuals)
  double variance_factor = s2;  // multiplies the unscaled inverse when scale_covariance
  Eigen::VectorXd weight;     // IRLS weights; empty for plain least squares
  r.chi2_reduced_robust = r.chi2_reduced;
  if (loss) {
    weight.resize(s.n);
    double sum_psi2 = 0, sum_dpsi = 0, sum_dpsi2 = 0, sum_wr2 = 0;
    for (int i = 0; i < s.n; ++i) {
      const double r2 = res(i) * res(i);
      double rho[3];
      loss->Evaluate(r2, rho);
      const double psi = rho[1] * res(i), dpsi = rho[1] + 2 * r2 * rho[2];
      weight(i) = rho[1];
      sum_wr2 += rho[1] * r2;
      sum_psi2 += psi * psi;
      sum_dpsi += dpsi;
      sum_dpsi2 += dpsi * dpsi;
    }
    const double n = s.n, w_dof = weight.sum() - s.nf;
    r.chi2_reduced_robust = w_dof > 0 ? sum_wr2 / w_dof : kNaN;
    const double mean_dpsi = sum_dpsi / n;
    const double var_dpsi = std::max(sum_dpsi2 / n - mean_dpsi * mean_dpsi, 0.0);
    if (r.dof > 0 && mean_dpsi > 0) {
      scale2 = sum_psi2 / r.dof / (mean_dpsi * mean_dpsi);
      const double kappa = 1 + s.nf / n * var_dpsi / (mean_dpsi * mean_dpsi);
      variance_factor = kappa * kappa * scale2;
    } else {
      scale2 = variance_factor = kNaN;
      if (r.dof > 0)
        r.warnings.push_back("mean psi' = " + FormatRounded(mean_dpsi) +
                             " is not positive: most points lie in the loss's descending part, no robust scale");
    }
  }
  r.residual_scale = std::sqrt(scale2);
  r.variance_factor = opt.scale_covariance ? variance_factor : 1.0;

  // ---- covariance in solver coordinates, then exactly to physical parameters.
  if (opt.covariance && s.nf > 0) {
    // Jacobian the covariance is built from. Plain: J, times s^2 when scaled.
    // Robust and scaled: Huber's form, (J^T J)^-1 times the variance factor.
    // Robust with absolute sigma: the IRLS-weighted (J^T W J)^-1, rows
    // carrying sqrt(w_i) (Ceres' corrector; Huber and Cauchy have rho'' <= 0).
    const bool weighted_rows = loss && !opt.scale_covariance;
    Eigen::MatrixXd Jc = J;
    if (weighted_rows)
      for (int i = 0; i < s.n; ++i) Jc.row(i) *= std::sqrt(std::max(weight(i), 0.0));
    ceres::LossFunction* cov_loss = weighted_rows ? loss.get() : nullptr;
    CovarianceOut cov = opt.covariance_backend == CovarianceBackend::kCeres
                            ? CeresCovariance(s, Jc, u.data(), cov_loss, opt.min_reciprocal_condition)
                            : EigenCovariance(Jc, opt.min_reciprocal_condition);
    if (!cov.ok) {
      cov = EigenCovariance(Jc, opt.min_reciprocal_condition);
      cov.method = "eigen-pseudo-inverse";
    }
    r.covariance_method = cov.method;
    r.rank_deficient = cov.rank < s.nf;
    const Eigen::MatrixXd& cov_u = cov.cov_u;
    Eigen::VectorXd dtheta(s.nf);  // dtheta/du, working units -> SI
    for (int k = 0; k < s.nf; ++k) {
      const int j = s.free_index[k];
      dtheta(k) = (s.log[j] ? theta[j] : 1.0) * m.parameters[j].si_factor;
    }
    r.covariance = dtheta.asDiagonal() * cov_u * dtheta.asDiagonal();
    if (opt.scale_covariance) r.covariance *= variance_factor;
    r.covariance_ok = !r.rank_deficient && r.covariance.allFinite();
    for (int a = 0; a < s.nf; ++a) r.parameters[s.free_index[a]].std_error = std::sqrt(r.covariance(a, a));
    Correlations(r.covariance, r.correlation, r.max_abs_correlation);
    r.high_correlation = r.max_abs_correlation > opt.correlation_threshold;
  }

  // ---- flags as warnings.
  for (int j = 0; j < s.np; ++j) {
    const ParameterResult& q = r.parameters[j];
    if (q.at_lower)
      r.warnings.push_back(q.name + " = " + FormatRounded(theta[j], 4) + " " + q.unit + " is at its lower bound");
    if (q.at_upper)
      r.warnings.push_back(q.name + " = " + FormatRounded(theta[j], 4) + " " + q.unit + " is at its upper bound");
  }
  // Closure-pressure identifiability (common practice, a rule of thumb: outside [P_min/3, 3 P_max] is weakly determined).
  const bool closure_free = m.closure_parameter < 0 || m.closure_parameter >= s.np || !s.fixed[m.closure_parameter];
  if (m.has_closure_pressure() && closure_free) {
    const double pc = m.ClosurePressure(theta.data());
    const double pmin = s.x.minCoeff(), pmax = s.x.maxCoeff();
    const double f = opt.closure_range_factor;
    if (std::isfinite(pc) && (pc < pmin / f || pc > f * pmax)) {
      r.closure_outside_range = true;
      const std::string label =
          m.closure_parameter >= 0 ? ParamLabel(m, m.closure_parameter) : std::string("closure pressure");
      r.warnings.push_back(label + " = " + FormatRounded(pc) + " " + m.x_unit + " is outside [P_min/" +
                           FormatNumber(f) + ", " + FormatNumber(f) + " P_max] = [" + FormatRounded(pmin / f) +
                           ", " + FormatRounded(f * pmax) + "] " + m.x_unit + ": the data barely constrain it");
    }
  }
  if (r.high_correlation)
    r.warnings.push_back("|correlation| = " + FormatRounded(r.max_abs_correlation) + " exceeds " +
                         FormatNumber(opt.correlation_threshold) + ": parameters are not separately identifiable");
  if (r.rank_deficient)
    r.warnings.push_back("J^T W J is rank deficient (reciprocal condition below " +
                         FormatNumber(opt.min_reciprocal_condition) + "): covariance from a pseudo-inverse");
  if (r.status == FitStatus::kMaxIterations)
    r.warnings.push_back("stopped at the iteration limit (" + std::to_string(opt.max_iterations) + ")");

  // ---- residual diagnostics.
  if (!opt.residual_diagnostics) return r;
  ResidualDiagnostics& d = r.residuals;
  d.x = s.x * m.x_si_factor;
  d.observed = s.y * m.y_si_factor;
  d.fitted = fitted_w * m.y_si_factor;
  d.sigma = s.sigma * m.y_si_factor;
  d.raw = raw_si;
  d.leverage = Leverages(J);
  d.standardized = StudentizedResiduals(d.raw, d.sigma, d.leverage, std::sqrt(scale2));
  d.robust_weight = loss ? weight : Eigen::VectorXd::Ones(s.n);
  OrderDiagnostics(s.x, res, d);
  return r;
}

}  // namespace porofit

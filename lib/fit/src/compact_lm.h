#pragma once
// Internal: a compact dense Levenberg–Marquardt for small plain
// least-squares problems (FitOptions::solver). It follows the Ceres
// trust-region LM that the fit layer uses otherwise, step for step where it
// matters for the result:
//  - columns scaled by 1 / (1 + |J_k|) (Ceres' jacobian_scaling);
//  - LM step from min |J d + r|^2 + |D d|^2 / radius, D^2 = diag(J^T J)
//    clamped to [1e-6, 1e32], solved by QR (here: QR of J once per Jacobian,
//    then a small QR of [R; D] per trial step, which is the same system);
//  - initial radius 1e4, radius update of Ceres' LevenbergMarquardtStrategy
//    (accept when the step quality exceeds 1e-3; radius / max(1/3, 1 - (2q-1)^3)
//    on success, / 2, / 4, ... on consecutive failures), maximum 1e16,
//    minimum 1e-32;
//  - convergence exactly as Ceres tests it: projected gradient max-norm
//    <= gradient_tolerance, |x - x_candidate| <= parameter_tolerance (|x| +
//    parameter_tolerance), |cost change| <= function_tolerance * cost; the
//    iteration count includes rejected steps.
// Bounds: a candidate is projected onto the box (as Ceres' ParameterBlock::Plus
// does), and a coordinate on its bound whose gradient points outwards is held
// there for the step (its column dropped) instead of Ceres' line search along
// the projected path; both stop at the same Karush–Kuhn–Tucker point.
// All matrices have fixed maximum sizes: nothing is allocated per iteration.
#include <Eigen/Core>
#include <Eigen/QR>
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <vector>

#include "solve_common.h"

namespace porofit::fit_detail {

inline constexpr int kCompactMaxParameters = 6;
inline constexpr int kCompactMaxPoints = 500;

struct CompactSummary {
  RunEnd end = RunEnd::kFailure;
  int iterations = 0;  ///< as Ceres' summary.iterations.size() - 1
  double cost = kInf;  ///< 1/2 sum r^2 at the returned point
  std::string message;
};

/// Buffers for one fit's compact solves (allocated once, reused by every start).
struct CompactWork {
  std::vector<double> r, r_try, jac, jac_try;  // residuals and row-major Jacobians (n x p)
  void Resize(int n, int p) {
    r.resize(static_cast<size_t>(n));
    r_try.resize(static_cast<size_t>(n));
    jac.resize(static_cast<size_t>(n) * static_cast<size_t>(p));
    jac_try.resize(static_cast<size_t>(n) * static_cast<size_t>(p));
  }
};

/// Optional per-iteration observer (the drift watch): called after every
/// accepted step with the iteration number, the cost and u; returning true
/// stops the solve with RunEnd::kStalled.
struct CompactObserver {
  virtual ~CompactObserver() = default;
  virtual bool Stop(int iteration, double cost, const double* u) = 0;
  virtual std::string Message() const = 0;
};

/// Solves min 1/2 |r(u)|^2, lo <= u <= hi, from u (overwritten with the
/// solution). `eval(u, r, jac)` fills r (n) and, if jac is non-null, the
/// row-major Jacobian dr/du (n x p); it returns false where r or J is not
/// finite. Requires 1 <= p <= kCompactMaxParameters, n <= kCompactMaxPoints,
/// and a start where eval succeeds.
template <class Eval>
CompactSummary SolveCompact(const Eval& eval, int n, int p, double* u, const double* lo, const double* hi,
                            const FitOptions& opt, CompactWork& w, CompactObserver* observer = nullptr) {
  using MatNP = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor, kCompactMaxPoints,
                              kCompactMaxParameters>;
  using MatAug = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor,
                               2 * kCompactMaxParameters, kCompactMaxParameters>;
  using VecP = Eigen::Matrix<double, Eigen::Dynamic, 1, Eigen::ColMajor, kCompactMaxParameters, 1>;
  using VecAug = Eigen::Matrix<double, Eigen::Dynamic, 1, Eigen::ColMajor, 2 * kCompactMaxParameters, 1>;
  using VecN = Eigen::Matrix<double, Eigen::Dynamic, 1, Eigen::ColMajor, kCompactMaxPoints, 1>;
  using RowMap = Eigen::Map<const Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>>;

  CompactSummary out;
  w.Resize(n, p);
  char buf[160];
  if (!eval(u, w.r.data(), w.jac.data())) {
    out.message = "compact solver: model or its derivative is not finite at the start";
    return out;
  }
  Eigen::Map<Eigen::VectorXd> x(u, p);
  double cost = 0.5 * Eigen::Map<const Eigen::VectorXd>(w.r.data(), n).squaredNorm();

  MatNP A(n, p);
  VecP scale(p), g(p), diag(p), qtr(p), step(p), cand(p), dx(p);
  VecN jd(n);
  Eigen::HouseholderQR<MatNP> qr(n, p);
  Eigen::HouseholderQR<MatAug> qr_aug(2 * p, p);
  MatAug aug(2 * p, p);
  VecAug rhs(2 * p);
  std::vector<bool> held(static_cast<size_t>(p), false);

  double radius = 1e4, decrease = 2.0;
  bool fresh_jacobian = true;
  Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::ColMajor, kCompactMaxParameters,
                kCompactMaxParameters>
      R(p, p);
  int iteration = 0;
  for (;;) {
    const RowMap J(w.jac.data(), n, p);
    const Eigen::Map<const Eigen::VectorXd> r(w.r.data(), n);
    if (fresh_jacobian) {
      g.noalias() = J.transpose() * r;
      // Projected gradient (as Ceres: x - P(x - g)) and the held coordinates.
      double gmax = 0;
      for (int k = 0; k < p; ++k) {
        const double moved = std::clamp(x(k) - g(k), lo[k], hi[k]);
        gmax = std::max(gmax, std::abs(x(k) - moved));
        held[static_cast<size_t>(k)] = (x(k) <= lo[k] && g(k) > 0) || (x(k) >= hi[k] && g(k) < 0);
      }
      if (!std::isfinite(gmax)) {
        out.message = "compact solver: gradient is not finite";
        out.end = RunEnd::kFailure;
        break;
      }
      if (gmax <= opt.gradient_tolerance) {
        std::snprintf(buf, sizeof buf, "compact solver: gradient tolerance reached. Gradient max norm: %e <= %e",
                      gmax, opt.gradient_tolerance);
        out.message = buf;
        out.end = RunEnd::kConverged;
        break;
      }
      for (int k = 0; k < p; ++k) {
        const double cn = J.col(k).norm();
        scale(k) = 1.0 / (1.0 + cn);
        if (held[static_cast<size_t>(k)]) {
          A.col(k).setZero();
        } else {
          A.col(k) = J.col(k) * scale(k);
        }
      }
      qr.compute(A);
      R = qr.matrixQR().topRows(p).template triangularView<Eigen::Upper>();
      jd = r;
      jd.applyOnTheLeft(qr.householderQ().adjoint());
      qtr = jd.head(p);
      for (int k = 0; k < p; ++k) diag(k) = std::clamp(A.col(k).squaredNorm(), 1e-6, 1e32);
      fresh_jacobian = false;
    }
    if (iteration >= opt.max_iterations) {
      std::snprintf(buf, sizeof buf, "compact solver: maximum number of iterations reached. Number of iterations: %d.",
                    iteration);
      out.message = buf;
      out.end = RunEnd::kNoConvergence;
      break;
    }
    if (radius < 1e-32) {
      std::snprintf(buf, sizeof buf, "compact solver: minimum trust region radius reached. Trust region radius: %e <= %e",
                    radius, 1e-32);
      out.message = buf;
      out.end = RunEnd::kConverged;
      break;
    }
    ++iteration;
    // LM step: min |R d + Q^T r|^2 + |sqrt(diag / radius) d|^2 (scaled coordinates).
    aug.topRows(p) = R;
    aug.bottomRows(p).setZero();
    for (int k = 0; k < p; ++k) aug(p + k, k) = std::sqrt(diag(k) / radius);
    rhs.head(p) = -qtr;
    rhs.tail(p).setZero();
    qr_aug.compute(aug);
    rhs.applyOnTheLeft(qr_aug.householderQ().adjoint());
    step = qr_aug.matrixQR().topRows(p).template triangularView<Eigen::Upper>().solve(rhs.head(p));
    for (int k = 0; k < p; ++k) {
      const double d = held[static_cast<size_t>(k)] ? 0.0 : step(k) * scale(k);
      cand(k) = std::clamp(x(k) + d, lo[k], hi[k]);
    }
    dx = cand - x;
    bool ok = dx.allFinite();
    double cand_cost = kInf;
    if (ok) {
      ok = eval(cand.data(), w.r_try.data(), w.jac_try.data());
      if (ok) cand_cost = 0.5 * Eigen::Map<const Eigen::VectorXd>(w.r_try.data(), n).squaredNorm();
      ok = ok && std::isfinite(cand_cost);
    }
    const double step_norm = ok ? dx.norm() : kInf;
    if (step_norm <= opt.parameter_tolerance * (x.norm() + opt.parameter_tolerance)) {
      std::snprintf(buf, sizeof buf, "compact solver: parameter tolerance reached. Relative step_norm: %e <= %e.",
                    step_norm / (x.norm() + opt.parameter_tolerance), opt.parameter_tolerance);
      out.message = buf;
      out.end = RunEnd::kConverged;
      --iteration;  // as Ceres: the step that meets a tolerance is not counted
      break;
    }
    const double cost_change = cost - cand_cost;
    if (ok && std::abs(cost_change) <= opt.function_tolerance * cost) {
      std::snprintf(buf, sizeof buf, "compact solver: function tolerance reached. |cost_change|/cost: %e <= %e",
                    std::abs(cost_change) / cost, opt.function_tolerance);
      out.message = buf;
      out.end = RunEnd::kConverged;
      --iteration;
      break;
    }
    double model_change = 0;
    if (ok) {
      jd.noalias() = J * dx;
      model_change = -jd.dot(r + 0.5 * jd);
    }
    const double quality = model_change > 0 ? cost_change / model_change : -kInf;
    if (ok && model_change > 0 && quality > 1e-3) {
      x = cand;
      cost = cand_cost;
      w.r.swap(w.r_try);
      w.jac.swap(w.jac_try);
      fresh_jacobian = true;
      radius = std::min(1e16, radius / std::max(1.0 / 3.0, 1.0 - std::pow(2.0 * quality - 1.0, 3)));
      decrease = 2.0;
      if (observer != nullptr && observer->Stop(iteration, cost, u)) {
        out.message = observer->Message();
        out.end = RunEnd::kStalled;
        break;
      }
    } else {
      radius /= decrease;
      decrease *= 2.0;
    }
  }
  out.iterations = iteration;
  out.cost = cost;
  return out;
}

}  // namespace porofit::fit_detail

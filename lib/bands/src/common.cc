#include "common.h"

#include <algorithm>
#include <cmath>
#include <functional>
#include <numbers>

#include <boost/math/distributions/normal.hpp>
#include <boost/math/distributions/students_t.hpp>


#include "porofit/core/error.h"

namespace porofit::bands {

namespace {
// Double precision throughout: Boost's default promotes to long double, which
// costs several times more per quantile for no accuracy a band needs.
using Fast = boost::math::policies::policy<boost::math::policies::promote_double<false>>;
}  // namespace

double TwoSidedT(double confidence, double dof) {
  const double q = 0.5 + 0.5 * confidence;
  if (!(dof > 0)) return detail::kNaN;
  if (std::isinf(dof)) return boost::math::quantile(boost::math::normal_distribution<double, Fast>(), q);
  return boost::math::quantile(boost::math::students_t_distribution<double, Fast>(dof), q);
}

TQuantileCurve::TQuantileCurve(double confidence, double nu_fit) : confidence_(confidence), nu_fit_(nu_fit) {
  if (!(nu_fit >= 2) || std::isinf(nu_fit)) return;
  // Chebyshev interpolation of q(u) = t_q(nu_fit / u) on u in [0, 1]
  // (u = 0 is the normal limit).
  constexpr int N = 24;
  static_assert(N == kNodes);
  double f[N];
  for (int k = 0; k < N; ++k) {
    const double x = std::cos(std::numbers::pi * (k + 0.5) / N);
    const double u = 0.5 * (x + 1.0);
    f[k] = TwoSidedT(confidence, u > 0 ? nu_fit / u : detail::kInf);
  }
  for (int j = 0; j < N; ++j) {
    double acc = 0;
    for (int k = 0; k < N; ++k) acc += f[k] * std::cos(std::numbers::pi * j * (k + 0.5) / N);
    coef_[j] = 2.0 * acc / N;
  }
  coef_[0] *= 0.5;
  exact_ = false;
}

double TQuantileCurve::operator()(double nu) const {
  if (exact_ || !(nu >= nu_fit_)) return TwoSidedT(confidence_, nu);
  const double u = std::isinf(nu) ? 0.0 : nu_fit_ / nu;
  const double x = 2.0 * u - 1.0;
  // Clenshaw recurrence.
  double b1 = 0, b2 = 0;
  for (int j = kNodes - 1; j >= 1; --j) {
    const double b0 = 2.0 * x * b1 - b2 + coef_[j];
    b2 = b1;
    b1 = b0;
  }
  return x * b1 - b2 + coef_[0];
}



double WelchSatterthwaiteDof(double v_fit, double dof_fit, double v_known) {
  // nu_eff = (v_fit + v_known)^2 / (v_fit^2/nu_fit + v_known^2/inf)
  //        = nu_fit (1 + v_known/v_fit)^2.
  if (std::isinf(dof_fit)) return std::numeric_limits<double>::infinity();
  if (!(v_fit > 0)) return std::numeric_limits<double>::infinity();
  const double r = 1.0 + std::max(v_known, 0.0) / v_fit;
  return dof_fit * r * r;
}

CurveGradient EvaluateCurve(const FitResult& fit, const ModelSpec& m, const std::vector<double>& pressure) {
  CurveGradient out;
  const size_t np = m.parameters.size();
  std::vector<double> th(np), grad(np);
  for (size_t j = 0; j < np && j < fit.parameters.size(); ++j)
    th[j] = fit.parameters[j].estimate / m.parameters[j].si_factor;
  out.value.resize(pressure.size());
  out.gradient.assign(pressure.size(), std::vector<double>(fit.free_index.size()));
  for (size_t i = 0; i < pressure.size(); ++i) {
    const double kw = m.value_and_gradient(th.data(), pressure[i] / m.x_si_factor, grad.data());
    out.value[i] = kw * m.y_si_factor;
    for (size_t k = 0; k < fit.free_index.size(); ++k) {
      const auto j = static_cast<size_t>(fit.free_index[k]);
      out.gradient[i][k] = m.y_si_factor * grad[j] / m.parameters[j].si_factor;
    }
  }
  return out;
}

namespace detail {

FitView ViewOf(const BandRequest& r) {
  FitView v;
  v.model = r.curve_model != nullptr ? r.curve_model : r.fit_request->model;
  const FitResult& f = *r.fit;
  const size_t np = v.model->parameters.size();
  v.theta_working.resize(np);
  for (size_t j = 0; j < np; ++j) v.theta_working[j] = f.parameters[j].estimate / v.model->parameters[j].si_factor;
  v.free_index = f.free_index;
  for (int j : v.free_index) v.theta_free_si.push_back(f.parameters[static_cast<size_t>(j)].estimate);
  v.n = f.n;
  v.p = f.p;
  v.scaled = f.covariance_scaled;
  v.k_dof = v.scaled ? static_cast<double>(f.dof) : kInf;
  return v;
}

std::string CheckRequest(const BandRequest& r, bool need_covariance, bool need_residuals) {
  if (r.fit_request == nullptr || r.fit_request->model == nullptr)
    throw InputError({}, "bands: the request has no fit request or model");
  if (r.fit == nullptr) throw InputError({}, "bands: the request has no fit result");
  if (std::string bad = r.options.Validate(); !bad.empty()) throw InputError({}, bad);
  if (!(std::isfinite(r.k_s) && r.k_s > 0))
    throw InputError({}, "bands.k_s = " + FormatNumber(r.k_s) + " Pa violates k_s > 0");
  if (!(std::isfinite(r.sigma_k_s) && r.sigma_k_s >= 0))
    throw InputError({}, "bands.sigma_k_s = " + FormatNumber(r.sigma_k_s) + " Pa violates sigma_k_s >= 0");
  if (!std::isnan(r.porosity) && !(r.porosity >= 0 && r.porosity < 1))
    throw InputError({}, "bands.porosity = " + FormatNumber(r.porosity) + " is outside [0, 1)");
  if (!std::isnan(r.fluid_modulus) && !(r.fluid_modulus > 0))
    throw InputError({}, "bands.fluid_modulus = " + FormatNumber(r.fluid_modulus) + " Pa violates fluid_modulus > 0");
  if (r.grid.size() == 0) throw InputError({}, "bands: the pressure grid is empty");
  for (double p : r.grid.pressure)
    if (!std::isfinite(p)) throw InputError({}, "bands: grid pressure " + FormatNumber(p) + " is not finite");

  const FitResult& f = *r.fit;
  const ModelSpec& m = *r.fit_request->model;
  if (f.status != FitStatus::kConverged)
    return "fit status is " + std::string(ToString(f.status)) + ": no bands from an unconverged fit";
  if (f.parameters.size() != m.parameters.size()) return "fit result does not match model " + m.id;
  if (r.curve_model != nullptr && r.curve_model->parameters.size() != m.parameters.size())
    return "curve model " + r.curve_model->id + " does not have the fit model's parameters";
  if (need_covariance) {
    const auto p = static_cast<Eigen::Index>(f.free_index.size());
    if (!f.covariance_ok || f.covariance.rows() != p || f.covariance.cols() != p)
      return "fit has no usable covariance (rank deficient or not computed)";
  }
  if (need_residuals) {
    const auto n = static_cast<Eigen::Index>(f.n);
    const ResidualDiagnostics& d = f.residuals;
    if (d.fitted.size() != n || d.raw.size() != n || d.sigma.size() != n || d.leverage.size() != n)
      return "fit has no residual diagnostics (fitted values, sigmas, leverages)";
    if (static_cast<Eigen::Index>(r.fit_request->data.y.size()) != n) return "fit request does not match the fit";
  }
  return {};
}

bool CurveAt(const ModelSpec& m, const double* theta, const std::vector<double>& pressure, double* k_out) {
  bool ok = true;
  for (size_t i = 0; i < pressure.size(); ++i) {
    const double k = m.value(theta, pressure[i] / m.x_si_factor) * m.y_si_factor;
    k_out[i] = k;
    ok = ok && std::isfinite(k) && k > 0;
  }
  return ok;
}

namespace {

// Type-7 position: order statistics k = floor(h) and k + 1 with weight frac,
// h = (N - 1) q (numpy's default percentile definition).
struct Position {
  size_t k = 0;
  double frac = 0;
};
Position PositionOf(size_t n, double q) {
  const double h = (static_cast<double>(n) - 1) * q;
  Position p;
  p.k = static_cast<size_t>(std::floor(h));
  p.frac = h - static_cast<double>(p.k);
  if (p.k + 1 >= n) p.frac = 0;
  return p;
}

}  // namespace

void Percentiles3(std::vector<double>& v, double tail, double& lo, double& mid, double& hi) {
  const size_t n = v.size();
  if (n == 0) {
    lo = mid = hi = kNaN;
    return;
  }
  // Three selections, each on the part above the previous order statistic
  // (introselect is linear; a bracketing sample pass was measured slower).
  const Position pos[3] = {PositionOf(n, tail), PositionOf(n, 0.5), PositionOf(n, 1.0 - tail)};
  double* out[3] = {&lo, &mid, &hi};
  size_t first = 0;
  for (int t = 0; t < 3; ++t) {
    const Position p = pos[t];
    const auto b = v.begin() + static_cast<std::ptrdiff_t>(first);
    const auto kth = v.begin() + static_cast<std::ptrdiff_t>(p.k);
    if (p.k >= first) std::nth_element(b, kth, v.end());
    const double a = v[p.k];
    *out[t] = p.frac == 0 ? a : a + p.frac * (*std::min_element(kth + 1, v.end()) - a);
    first = std::max(first, p.k + 1);
  }
}

bool Percentiles3Guided(const std::vector<double>& v, double tail, const double guess[3], const double half_width[3],
                        double& lo, double& mid, double& hi) {
  const size_t n = v.size();
  if (n == 0) return false;
  const Position pos[3] = {PositionOf(n, tail), PositionOf(n, 0.5), PositionOf(n, 1.0 - tail)};
  double lo_edge[3], hi_edge[3];
  for (int t = 0; t < 3; ++t) {
    if (!std::isfinite(guess[t]) || !std::isfinite(half_width[t])) return false;
    lo_edge[t] = guess[t] - half_width[t];
    hi_edge[t] = guess[t] + half_width[t];
  }
  // Pass 1: how many values lie below each bracket and how many at or below
  // its top. Counting in doubles (exact below 2^53) lets the compiler
  // vectorise the loop; a NaN would break the counts, so it sends the column
  // to the full selection.
  double cb0 = 0, cb1 = 0, cb2 = 0, cu0 = 0, cu1 = 0, cu2 = 0, finite = 0;
  const double l0 = lo_edge[0], l1 = lo_edge[1], l2 = lo_edge[2];
  const double h0 = hi_edge[0], h1 = hi_edge[1], h2 = hi_edge[2];
  const double* data = v.data();
  for (size_t i = 0; i < n; ++i) {
    const double x = data[i];
    finite += x == x ? 1.0 : 0.0;
    cb0 += x < l0 ? 1.0 : 0.0;
    cb1 += x < l1 ? 1.0 : 0.0;
    cb2 += x < l2 ? 1.0 : 0.0;
    cu0 += x <= h0 ? 1.0 : 0.0;
    cu1 += x <= h1 ? 1.0 : 0.0;
    cu2 += x <= h2 ? 1.0 : 0.0;
  }
  if (finite != static_cast<double>(n)) return false;
  const size_t below[3] = {static_cast<size_t>(cb0), static_cast<size_t>(cb1), static_cast<size_t>(cb2)};
  const size_t upto[3] = {static_cast<size_t>(cu0), static_cast<size_t>(cu1), static_cast<size_t>(cu2)};
  for (int t = 0; t < 3; ++t) {
    // Order statistic k, and k + 1 when interpolating, must both be inside.
    const size_t last = pos[t].k + (pos[t].frac != 0 ? 1 : 0);
    if (pos[t].k < below[t] || last >= upto[t]) return false;
  }
  // Pass 2: gather the values inside each bracket (branch-free compaction:
  // every value is written, the fill index advances only for those inside).
  thread_local std::vector<double> inside[3];
  double* out[3];
  for (int t = 0; t < 3; ++t) {
    inside[t].resize(upto[t] - below[t] + 1);
    out[t] = inside[t].data();
  }
  size_t f0 = 0, f1 = 0, f2 = 0;
  for (size_t i = 0; i < n; ++i) {
    const double x = data[i];
    out[0][f0] = x;
    out[1][f1] = x;
    out[2][f2] = x;
    f0 += static_cast<size_t>((x >= l0) & (x <= h0));
    f1 += static_cast<size_t>((x >= l1) & (x <= h1));
    f2 += static_cast<size_t>((x >= l2) & (x <= h2));
  }
  inside[0].resize(f0);
  inside[1].resize(f1);
  inside[2].resize(f2);
  double value[3];
  for (int t = 0; t < 3; ++t) {
    std::vector<double>& w = inside[t];
    const auto kth = w.begin() + static_cast<std::ptrdiff_t>(pos[t].k - below[t]);
    std::nth_element(w.begin(), kth, w.end());
    const double x = *kth;
    value[t] = pos[t].frac == 0 ? x : x + pos[t].frac * (*std::min_element(kth + 1, w.end()) - x);
  }
  lo = value[0];
  mid = value[1];
  hi = value[2];
  return true;
}

namespace {

// Percentiles of one column, guided by the two previous columns of the same
// block: adjacent grid points have nearly equal quantiles, so a bracket around
// the linear extrapolation holds the wanted order statistics almost always,
// and one counting pass replaces three introselects (measured 58 % of the
// Monte Carlo time before). A miss falls back to the full selection.
struct ColumnTracker {
  int seen = 0;
  double q1[3] = {0, 0, 0}, q2[3] = {0, 0, 0};

  void Next(std::vector<double>& v, double tail, double& lo, double& mid, double& hi) {
    bool done = false;
    if (seen >= 1) {
      double guess[3], half[3];
      const double spread = q1[2] - q1[0];
      // Half-widths as fractions of the previous central interval: about 100
      // draws fall inside the tail brackets and 400 inside the median's at
      // 4,000 draws of a near-normal column.
      const double frac[3] = {0.06, 0.03, 0.06};
      for (int t = 0; t < 3; ++t) {
        guess[t] = seen >= 2 ? 2 * q1[t] - q2[t] : q1[t];
        const double drift = seen >= 2 ? std::abs(q1[t] - q2[t]) : 0.0;
        half[t] = frac[t] * spread + 0.5 * drift;
      }
      done = spread > 0 && Percentiles3Guided(v, tail, guess, half, lo, mid, hi);
    }
    if (!done) Percentiles3(v, tail, lo, mid, hi);
    const double q[3] = {lo, mid, hi};
    for (int t = 0; t < 3; ++t) {
      q2[t] = q1[t];
      q1[t] = q[t];
    }
    ++seen;
  }
};

}  // namespace

void PercentileBands(const double* k, const double* ks, const std::vector<char>& use, size_t grid,
                     double confidence, int threads, Band& k_out, Band& alpha_out) {
  const size_t rows = use.size();
  for (Band* b : {&k_out, &alpha_out}) {
    b->estimate.assign(grid, kNaN);
    b->lower.assign(grid, kNaN);
    b->upper.assign(grid, kNaN);
  }
  const double tail = 0.5 * (1.0 - confidence);
  // Blocks of 50 grid points: the guided selection needs two columns of run-up
  // per block, and 200 points split evenly over 2 or 4 threads.
  constexpr size_t kBlock = 50;
  const int blocks = static_cast<int>((grid + kBlock - 1) / kBlock);
  ParallelFor(blocks, threads, [&](int b) {
    const size_t g0 = static_cast<size_t>(b) * kBlock, g1 = std::min(grid, g0 + kBlock), w = g1 - g0;
    const auto used = static_cast<size_t>(std::count_if(use.begin(), use.end(), [](char u) { return u != 0; }));
    std::vector<std::vector<double>> ck(w, std::vector<double>(used)), ca(w, std::vector<double>(used));
    size_t i = 0;
    for (size_t r = 0; r < rows; ++r) {
      if (!use[r]) continue;
      const double* row = k + r * grid + g0;
      const double inv = 1.0 / ks[r];
      for (size_t c = 0; c < w; ++c) {
        ck[c][i] = row[c];
        ca[c][i] = 1.0 - row[c] * inv;
      }
      ++i;
    }
    // Trackers restart in every block, so a column's result never depends on
    // how blocks are shared among threads (and is exact either way).
    ColumnTracker tk, ta;
    for (size_t c = 0; c < w; ++c) {
      const size_t g = g0 + c;
      tk.Next(ck[c], tail, k_out.lower[g], k_out.estimate[g], k_out.upper[g]);
      ta.Next(ca[c], tail, alpha_out.lower[g], alpha_out.estimate[g], alpha_out.upper[g]);
    }
  });
}

}  // namespace detail
}  // namespace porofit::bands

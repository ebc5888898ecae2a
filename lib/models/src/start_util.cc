#include "start_util.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <utility>

#include "porofit/core/error.h"

namespace porofit::detail {

Points PreparePoints(std::span<const double> x, std::span<const double> y, bool positive_x,
                     bool positive_y) {
  std::vector<std::pair<double, double>> pairs;
  const size_t n = std::min(x.size(), y.size());
  pairs.reserve(n);
  for (size_t i = 0; i < n; ++i) {
    if (!std::isfinite(x[i]) || !std::isfinite(y[i])) continue;
    if (positive_x && !(x[i] > 0)) continue;
    if (positive_y && !(y[i] > 0)) continue;
    pairs.emplace_back(x[i], y[i]);
  }
  std::sort(pairs.begin(), pairs.end());
  Points out;
  for (size_t i = 0; i < pairs.size();) {
    size_t j = i;
    double sum = 0;
    while (j < pairs.size() && pairs[j].first == pairs[i].first) sum += pairs[j++].second;
    out.x.push_back(pairs[i].first);
    out.y.push_back(sum / static_cast<double>(j - i));
    i = j;
  }
  return out;
}

LineFit FitLine(std::span<const double> x, std::span<const double> y, std::span<const double> w) {
  LineFit fit;
  const size_t n = std::min(x.size(), y.size());
  double sw = 0, sx = 0, sy = 0;
  for (size_t i = 0; i < n; ++i) {
    const double wi = w.empty() ? 1.0 : w[i];
    if (!(wi > 0)) continue;
    sw += wi;
    sx += wi * x[i];
    sy += wi * y[i];
  }
  if (!(sw > 0)) return fit;
  const double mx = sx / sw, my = sy / sw;
  double sxx = 0, sxy = 0;
  for (size_t i = 0; i < n; ++i) {
    const double wi = w.empty() ? 1.0 : w[i];
    if (!(wi > 0)) continue;
    sxx += wi * (x[i] - mx) * (x[i] - mx);
    sxy += wi * (x[i] - mx) * (y[i] - my);
  }
  // Centred sums: sxx is zero only when every weighted x is the same.
  if (!(sxx > 0)) return fit;
  fit.slope = sxy / sxx;
  fit.intercept = my - fit.slope * mx;
  fit.ok = std::isfinite(fit.slope) && std::isfinite(fit.intercept);
  return fit;
}

double Median(std::vector<double> v) {
  if (v.empty()) return std::nan("");
  std::sort(v.begin(), v.end());
  const size_t m = v.size() / 2;
  return v.size() % 2 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}

double Mean(std::span<const double> v) {
  if (v.empty()) return std::nan("");
  return std::accumulate(v.begin(), v.end(), 0.0) / static_cast<double>(v.size());
}

DataScale ScaleOf(const Points& p) {
  DataScale s;
  std::vector<double> pos_y;
  for (double v : p.y)
    if (v > 0) pos_y.push_back(v);
  if (!pos_y.empty()) {
    s.y_typical = Median(pos_y);
    s.y_max = *std::max_element(pos_y.begin(), pos_y.end());
  }
  double xm = 0;
  for (double v : p.x) xm = std::max(xm, v);
  if (xm > 0) s.x_max = xm;
  return s;
}

double Interior(double v, const ParameterSpec& p, double fallback) {
  if (!std::isfinite(v)) v = fallback;
  const bool has_lo = std::isfinite(p.lower), has_hi = std::isfinite(p.upper);
  if (has_lo && has_hi) {
    const double margin = 1e-3 * (p.upper - p.lower);
    return std::clamp(v, p.lower + margin, p.upper - margin);
  }
  const double step = std::max({std::abs(fallback) * 1e-3, std::abs(v) * 1e-6, 1e-12});
  if (has_lo && !(v > p.lower)) return p.lower + std::max(step, std::abs(p.lower) * 1e-6);
  if (has_hi && !(v < p.upper)) return p.upper - std::max(step, std::abs(p.upper) * 1e-6);
  return v;
}

std::vector<double> FinishStart(std::string_view id, const std::vector<ParameterSpec>& params,
                                std::vector<double> theta, const std::vector<double>& fallback) {
  POROFIT_CHECK(theta.size() == params.size() && fallback.size() == theta.size(),
                "start for '" + std::string(id) + "' has the wrong length");
  for (size_t j = 0; j < theta.size(); ++j) {
    theta[j] = Interior(theta[j], params[j], fallback[j]);
    POROFIT_CHECK(std::isfinite(theta[j]) && theta[j] > params[j].lower &&
                      theta[j] < params[j].upper,
                  "start for '" + std::string(id) + "' parameter " + params[j].name +
                      " is not inside its bounds");
  }
  return theta;
}

// Start for a saturating rise y = y_inf - (y_inf - y_0) exp(-x/x_c), shared
// by exp-modulus (on K) and exp-compliance (on -C, see there):
// y_inf = y_max + 2 % of |y_max|; y_0 from the first two points extrapolated
// to x = 0; x_c from the slope (-1/x_c) of ln(y_inf - y) against x, weighted
// by (y_inf - y)^2 so the point nearest y_inf does not dominate the log.
// Returns {y_inf, y_0, x_c}; y_0 < y_inf always.
std::vector<double> SaturatingRiseStart(const Points& p, double fallback_y, double fallback_x) {
  if (p.empty())
    return {fallback_y + 0.25 * std::abs(fallback_y), fallback_y - 0.25 * std::abs(fallback_y),
            fallback_x};
  const double ymax = *std::max_element(p.y.begin(), p.y.end());
  const double ymin = *std::min_element(p.y.begin(), p.y.end());
  const double span = std::max(ymax - ymin, 0.05 * std::abs(ymax));
  const double y_inf = ymax + std::max(0.02 * std::abs(ymax), 0.02 * span);
  double y_0 = p.y[0];
  if (p.size() >= 2 && p.x[1] > p.x[0])
    y_0 = p.y[0] - p.x[0] * (p.y[1] - p.y[0]) / (p.x[1] - p.x[0]);
  // Noise can make the first segment fall; never start at or above y_inf, and
  // do not extrapolate far below the data either.
  const double lo = ymin - span, hi = std::min(p.y[0], y_inf - 0.1 * span);
  if (!std::isfinite(y_0)) y_0 = p.y[0];
  y_0 = std::clamp(y_0, lo, std::max(lo, hi));

  const double xmax = std::max(p.x.back(), 0.0);
  const double xscale = xmax > 0 ? xmax : fallback_x;
  double x_c = xmax > 0 ? xmax / 3 : fallback_x;
  std::vector<double> lx, ly, w;
  for (size_t i = 0; i < p.size(); ++i) {
    const double gap = y_inf - p.y[i];
    if (!(gap > 0)) continue;
    lx.push_back(p.x[i]);
    ly.push_back(std::log(gap));
    w.push_back(gap * gap);
  }
  const LineFit line = FitLine(lx, ly, w);
  if (line.ok && line.slope < 0) x_c = -1.0 / line.slope;
  // Keep the closure scale within three decades either side of the data.
  x_c = std::clamp(x_c, 1e-3 * xscale, 1e3 * xscale);
  return {y_inf, y_0, x_c};
}

}  // namespace porofit::detail

#pragma once
// Shared pieces of the start heuristics. Lab data arrive unsorted, with
// repeated pressures, noise and sometimes only a handful of points, so every
// heuristic first tidies the points and ends by forcing each value strictly
// inside its parameter's bounds.
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/models/model.h"

namespace porofit::detail {

/// Finite (x, y) pairs sorted by x, with repeated x merged into one point at
/// the mean y. Optionally keeps only x > 0 and/or y > 0.
struct Points {
  std::vector<double> x;
  std::vector<double> y;
  size_t size() const { return x.size(); }
  bool empty() const { return x.empty(); }
};
Points PreparePoints(std::span<const double> x, std::span<const double> y, bool positive_x,
                     bool positive_y);

/// Weighted least-squares line y = intercept + slope x. ok is false if fewer
/// than two distinct x carry positive weight or the result is not finite.
/// Empty w means unit weights.
struct LineFit {
  double intercept = 0;
  double slope = 0;
  bool ok = false;
};
LineFit FitLine(std::span<const double> x, std::span<const double> y,
                std::span<const double> w = {});

double Median(std::vector<double> v);  ///< NaN if empty
double Mean(std::span<const double> v);  ///< NaN if empty

/// Typical scales of the data, with fallbacks for empty input: the median
/// positive y (else 10) and the largest positive x (else 10).
struct DataScale {
  double y_typical = 10;
  double y_max = 10;
  double x_max = 10;
};
DataScale ScaleOf(const Points& p);

/// v moved strictly inside (p.lower, p.upper); a non-finite v is replaced by
/// `fallback` first. Two-sided bounds keep a margin of 1e-3 of the width.
double Interior(double v, const ParameterSpec& p, double fallback);

/// Applies Interior to every entry (fallbacks given per parameter) and
/// checks the result, so a start function can never hand back a bad vector.
std::vector<double> FinishStart(std::string_view id, const std::vector<ParameterSpec>& params,
                                std::vector<double> theta, const std::vector<double>& fallback);

/// Start for a saturating rise y = y_inf - (y_inf - y_0) exp(-x/x_c), shared
/// by exp-modulus (on K) and exp-compliance (on -C): y_inf = y_max plus 2 %;
/// y_0 from the first two points extrapolated to x = 0; x_c from the slope
/// (-1/x_c) of ln(y_inf - y) against x (common practice). Returns
/// {y_inf, y_0, x_c} with y_0 < y_inf and x_c > 0, all finite; the fallbacks
/// are used for empty data.
std::vector<double> SaturatingRiseStart(const Points& p, double fallback_y, double fallback_x);

}  // namespace porofit::detail

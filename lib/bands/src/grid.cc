#include "porofit/bands/grid.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include "porofit/core/error.h"

namespace porofit::bands {
namespace {

std::string Violation(const char* field, double value, const char* rule) {
  return std::string("grid.") + field + " = " + FormatNumber(value) + " violates " + rule;
}

std::string OverLimit(const char* field, long long value, int limit) {
  return std::string("grid.") + field + " = " + std::to_string(value) + " exceeds the limit of " + std::to_string(limit);
}

}  // namespace

std::string GridSpec::Validate() const {
  if (spacing == GridSpacing::kExplicit) {
    if (pressures.empty()) return "grid.pressures is empty: an explicit grid needs at least one pressure";
    if (pressures.size() > static_cast<size_t>(kMaxGridPoints))
      return "grid.pressures lists " + std::to_string(pressures.size()) + " pressures, over the limit of " +
             std::to_string(kMaxGridPoints);
    for (double p : pressures)
      if (!(std::isfinite(p) && p >= 0)) return Violation("pressures", p, "finite pressure >= 0");
    return {};
  }
  if (count < 2) return Violation("count", count, "count >= 2");
  if (count > kMaxGridPoints) return OverLimit("count", count, kMaxGridPoints);
  if (!(std::isfinite(margin) && margin >= 0)) return Violation("margin", margin, "margin >= 0");
  if (from && !(std::isfinite(*from) && *from >= 0)) return Violation("from", *from, "finite from >= 0");
  if (to && !(std::isfinite(*to) && *to >= 0)) return Violation("to", *to, "finite to >= 0");
  if (from && to && !(*from < *to))
    return "grid.from = " + FormatNumber(*from) + " violates from < to = " + FormatNumber(*to);
  if (spacing == GridSpacing::kLog && from && !(*from > 0)) return Violation("from", *from, "from > 0 (log spacing)");
  return {};
}

PressureGrid GridAt(std::vector<double> pressure, double data_min, double data_max) {
  PressureGrid g;
  std::sort(pressure.begin(), pressure.end());
  g.pressure = std::move(pressure);
  g.data_min = data_min;
  g.data_max = data_max;
  g.extrapolated.resize(g.pressure.size());
  for (size_t i = 0; i < g.pressure.size(); ++i)
    g.extrapolated[i] = g.pressure[i] < data_min || g.pressure[i] > data_max;
  return g;
}

PressureGrid MakeGrid(const GridSpec& spec, std::span<const double> data_pressure) {
  if (std::string bad = spec.Validate(); !bad.empty()) throw InputError({}, bad);
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double p : data_pressure) {
    if (!std::isfinite(p)) continue;
    lo = std::min(lo, p);
    hi = std::max(hi, p);
  }
  if (!(lo <= hi)) throw InputError({}, "grid: the data have no finite pressure to span");
  if (spec.spacing == GridSpacing::kExplicit) return GridAt(spec.pressures, lo, hi);

  const double span = hi - lo;
  double from, to;
  if (spec.spacing == GridSpacing::kLinear) {
    from = spec.from.value_or(std::max(0.0, lo - spec.margin * span));
    to = spec.to.value_or(hi + spec.margin * span);
  } else {
    if (!spec.from && !(lo > 0))
      throw InputError({}, "grid: log spacing needs pressures > 0, the data reach " + FormatNumber(lo) + " Pa");
    const double widen = lo > 0 ? std::pow(hi / lo, spec.margin) : 1.0;
    from = spec.from.value_or(lo / widen);
    to = spec.to.value_or(hi * widen);
  }
  if (!(from < to)) {
    // One distinct data pressure and no margin: widen by 10 % so the grid has a span.
    if (from == to && !spec.from && !spec.to) {
      from = std::max(0.0, from * 0.9);
      to = to * 1.1;
    }
    if (!(from < to))
      throw InputError({}, "grid: from = " + FormatNumber(from) + " Pa is not below to = " + FormatNumber(to) + " Pa");
  }
  if (spec.spacing == GridSpacing::kLog && !(from > 0))
    throw InputError({}, "grid: log spacing needs from > 0, got " + FormatNumber(from) + " Pa");

  std::vector<double> p(static_cast<size_t>(spec.count));
  const double m = spec.count - 1;
  for (int i = 0; i < spec.count; ++i) {
    const double t = i / m;
    p[static_cast<size_t>(i)] = spec.spacing == GridSpacing::kLinear
                                    ? from + t * (to - from)
                                    : std::exp(std::log(from) + t * (std::log(to) - std::log(from)));
  }
  p.front() = from;
  p.back() = to;
  return GridAt(std::move(p), lo, hi);
}

}  // namespace porofit::bands

#pragma once
// Axis ticks and number formatting used by porofit::plot, public so they can
// be tested and reused (e.g. for tables next to a figure).
#include <string>
#include <string_view>
#include <vector>

#include "porofit/plot/figure.h"

namespace porofit::plot {

/// Ticks for one axis. lo/hi: the axis range actually drawn.
struct TickSet {
  double lo = 0, hi = 1;
  std::vector<double> major;        ///< labelled, ascending, inside [lo, hi]
  std::vector<std::string> labels;  ///< one per major tick
  std::vector<double> minor;        ///< unlabelled (log axes: 2..9 per decade)
};

/// Nice ticks for the data range [lo, hi] (either order).
/// Linear: steps of 1, 2 or 5 times a power of ten, about `target` majors.
/// Log: majors at decades (every k-th decade for wide ranges), minors at
/// 2..9 x 10^k; lo and hi must be > 0. snap: widen [lo, hi] to the enclosing
/// major ticks (used when the axis range comes from the data). A degenerate
/// range (lo == hi) is widened to lo +/- max(|lo| / 10, 1) (log: lo / 10 ..
/// lo * 10). Non-finite input, or lo/hi <= 0 on a log axis, throws
/// std::invalid_argument.
TickSet MakeTicks(double lo, double hi, Scale scale, bool snap, int target = 6);

/// Compact, locale-free tick label: fixed notation with just enough decimals
/// for `step` ("0.25", "-10", "0"), or "1e-05"-style for |v| >= 1e6 or
/// step < 1e-4. Never prints "-0".
std::string FormatTick(double value, double step);

/// Fixed-point with `decimals` digits, trailing zeros trimmed, "-0" -> "0".
/// Deterministic across locales (std::to_chars). NaN -> "nan".
std::string FormatNumber(double value, int decimals = 2);

/// Escapes & < > " ' for XML text and attribute values; drops control
/// characters that XML 1.0 forbids (keeps tab, newline, carriage return).
std::string EscapeXml(std::string_view text);

}  // namespace porofit::plot

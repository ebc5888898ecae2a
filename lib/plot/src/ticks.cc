#include "porofit/plot/ticks.h"

#include <charconv>
#include <cmath>
#include <stdexcept>
#include <string>

namespace porofit::plot {
namespace {

// Relative slack so that values like 0.30000000000000004 still count as ticks.
constexpr double kEps = 1e-9;

std::string ToChars(double v, std::chars_format fmt, int precision) {
  char buf[64];
  auto r = std::to_chars(buf, buf + sizeof buf, v, fmt, precision);
  return std::string(buf, r.ptr);
}

void LinearTicks(double lo, double hi, bool snap, int target, TickSet& t) {
  const double raw = (hi - lo) / std::max(target, 2);
  const double mag = std::pow(10.0, std::floor(std::log10(raw)));
  const double norm = raw / mag;
  const double mult = norm <= 1.0 + kEps ? 1 : norm <= 2.0 + kEps ? 2 : norm <= 5.0 + kEps ? 5 : 10;
  const double step = mult * mag;
  const double k0 = std::floor(lo / step + kEps), k1 = std::ceil(hi / step - kEps);
  if (snap) {
    lo = k0 * step;
    hi = k1 * step;
  }
  t.lo = lo;
  t.hi = hi;
  const double slack = step * kEps * 1e3;
  for (double k = k0; k <= k1; k += 1) {
    double v = k * step;  // integer multiple: no accumulated rounding
    if (std::abs(v) < slack) v = 0;
    if (v < lo - slack || v > hi + slack) continue;
    t.major.push_back(v);
    t.labels.push_back(FormatTick(v, step));
  }
}

void LogTicks(double lo, double hi, bool snap, int target, TickSet& t) {
  const double d0 = std::floor(std::log10(lo) + kEps), d1 = std::ceil(std::log10(hi) - kEps);
  if (snap) {
    lo = std::pow(10.0, d0);
    hi = std::pow(10.0, d1);
  }
  t.lo = lo;
  t.hi = hi;
  const double decades = d1 - d0;
  const double every = std::max(1.0, std::ceil(decades / std::max(target, 2)));
  const double rlo = lo * (1 - kEps), rhi = hi * (1 + kEps);
  for (double d = d0; d <= d1; d += 1) {
    const double base = std::pow(10.0, d);
    if (std::fmod(d - d0, every) == 0 && base >= rlo && base <= rhi) {
      t.major.push_back(base);
      t.labels.push_back(FormatTick(base, base));
    }
    if (decades <= 8) {
      for (int m = 2; m <= 9; ++m) {
        const double v = m * base;
        if (v >= rlo && v <= rhi) t.minor.push_back(v);
      }
    }
  }
  // Less than a decade shown: label 1-2-5 multiples too so the axis can be read.
  if (t.major.size() < 2) {
    t.major.clear();
    t.labels.clear();
    for (double d = d0; d <= d1; d += 1) {
      for (double m : {1.0, 2.0, 5.0}) {
        const double v = m * std::pow(10.0, d);
        if (v >= rlo && v <= rhi) {
          t.major.push_back(v);
          t.labels.push_back(FormatTick(v, std::pow(10.0, d)));
        }
      }
    }
  }
}

}  // namespace

TickSet MakeTicks(double lo, double hi, Scale scale, bool snap, int target) {
  if (!std::isfinite(lo) || !std::isfinite(hi))
    throw std::invalid_argument("axis range must be finite");
  if (lo > hi) std::swap(lo, hi);
  TickSet t;
  if (scale == Scale::kLog) {
    if (lo <= 0) throw std::invalid_argument("log axis range must be > 0, got " + FormatNumber(lo, 6));
    if (hi / lo < 1 + kEps) {
      lo /= 10;
      hi *= 10;
    }
    LogTicks(lo, hi, snap, target, t);
  } else {
    if (hi - lo <= kEps * std::max(std::abs(lo), std::abs(hi))) {
      const double pad = std::max(std::abs(lo) / 10, 1.0);
      lo -= pad;
      hi += pad;
    }
    LinearTicks(lo, hi, snap, target, t);
  }
  return t;
}

std::string FormatTick(double value, double step) {
  if (value == 0) return "0";
  const double a = std::abs(value);
  if (a >= 1e6 || std::abs(step) < 1e-4) {
    // Shortest round-trip scientific form, e.g. "1e-05", "2.5e+06".
    char buf[64];
    auto r = std::to_chars(buf, buf + sizeof buf, value, std::chars_format::scientific);
    return std::string(buf, r.ptr);
  }
  int decimals = 0;
  const double s = std::abs(step);
  if (s < 1) decimals = static_cast<int>(std::ceil(-std::log10(s) - kEps));
  // Steps such as 0.25 or 2.5 need one digit more than their magnitude.
  while (decimals < 10) {
    const double scaled = s * std::pow(10.0, decimals);
    if (std::abs(scaled - std::round(scaled)) < 1e-6 * std::max(1.0, scaled)) break;
    ++decimals;
  }
  return FormatNumber(value, decimals);
}

std::string FormatNumber(double value, int decimals) {
  if (std::isnan(value)) return "nan";
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  std::string s = ToChars(value, std::chars_format::fixed, decimals);
  if (s.find('.') != std::string::npos) {
    while (s.back() == '0') s.pop_back();
    if (s.back() == '.') s.pop_back();
  }
  if (s == "-0") s = "0";
  return s;
}

std::string EscapeXml(std::string_view text) {
  std::string out;
  out.reserve(text.size());
  for (char c : text) {
    switch (c) {
      case '&': out += "&amp;"; break;
      case '<': out += "&lt;"; break;
      case '>': out += "&gt;"; break;
      case '"': out += "&quot;"; break;
      case '\'': out += "&apos;"; break;
      default:
        if (static_cast<unsigned char>(c) < 0x20 && c != '\t' && c != '\n' && c != '\r') break;
        out += c;
    }
  }
  return out;
}

}  // namespace porofit::plot

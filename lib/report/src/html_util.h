#pragma once
// Small text helpers of the HTML report (private).
#include <cmath>
#include <cstdio>
#include <string>
#include <string_view>

#include "porofit/report/html.h"

namespace porofit::detail {

/// printf-style number, "–" (en dash) for NaN / infinity: a value that was
/// not computed is visibly absent, never 0.
inline std::string HtmlNum(const char* format, double v) {
  if (!std::isfinite(v)) return "&ndash;";
  char buf[64];
  std::snprintf(buf, sizeof buf, format, v);
  return buf;
}

/// Significant-digit form for numbers of any size.
inline std::string Sig(double v, int digits = 4) {
  if (!std::isfinite(v)) return "&ndash;";
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*g", digits, v);
  return buf;
}

inline std::string Tag(std::string_view name, std::string_view escaped_body, std::string_view attributes = {}) {
  std::string s = "<";
  s += name;
  if (!attributes.empty()) {
    s += ' ';
    s += attributes;
  }
  s += '>';
  s += escaped_body;
  s += "</";
  s += name;
  s += '>';
  return s;
}

inline std::string Esc(std::string_view s) { return HtmlEscape(s); }

/// The caption sentence for a band method and level, e.g. "95 % delta-method".
inline std::string LevelText(double confidence) {
  return HtmlNum("%.0f", 100 * confidence) + "&nbsp;%";
}

}  // namespace porofit::detail

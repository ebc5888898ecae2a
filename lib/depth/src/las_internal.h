#pragma once
// Small text helpers shared by the LAS reader (las.cc), its curve-use checks
// (las_use.cc) and the density profile (density_log.cc).
#include <cctype>
#include <charconv>
#include <cmath>
#include <string>

#include "porofit/depth/las.h"

namespace porofit::depth::las_detail {

inline std::string Upper(std::string s) {
  for (char& c : s) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  return s;
}

inline bool IsSpace(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\f' || c == '\v'; }

inline std::string Trim(const std::string& s) {
  size_t a = 0, b = s.size();
  while (a < b && IsSpace(s[a])) ++a;
  while (b > a && IsSpace(s[b - 1])) --b;
  return s.substr(a, b - a);
}

/// A finite number written in full (from_chars rules, a leading '+' allowed).
inline bool ParseNumber(const std::string& s, double* out) {
  if (s.empty()) return false;
  const char* first = s.data();
  const char* last = s.data() + s.size();
  if (*first == '+') ++first;  // from_chars rejects a leading '+'
  auto [ptr, ec] = std::from_chars(first, last, *out);
  return ec == std::errc() && ptr == last && std::isfinite(*out);
}

/// Metres per unit for the length units LAS files use for depth (M, METER(S),
/// METRE(S); F, FT, FEET, FOOT; any case), 0 for anything else.
inline double LengthFactor(const std::string& unit) {
  const std::string u = Upper(unit);
  if (u == "M" || u == "METER" || u == "METERS" || u == "METRE" || u == "METRES") return 1.0;
  if (u == "F" || u == "FT" || u == "FEET" || u == "FOOT") return 0.3048;  // exact by definition
  return 0.0;
}

/// A warning at file:line:col (built member by member: GCC 12 reports a
/// false maybe-uninitialized for the nested brace form).
inline LasWarning MakeWarning(const std::string& file, int line, int column, const std::string& message) {
  LasWarning w;
  w.where.file = file;
  w.where.line = line;
  w.where.column = column;
  w.message = message;
  return w;
}

}  // namespace porofit::depth::las_detail

#include "porofit/core/error.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <cstdio>
#include <vector>

namespace porofit {

std::string SourceLocation::ToString() const {
  std::string s = file.empty() ? std::string("<input>") : file;
  if (line > 0) {
    s += ":" + std::to_string(line);
    if (column > 0) s += ":" + std::to_string(column);
  }
  return s;
}

namespace {

// Length of the valid UTF-8 sequence starting at s[i], or 0 (RFC 3629: no
// overlong forms, no surrogates, nothing above U+10FFFF).
size_t Utf8Length(std::string_view s, size_t i) {
  const auto b = [&](size_t k) { return static_cast<unsigned char>(s[k]); };
  const unsigned char c = b(i);
  if (c < 0x80) return 1;
  size_t n = 0;
  unsigned char lo = 0x80, hi = 0xBF;  // allowed range of the second byte
  if (c >= 0xC2 && c <= 0xDF) n = 2;
  else if (c == 0xE0) n = 3, lo = 0xA0;
  else if (c >= 0xE1 && c <= 0xEC) n = 3;
  else if (c == 0xED) n = 3, hi = 0x9F;
  else if (c >= 0xEE && c <= 0xEF) n = 3;
  else if (c == 0xF0) n = 4, lo = 0x90;
  else if (c >= 0xF1 && c <= 0xF3) n = 4;
  else if (c == 0xF4) n = 4, hi = 0x8F;
  else return 0;
  if (i + n > s.size()) return 0;
  if (b(i + 1) < lo || b(i + 1) > hi) return 0;
  for (size_t k = 2; k < n; ++k)
    if (b(i + k) < 0x80 || b(i + k) > 0xBF) return 0;
  return n;
}

}  // namespace

std::string PrintableText(std::string_view text) {
  static const char kHex[] = "0123456789ABCDEF";
  std::string out;
  out.reserve(text.size());
  for (size_t i = 0; i < text.size();) {
    const unsigned char c = static_cast<unsigned char>(text[i]);
    const size_t n = Utf8Length(text, i);
    const bool control = n == 1 && (c < 0x20 || c == 0x7F) && c != '\n' && c != '\t';
    if (n == 0 || control) {
      out += "\\x";
      out += kHex[c >> 4];
      out += kHex[c & 0xF];
      ++i;
    } else {
      out.append(text.substr(i, n));
      i += n;
    }
  }
  return out;
}

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(PrintableText(where.ToString()) + ": error: " + PrintableText(message)),
      where_(std::move(where)),
      message_(PrintableText(message)) {}

std::string FormatNumber(double value) {
  char buf[64];
  auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, value);
  if (ec != std::errc()) return "?";
  return std::string(buf, ptr);
}

namespace {

std::string Fixed(double v, int decimals) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*f", std::max(0, decimals), v);
  std::string s = buf;
  if (s.find_first_not_of("-0.") == std::string::npos && s.front() == '-') s.erase(0, 1);  // no "-0.00"
  return s;
}

std::string Scientific(double v, int significant) {
  char buf[64];
  std::snprintf(buf, sizeof buf, "%.*e", std::max(0, significant - 1), v);
  std::string s = buf;  // 3.20e+06 -> 3.20e6
  const size_t e = s.find('e');
  std::string exp = s.substr(e + 1);
  const bool negative = exp[0] == '-';
  exp.erase(0, 1);
  while (exp.size() > 1 && exp[0] == '0') exp.erase(0, 1);
  return s.substr(0, e) + "e" + (negative ? "-" : "") + exp;
}

// Decimals that keep `significant` digits of v in fixed notation.
int DecimalsFor(double v, int significant) {
  return significant - 1 - static_cast<int>(std::floor(std::log10(std::fabs(v))));
}

}  // namespace

std::string FormatRounded(double value, int significant) {
  if (std::isnan(value)) return "nan";
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  if (value == 0) return "0";
  const double a = std::fabs(value);
  if (a < 1e-4 || a >= 1e6) return Scientific(value, significant);
  // Round first so that 9.996 with 3 digits becomes 10.0, not 10.00.
  const int d = DecimalsFor(value, significant);
  const double scale = std::pow(10.0, d);
  const double rounded = std::round(value * scale) / scale;
  return Fixed(rounded, rounded == 0 ? d : DecimalsFor(rounded, significant));
}

std::string FormatPlusMinus(double value, double error) {
  if (!(std::isfinite(error) && error > 0) || !std::isfinite(value)) return FormatRounded(value) + " ± ?";
  const double a = std::max(std::fabs(value), error);
  if (a < 1e-4 || a >= 1e6) return Scientific(value, 3) + " ± " + Scientific(error, 2);
  const int d = DecimalsFor(std::round(error * std::pow(10.0, DecimalsFor(error, 2))) /
                                std::pow(10.0, DecimalsFor(error, 2)),
                            2);
  return Fixed(value, d) + " ± " + Fixed(error, d);
}

int EditDistance(const std::string& a, const std::string& b) {
  std::vector<int> prev(b.size() + 1), cur(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) prev[j] = static_cast<int>(j);
  for (size_t i = 1; i <= a.size(); ++i) {
    cur[0] = static_cast<int>(i);
    for (size_t j = 1; j <= b.size(); ++j) {
      const int sub = prev[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, sub});
    }
    std::swap(prev, cur);
  }
  return prev[b.size()];
}

namespace detail {
void CheckFailed(const char* expr, const char* file, int line, const std::string& msg) {
  std::fprintf(stderr, "%s:%d: internal check failed: %s (%s)\n", file, line, expr, msg.c_str());
  std::abort();
}
}  // namespace detail

}  // namespace porofit

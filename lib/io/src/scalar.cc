#include "scalar.h"

#include <charconv>
#include <cmath>

#include "porofit/core/units.h"

namespace porofit::io::detail {
namespace {

std::string_view Trim(std::string_view s) {
  while (!s.empty() && (s.front() == ' ' || s.front() == '\t')) s.remove_prefix(1);
  while (!s.empty() && (s.back() == ' ' || s.back() == '\t')) s.remove_suffix(1);
  return s;
}

// Exponent after '^': a number or "(a/b)".
bool ParseExponent(std::string_view& s, double& e) {
  if (!s.empty() && s.front() == '(') {
    const size_t close = s.find(')');
    if (close == std::string_view::npos) return false;
    std::string_view inner = s.substr(1, close - 1);
    const size_t slash = inner.find('/');
    double a = 0, b = 1;
    auto parse = [](std::string_view t, double& v) {
      t = Trim(t);
      auto [p, ec] = std::from_chars(t.data(), t.data() + t.size(), v);
      return ec == std::errc() && p == t.data() + t.size();
    };
    if (slash == std::string_view::npos) {
      if (!parse(inner, a)) return false;
    } else if (!parse(inner.substr(0, slash), a) || !parse(inner.substr(slash + 1), b) || b == 0) {
      return false;
    }
    e = a / b;
    s.remove_prefix(close + 1);
    return true;
  }
  auto [p, ec] = std::from_chars(s.data(), s.data() + s.size(), e);
  if (ec != std::errc()) return false;
  s.remove_prefix(static_cast<size_t>(p - s.data()));
  return true;
}

}  // namespace

std::optional<NumberText> SplitNumberUnit(std::string_view text) {
  text = Trim(text);
  if (!text.empty() && text.front() == '+') text.remove_prefix(1);
  NumberText out;
  auto [p, ec] = std::from_chars(text.data(), text.data() + text.size(), out.value,
                                 std::chars_format::general);
  if (ec != std::errc()) return std::nullopt;
  out.unit = std::string(Trim(text.substr(static_cast<size_t>(p - text.data()))));
  return out;
}

std::optional<UnitExpression> ParseUnitExpression(std::string_view text) {
  std::string_view s = Trim(text);
  if (s.empty()) return std::nullopt;
  UnitExpression out;
  int sign = +1;  // +1 multiply, -1 divide
  while (true) {
    s = Trim(s);
    // One factor: a unit name (letters) or "1".
    size_t n = 0;
    while (n < s.size() && s[n] != '/' && s[n] != '*' && s[n] != '^' && s[n] != ' ') ++n;
    const std::string_view name = s.substr(0, n);
    s.remove_prefix(n);
    double factor = 1, dim = 0;
    if (name == "1") {
      factor = 1;
      dim = 0;
    } else if (auto f = units::ToSiFactor(units::Quantity::kPressure, name)) {
      factor = *f;
      dim = 1;
    } else {
      return std::nullopt;
    }
    s = Trim(s);
    double e = 1;
    if (!s.empty() && s.front() == '^') {
      s.remove_prefix(1);
      s = Trim(s);
      if (!ParseExponent(s, e)) return std::nullopt;
    }
    out.si_factor *= std::pow(factor, sign * e);
    out.pressure_exponent += sign * e * dim;
    s = Trim(s);
    if (s.empty()) break;
    if (s.front() == '/') sign = -1;
    else if (s.front() == '*') sign = +1;
    else return std::nullopt;
    s.remove_prefix(1);
  }
  return out;
}

void CheckUnitInRange(const UnitExpression& u, const std::string& unit, const std::string& of,
                      const SourceLocation& at) {
  if (std::isfinite(u.si_factor) && u.si_factor > 0) return;
  throw InputError(at, "unit '" + unit + "' of " + of +
                           " is out of range: its factor to SI units is not a finite number (pressure exponent " +
                           FormatNumber(u.pressure_exponent) + "); use a smaller exponent");
}

void RequirePlausibleText(units::Measured m, const std::string& label, const std::string& text, double si,
                          const SourceLocation& at) {
  if (auto nt = SplitNumberUnit(text)) units::RequirePlausible(m, label, nt->value, nt->unit, si, false, at);
}

void RequirePlausibleSigmaText(units::Measured m, const std::string& label, const std::string& text,
                               double sigma_si, double value_si, const SourceLocation& at) {
  if (auto nt = SplitNumberUnit(text))
    units::RequirePlausibleSigma(m, label, nt->value, nt->unit, sigma_si, value_si, false, at);
}

}  // namespace porofit::io::detail

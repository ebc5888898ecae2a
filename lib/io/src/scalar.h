#pragma once
// Numbers with units as written in study files: "12.5 GPa", "3 %", "0.21".
#include <optional>
#include <string>
#include <string_view>

#include "porofit/core/error.h"
#include "porofit/core/plausible.h"

namespace porofit::io::detail {

struct NumberText {
  double value = 0;
  std::string unit;  ///< trimmed text after the number; empty if none
};

/// Splits "12.5 GPa" (or "12.5GPa") into 12.5 and "GPa". Returns nullopt if
/// the text does not start with a number.
std::optional<NumberText> SplitNumberUnit(std::string_view text);

/// A product of powers of pressure units, as used by model parameters
/// ("GPa", "1/GPa", "GPa/MPa", "GPa/MPa^(1/3)", "1"): SI factor and the
/// exponent of the pressure dimension.
struct UnitExpression {
  double si_factor = 1;
  double pressure_exponent = 0;
};

/// Parses a unit expression built from the pressure units of porofit::units,
/// "1", "/", "*" and "^" with a number or "(a/b)". Returns nullopt if it
/// cannot be parsed.
std::optional<UnitExpression> ParseUnitExpression(std::string_view text);

/// Throws InputError at `at` unless `u`'s SI factor is a finite positive
/// double: an expression such as "GPa^400" (1e3600 Pa^400) parses but cannot
/// be used. `unit` is the text as written, `of` names its owner.
void CheckUnitInRange(const UnitExpression& u, const std::string& unit, const std::string& of,
                      const SourceLocation& at);
/// The plausible-range check (porofit/core/plausible.h) of one value written
/// as `text` ("3.2e6 GPa") at `at`, already converted to `si`; throws
/// InputError naming the likely unit slip. Text that is not a number is left
/// to the caller's own rules.
void RequirePlausibleText(units::Measured m, const std::string& label, const std::string& text, double si,
                          const SourceLocation& at);
/// The same for a 1-sigma uncertainty of `value_si` ("%" or absolute).
void RequirePlausibleSigmaText(units::Measured m, const std::string& label, const std::string& text,
                               double sigma_si, double value_si, const SourceLocation& at);

}  // namespace porofit::io::detail

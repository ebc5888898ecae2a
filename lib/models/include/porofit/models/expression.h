#pragma once
// Models of the user's own: a formula in a small plain-math syntax, parsed
// once into a postfix tape and evaluated with exact derivatives (forward-mode
// automatic differentiation over the tape: each step carries the value and
// its derivative vector, so gradients are exact to rounding).
//
// Syntax (whitespace is ignored):
//   formula  := [ "K" "=" ] sum
//   sum      := product { ("+" | "-") product }
//   product  := signed { ("*" | "/") signed }
//   signed   := ("-" | "+") signed | power
//   power    := atom [ "^" signed ]        right-associative: 2^3^2 = 2^9;
//                                          binds tighter than unary minus:
//                                          -x^2 = -(x^2), 2^-1 = 0.5
//   atom     := number | "P" | parameter | function "(" args ")" | "(" sum ")"
//   number   := digits [ "." digits ] [ ("e" | "E") [sign] digits ]  e.g. 1e-3, .5
//   function := exp(a) | log(a) (natural) | sqrt(a) | pow(a, b)
// "P" is the pressure in working units (MPa, as for the built-in models);
// the value is K in GPa. Names are letters, digits and "_", not starting with
// a digit; every other name must be a declared parameter.
//
// Failure modes: a malformed formula throws FormulaError whose message()
// starts with "column N: " (N one-based, counted in the formula text), e.g.
// "column 12: unknown name 'Kinf' (did you mean 'K_inf'?)". Bad parameter
// declarations (empty id, no parameters, duplicate or reserved names, empty
// unit, si_factor <= 0, missing or out-of-bounds start,
// a parameter the formula never uses) throw FormulaError with column 0.
// Evaluation outside the domain (log of a negative number) returns NaN, which
// the solver treats as an infeasible step.
//
// Thread safety: the returned ModelSpec shares only an immutable tape; every
// evaluation uses its own scratch storage.
#include <limits>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/models/model.h"

namespace porofit {

struct FormulaParameter {
  std::string name;      ///< symbol used in the formula, e.g. "K_inf"
  std::string unit;      ///< working unit, e.g. "GPa"
  double si_factor = 1;  ///< SI value = si_factor * working value
  double lower = -std::numeric_limits<double>::infinity();  ///< bound, working units
  double upper = std::numeric_limits<double>::infinity();   ///< bound, working units
  double start = std::numeric_limits<double>::quiet_NaN();  ///< required, strictly inside bounds
  std::string meaning;   ///< optional one-line description (default: generic text)
};

/// A malformed formula or parameter list. location().column and column() are
/// the one-based column in the formula text (0: not tied to a column).
class FormulaError : public InputError {
 public:
  FormulaError(int column, const std::string& message);
  int column() const { return column_; }

 private:
  int column_;
};

/// Parses `formula` once and returns a complete ModelSpec: value,
/// value_and_gradient, slope (dK/dP), parameters (identity transform), the
/// formula text and a start function returning the declared start values.
/// Throws FormulaError as described above.
ModelSpec MakeFormulaModel(std::string id, std::string_view formula,
                           std::vector<FormulaParameter> params);

}  // namespace porofit

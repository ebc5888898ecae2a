#pragma once
// Models of the user's own: a formula in a small plain-math syntax, parsed
// once into a postfix tape and evaluated with exact derivatives (forward-mode
// automatic differentiation over the tape: each step carries the value and
// its derivative vector, so gradients are exact to rounding).
//
// Syntax (whitespace, including line breaks, is ignored):
//   formula  := [ y "=" ] sum               y: the response symbol, "K" by default
//   sum      := product { ("+" | "-") product }
//   product  := signed { ("*" | "/") signed }
//   signed   := ("-" | "+") signed | power
//   power    := atom [ ("^" | "**") signed ]   right-associative: 2^3^2 = 2^9;
//                                          binds tighter than unary minus:
//                                          -x^2 = -(x^2), 2^-1 = 0.5
//   atom     := number | name | function args | "(" sum ")" | "[" sum "]"
//   args     := "(" sum [ "," sum ] ")" | "[" sum [ "," sum ] "]"
//   number   := digits [ "." digits ] [ ("e" | "E") [sign] digits ]  e.g. 1e-3, .5
//   function := exp | log (natural; "ln" too) | sqrt | sin | cos | tan (radians)
//               | atan (one argument, "arctan" too) | pow(a, b) = a^b
//   name     := letters, digits and "_", not starting with a digit:
//               the x symbol ("P" by default), "pi", a declared parameter or a
//               bound data column (FormulaOptions::columns)
// "**" and square brackets are accepted so that model statements written in
// the Fortran style of published reference problems (NIST StRD:
// "y = b1*(1-exp[-b2*x])", "x**b2") can be used as printed.
// By default "P" is the pressure in working units (MPa, as for the built-in
// models) and the value is K in GPa; FormulaOptions changes the symbols and
// units (e.g. a dimensionless model: x_unit = y_unit = "1").
//
// Limits: a formula is at most kMaxFormulaLength bytes long and nests at most
// kMaxFormulaDepth levels (each parenthesis or bracket, function call, unary
// sign and right-hand side of "^" or "**" opens one), so that parsing uses
// bounded stack; a number literal must be a finite double (1e999 is refused).
//
// Failure modes: a malformed formula throws FormulaError whose message()
// starts with "column N: " (N one-based, counted in the formula text), e.g.
// "column 12: unknown name 'Kinf' (did you mean 'K_inf'?)". Bad parameter
// declarations (empty id, no parameters, duplicate or reserved names, empty
// unit, si_factor <= 0, missing or out-of-bounds start, transform log with
// lower < 0, a parameter the formula never uses) throw FormulaError with
// column 0. Evaluation outside the domain (log of a negative number) returns
// NaN, which the solver treats as an infeasible step.
//
// Thread safety: the returned ModelSpec shares only an immutable tape; every
// evaluation uses its own scratch storage.
#include <limits>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/models/model.h"

namespace porofit {

/// Longest formula text accepted, in bytes (the longest published model
/// statements are a few hundred characters).
inline constexpr size_t kMaxFormulaLength = 10000;
/// Deepest nesting accepted (see "Limits" above); hand-written formulas
/// rarely nest more than ten levels.
inline constexpr int kMaxFormulaDepth = 256;

struct FormulaParameter {
  std::string name;      ///< symbol used in the formula, e.g. "K_inf"
  std::string unit;      ///< working unit, e.g. "GPa"
  double si_factor = 1;  ///< SI value = si_factor * working value
  double lower = -std::numeric_limits<double>::infinity();  ///< bound, working units
  double upper = std::numeric_limits<double>::infinity();   ///< bound, working units
  double start = std::numeric_limits<double>::quiet_NaN();  ///< required, strictly inside bounds
  std::string meaning;   ///< optional one-line description (default: generic text)
  /// kLog: the solver works on ln(theta) (needs lower >= 0); see ParameterTransform.
  ParameterTransform transform = ParameterTransform::kIdentity;
};

/// Symbols, units and data of a formula model. The defaults make a
/// crack-closure model K(P) in GPa and MPa, like the built-in catalogue.
struct FormulaOptions {
  std::string x_symbol = "P";  ///< the independent variable's name in the formula
  std::string x_unit = "MPa";  ///< working unit of x ("1": dimensionless)
  double x_si_factor = 1e6;    ///< SI value = x_si_factor * working value
  std::string y_symbol = "K";  ///< the response's name (optional "K =" prefix)
  std::string y_unit = "GPa";
  double y_si_factor = 1e9;
  std::string name;       ///< short title; empty: "formula <id>"
  std::string reference;  ///< where the formula comes from; empty: "user formula"
  /// Extra per-point predictors, by name. When any are bound, the model's x
  /// is the 0-based row index i of the data (fed as x = 0, 1, ..., n-1), each
  /// column name evaluates to column[i] (NaN where x is not a row index) and
  /// the x symbol evaluates to i itself. For data with several predictors
  /// (NIST StRD Nelson: x1, x2); slope() is then d/d(index) and meaningless.
  std::vector<std::pair<std::string, std::vector<double>>> columns;
};

/// A malformed formula or parameter list. location().column and column() are
/// the one-based column in the formula text (0: not tied to a column).
/// detail() is the message without the "column N: " prefix; parameter() names
/// the declared parameter a column-0 error is about ("" if none), so that a
/// caller can point at its own source of the declaration.
class FormulaError : public InputError {
 public:
  FormulaError(int column, const std::string& message, std::string parameter = "");
  int column() const { return column_; }
  const std::string& detail() const { return detail_; }
  const std::string& parameter() const { return parameter_; }

 private:
  int column_;
  std::string detail_;
  std::string parameter_;
};

/// Parses `formula` once and returns a complete ModelSpec: value,
/// value_and_gradient, slope (dy/dx), parameters (with their transforms),
/// symbols and units from `options`, the formula text ("K = " prepended when
/// the formula has no left-hand side) and a start function returning the
/// declared start values. Throws FormulaError as described above.
ModelSpec MakeFormulaModel(std::string id, std::string_view formula,
                           std::vector<FormulaParameter> params, const FormulaOptions& options = {});

}  // namespace porofit

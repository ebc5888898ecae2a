#pragma once
// Errors with source locations.
//
// Two channels (see DEVELOPERS.md): bad *input* (study files, data tables,
// command-line values) throws porofit::InputError carrying the file, line and
// column where the offending text was written; a fit that does not converge is
// never an exception but a status inside FitResult. Programmer errors (broken
// invariants) use POROFIT_CHECK, which aborts with file and line.
#include <algorithm>
#include <cstdio>
#include <cstdlib>
#include <stdexcept>
#include <string>
#include <string_view>

namespace porofit {

/// A place in an input file. Line and column are one-based; 0 means unknown
/// (then ToString() omits them).
struct SourceLocation {
  std::string file;
  int line = 0;
  int column = 0;

  /// "file:line:col", "file:line" or "file" depending on what is known.
  std::string ToString() const;
  bool known() const { return !file.empty(); }
};

/// Bad input. what() is the full diagnostic "file:line:col: error: message".
/// message() is the part after "error: ", location() where it was found.
/// Both are valid UTF-8 whatever the input held: the message and the file
/// name pass through PrintableText() (location().file is kept as given).
class InputError : public std::runtime_error {
 public:
  InputError(SourceLocation where, const std::string& message);
  const SourceLocation& location() const { return where_; }
  const std::string& message() const { return message_; }

 private:
  SourceLocation where_;
  std::string message_;
};

/// `text` made safe to print: every byte that is not part of a valid UTF-8
/// sequence, and every control character other than line feed and tab
/// (including NUL and DEL), is written as "\xNN" (two hex digits). Valid
/// UTF-8 text without control characters is returned unchanged.
std::string PrintableText(std::string_view text);

/// Formats a double the way messages show values: shortest round-trip form.
std::string FormatNumber(double value);

/// A number for people to read (summary, report, notes): `significant` digits,
/// trailing zeros kept (0.990), plain decimals for 1e-4 <= |v| < 1e6, else
/// scientific with a bare exponent (3.2e6). "nan", "inf" for those.
std::string FormatRounded(double value, int significant = 3);

/// "value ± error" rounded together: the error to 2 significant digits and the
/// value to the same decimal place ("20.7 ± 4.9"); FormatRounded(value) and
/// " ± ?" when the error is not finite or not positive.
std::string FormatPlusMinus(double value, double error);

/// Levenshtein distance, used for "did you mean" suggestions.
int EditDistance(const std::string& a, const std::string& b);

/// The candidate closest to `word` by edit distance (ties: first), or "" if
/// none is within max(2, |word|/2) edits.
template <class Range>
std::string NearestWord(const std::string& word, const Range& candidates) {
  std::string best;
  int best_d = 1 << 30;
  for (const auto& c : candidates) {
    const int d = EditDistance(word, std::string(c));
    if (d < best_d) { best_d = d; best = std::string(c); }
  }
  const int limit = std::max<int>(2, static_cast<int>(word.size()) / 2);
  return best_d <= limit ? best : std::string();
}

namespace detail {
[[noreturn]] void CheckFailed(const char* expr, const char* file, int line, const std::string& msg);
}  // namespace detail

}  // namespace porofit

/// Invariant check for programmer errors: aborts with file and line.
#define POROFIT_CHECK(cond, msg)                                                \
  do {                                                                          \
    if (!(cond)) ::porofit::detail::CheckFailed(#cond, __FILE__, __LINE__, (msg)); \
  } while (0)

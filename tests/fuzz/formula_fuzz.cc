// libFuzzer harness for the formula parser (porofit::MakeFormulaModel,
// porofit/models/expression.h).
//
// The input is the formula text. Every name in it that is not a function,
// "pi" or the x/y symbol is declared as a parameter (start 1, unbounded), so
// that printed model statements (NIST StRD "y = b1*(1-exp[-b2*x])") and
// study-file formulas ("K = K_inf - ... exp(-P/P_close)") parse as written.
// A formula using the name "x" gets the symbols x and y; otherwise the
// defaults P and K. A model that parses is evaluated (value, gradient, slope)
// at a few x. Expected outcomes: a model, or porofit::InputError
// (FormulaError). Anything else (another exception, crash, leak, UB) is a
// finding.
#include <cstddef>
#include <cstdint>
#include <set>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/models/expression.h"

namespace {

constexpr size_t kMaxParameters = 32;

bool IsNameStart(char c) { return (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || c == '_'; }
bool IsDigit(char c) { return c >= '0' && c <= '9'; }

// Names written in `text`, skipping numbers (so "1e-3" declares no "e").
std::set<std::string> NamesIn(std::string_view text) {
  std::set<std::string> names;
  size_t i = 0;
  while (i < text.size()) {
    if (IsNameStart(text[i])) {
      size_t j = i;
      while (j < text.size() && (IsNameStart(text[j]) || IsDigit(text[j]))) ++j;
      names.emplace(text.substr(i, j - i));
      i = j;
    } else if (IsDigit(text[i]) || text[i] == '.') {
      while (i < text.size() && (IsDigit(text[i]) || text[i] == '.')) ++i;
      if (i < text.size() && (text[i] == 'e' || text[i] == 'E')) {
        ++i;
        if (i < text.size() && (text[i] == '+' || text[i] == '-')) ++i;
        while (i < text.size() && IsDigit(text[i])) ++i;
      }
    } else {
      ++i;
    }
  }
  return names;
}

std::vector<porofit::FormulaParameter> Parameters(const std::set<std::string>& names,
                                                  const porofit::FormulaOptions& options) {
  static const std::set<std::string> kReserved = {"exp", "log", "ln", "sqrt", "sin", "cos",
                                                  "tan", "atan", "arctan", "pow", "pi"};
  std::vector<porofit::FormulaParameter> params;
  for (const std::string& name : names) {
    if (kReserved.count(name) || name == options.x_symbol || name == options.y_symbol) continue;
    if (params.size() == kMaxParameters) break;
    porofit::FormulaParameter p;
    p.name = name;
    p.unit = "1";
    p.start = 1;
    params.push_back(p);
  }
  return params;
}

void Evaluate(const porofit::ModelSpec& spec) {
  const std::vector<double> theta(spec.num_parameters(), 1.0);
  std::vector<double> grad(spec.num_parameters());
  for (double x : {0.0, 1.5, 40.0}) {
    (void)spec.value(theta.data(), x);
    (void)spec.value_and_gradient(theta.data(), x, grad.data());
    (void)spec.slope(theta.data(), x);
  }
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view formula(reinterpret_cast<const char*>(data), size);
  const std::set<std::string> names = NamesIn(formula);
  porofit::FormulaOptions options;
  if (names.count("x")) {
    options.x_symbol = "x";
    options.x_unit = "1";
    options.x_si_factor = 1;
    options.y_symbol = "y";
    options.y_unit = "1";
    options.y_si_factor = 1;
  }
  try {
    Evaluate(porofit::MakeFormulaModel("fuzz", formula, Parameters(names, options), options));
  } catch (const porofit::InputError&) {
    // The expected way to reject bad input (FormulaError derives from it).
  }
  return 0;
}

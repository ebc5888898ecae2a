// Formula models: recursive-descent parser to a postfix tape, and a
// forward-mode evaluator that carries (value, derivative vector) per slot.
#include "porofit/models/expression.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <cstdlib>
#include <memory>
#include <numbers>
#include <span>
#include <utility>

namespace porofit {

FormulaError::FormulaError(int column, const std::string& message, std::string parameter)
    : InputError(SourceLocation{"formula", column > 0 ? 1 : 0, column},
                 column > 0 ? "column " + std::to_string(column) + ": " + message : message),
      column_(column),
      detail_(message),
      parameter_(std::move(parameter)) {}

namespace {

enum class Op {
  kConst, kParam, kPressure, kColumn, kAdd, kSub, kMul, kDiv, kPow, kNeg,
  kExp, kLog, kSqrt, kSin, kCos, kTan, kAtan
};

struct Step {
  Op op;
  double constant = 0;  // kConst
  int index = 0;        // kParam, kColumn
};

// One-argument functions, with the names the syntax accepts (arctan and ln are
// spellings found in published model statements, e.g. the NIST StRD files).
struct Function {
  std::string_view name;
  Op op;
};
constexpr Function kUnary[] = {{"exp", Op::kExp}, {"log", Op::kLog},   {"ln", Op::kLog},
                               {"sqrt", Op::kSqrt}, {"sin", Op::kSin}, {"cos", Op::kCos},
                               {"tan", Op::kTan}, {"atan", Op::kAtan}, {"arctan", Op::kAtan}};

bool IsFunctionName(std::string_view name) {
  if (name == "pow") return true;
  for (const auto& f : kUnary)
    if (f.name == name) return true;
  return false;
}

// Data columns bound to names; the model's x is then the row index.
using Columns = std::vector<std::pair<std::string, std::vector<double>>>;

using Tape = std::vector<Step>;

class Parser {
 public:
  Parser(std::string_view text, const std::vector<FormulaParameter>& params, const FormulaOptions& options)
      : text_(text), params_(params), options_(options), used_(params.size(), false) {}

  Tape Parse() {
    SkipSpace();
    // Optional leading "K =" (the response symbol).
    const std::string_view y = options_.y_symbol;
    if (!y.empty() && text_.substr(pos_, y.size()) == y) {
      size_t q = pos_ + y.size();
      while (q < text_.size() && std::isspace(static_cast<unsigned char>(text_[q]))) ++q;
      if (q < text_.size() && text_[q] == '=') {
        pos_ = q + 1;
        SkipSpace();
      }
    }
    if (pos_ >= text_.size()) Fail(pos_, "empty formula");
    Sum();
    if (pos_ < text_.size()) Fail(pos_, "unexpected " + CharAt(pos_));
    return std::move(tape_);
  }
  const std::vector<bool>& used() const { return used_; }

 private:
  [[noreturn]] void Fail(size_t at, const std::string& msg) const {
    throw FormulaError(static_cast<int>(at) + 1, msg);
  }
  // The character at `at`, quoted: a whole UTF-8 sequence when one starts
  // there (so a message never holds a lone byte of a multi-byte character).
  std::string CharAt(size_t at) const {
    const unsigned char c = static_cast<unsigned char>(text_[at]);
    size_t n = c < 0x80 ? 1 : c >= 0xF0 ? 4 : c >= 0xE0 ? 3 : c >= 0xC0 ? 2 : 1;
    n = std::min(n, text_.size() - at);
    for (size_t k = 1; k < n; ++k)
      if ((static_cast<unsigned char>(text_[at + k]) & 0xC0) != 0x80) n = 1;
    return "'" + std::string(text_.substr(at, n)) + "'";
  }
  // Counts one level of nesting for as long as it lives. Every recursive path
  // of the grammar (parentheses, function arguments, unary signs, the right
  // side of '^') passes through Signed(), which holds one.
  class Nest {
   public:
    explicit Nest(Parser& p) : p_(p) {
      if (++p_.depth_ > kMaxFormulaDepth)
        p_.Fail(p_.pos_, "formula nests deeper than the limit of " + std::to_string(kMaxFormulaDepth) +
                             " levels (parentheses, function calls, signs and powers each count one)");
    }
    ~Nest() { --p_.depth_; }
    Nest(const Nest&) = delete;
    Nest& operator=(const Nest&) = delete;

   private:
    Parser& p_;
  };
  void SkipSpace() {
    while (pos_ < text_.size() && std::isspace(static_cast<unsigned char>(text_[pos_]))) ++pos_;
  }
  bool Accept(char c) {
    if (pos_ < text_.size() && text_[pos_] == c) {
      ++pos_;
      SkipSpace();
      return true;
    }
    return false;
  }
  void Expect(char c) {
    if (Accept(c)) return;
    if (pos_ >= text_.size()) Fail(pos_, "unexpected end of formula (expected '" + std::string(1, c) + "')");
    Fail(pos_, "expected '" + std::string(1, c) + "'");
  }
  void Emit(Op op) { tape_.push_back(Step{op}); }

  void Sum() {
    Product();
    for (;;) {
      if (Accept('+')) { Product(); Emit(Op::kAdd); }
      else if (Accept('-')) { Product(); Emit(Op::kSub); }
      else return;
    }
  }
  void Product() {
    Signed();
    for (;;) {
      if (pos_ + 1 < text_.size() && text_[pos_] == '*' && text_[pos_ + 1] == '*') return;  // "**" is power
      if (Accept('*')) { Signed(); Emit(Op::kMul); }
      else if (Accept('/')) { Signed(); Emit(Op::kDiv); }
      else return;
    }
  }
  void Signed() {
    const Nest nest(*this);
    if (Accept('-')) { Signed(); Emit(Op::kNeg); return; }
    if (Accept('+')) { Signed(); return; }
    Power();
  }
  void Power() {
    Atom();
    if (pos_ + 1 < text_.size() && text_[pos_] == '*' && text_[pos_ + 1] == '*') {
      ++pos_;
      Accept('*');
      Signed();
      Emit(Op::kPow);
      return;
    }
    if (Accept('^')) { Signed(); Emit(Op::kPow); }
  }
  void Atom() {
    if (pos_ >= text_.size()) Fail(pos_, "unexpected end of formula");
    const char c = text_[pos_];
    const size_t start = pos_;
    if (std::isdigit(static_cast<unsigned char>(c)) || c == '.') { Number(); return; }
    if (std::isalpha(static_cast<unsigned char>(c)) || c == '_') {
      while (pos_ < text_.size() &&
             (std::isalnum(static_cast<unsigned char>(text_[pos_])) || text_[pos_] == '_'))
        ++pos_;
      const std::string name(text_.substr(start, pos_ - start));
      SkipSpace();
      Name(name, start);
      return;
    }
    if (Accept('(')) {
      Sum();
      Expect(')');
      return;
    }
    if (Accept('[')) {
      Sum();
      Expect(']');
      return;
    }
    Fail(pos_, "unexpected " + CharAt(pos_));
  }
  void Number() {
    const size_t start = pos_;
    auto digits = [&] {
      size_t n = 0;
      while (pos_ < text_.size() && std::isdigit(static_cast<unsigned char>(text_[pos_]))) ++pos_, ++n;
      return n;
    };
    size_t n = digits();
    if (pos_ < text_.size() && text_[pos_] == '.') { ++pos_; n += digits(); }
    if (n == 0) Fail(start, "malformed number");
    if (pos_ < text_.size() && (text_[pos_] == 'e' || text_[pos_] == 'E')) {
      ++pos_;
      if (pos_ < text_.size() && (text_[pos_] == '+' || text_[pos_] == '-')) ++pos_;
      if (digits() == 0) Fail(start, "malformed number '" + std::string(text_.substr(start, pos_ - start)) + "'");
    }
    const std::string s(text_.substr(start, pos_ - start));
    const double v = std::strtod(s.c_str(), nullptr);
    if (!std::isfinite(v)) Fail(start, "number '" + s + "' is too large to be a finite double");
    tape_.push_back(Step{Op::kConst, v});
    SkipSpace();
  }
  // After a function name: "(" or "[" opens the argument list; returns the closer.
  char OpenArguments(const std::string& name) {
    if (Accept('(')) return ')';
    if (Accept('[')) return ']';
    Fail(pos_, "expected '(' after '" + name + "'");
  }
  bool AtCall() const { return pos_ < text_.size() && (text_[pos_] == '(' || text_[pos_] == '['); }

  void Name(const std::string& name, size_t start) {
    if (IsFunctionName(name)) {
      const char close = OpenArguments(name);
      Sum();
      if (name == "pow") {
        if (!Accept(',')) Fail(pos_, pos_ >= text_.size() ? "unexpected end of formula (pow takes 2 arguments)" : "pow takes 2 arguments: expected ','");
        Sum();
        Expect(close);
        Emit(Op::kPow);
        return;
      }
      if (pos_ < text_.size() && text_[pos_] == ',') Fail(pos_, name + " takes 1 argument");
      Expect(close);
      for (const auto& f : kUnary)
        if (f.name == name) Emit(f.op);
      return;
    }
    int index = -1;
    for (size_t j = 0; j < params_.size(); ++j)
      if (params_[j].name == name) index = static_cast<int>(j);
    int column = -1;
    for (size_t k = 0; k < options_.columns.size(); ++k)
      if (options_.columns[k].first == name) column = static_cast<int>(k);
    const bool is_x = name == options_.x_symbol, is_pi = name == "pi";
    if (index < 0 && column < 0 && !is_x && !is_pi) {
      // A call suggests functions only; a plain name suggests names first.
      std::vector<std::string> candidates;
      if (!AtCall()) {
        candidates.push_back(options_.x_symbol);
        candidates.emplace_back("pi");
        for (const auto& p : params_) candidates.push_back(p.name);
        for (const auto& c : options_.columns) candidates.push_back(c.first);
      }
      for (const auto& f : kUnary) candidates.emplace_back(f.name);
      candidates.emplace_back("pow");
      const std::string near = NearestWord(name, candidates);
      Fail(start, std::string(AtCall() ? "unknown function '" : "unknown name '") + name + "'" +
                      (near.empty() ? "" : " (did you mean '" + near + "'?)"));
    }
    if (AtCall()) Fail(start, "'" + name + "' is not a function");
    if (is_pi) { tape_.push_back(Step{Op::kConst, std::numbers::pi}); return; }
    if (is_x) { Emit(Op::kPressure); return; }
    if (column >= 0) { tape_.push_back(Step{Op::kColumn, 0, column}); return; }
    used_[static_cast<size_t>(index)] = true;
    tape_.push_back(Step{Op::kParam, 0, index});
  }

  std::string_view text_;
  const std::vector<FormulaParameter>& params_;
  const FormulaOptions& options_;
  std::vector<bool> used_;
  Tape tape_;
  size_t pos_ = 0;
  int depth_ = 0;  // levels of Signed() now open
};

// Evaluates the tape with `nd` derivative directions. Each stack slot holds
// [value, d_0 .. d_{nd-1}]. seed_param(j) / seed_p give the derivative vector of
// parameter j / of P: for the gradient, parameter j is unit vector j and P is
// 0; for the slope (nd = 1), parameters are 0 and P is 1.
// With data columns, p is the row index: a column step pushes that row's value
// (NaN for a p that is not a row index).
double Run(const Tape& tape, const Columns& columns, size_t max_depth, const double* theta, double p,
           int nd, bool params_seeded, double* deriv) {
  const size_t w = static_cast<size_t>(nd) + 1;
  // Scratch: on the stack for the usual small formulas, else a per-thread
  // buffer that keeps its capacity (no allocation per evaluation either way).
  constexpr size_t kLocal = 512;
  double local[kLocal];
  double* st = local;
  if (max_depth * w > kLocal) {
    thread_local std::vector<double> heap;
    if (heap.size() < max_depth * w) heap.resize(max_depth * w);
    st = heap.data();
  }
  size_t top = 0;  // doubles in use
  auto push = [&](double v) {
    double* a = st + top;
    a[0] = v;
    for (size_t k = 1; k < w; ++k) a[k] = 0.0;
    top += w;
    return a;
  };
  for (const Step& s : tape) {
    switch (s.op) {
      case Op::kConst: push(s.constant); break;
      case Op::kParam: {
        double* a = push(theta[s.index]);
        if (params_seeded) a[1 + s.index] = 1.0;
        break;
      }
      case Op::kPressure: {
        double* a = push(p);
        if (!params_seeded && nd > 0) a[1] = 1.0;
        break;
      }
      case Op::kColumn: {
        const std::vector<double>& c = columns[static_cast<size_t>(s.index)].second;
        const bool row = p >= 0 && p < static_cast<double>(c.size()) && p == std::floor(p);
        push(row ? c[static_cast<size_t>(p)] : std::numeric_limits<double>::quiet_NaN());
        break;
      }
      case Op::kNeg: {
        double* a = st + top - w;
        for (size_t k = 0; k < w; ++k) a[k] = -a[k];
        break;
      }
      case Op::kExp: case Op::kLog: case Op::kSqrt: case Op::kSin: case Op::kCos: case Op::kTan:
      case Op::kAtan: {
        double* a = st + top - w;
        const double x = a[0];
        double v = 0, d = 0;
        switch (s.op) {
          case Op::kExp: v = std::exp(x); d = v; break;
          case Op::kLog: v = std::log(x); d = 1.0 / x; break;
          case Op::kSqrt: v = std::sqrt(x); d = 0.5 / v; break;
          case Op::kSin: v = std::sin(x); d = std::cos(x); break;
          case Op::kCos: v = std::cos(x); d = -std::sin(x); break;
          case Op::kTan: v = std::tan(x); d = 1.0 + v * v; break;
          default: v = std::atan(x); d = 1.0 / (1.0 + x * x); break;
        }
        a[0] = v;
        for (size_t k = 1; k < w; ++k) a[k] *= d;
        break;
      }
      default: {
        double* b = st + top - w;
        double* a = b - w;
        const double x = a[0], y = b[0];
        switch (s.op) {
          case Op::kAdd: for (size_t k = 0; k < w; ++k) a[k] += b[k]; break;
          case Op::kSub: for (size_t k = 0; k < w; ++k) a[k] -= b[k]; break;
          case Op::kMul:
            a[0] = x * y;
            for (size_t k = 1; k < w; ++k) a[k] = a[k] * y + x * b[k];
            break;
          case Op::kDiv: {
            const double q = x / y;
            a[0] = q;
            for (size_t k = 1; k < w; ++k) a[k] = (a[k] - q * b[k]) / y;
            break;
          }
          case Op::kPow: {
            const double v = std::pow(x, y);
            // d(x^y) = y x^(y-1) dx + x^y ln(x) dy; the ln term only where dy != 0,
            // so a negative base with a constant exponent keeps finite derivatives.
            const double dx = y == 0 ? 0.0 : y * std::pow(x, y - 1);
            for (size_t k = 1; k < w; ++k) {
              double d = a[k] == 0 ? 0.0 : dx * a[k];
              if (b[k] != 0) d += v * std::log(x) * b[k];
              a[k] = d;
            }
            a[0] = v;
            break;
          }
          default: break;
        }
        top -= w;
      }
    }
  }
  if (deriv != nullptr)
    for (int k = 0; k < nd; ++k) deriv[k] = st[1 + static_cast<size_t>(k)];
  return st[0];
}

// What the model's closures share: the tape and the bound data columns.
struct Compiled {
  Tape tape;
  Columns columns;
  size_t max_depth = 0;  // deepest evaluation stack of the tape, in slots
};

size_t MaxDepth(const Tape& tape) {
  size_t depth = 0, deepest = 0;
  for (const Step& s : tape) {
    switch (s.op) {
      case Op::kConst: case Op::kParam: case Op::kPressure: case Op::kColumn: ++depth; break;
      case Op::kAdd: case Op::kSub: case Op::kMul: case Op::kDiv: case Op::kPow: --depth; break;
      default: break;  // one in, one out
    }
    deepest = std::max(deepest, depth);
  }
  return deepest;
}

}  // namespace

ModelSpec MakeFormulaModel(std::string id, std::string_view formula,
                           std::vector<FormulaParameter> params, const FormulaOptions& options) {
  // The registry's completeness rules (registry.cc) must hold for the result.
  if (id.empty()) throw FormulaError(0, "formula model id is empty");
  if (params.empty()) throw FormulaError(0, "formula model '" + id + "' declares no parameters");
  if (options.x_symbol.empty() || options.y_symbol.empty() || options.x_unit.empty() ||
      options.y_unit.empty() || !(options.x_si_factor > 0) || !(options.y_si_factor > 0) ||
      !std::isfinite(options.x_si_factor) || !std::isfinite(options.y_si_factor))
    throw FormulaError(0, "formula model '" + id + "' needs x and y symbols, units and positive si factors");
  auto reserved = [&](const std::string& name) {
    return name == options.x_symbol || name == options.y_symbol || name == "pi" || IsFunctionName(name);
  };
  std::vector<std::string> column_names;
  for (const auto& [name, values] : options.columns) {
    if (name.empty() || reserved(name))
      throw FormulaError(0, "data column name '" + name + "' is empty or reserved");
    for (const auto& other : column_names)
      if (other == name) throw FormulaError(0, "data column '" + name + "' is bound twice");
    column_names.push_back(name);
  }
  for (size_t j = 0; j < params.size(); ++j) {
    const auto& q = params[j];
    if (q.name.empty()) throw FormulaError(0, "parameter " + std::to_string(j + 1) + " has no name");
    for (size_t i = 0; i < j; ++i)
      if (params[i].name == q.name) throw FormulaError(0, "parameter '" + q.name + "' is declared twice", q.name);
    if (reserved(q.name)) throw FormulaError(0, "parameter name '" + q.name + "' is reserved", q.name);
    for (const auto& c : column_names)
      if (c == q.name) throw FormulaError(0, "parameter '" + q.name + "' has the name of a data column", q.name);
    if (q.unit.empty())
      throw FormulaError(0, "parameter '" + q.name + "' needs a unit (\"1\" if dimensionless)", q.name);
    if (!(std::isfinite(q.si_factor) && q.si_factor > 0))
      throw FormulaError(0, "parameter '" + q.name + "' si_factor = " + FormatNumber(q.si_factor) +
                                " must be positive", q.name);
    if (!std::isfinite(q.start))
      throw FormulaError(0, "parameter '" + q.name + "' needs a finite start value", q.name);
    if (!(q.start > q.lower && q.start < q.upper))
      throw FormulaError(0, "start " + q.name + " = " + FormatNumber(q.start) +
                                " is not strictly inside [" + FormatNumber(q.lower) + ", " +
                                FormatNumber(q.upper) + "]", q.name);
    if (q.transform == ParameterTransform::kLog && !(q.lower >= 0))
      throw FormulaError(0, "parameter '" + q.name + "': transform log needs lower >= 0, found lower = " +
                                FormatNumber(q.lower), q.name);
  }
  if (formula.size() > kMaxFormulaLength)
    throw FormulaError(0, "formula of '" + id + "' is " + std::to_string(formula.size()) +
                              " characters long, over the limit of " + std::to_string(kMaxFormulaLength));
  Parser parser(formula, params, options);
  auto compiled = std::make_shared<Compiled>();
  compiled->tape = parser.Parse();
  compiled->columns = options.columns;
  compiled->max_depth = MaxDepth(compiled->tape);
  for (size_t j = 0; j < params.size(); ++j)
    if (!parser.used()[j])
      throw FormulaError(0, "parameter '" + params[j].name + "' does not appear in the formula", params[j].name);
  std::shared_ptr<const Compiled> c = std::move(compiled);

  ModelSpec s;
  s.id = std::move(id);
  s.name = options.name.empty() ? "formula " + s.id : options.name;
  s.x_symbol = options.x_symbol;
  s.x_unit = options.x_unit;
  s.x_si_factor = options.x_si_factor;
  s.y_symbol = options.y_symbol;
  s.y_unit = options.y_unit;
  s.y_si_factor = options.y_si_factor;
  // The display text: a formula written over several lines reads as one line
  // (each line break with the blanks around it becomes one space).
  std::string text;
  for (size_t i = 0; i < formula.size(); ++i) {
    if (formula[i] == '\n' || formula[i] == '\r') {
      while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.pop_back();
      while (i + 1 < formula.size() && std::isspace(static_cast<unsigned char>(formula[i + 1]))) ++i;
      text += ' ';
    } else {
      text += formula[i];
    }
  }
  while (!text.empty() && std::isspace(static_cast<unsigned char>(text.back()))) text.pop_back();
  const size_t first = text.find_first_not_of(" \t\n");
  if (first != std::string::npos) text.erase(0, first);
  const bool has_lhs = text.rfind(options.y_symbol, 0) == 0 &&
                       text.find_first_not_of(" \t", options.y_symbol.size()) != std::string::npos &&
                       text[text.find_first_not_of(" \t", options.y_symbol.size())] == '=';
  s.formula = has_lhs ? text : options.y_symbol + " = " + text;
  s.reference = options.reference.empty() ? "user formula" : options.reference;
  std::vector<double> starts;
  for (const auto& q : params) {
    ParameterSpec ps;
    ps.name = q.name;
    ps.unit = q.unit;
    ps.si_factor = q.si_factor;
    ps.lower = q.lower;
    ps.upper = q.upper;
    ps.transform = q.transform;
    ps.meaning = q.meaning.empty() ? "parameter of the user formula" : q.meaning;
    s.parameters.push_back(ps);
    starts.push_back(q.start);
  }
  const int n = static_cast<int>(params.size());
  s.value = [c](const double* theta, double x) { return Run(c->tape, c->columns, c->max_depth, theta, x, 0, false, nullptr); };
  s.value_and_gradient = [c, n](const double* theta, double x, double* grad) {
    return Run(c->tape, c->columns, c->max_depth, theta, x, n, true, grad);
  };
  s.slope = [c](const double* theta, double x) {
    double d = 0;
    Run(c->tape, c->columns, c->max_depth, theta, x, 1, false, &d);
    return d;
  };
  s.start = [starts](std::span<const double>, std::span<const double>) { return starts; };
  return s;
}

}  // namespace porofit

// Formula models: recursive-descent parser to a postfix tape, and a
// forward-mode evaluator that carries (value, derivative vector) per slot.
#include "porofit/models/expression.h"

#include <cctype>
#include <cmath>
#include <cstdlib>
#include <memory>
#include <span>
#include <utility>

namespace porofit {

FormulaError::FormulaError(int column, const std::string& message)
    : InputError(SourceLocation{"formula", column > 0 ? 1 : 0, column},
                 column > 0 ? "column " + std::to_string(column) + ": " + message : message),
      column_(column) {}

namespace {

enum class Op { kConst, kParam, kPressure, kAdd, kSub, kMul, kDiv, kPow, kNeg, kExp, kLog, kSqrt };

struct Step {
  Op op;
  double constant = 0;  // kConst
  int index = 0;        // kParam
};

using Tape = std::vector<Step>;

class Parser {
 public:
  Parser(std::string_view text, const std::vector<FormulaParameter>& params)
      : text_(text), params_(params), used_(params.size(), false) {}

  Tape Parse() {
    SkipSpace();
    // Optional leading "K =".
    const size_t save = pos_;
    if (pos_ < text_.size() && text_[pos_] == 'K') {
      size_t q = pos_ + 1;
      while (q < text_.size() && std::isspace(static_cast<unsigned char>(text_[q]))) ++q;
      if (q < text_.size() && text_[q] == '=') {
        pos_ = q + 1;
        SkipSpace();
      }
    }
    (void)save;
    if (pos_ >= text_.size()) Fail(pos_, "empty formula");
    Sum();
    if (pos_ < text_.size()) Fail(pos_, "unexpected '" + std::string(1, text_[pos_]) + "'");
    return std::move(tape_);
  }
  const std::vector<bool>& used() const { return used_; }

 private:
  [[noreturn]] void Fail(size_t at, const std::string& msg) const {
    throw FormulaError(static_cast<int>(at) + 1, msg);
  }
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
      if (Accept('*')) { Signed(); Emit(Op::kMul); }
      else if (Accept('/')) { Signed(); Emit(Op::kDiv); }
      else return;
    }
  }
  void Signed() {
    if (Accept('-')) { Signed(); Emit(Op::kNeg); return; }
    if (Accept('+')) { Signed(); return; }
    Power();
  }
  void Power() {
    Atom();
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
    Fail(pos_, "unexpected '" + std::string(1, c) + "'");
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
    tape_.push_back(Step{Op::kConst, std::strtod(s.c_str(), nullptr)});
    SkipSpace();
  }
  void Name(const std::string& name, size_t start) {
    static constexpr std::string_view kFunctions[] = {"exp", "log", "sqrt", "pow"};
    bool is_function = false;
    for (auto f : kFunctions) is_function |= (name == f);
    if (is_function) {
      if (!Accept('(')) Fail(pos_, "expected '(' after '" + name + "'");
      Sum();
      if (name == "pow") {
        if (!Accept(',')) Fail(pos_, pos_ >= text_.size() ? "unexpected end of formula (pow takes 2 arguments)" : "pow takes 2 arguments: expected ','");
        Sum();
        Expect(')');
        Emit(Op::kPow);
        return;
      }
      if (pos_ < text_.size() && text_[pos_] == ',') Fail(pos_, name + " takes 1 argument");
      Expect(')');
      Emit(name == "exp" ? Op::kExp : name == "log" ? Op::kLog : Op::kSqrt);
      return;
    }
    int index = -1;
    for (size_t j = 0; j < params_.size(); ++j)
      if (params_[j].name == name) index = static_cast<int>(j);
    if (index < 0 && name != "P") {
      std::vector<std::string> candidates{"P", "exp", "log", "sqrt", "pow"};
      for (const auto& p : params_) candidates.push_back(p.name);
      const std::string near = NearestWord(name, candidates);
      const bool call = pos_ < text_.size() && text_[pos_] == '(';
      Fail(start, std::string(call ? "unknown function '" : "unknown name '") + name + "'" +
                      (near.empty() ? "" : " (did you mean '" + near + "'?)"));
    }
    if (pos_ < text_.size() && text_[pos_] == '(') Fail(start, "'" + name + "' is not a function");
    if (index < 0) { Emit(Op::kPressure); return; }
    used_[static_cast<size_t>(index)] = true;
    tape_.push_back(Step{Op::kParam, 0, index});
  }

  std::string_view text_;
  const std::vector<FormulaParameter>& params_;
  std::vector<bool> used_;
  Tape tape_;
  size_t pos_ = 0;
};

// Evaluates the tape with `nd` derivative directions. Each stack slot holds
// [value, d_0 .. d_{nd-1}]. seed_param(j) / seed_p give the derivative vector of
// parameter j / of P: for the gradient, parameter j is unit vector j and P is
// 0; for the slope (nd = 1), parameters are 0 and P is 1.
double Run(const Tape& tape, const double* theta, double p, int nd, bool params_seeded,
           double* deriv) {
  const size_t w = static_cast<size_t>(nd) + 1;
  std::vector<double> st;
  st.reserve(w * 8);
  auto push = [&](double v) {
    st.push_back(v);
    st.resize(st.size() + w - 1, 0.0);
    return st.data() + st.size() - w;
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
      case Op::kNeg: {
        double* a = st.data() + st.size() - w;
        for (size_t k = 0; k < w; ++k) a[k] = -a[k];
        break;
      }
      case Op::kExp: case Op::kLog: case Op::kSqrt: {
        double* a = st.data() + st.size() - w;
        const double x = a[0];
        double v, d;
        if (s.op == Op::kExp) { v = std::exp(x); d = v; }
        else if (s.op == Op::kLog) { v = std::log(x); d = 1.0 / x; }
        else { v = std::sqrt(x); d = 0.5 / v; }
        a[0] = v;
        for (size_t k = 1; k < w; ++k) a[k] *= d;
        break;
      }
      default: {
        double* b = st.data() + st.size() - w;
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
        st.resize(st.size() - w);
      }
    }
  }
  if (deriv != nullptr)
    for (int k = 0; k < nd; ++k) deriv[k] = st[1 + static_cast<size_t>(k)];
  return st[0];
}

double RunValue(const Tape& tape, const double* theta, double p) {
  return Run(tape, theta, p, 0, false, nullptr);
}

}  // namespace

ModelSpec MakeFormulaModel(std::string id, std::string_view formula,
                           std::vector<FormulaParameter> params) {
  // The registry's completeness rules (registry.cc) must hold for the result.
  if (id.empty()) throw FormulaError(0, "formula model id is empty");
  if (params.empty()) throw FormulaError(0, "formula model '" + id + "' declares no parameters");
  for (size_t j = 0; j < params.size(); ++j) {
    const auto& q = params[j];
    if (q.name.empty()) throw FormulaError(0, "parameter " + std::to_string(j + 1) + " has no name");
    for (size_t i = 0; i < j; ++i)
      if (params[i].name == q.name) throw FormulaError(0, "parameter '" + q.name + "' is declared twice");
    if (q.name == "P" || q.name == "K" || q.name == "exp" || q.name == "log" || q.name == "sqrt" ||
        q.name == "pow")
      throw FormulaError(0, "parameter name '" + q.name + "' is reserved");
    if (q.unit.empty())
      throw FormulaError(0, "parameter '" + q.name + "' needs a unit (\"1\" if dimensionless)");
    if (!(std::isfinite(q.si_factor) && q.si_factor > 0))
      throw FormulaError(0, "parameter '" + q.name + "' si_factor = " + FormatNumber(q.si_factor) +
                                " must be positive");
    if (!std::isfinite(q.start))
      throw FormulaError(0, "parameter '" + q.name + "' needs a finite start value");
    if (!(q.start > q.lower && q.start < q.upper))
      throw FormulaError(0, "start " + q.name + " = " + FormatNumber(q.start) +
                                " is not strictly inside [" + FormatNumber(q.lower) + ", " +
                                FormatNumber(q.upper) + "]");
  }
  Parser parser(formula, params);
  auto tape = std::make_shared<const Tape>(parser.Parse());
  for (size_t j = 0; j < params.size(); ++j)
    if (!parser.used()[j])
      throw FormulaError(0, "parameter '" + params[j].name + "' does not appear in the formula");

  ModelSpec s;
  s.id = std::move(id);
  s.name = "formula " + s.id;
  std::string text(formula);
  const size_t first = text.find_first_not_of(" \t");
  s.formula = (first != std::string::npos && text[first] == 'K' &&
               text.find('=') != std::string::npos)
                  ? text
                  : "K = " + text;
  s.reference = "user formula";
  std::vector<double> starts;
  for (const auto& q : params) {
    ParameterSpec ps;
    ps.name = q.name;
    ps.unit = q.unit;
    ps.si_factor = q.si_factor;
    ps.lower = q.lower;
    ps.upper = q.upper;
    ps.meaning = q.meaning.empty() ? "parameter of the user formula" : q.meaning;
    s.parameters.push_back(ps);
    starts.push_back(q.start);
  }
  const int n = static_cast<int>(params.size());
  s.value = [tape](const double* theta, double x) { return RunValue(*tape, theta, x); };
  s.value_and_gradient = [tape, n](const double* theta, double x, double* grad) {
    return Run(*tape, theta, x, n, true, grad);
  };
  s.slope = [tape](const double* theta, double x) {
    double d = 0;
    Run(*tape, theta, x, 1, false, &d);
    return d;
  };
  s.start = [starts](std::span<const double>, std::span<const double>) { return starts; };
  return s;
}

}  // namespace porofit

// Formula models: agreement with the built-in catalogue, exact derivatives,
// diagnostics for malformed formulas, precedence and associativity.
#include "porofit/models/expression.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <numbers>
#include <string>
#include <thread>
#include <vector>

#include "model_cases.h"
#include "porofit/models/registry.h"

namespace porofit {
namespace {

std::vector<FormulaParameter> ExpModulusParams() {
  return {{"K_inf", "GPa", 1e9, 0, 1e9, 20, ""}, {"K_0", "GPa", 1e9, 0, 1e9, 8, ""},
          {"P_close", "MPa", 1e6, 0, 1e9, 10, ""}};
}

void ExpectSameAsBuiltin(const ModelSpec& mine, const std::string& builtin_id) {
  const ModelSpec* ref = ModelRegistry::Builtin().Find(builtin_id);
  ASSERT_NE(ref, nullptr);
  ASSERT_EQ(mine.num_parameters(), ref->num_parameters());
  const size_t n = ref->num_parameters();
  int checked = 0;
  for (const auto& th : testing::ParameterSets(builtin_id)) {
    for (double p : testing::ProbePressures()) {
      std::vector<double> g1(n), g2(n);
      const double v1 = mine.value_and_gradient(th.data(), p, g1.data());
      const double v2 = ref->value_and_gradient(th.data(), p, g2.data());
      EXPECT_NEAR(v1, v2, 1e-12 * std::abs(v2)) << "P = " << p;
      EXPECT_NEAR(mine.value(th.data(), p), v2, 1e-12 * std::abs(v2));
      for (size_t j = 0; j < n; ++j)
        EXPECT_NEAR(g1[j], g2[j], 1e-12 * std::max(1.0, std::abs(g2[j]))) << "j = " << j << " P = " << p;
      const double s2 = ref->slope(th.data(), p);
      EXPECT_NEAR(mine.slope(th.data(), p), s2, 1e-12 * std::max(1.0, std::abs(s2)));
      ++checked;
    }
  }
  EXPECT_GE(checked, 18);
}

TEST(FormulaModel, ReproducesBuiltinExpModulus) {
  const ModelSpec m =
      MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)*exp(-P/P_close)", ExpModulusParams());
  ExpectSameAsBuiltin(m, "exp-modulus");
}

TEST(FormulaModel, ReproducesBuiltinPowerRefWithLeadingK) {
  const ModelSpec m = MakeFormulaModel(
      "my-power", "K = K_ref * (P/P_ref)^n",
      {{"K_ref", "GPa", 1e9, 0, 1e9, 12, ""}, {"n", "1", 1, 0, 1, 0.2, ""}, {"P_ref", "MPa", 1e6, 0, 1e9, 20, ""}});
  ExpectSameAsBuiltin(m, "power-ref");
}

TEST(FormulaModel, GradientAndSlopeMatchCentralDifferences) {
  // Exercises every operator and function, including a parameter exponent.
  const std::vector<FormulaParameter> params = {
      {"a", "1", 1, 0, 10, 2.0, ""}, {"b", "1", 1, 0, 10, 0.7, ""}, {"c", "1", 1, 0, 10, 1.3, ""}};
  const ModelSpec m = MakeFormulaModel(
      "mix", "a*sqrt(P + c) - log(b + P)/c + pow(P, b) - exp(-b*P)^2 + (a/P)^c - -a", params);
  const std::vector<std::vector<double>> thetas = {{2.0, 0.7, 1.3}, {5.0, 1.9, 0.4}};
  for (const auto& th : thetas) {
    for (double p : {0.5, 2.0, 9.0}) {
      std::vector<double> g(3);
      m.value_and_gradient(th.data(), p, g.data());
      for (size_t j = 0; j < 3; ++j) {
        const double h = 1e-6 * std::max(1.0, std::abs(th[j]));
        auto tp = th, tm = th;
        tp[j] += h;
        tm[j] -= h;
        const double fd = (m.value(tp.data(), p) - m.value(tm.data(), p)) / (2 * h);
        EXPECT_NEAR(g[j], fd, 1e-6 * std::max(1.0, std::abs(fd))) << "j = " << j;
      }
      const double h = 1e-6 * p;
      const double fd = (m.value(th.data(), p + h) - m.value(th.data(), p - h)) / (2 * h);
      EXPECT_NEAR(m.slope(th.data(), p), fd, 1e-6 * std::max(1.0, std::abs(fd)));
    }
  }
}

struct BadCase {
  const char* formula;
  int column;
  const char* fragment;
};

TEST(FormulaModel, MalformedFormulasNameColumnAndProblem) {
  const BadCase cases[] = {
      {"Kinf - (K_inf - K_0)*exp(-P/P_close)", 1, "unknown name 'Kinf' (did you mean 'K_inf'?)"},
      {"K_inf - (K_inf - K_0*exp(-P/P_close)", 37, "unexpected end of formula"},
      {"K_inf - (K_inf - K_0))*exp(-P/P_close)", 22, "unexpected ')'"},
      {"K_inf -", 8, "unexpected end of formula"},
      {"K_inf - K_0 * xp(-P/P_close)", 15, "unknown function 'xp' (did you mean 'exp'?)"},
      {"K_inf - K_0 * exp -P/P_close", 19, "expected '(' after 'exp'"},
      {"K_inf(P) + K_0 + P_close", 1, "'K_inf' is not a function"},
      {"K_inf + K_0 * 1e- + P_close", 15, "malformed number"},
      {"K_inf + K_0 + pow(P_close)", 26, "pow takes 2 arguments"},
      {"K_inf + K_0 + exp(P_close, 2)", 26, "exp takes 1 argument"},
      {"K_inf + K_0 # P_close", 13, "unexpected '#'"},
      {"(K_inf + K_0) (P_close)", 15, "unexpected '('"},
      {"   ", 4, "empty formula"},
      {"K_inf + K_0 * (P_close P)", 24, "expected ')'"},
  };
  for (const auto& c : cases) {
    try {
      MakeFormulaModel("bad", c.formula, ExpModulusParams());
      ADD_FAILURE() << "no error for " << c.formula;
    } catch (const FormulaError& e) {
      EXPECT_EQ(e.column(), c.column) << c.formula << ": " << e.message();
      EXPECT_EQ(e.location().column, c.column);
      EXPECT_NE(e.message().find("column " + std::to_string(c.column) + ": "), std::string::npos)
          << e.message();
      EXPECT_NE(e.message().find(c.fragment), std::string::npos) << c.formula << ": " << e.message();
    }
  }
}

// The parser counts nesting on every recursive path; one level below the
// limit parses (and evaluates), the limit itself is a FormulaError at a column.
std::string Nested(const std::string& shape, int levels) {
  // `levels` is the number of Signed() frames the parser opens.
  const int n = levels - 1;
  if (shape == "parens") return std::string(n, '(') + "K_inf" + std::string(n, ')');
  if (shape == "minus") return std::string(n, '-') + "K_inf";
  std::string s = "K_inf";
  if (shape == "power") for (int i = 0; i < n; ++i) s += "^1";
  if (shape == "call") {
    s = "K_inf";
    for (int i = 0; i < n; ++i) s = "sqrt(" + s + ")";
  }
  return s;
}

TEST(FormulaModel, NestingIsBoundedOnEveryRecursivePath) {
  std::vector<FormulaParameter> p = {{"K_inf", "GPa", 1e9, -1e9, 1e9, 20, ""}};
  for (const char* shape : {"parens", "minus", "power", "call"}) {
    const ModelSpec ok = MakeFormulaModel("deep", Nested(shape, kMaxFormulaDepth), p);
    const double theta[] = {0.5};
    EXPECT_TRUE(std::isfinite(ok.value(theta, 10.0))) << shape;
    try {
      MakeFormulaModel("deep", Nested(shape, kMaxFormulaDepth + 1), p);
      ADD_FAILURE() << shape << " one level over the limit parsed";
    } catch (const FormulaError& e) {
      EXPECT_GT(e.column(), 0) << shape;
      EXPECT_NE(e.detail().find("nests deeper than the limit of " + std::to_string(kMaxFormulaDepth)),
                std::string::npos) << e.detail();
    }
  }
}

TEST(FormulaModel, LengthIsBounded) {
  std::vector<FormulaParameter> p = {{"K_inf", "GPa", 1e9, -1e9, 1e9, 20, ""}};
  std::string long_sum = "K_inf";
  while (long_sum.size() <= kMaxFormulaLength) long_sum += " + 1";
  try {
    MakeFormulaModel("long", long_sum, p);
    ADD_FAILURE() << "a formula over the length limit parsed";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.column(), 0);
    EXPECT_NE(e.detail().find("over the limit of " + std::to_string(kMaxFormulaLength)), std::string::npos) << e.detail();
  }
}

TEST(FormulaModel, LiteralsMustBeFiniteAndCharactersWhole) {
  std::vector<FormulaParameter> p = {{"K_inf", "GPa", 1e9, -1e9, 1e9, 20, ""}};
  try {
    MakeFormulaModel("big", "K_inf + 1e999", p);
    ADD_FAILURE() << "1e999 parsed";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.column(), 9);
    EXPECT_NE(e.detail().find("number '1e999' is too large to be a finite double"), std::string::npos) << e.detail();
  }
  try {
    MakeFormulaModel("sign", "K_inf \xC3\x97 2", p);  // U+00D7 MULTIPLICATION SIGN
    ADD_FAILURE() << "a non-ASCII operator parsed";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.detail(), "unexpected '\xC3\x97'");  // the whole character, not its first byte
  }
}

TEST(FormulaModel, BadParameterDeclarationsAreRejected) {
  auto p = ExpModulusParams();
  p[1].start = std::numeric_limits<double>::quiet_NaN();
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0 + P_close", p), FormulaError);
  p = ExpModulusParams();
  p[2].start = -1;  // below lower bound 0
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0 + P_close", p), FormulaError);
  p = ExpModulusParams();
  p[2].name = "K_0";
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0", p), FormulaError);
  p = ExpModulusParams();
  p[2].name = "P";
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0 + P", p), FormulaError);
  p = ExpModulusParams();
  p[0].unit = "";
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0 + P_close", p), FormulaError);
  p = ExpModulusParams();
  p[0].si_factor = 0;
  EXPECT_THROW(MakeFormulaModel("x", "K_inf + K_0 + P_close", p), FormulaError);
  EXPECT_THROW(MakeFormulaModel("", "K_inf + K_0 + P_close", ExpModulusParams()), FormulaError);
  EXPECT_THROW(MakeFormulaModel("x", "2*P", {}), FormulaError);
  try {
    MakeFormulaModel("x", "K_inf + K_0", ExpModulusParams());
    ADD_FAILURE() << "unused parameter accepted";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.column(), 0);
    EXPECT_NE(e.message().find("'P_close' does not appear"), std::string::npos) << e.message();
  }
}

double Eval(const std::string& formula, double p = 3.0) {
  const ModelSpec m = MakeFormulaModel("t", formula + " + 0*a", {{"a", "1", 1, -10, 10, 1, ""}});
  const double th[1] = {1.0};
  return m.value(th, p);
}

TEST(FormulaModel, PrecedenceAndAssociativityFollowMathConvention) {
  EXPECT_EQ(Eval("2^3^2"), 512.0);        // right-associative
  EXPECT_EQ(Eval("-P^2"), -9.0);          // -(P^2)
  EXPECT_EQ(Eval("(-P)^2"), 9.0);
  EXPECT_EQ(Eval("2^-1"), 0.5);
  EXPECT_EQ(Eval("1 + 2*3"), 7.0);
  EXPECT_EQ(Eval("8/4/2"), 1.0);          // left-associative
  EXPECT_EQ(Eval("8 - 4 - 2"), 2.0);
  EXPECT_EQ(Eval("2*3^2"), 18.0);
  EXPECT_EQ(Eval("-2*-3"), 6.0);
  EXPECT_EQ(Eval("- - P"), 3.0);
  EXPECT_EQ(Eval("1e-3*1000"), 1.0);
  EXPECT_EQ(Eval(".5 + 2.5E1"), 25.5);
  EXPECT_EQ(Eval("pow(2, 3) + sqrt(16)"), 12.0);
  EXPECT_EQ(Eval("log(exp(0))"), 0.0);
  EXPECT_EQ(Eval("K = P/2"), 1.5);
}

TEST(FormulaModel, FillsSpecAndReturnsDeclaredStarts) {
  const ModelSpec m =
      MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)*exp(-P/P_close)", ExpModulusParams());
  EXPECT_EQ(m.id, "my-exp");
  EXPECT_EQ(m.formula, "K = K_inf - (K_inf - K_0)*exp(-P/P_close)");
  ASSERT_EQ(m.num_parameters(), 3u);
  EXPECT_EQ(m.parameters[2].name, "P_close");
  EXPECT_EQ(m.parameters[2].unit, "MPa");
  EXPECT_EQ(m.parameters[2].si_factor, 1e6);
  const std::vector<double> x = {1, 2}, y = {3, 4};
  EXPECT_EQ(m.start(x, y), (std::vector<double>{20, 8, 10}));
  ModelRegistry registry;  // passes the registry's completeness checks (aborts otherwise)
  registry.Add(m);
  EXPECT_NE(registry.Find("my-exp"), nullptr);
}

TEST(FormulaModel, EvaluatesConcurrentlyWithoutInterference) {
  const ModelSpec m =
      MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)*exp(-P/P_close)", ExpModulusParams());
  const double th[3] = {20, 8, 10};
  const double expected = m.value(th, 5.0);
  std::vector<int> bad(4, 0);
  std::vector<std::thread> threads;
  for (int t = 0; t < 4; ++t)
    threads.emplace_back([&, t] {
      double g[3];
      for (int i = 0; i < 20000; ++i)
        if (m.value_and_gradient(th, 5.0, g) != expected) ++bad[static_cast<size_t>(t)];
    });
  for (auto& t : threads) t.join();
  for (int b : bad) EXPECT_EQ(b, 0);
}

TEST(FormulaModel, TrigonometricFunctionsPiAndFortranSpellingHaveExactDerivatives) {
  const std::vector<FormulaParameter> params = {
      {"a", "1", 1, 0, 10, 2.0, ""}, {"b", "1", 1, 0, 10, 0.7, ""}, {"c", "1", 1, 0, 10, 1.3, ""}};
  const ModelSpec m = MakeFormulaModel(
      "trig", "a*sin(2*pi*P/c) + cos[b*P] - arctan[b/(P - 4*c)]/pi + atan(a*P) + tan(b/P) + ln(c + P + 1)**b",
      params);
  const std::vector<std::vector<double>> thetas = {{2.0, 0.7, 1.3}, {5.0, 1.9, 0.4}};
  for (const auto& th : thetas) {
    for (double p : {0.5, 2.0, 9.0}) {
      std::vector<double> g(3);
      const double v = m.value_and_gradient(th.data(), p, g.data());
      EXPECT_EQ(v, m.value(th.data(), p));
      for (size_t j = 0; j < 3; ++j) {
        const double h = 1e-6 * std::max(1.0, std::abs(th[j]));
        auto tp = th, tm = th;
        tp[j] += h;
        tm[j] -= h;
        const double fd = (m.value(tp.data(), p) - m.value(tm.data(), p)) / (2 * h);
        EXPECT_NEAR(g[j], fd, 1e-6 * std::max(1.0, std::abs(fd))) << "j = " << j << " P = " << p;
      }
      const double h = 1e-6 * p;
      const double fd = (m.value(th.data(), p + h) - m.value(th.data(), p - h)) / (2 * h);
      EXPECT_NEAR(m.slope(th.data(), p), fd, 1e-6 * std::max(1.0, std::abs(fd)));
    }
  }
}

TEST(FormulaModel, NewSpellingsEvaluateAsMathDefines) {
  EXPECT_EQ(Eval("2**3**2"), 512.0);  // "**" is "^", right-associative
  EXPECT_EQ(Eval("-P**2"), -9.0);
  EXPECT_EQ(Eval("[1 + 2]*3"), 9.0);
  EXPECT_EQ(Eval("exp[0] + 2*P"), 7.0);
  EXPECT_DOUBLE_EQ(Eval("4*atan(1)"), std::numbers::pi);
  EXPECT_DOUBLE_EQ(Eval("arctan(1)*4 - pi"), 0.0);
  EXPECT_DOUBLE_EQ(Eval("sin(pi/2) + cos(0) + tan(0)"), 2.0);
  EXPECT_DOUBLE_EQ(Eval("ln(exp(2))"), 2.0);
}

TEST(FormulaModel, OptionsSetSymbolsUnitsAndTitle) {
  FormulaOptions o;
  o.x_symbol = "x";
  o.y_symbol = "y";
  o.x_unit = o.y_unit = "1";
  o.x_si_factor = o.y_si_factor = 1.0;
  o.name = "growth curve";
  o.reference = "NIST StRD Misra1a model statement";
  const ModelSpec m = MakeFormulaModel("m1a", "y = b1*(1-exp[-b2*x])",
                                       {{"b1", "1", 1, 0, 1e4, 500, ""}, {"b2", "1", 1, 0, 1, 1e-4, ""}}, o);
  EXPECT_EQ(m.x_symbol, "x");
  EXPECT_EQ(m.y_symbol, "y");
  EXPECT_EQ(m.x_unit, "1");
  EXPECT_EQ(m.y_unit, "1");
  EXPECT_EQ(m.x_si_factor, 1.0);
  EXPECT_EQ(m.y_si_factor, 1.0);
  EXPECT_EQ(m.name, "growth curve");
  EXPECT_EQ(m.reference, "NIST StRD Misra1a model statement");
  EXPECT_EQ(m.formula, "y = b1*(1-exp[-b2*x])");
  const double th[2] = {500, 1e-4};
  EXPECT_DOUBLE_EQ(m.value(th, 100.0), 500 * (1 - std::exp(-1e-2)));
  // With the default options "P" is the x symbol and "x" is an unknown name.
  try {
    MakeFormulaModel("m1a", "b1*(1-exp(-b2*x))", {{"b1", "1", 1, 0, 1e4, 500, ""}, {"b2", "1", 1, 0, 1, 1e-4, ""}});
    ADD_FAILURE() << "x accepted without x_symbol = x";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.column(), 15);
    EXPECT_EQ(e.detail(), "unknown name 'x' (did you mean 'P'?)");
  }
}

TEST(FormulaModel, DataColumnsTakeTheRowValueAtTheRowIndex) {
  FormulaOptions o;
  o.columns = {{"x1", {1.0, 2.0, 3.0}}, {"x2", {10.0, 20.0, 30.0}}};
  const ModelSpec m = MakeFormulaModel("two", "a*x1 + b*x2 + P", {{"a", "1", 1, -9, 9, 1, ""}, {"b", "1", 1, -9, 9, 1, ""}}, o);
  const double th[2] = {2.0, 0.5};
  EXPECT_EQ(m.value(th, 0.0), 2.0 + 5.0 + 0.0);
  EXPECT_EQ(m.value(th, 2.0), 6.0 + 15.0 + 2.0);
  double g[2];
  EXPECT_EQ(m.value_and_gradient(th, 1.0, g), 4.0 + 10.0 + 1.0);
  EXPECT_EQ(g[0], 2.0);
  EXPECT_EQ(g[1], 20.0);
  EXPECT_TRUE(std::isnan(m.value(th, 3.0)));   // no such row
  EXPECT_TRUE(std::isnan(m.value(th, 0.5)));   // not a row index
  EXPECT_TRUE(std::isnan(m.value(th, -1.0)));
  o.columns = {{"a", {1.0}}};
  EXPECT_THROW(MakeFormulaModel("two", "a*P", {{"a", "1", 1, -9, 9, 1, ""}}, o), FormulaError);
  o.columns = {{"exp", {1.0}}};
  EXPECT_THROW(MakeFormulaModel("two", "a*P", {{"a", "1", 1, -9, 9, 1, ""}}, o), FormulaError);
}

TEST(FormulaModel, LogTransformIsCarriedAndNeedsANonNegativeLowerBound) {
  auto p = ExpModulusParams();
  p[2].transform = ParameterTransform::kLog;
  const ModelSpec m = MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)*exp(-P/P_close)", p);
  EXPECT_EQ(m.parameters[2].transform, ParameterTransform::kLog);
  EXPECT_EQ(m.parameters[0].transform, ParameterTransform::kIdentity);
  p[2].lower = -1;
  try {
    MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)*exp(-P/P_close)", p);
    ADD_FAILURE() << "log transform with lower < 0 accepted";
  } catch (const FormulaError& e) {
    EXPECT_EQ(e.column(), 0);
    EXPECT_EQ(e.parameter(), "P_close");
    EXPECT_NE(e.detail().find("transform log needs lower >= 0"), std::string::npos) << e.detail();
  }
}

TEST(FormulaModel, BracketAndNewFunctionErrorsNameTheColumn) {
  const BadCase cases[] = {
      {"K_inf + K_0 * [P_close + P", 27, "expected ']'"},
      {"K_inf + K_0 * exp[P_close)", 26, "expected ']'"},
      {"K_inf + K_0 * sinh(P_close)", 15, "unknown function 'sinh' (did you mean 'sin'?)"},
      {"K_inf + K_0 * P_close ** ", 26, "unexpected end of formula"},
      {"K_inf + K_0 + atan(P_close, P)", 27, "atan takes 1 argument"},
      {"K_inf + K_0 + pi(P_close)", 15, "'pi' is not a function"},
  };
  for (const auto& c : cases) {
    try {
      MakeFormulaModel("bad", c.formula, ExpModulusParams());
      ADD_FAILURE() << "no error for " << c.formula;
    } catch (const FormulaError& e) {
      EXPECT_EQ(e.column(), c.column) << c.formula << ": " << e.message();
      EXPECT_NE(e.detail().find(c.fragment), std::string::npos) << c.formula << ": " << e.message();
      EXPECT_EQ(e.message(), "column " + std::to_string(c.column) + ": " + e.detail());
    }
  }
  auto p = ExpModulusParams();
  p[0].name = "pi";
  EXPECT_THROW(MakeFormulaModel("x", "pi + K_0 + P_close", p), FormulaError);
  p[0].name = "sin";
  EXPECT_THROW(MakeFormulaModel("x", "sin + K_0 + P_close", p), FormulaError);
}

TEST(FormulaModel, DeeplyNestedFormulasEvaluateExactly) {
  // 200 nested sums need a deeper evaluation stack than the small-formula
  // buffer: a + (a + (a + ... + P*b)) = 200 a + P b.
  std::string f = "P*b";
  for (int k = 0; k < 200; ++k) f = "a + (" + f + ")";
  const ModelSpec m = MakeFormulaModel("deep", f, {{"a", "1", 1, -9, 9, 1, ""}, {"b", "1", 1, -9, 9, 1, ""}});
  const double th[2] = {0.5, 2.0};
  double g[2];
  EXPECT_DOUBLE_EQ(m.value_and_gradient(th, 3.0, g), 200 * 0.5 + 3.0 * 2.0);
  EXPECT_DOUBLE_EQ(g[0], 200.0);
  EXPECT_DOUBLE_EQ(g[1], 3.0);
  EXPECT_DOUBLE_EQ(m.slope(th, 3.0), 2.0);
}

TEST(FormulaModel, AFormulaOverSeveralLinesIsShownOnOne) {
  const ModelSpec m = MakeFormulaModel("my-exp", "K_inf - (K_inf - K_0)\n    * exp(-P/P_close)\n", ExpModulusParams());
  EXPECT_EQ(m.formula, "K = K_inf - (K_inf - K_0) * exp(-P/P_close)");
  const double th[3] = {20, 8, 10};
  EXPECT_DOUBLE_EQ(m.value(th, 10.0), 20 - 12 * std::exp(-1.0));
}

}  // namespace
}  // namespace porofit

// `user_models:` in study files: formula models declared by the study and
// named by samples like built-ins; formula errors located at file:line:col.
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

const char* kPath = "virtual/study.yaml";

// A valid study with one user model; `models` is the sample's model list.
std::string StudyText(const std::string& user_models, const std::string& models = "[my-exp]") {
  return "name: user model test\n"
         "user_models:\n" +
         user_models +
         "samples:\n"
         "  - id: S1\n"
         "    lithology: clean sandstone\n"
         "    porosity: 0.2\n"
         "    bulk_density: 2.12 g/cc\n"
         "    measurement: static\n"
         "    data:\n"
         "      columns: [P_c MPa, P_p MPa, K GPa]\n"
         "      rows:\n"
         "        - [5, 1, 8.1]\n"
         "        - [10, 1, 10.2]\n"
         "        - [20, 1, 12.9]\n"
         "        - [40, 1, 15.0]\n"
         "    models: " +
         models + "\n";
}

// Parameters block shared by the formula-location cases (lines 3.. of an entry).
const std::string kParams =
    "    parameters:\n"
    "      K_inf: {unit: GPa, lower: 0, upper: 200, start: 20}\n"
    "      K_0: {unit: GPa, lower: 0, start: 8}\n"
    "      P_close: {unit: MPa, lower: 0, start: 10, transform: log}\n";

InputError ErrorOf(const std::string& text) {
  try {
    ParseStudy(text, kPath, ModelRegistry::Builtin());
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "no error for:\n" << text;
  return InputError({}, "");
}

TEST(UserModels, AreDeclaredWithUnitsBoundsStartAndTransformAndNamedLikeBuiltins) {
  const std::string text = StudyText(
      "  - id: my-exp\n"
      "    name: exponential closure, my spelling\n"
      "    reference: lab notebook 7, p. 12\n"
      "    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n"
      "    closure_parameter: P_close\n"
      "    parameters:\n"
      "      K_inf: {unit: GPa, lower: 0, upper: 200, start: 20, meaning: modulus with cracks closed}\n"
      "      K_0: {unit: GPa, lower: 0, start: 8000 MPa}\n"
      "      P_close: {unit: MPa, lower: 0, start: 10, transform: log}\n",
      "\n      - linear\n      - id: my-exp\n        parameters:\n          K_0: {start: 7 GPa, upper: 9 GPa}\n"
      "          P_close: {lower: 1450 psi}");
  const Study s = ParseStudy(text, kPath, ModelRegistry::Builtin());
  ASSERT_EQ(s.user_models.size(), 1u);
  const ModelSpec& m = s.user_models[0];
  EXPECT_EQ(m.id, "my-exp");
  EXPECT_EQ(m.name, "exponential closure, my spelling");
  EXPECT_EQ(m.reference, "lab notebook 7, p. 12");
  EXPECT_EQ(m.formula, "K = K_inf - (K_inf - K_0)*exp(-P/P_close)");
  EXPECT_EQ(m.x_unit, "MPa");
  EXPECT_EQ(m.y_unit, "GPa");
  EXPECT_EQ(m.closure_parameter, 2);
  ASSERT_EQ(m.num_parameters(), 3u);
  EXPECT_EQ(m.parameters[0].name, "K_inf");
  EXPECT_EQ(m.parameters[0].unit, "GPa");
  EXPECT_EQ(m.parameters[0].si_factor, 1e9);
  EXPECT_EQ(m.parameters[0].upper, 200.0);
  EXPECT_EQ(m.parameters[0].meaning, "modulus with cracks closed");
  EXPECT_EQ(m.parameters[2].si_factor, 1e6);
  EXPECT_EQ(m.parameters[2].transform, ParameterTransform::kLog);
  EXPECT_EQ(m.start({}, {}), (std::vector<double>{20, 8, 10}));  // 8000 MPa = 8 GPa

  ASSERT_EQ(s.samples.size(), 1u);
  ASSERT_EQ(s.samples[0].models.size(), 2u);
  const ModelChoice& c = s.samples[0].models[1];
  EXPECT_EQ(c.model_id, "my-exp");
  ASSERT_EQ(c.settings.count("K_0"), 1u);
  EXPECT_DOUBLE_EQ(*c.settings.at("K_0").start, 7e9);
  EXPECT_DOUBLE_EQ(*c.settings.at("K_0").upper, 9e9);
  // check value 7 (docs/check-values.md): 1 psi = 6.894757 kPa (7 digits)
  EXPECT_NEAR(*c.settings.at("P_close").lower, 1450 * 6894.757, 1e-7 * 1450 * 6894.757);
}

TEST(UserModels, DefaultModelsMayNameThem) {
  std::string text = StudyText(
      "  - id: my-exp\n"
      "    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n" + kParams);
  // No per-sample list: the sample takes the defaults.
  text.replace(text.find("    models: [my-exp]\n"), std::string("    models: [my-exp]\n").size(), "");
  text.insert(text.find("samples:"), "defaults:\n  models: [my-exp, exp-modulus]\n");
  const Study s = ParseStudy(text, kPath, ModelRegistry::Builtin());
  ASSERT_EQ(s.samples[0].models.size(), 2u);
  EXPECT_EQ(s.samples[0].models[0].model_id, "my-exp");
}

struct LocationCase {
  const char* name;
  std::string entry;  // the user_models entry, formula included
  int line, column;   // expected location of the bad character (1-based)
  const char* fragment;
};

// Line 3 of the study text is the entry's first line ("  - id: my-exp").
TEST(UserModels, FormulaErrorsNameFileLineAndColumnForEveryScalarStyle) {
  const std::vector<LocationCase> cases = {
      {"plain", "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)*exp(-P/Pclose)\n" + kParams, 4, 43,
       "unknown name 'Pclose' (did you mean 'P_close'?)"},
      {"plain, end of text", "  - id: my-exp\n    formula: K_inf - (K_inf - K_0*exp(-P/P_close)\n" + kParams, 4,
       50, "unexpected end of formula"},
      {"single-quoted", "  - id: my-exp\n    formula: 'K_inf - (K_inf - K_0)*exp(-P/P_close) # 2'\n" + kParams, 4,
       53, "unexpected '#'"},
      {"single-quoted with '' before the error",
       "  - id: my-exp\n    formula: 'K_inf - (K_inf - K_0)*exp(-P/P_close) '' 2'\n" + kParams, 4, 53,
       "unexpected '''"},
      {"double-quoted with an escape before the error",
       "  - id: my-exp\n    formula: \"K_inf -\\t(K_inf - K_0)*exp(-P/P_close) ?\"\n" + kParams, 4, 54,
       "unexpected '?'"},
      {"literal block", "  - id: my-exp\n    formula: |\n      K_inf - (K_inf - K_0)\n        * xp(-P/P_close)\n" + kParams,
       6, 11, "unknown function 'xp' (did you mean 'exp'?)"},
      {"folded block", "  - id: my-exp\n    formula: >-\n      K_inf - (K_inf - K_0)\n      * exp(-P/P_close))\n" + kParams,
       6, 24, "unexpected ')'"},
      {"multi-line plain", "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)\n      * exp(-P/P_close) $\n" + kParams, 5,
       25, "unexpected '$'"},
  };
  for (const auto& c : cases) {
    const InputError e = ErrorOf(StudyText(c.entry));
    EXPECT_EQ(e.location().ToString(), std::string(kPath) + ":" + std::to_string(c.line) + ":" +
                                           std::to_string(c.column))
        << c.name << ": " << e.what();
    EXPECT_NE(e.message().find(c.fragment), std::string::npos) << c.name << ": " << e.message();
    EXPECT_NE(e.message().find("formula of user model 'my-exp': "), std::string::npos) << e.message();
  }
}

TEST(UserModels, DeclarationErrorsPointAtTheirField) {
  struct Case {
    const char* name;
    std::string entry;
    int line, column;
    const char* fragment;
  };
  const std::string f = "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n";
  const std::vector<Case> cases = {
      {"clash", "  - id: exp-modulus\n    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n" + kParams, 3, 9,
       "user model id 'exp-modulus' is already a built-in model"},
      {"unused parameter",
       f + "    parameters:\n      K_inf: {unit: GPa, start: 20}\n      K_0: {unit: GPa, start: 8}\n"
           "      P_close: {unit: MPa, start: 10}\n      n: {unit: '1', start: 0.5}\n",
       9, 7, "parameter 'n' does not appear in the formula"},
      {"unknown unit", f + "    parameters:\n      K_inf: {unit: Gpa, start: 20}\n", 6, 21,
       "unit 'Gpa' of user model 'my-exp' parameter K_inf"},
      {"start outside", f + "    parameters:\n      K_inf: {unit: GPa, lower: 0, upper: 10, start: 20}\n", 6, 54,
       "K_inf: start = 20 GPa is not strictly inside the bounds [0, 10]"},
      {"log without lower", f + "    parameters:\n      K_inf: {unit: GPa, start: 20, transform: log}\n", 6, 48,
       "transform log needs lower >= 0"},
      {"missing start", f + "    parameters:\n      K_inf: {unit: GPa}\n", 6, 14, "missing required key"},
      {"reserved name", "  - id: my-exp\n    formula: P + 1\n    parameters:\n      P: {unit: MPa, start: 1}\n", 6, 7,
       "parameter name 'P' is reserved"},
      {"unknown key", f + "    parameter:\n      K_inf: {unit: GPa, start: 20}\n", 5, 5,
       "unknown key 'parameter' in user model 1; did you mean 'parameters'?"},
  };
  for (const auto& c : cases) {
    const InputError e = ErrorOf(StudyText(c.entry));
    EXPECT_EQ(e.location().ToString(), std::string(kPath) + ":" + std::to_string(c.line) + ":" +
                                           std::to_string(c.column))
        << c.name << ": " << e.what();
    EXPECT_NE(e.message().find(c.fragment), std::string::npos) << c.name << ": " << e.message();
  }
}

TEST(UserModels, DuplicateIdsAreRejected) {
  const std::string entry = "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n" + kParams;
  const InputError e = ErrorOf(StudyText(entry + entry));
  EXPECT_EQ(e.location().ToString(), std::string(kPath) + ":9:9") << e.what();
  EXPECT_NE(e.message().find("declared twice"), std::string::npos) << e.message();
}

TEST(UserModels, UnknownModelIdsSuggestUserModelsToo) {
  const std::string entry = "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n" + kParams;
  const InputError e = ErrorOf(StudyText(entry, "[my-exq]"));
  EXPECT_NE(e.message().find("did you mean 'my-exp'?"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("my-exp"), std::string::npos);
  EXPECT_NE(e.message().find("exp-modulus"), std::string::npos) << e.message();  // the valid list has both
}

TEST(UserModels, UnknownParameterOfAUserModelInASampleIsReported) {
  const std::string entry = "  - id: my-exp\n    formula: K_inf - (K_inf - K_0)*exp(-P/P_close)\n" + kParams;
  const InputError e =
      ErrorOf(StudyText(entry, "\n      - id: my-exp\n        parameters:\n          Pclose: {start: 5 MPa}"));
  EXPECT_NE(e.message().find("model 'my-exp' has no parameter 'Pclose'"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("did you mean 'P_close'?"), std::string::npos) << e.message();
}

TEST(UserModels, AFormulaThatYamlWouldReadAsAListMustBeQuoted) {
  const std::string quoted = "  - id: my-exp\n    formula: \"[K_inf - K_0]*exp(-P/P_close) + K_0\"\n" + kParams;
  const Study s = ParseStudy(StudyText(quoted), kPath, ModelRegistry::Builtin());
  const double th[3] = {20, 8, 10};
  EXPECT_DOUBLE_EQ(s.user_models[0].value(th, 10.0), 12 * std::exp(-1.0) + 8);
  const std::string bare = "  - id: my-exp\n    formula: [K_inf - K_0]\n" + kParams;
  const InputError e = ErrorOf(StudyText(bare));
  EXPECT_EQ(e.location().ToString(), std::string(kPath) + ":4:14") << e.what();
  EXPECT_NE(e.message().find("'user_models[1].formula' must be a single value, found a list"), std::string::npos)
      << e.message();
}

}  // namespace
}  // namespace porofit

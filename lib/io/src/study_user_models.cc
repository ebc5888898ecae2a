// `user_models:` of a study file. Parameters are declared with a working
// unit ("GPa", "MPa", "1/GPa", "1", ...) from which the SI factor follows;
// bounds and start are bare numbers in that unit or numbers with a unit of
// the same pressure dimension.
#include "study_user_models.h"

#include <cctype>
#include <cmath>
#include <limits>

#include "porofit/core/units.h"
#include "porofit/models/expression.h"
#include "scalar.h"

namespace porofit::io::detail {
namespace {

std::string Quote(const std::string& s) { return "'" + s + "'"; }

bool IsSpace(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\n'; }

size_t LineStart(std::string_view raw, int line) {
  size_t pos = 0;
  for (int l = 0; l < line && pos < raw.size(); ++l) {
    const size_t nl = raw.find('\n', pos);
    if (nl == std::string_view::npos) return raw.size();
    pos = nl + 1;
  }
  return pos;
}

// The declared working unit of a parameter.
struct WorkingUnit {
  std::string text;
  UnitExpression expr;
};

// A bound or start: "20" (in the declared unit) or "20 GPa" / "2900 psi"
// (any unit of the same pressure dimension). Returns the working value.
double ParseValue(const Field& f, const WorkingUnit& u, const std::string& what) {
  const std::string& text = f.Scalar();
  const auto nt = SplitNumberUnit(text);
  if (!nt) throw InputError(f.at, Quote(f.path) + " = " + Quote(text) + " is not a number (e.g. '1' or '1 " + u.text + "')");
  double v = nt->value;
  if (!nt->unit.empty() && nt->unit != u.text) {
    const auto given = ParseUnitExpression(nt->unit);
    if (!given || std::fabs(given->pressure_exponent - u.expr.pressure_exponent) > 1e-9)
      throw InputError(f.at, "unit " + Quote(nt->unit) + " of " + Quote(f.path) + " does not fit " + what +
                                 ", which is in " + u.text + "; pressure units accepted: " +
                                 units::AcceptedUnitsList(units::Quantity::kPressure));
    CheckUnitInRange(*given, nt->unit, Quote(f.path), f.at);
    v = nt->value * given->si_factor / u.expr.si_factor;
  }
  if (!std::isfinite(v)) throw InputError(f.at, Quote(f.path) + " = " + text + " is not finite");
  if (!std::isfinite(v * u.expr.si_factor))
    throw InputError(f.at, Quote(f.path) + " = " + text + " is out of range: not a finite number once converted to SI units");
  return v;
}

bool ValidId(const std::string& id) {
  if (id.empty()) return false;
  for (char c : id)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.')) return false;
  return true;
}

}  // namespace

SourceLocation ScalarCharLocation(const YAML::Node& node, const std::string& text, size_t index,
                                  std::string_view raw, const std::string& file) {
  const YAML::Mark mark = node.Mark();
  size_t pos = LineStart(raw, mark.line) + static_cast<size_t>(std::max(0, mark.column));
  bool single = false, dbl = false;
  if (pos < raw.size()) {
    const char c = raw[pos];
    if (c == '"') { dbl = true; ++pos; }
    else if (c == '\'') { single = true; ++pos; }
    else if (c == '|' || c == '>') {  // block scalar: the text starts on the next line
      const size_t nl = raw.find('\n', pos);
      pos = nl == std::string_view::npos ? raw.size() : nl + 1;
    }
  }
  auto skip_space = [&] { while (pos < raw.size() && IsSpace(raw[pos])) ++pos; };
  // Walk the parsed text and the raw file side by side: every non-blank
  // character of the parsed text is the next non-blank character of the file
  // (or the escape sequence that spells it); blanks and line breaks may differ.
  auto skip_escape = [&] {
    const char e = raw[pos + 1];
    pos += e == 'x' ? 4 : e == 'u' ? 6 : e == 'U' ? 10 : 2;
  };
  for (size_t k = 0; k < index && k < text.size(); ++k) {
    if (IsSpace(text[k])) {  // a blank: an escape ("\t"), itself, or a folded line break
      if (dbl && pos + 1 < raw.size() && raw[pos] == '\\') skip_escape();
      else if (pos < raw.size() && raw[pos] == text[k]) ++pos;
      continue;
    }
    skip_space();
    if (dbl && pos + 1 < raw.size() && raw[pos] == '\\') {
      skip_escape();
    } else if (single && pos + 1 < raw.size() && raw[pos] == '\'' && raw[pos + 1] == '\'') {
      pos += 2;
    } else {
      ++pos;
    }
  }
  if (index < text.size() && !IsSpace(text[index])) skip_space();
  pos = std::min(pos, raw.size());
  int line = 1;
  size_t line_start = 0;
  for (size_t i = 0; i < pos; ++i)
    if (raw[i] == '\n') { ++line; line_start = i + 1; }
  return SourceLocation{file, line, static_cast<int>(pos - line_start) + 1};
}

std::vector<ModelSpec> ReadUserModels(const Field& f, const std::string& file, std::string_view raw_text,
                                      const ModelRegistry& known) {
  f.ExpectList();
  if (f.node.size() == 0) throw InputError(f.at, "'user_models' is empty: declare a model or leave the key out");
  std::vector<ModelSpec> out;
  for (size_t i = 0; i < f.node.size(); ++i) {
    const std::string path = f.path + "[" + std::to_string(i + 1) + "]";
    MapReader m(f.node[i], file, "user model " + std::to_string(i + 1), path);
    Field id = m.Get("id"), formula = m.Get("formula"), parameters = m.Get("parameters"), name = m.Get("name"),
          reference = m.Get("reference"), notes = m.Get("notes"), closure = m.Get("closure_parameter");
    m.Finish();
    if (!id) throw InputError(m.at(), "missing required key '" + path + ".id'");
    const std::string model_id = id.Scalar();
    if (!ValidId(model_id))
      throw InputError(id.at, "user model id " + Quote(model_id) +
                                  " must be non-empty letters, digits, '-', '_' or '.'");
    if (known.Find(model_id) != nullptr)
      throw InputError(id.at, "user model id " + Quote(model_id) +
                                  " is already a built-in model; choose another id");
    for (const ModelSpec& prior : out)
      if (prior.id == model_id) throw InputError(id.at, "user model id " + Quote(model_id) + " is declared twice");
    const std::string what = "user model " + Quote(model_id);
    if (!formula) throw InputError(m.at(), "missing required key '" + path + ".formula'");
    if (!parameters) throw InputError(m.at(), "missing required key '" + path + ".parameters'");
    const std::string& text = formula.Scalar();

    MapReader pm(parameters.node, file, "parameters of " + what, parameters.path);
    std::vector<FormulaParameter> params;
    std::vector<SourceLocation> param_at;
    for (auto it = parameters.node.begin(); it != parameters.node.end(); ++it) {
      const Field pf = pm.Get(it->first.Scalar());
      FormulaParameter q;
      q.name = pf.key;
      const std::string pwhat = what + " parameter " + q.name;
      MapReader sm(pf.node, file, "parameter " + q.name + " of " + what, pf.path);
      Field unit = sm.Get("unit"), lower = sm.Get("lower"), upper = sm.Get("upper"), start = sm.Get("start"),
            meaning = sm.Get("meaning"), transform = sm.Get("transform");
      sm.Finish();
      if (!unit)
        throw InputError(sm.at(), "missing required key '" + pf.path + ".unit' (e.g. 'GPa', 'MPa', '1/GPa', '1')");
      WorkingUnit u;
      u.text = unit.Scalar();
      const auto expr = ParseUnitExpression(u.text);
      if (!expr)
        throw InputError(unit.at, "unit " + Quote(u.text) + " of " + pwhat +
                                      " is not a unit of pressure powers (e.g. 'GPa', '1/GPa', 'GPa/MPa', '1'); "
                                      "pressure units accepted: " +
                                      units::AcceptedUnitsList(units::Quantity::kPressure));
      CheckUnitInRange(*expr, u.text, pwhat, unit.at);
      u.expr = *expr;
      q.unit = u.text;
      q.si_factor = expr->si_factor;
      if (lower) q.lower = ParseValue(lower, u, pwhat);
      if (upper) q.upper = ParseValue(upper, u, pwhat);
      if (!start) throw InputError(sm.at(), "missing required key '" + pf.path + ".start'");
      q.start = ParseValue(start, u, pwhat);
      if (meaning) q.meaning = meaning.Scalar();
      if (transform) {
        const std::string& t = transform.Scalar();
        if (t == "log") q.transform = ParameterTransform::kLog;
        else if (t != "none")
          throw InputError(transform.at, Quote(transform.path) + " = " + Quote(t) + " is not one of 'none', 'log'");
        if (q.transform == ParameterTransform::kLog && !(lower && q.lower >= 0))
          throw InputError(transform.at, q.name + ": transform log needs lower >= 0" +
                                             std::string(lower ? ", found lower = " + FormatNumber(q.lower) + " " + u.text
                                                               : " (give 'lower')"));
      }
      if (!(q.lower < q.upper))
        throw InputError((upper ? upper : lower).at, q.name + ": lower = " + FormatNumber(q.lower) +
                                                         " is not below upper = " + FormatNumber(q.upper));
      if (!(q.start > q.lower && q.start < q.upper))
        throw InputError(start.at, q.name + ": start = " + FormatNumber(q.start) + " " + u.text +
                                       " is not strictly inside the bounds [" + FormatNumber(q.lower) + ", " +
                                       FormatNumber(q.upper) + "]");
      params.push_back(q);
      param_at.push_back(pf.key_at);
    }
    pm.Finish();
    if (params.empty()) throw InputError(parameters.at, Quote(parameters.path) + " declares no parameters");

    FormulaOptions options;
    if (name) options.name = name.Scalar();
    if (reference) options.reference = reference.Scalar();
    ModelSpec spec;
    try {
      spec = MakeFormulaModel(model_id, text, params, options);
    } catch (const FormulaError& e) {
      if (e.column() > 0)
        throw InputError(ScalarCharLocation(formula.node, text, static_cast<size_t>(e.column() - 1), raw_text, file),
                         "formula of " + what + ": " + e.detail());
      for (size_t j = 0; j < params.size(); ++j)
        if (params[j].name == e.parameter()) throw InputError(param_at[j], what + ": " + e.detail());
      throw InputError(formula.at, what + ": " + e.detail());
    }
    if (notes) spec.notes = notes.Scalar();
    if (closure) {
      const int k = spec.ParameterIndex(closure.Scalar());
      if (k < 0)
        throw InputError(closure.at, Quote(closure.path) + " = " + Quote(closure.Scalar()) + " is not a parameter of " +
                                         what);
      if (spec.parameters[static_cast<size_t>(k)].unit != "MPa")
        throw InputError(closure.at, "closure parameter " + closure.Scalar() + " of " + what +
                                         " must be in MPa (it is compared with the data's pressures in MPa)");
      spec.closure_parameter = k;
    }
    out.push_back(std::move(spec));
  }
  return out;
}

}  // namespace porofit::io::detail

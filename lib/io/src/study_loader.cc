#include "porofit/io/study_loader.h"

#include <yaml-cpp/yaml.h>

#include <array>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <optional>
#include <sstream>

#include "porofit/core/dynamic.h"
#include "porofit/core/input_file.h"
#include "porofit/core/plausible.h"
#include "porofit/core/units.h"
#include "porofit/io/csv.h"
#include "porofit/models/strain_form.h"
#include "branch_settings.h"
#include "csv_columns.h"
#include "scalar.h"
#include "study_joint.h"
#include "study_depth.h"
#include "study_comparison.h"
#include "study_user_models.h"
#include "strain_columns.h"
#include "study_batch.h"
#include "yaml_map.h"

namespace porofit {
namespace {

using io::detail::Field;
using io::detail::ParseChoice;
using io::detail::RequirePlausibleSigmaText;
using io::detail::RequirePlausibleText;
using units::Measured;
using io::detail::MapReader;
using io::detail::SplitNumberUnit;
using io::detail::TypeName;
using io::detail::Where;
using units::Quantity;

std::string Join(const std::vector<std::string>& words) {
  std::string s;
  for (const auto& w : words) s += (s.empty() ? "" : ", ") + w;
  return s;
}

std::string Quote(const std::string& s) { return "'" + s + "'"; }

// An integer option that must fit an int; larger values are an input error.
int ToInt(const Field& f) {
  const long long v = f.Integer();
  if (v < -2147483647LL || v > 2147483647LL)
    throw InputError(f.at, Quote(f.path) + " = " + f.Scalar() + " is too large");
  return static_cast<int>(v);
}

std::string Fixed(double v, int digits) {
  std::ostringstream os;
  os.setf(std::ios::fixed);
  os.precision(digits);
  os << v;
  return os.str();
}

// SI factor of `unit` for quantity q; throws with the accepted units.
double UnitFactor(const std::string& unit, Quantity q, const std::string& what,
                  const SourceLocation& at) {
  if (auto f = units::ToSiFactor(q, unit)) return *f;
  std::string msg = "unknown " + std::string(units::QuantityName(q)) + " unit " + Quote(unit) +
                    " for " + what + "; accepted: " + units::AcceptedUnitsList(q);
  const std::string near = NearestWord(unit, units::AcceptedUnits(q));
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(at, msg);
}

// "2.3 g/cc" -> SI. The unit is required.
double ParseQuantity(const Field& f, Quantity q) {
  const std::string& text = f.Scalar();
  auto nt = SplitNumberUnit(text);
  if (!nt)
    throw InputError(f.at, Quote(f.path) + " = " + Quote(text) + " is not a number with a unit (e.g. '" +
                               std::string(q == Quantity::kDensity ? "2.65 g/cc" : "10 MPa") + "')");
  if (nt->unit.empty())
    throw InputError(f.at, Quote(f.path) + " = " + text + " needs a unit; accepted: " +
                               units::AcceptedUnitsList(q));
  const double v = nt->value * UnitFactor(nt->unit, q, Quote(f.path), f.at);
  if (!std::isfinite(v)) throw InputError(f.at, Quote(f.path) + " = " + text + " is not finite");
  return v;
}

// An uncertainty: absolute (SI) or relative to the value ("3 %").
struct Sigma {
  double value = 0;  // SI if absolute, fraction if relative
  bool relative = false;
  std::string path, text;  // as written, for the plausible-range check against each value
  SourceLocation at;
  double Of(double x) const { return relative ? value * std::fabs(x) : value; }
};

Sigma ParseSigma(const Field& f, Quantity q, bool strain = false) {
  const std::string& text = f.Scalar();
  auto nt = SplitNumberUnit(text);
  if (!nt || nt->unit.empty())
    throw InputError(f.at, Quote(f.path) + " = " + Quote(text) +
                               " must be a number with a unit or '%' (e.g. '3 %')");
  Sigma s;
  if (nt->unit == "%") {
    s.relative = true;
    s.value = nt->value / 100.0;
  } else {
    s.value = nt->value * (strain ? io::detail::StrainUnitFactorOrThrow(nt->unit, Quote(f.path), f.at)
                                  : UnitFactor(nt->unit, q, Quote(f.path), f.at));
  }
  if (!(std::isfinite(s.value) && s.value > 0))
    throw InputError(f.at, Quote(f.path) + " = " + text + " must be > 0");
  s.path = f.path, s.text = text, s.at = f.at;
  return s;
}

// ---------------------------------------------------------------- fit options

struct FitOptionsRead {
  FitOptions options;
  std::optional<bool> scale_covariance;  // explicit choice, if any
  SourceLocation scale_covariance_at;
  SourceLocation at;                      // the fit mapping
  std::vector<std::pair<std::string, SourceLocation>> keys;  // given keys, for Validate() locations
};

void ReadFitOptions(const Field& field, const std::string& file, const std::string& owner,
                    FitOptionsRead& out) {
  MapReader m(field.node, file, "fit options of " + owner, field.path);
  out.at = m.at();
  Field loss = m.Get("loss"), loss_scale = m.Get("loss_scale"), multistart = m.Get("multistart"),
        spread = m.Get("start_spread"), seed = m.Get("seed"), iters = m.Get("max_iterations"),
        ftol = m.Get("function_tolerance"), gtol = m.Get("gradient_tolerance"),
        ptol = m.Get("parameter_tolerance"), cov = m.Get("covariance"),
        scale = m.Get("scale_covariance"), backend = m.Get("covariance_backend"),
        rcond = m.Get("min_reciprocal_condition"),
        corr = m.Get("correlation_threshold"), closure = m.Get("closure_range_factor"),
        solver = m.Get("solver"), every_start = m.Get("run_every_start");
  m.Finish();
  FitOptions& o = out.options;
  auto note = [&](const Field& f) { out.keys.emplace_back(f.key, f.key_at); };
  if (loss) {
    note(loss);
    o.loss = ParseChoice<RobustLoss>(
        loss, {{"none", RobustLoss::kNone}, {"huber", RobustLoss::kHuber}, {"cauchy", RobustLoss::kCauchy}});
  }
  if (loss_scale) note(loss_scale), o.loss_scale = loss_scale.Number();
  if (multistart) note(multistart), o.multistart = ToInt(multistart);
  if (spread) note(spread), o.start_spread = spread.Number();
  if (seed) {
    note(seed);
    const long long v = seed.Integer();
    if (v < 0) throw InputError(seed.at, Quote(seed.path) + " = " + seed.Scalar() + " must be >= 0");
    o.seed = static_cast<std::uint64_t>(v);
  }
  if (iters) note(iters), o.max_iterations = ToInt(iters);
  if (ftol) note(ftol), o.function_tolerance = ftol.Number();
  if (gtol) note(gtol), o.gradient_tolerance = gtol.Number();
  if (ptol) note(ptol), o.parameter_tolerance = ptol.Number();
  if (cov) note(cov), o.covariance = cov.Boolean();
  if (scale) {
    note(scale);
    out.scale_covariance = scale.Boolean();
    out.scale_covariance_at = scale.at;
  }
  if (backend) {
    note(backend);
    o.covariance_backend = ParseChoice<CovarianceBackend>(
        backend, {{"ceres", CovarianceBackend::kCeres}, {"eigen", CovarianceBackend::kEigen}});
  }
  if (rcond) note(rcond), o.min_reciprocal_condition = rcond.Number();
  if (corr) note(corr), o.correlation_threshold = corr.Number();
  if (closure) note(closure), o.closure_range_factor = closure.Number();
  if (solver) {
    note(solver);
    o.solver = ParseChoice<SolverChoice>(
        solver, {{"auto", SolverChoice::kAuto}, {"ceres", SolverChoice::kCeres}, {"compact", SolverChoice::kCompact}});
  }
  if (every_start) note(every_start), o.skip_starts_at_same_limit = !every_start.Boolean();

  const std::string problem = o.Validate();
  if (!problem.empty()) {
    // Validate() names the field as "fit.<name> = ..."; point at that key if it was written here.
    SourceLocation where = out.at;
    for (const auto& [key, at] : out.keys)
      if (problem.rfind("fit." + key + " ", 0) == 0) where = at;
    throw InputError(where, problem);
  }
}

// --------------------------------------------------------------------- models

double ParseParameterValue(const Field& f, const ParameterSpec& ps, const std::string& model_id) {
  const std::string& text = f.Scalar();
  auto nt = SplitNumberUnit(text);
  if (!nt)
    throw InputError(f.at, Quote(f.path) + " = " + Quote(text) + " is not a number with a unit (e.g. '1 " +
                               ps.unit + "')");
  double si = 0;
  if (nt->unit.empty()) {
    if (ps.unit != "1")
      throw InputError(f.at, Quote(f.path) + " = " + text + " needs a unit (" + model_id + " " + ps.name +
                                 " is in " + ps.unit + ", e.g. '" + text + " " + ps.unit + "')");
    si = nt->value * ps.si_factor;
  } else if (nt->unit == ps.unit) {
    si = nt->value * ps.si_factor;
  } else {
    const auto given = io::detail::ParseUnitExpression(nt->unit);
    const auto working = io::detail::ParseUnitExpression(ps.unit);
    if (!given || !working || std::fabs(given->pressure_exponent - working->pressure_exponent) > 1e-9)
      throw InputError(f.at, "unit " + Quote(nt->unit) + " of " + Quote(f.path) + " does not fit " + model_id +
                                 " parameter " + ps.name + ", which is in " + ps.unit +
                                 "; pressure units accepted: " + units::AcceptedUnitsList(Quantity::kPressure));
    io::detail::CheckUnitInRange(*given, nt->unit, Quote(f.path), f.at);
    si = nt->value * given->si_factor;
  }
  if (!std::isfinite(si)) throw InputError(f.at, Quote(f.path) + " = " + text + " is not finite");
  return si;
}

std::string Show(double si, const ParameterSpec& ps) {
  return FormatNumber(si / ps.si_factor) + (ps.unit == "1" ? "" : " " + ps.unit);
}

ModelChoice ReadModelChoice(const YAML::Node& node, const std::string& file, const std::string& path,
                            const ModelRegistry& registry) {
  ModelChoice choice;
  choice.where = Where(file, node.Mark());
  Field id_field;
  Field params;
  if (node.IsScalar()) {
    id_field.node = node;
    id_field.path = path;
    id_field.at = choice.where;
    id_field.key_at = choice.where;
    id_field.present = true;
  } else if (node.IsMap()) {
    MapReader m(node, file, Quote(path), path);
    id_field = m.Get("id");
    params = m.Get("parameters");
    m.Finish();
    if (!id_field) throw InputError(m.at(), "missing required key '" + path + ".id'");
  } else {
    throw InputError(choice.where, Quote(path) + " must be a model id or a mapping with 'id', found " +
                                       TypeName(node));
  }
  choice.model_id = id_field.Scalar();
  const ModelSpec* spec = registry.Find(choice.model_id);
  if (spec == nullptr) {
    std::string msg = "unknown model " + Quote(choice.model_id) + " (valid models: " + Join(registry.ids()) + ")";
    const std::string near = NearestWord(choice.model_id, registry.ids());
    if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
    throw InputError(id_field.at, msg);
  }
  if (!params) return choice;

  std::vector<std::string> names;
  for (const auto& p : spec->parameters) names.push_back(p.name);
  MapReader pm(params.node, file, "parameters of model " + Quote(choice.model_id), params.path);
  for (auto it = params.node.begin(); it != params.node.end(); ++it) {
    const std::string name = it->first.Scalar();
    const int index = spec->ParameterIndex(name);
    if (index < 0) {
      std::string msg = "model " + Quote(choice.model_id) + " has no parameter " + Quote(name) + " (parameters: " +
                        Join(names) + ")";
      const std::string near = NearestWord(name, names);
      if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
      throw InputError(Where(file, it->first.Mark()), msg);
    }
    const ParameterSpec& ps = spec->parameters[static_cast<size_t>(index)];
    const Field pf = pm.Get(name);
    MapReader sm(pf.node, file, "parameter " + name + " of model " + Quote(choice.model_id), pf.path);
    Field fixed = sm.Get("fixed"), lower = sm.Get("lower"), upper = sm.Get("upper"), start = sm.Get("start"),
          free = sm.Get("free");
    sm.Finish();
    ParameterSetting s;
    if (fixed) s.fixed = ParseParameterValue(fixed, ps, choice.model_id);
    if (lower) s.lower = ParseParameterValue(lower, ps, choice.model_id);
    if (upper) s.upper = ParseParameterValue(upper, ps, choice.model_id);
    if (start) s.start = ParseParameterValue(start, ps, choice.model_id);
    if (free) s.free = free.Boolean();

    if (fixed && start)
      throw InputError(start.key_at, name + ": give 'fixed' or 'start', not both");
    if (fixed && free && s.free)
      throw InputError(free.key_at, name + ": a parameter cannot be both 'fixed' and 'free'");
    if (free && s.free && !ps.fixed_by_default)
      throw InputError(free.key_at, name + " of model " + Quote(choice.model_id) +
                                        " is already free; 'free' applies only to parameters fixed by default");
    const double model_lo = ps.lower * ps.si_factor, model_hi = ps.upper * ps.si_factor;
    if (s.lower && *s.lower < model_lo)
      throw InputError(lower.at, name + ": lower = " + Show(*s.lower, ps) + " is below the model's bound " +
                                     Show(model_lo, ps));
    if (s.upper && *s.upper > model_hi)
      throw InputError(upper.at, name + ": upper = " + Show(*s.upper, ps) + " is above the model's bound " +
                                     Show(model_hi, ps));
    const double lo = s.lower.value_or(model_lo), hi = s.upper.value_or(model_hi);
    if (!(lo < hi)) {
      const Field& culprit = upper ? upper : lower;
      throw InputError(culprit.at, name + ": lower = " + Show(lo, ps) + " is not below upper = " + Show(hi, ps));
    }
    auto check_inside = [&](const Field& f, double v, const char* what) {
      if (v < lo || v > hi)
        throw InputError(f.at, name + ": " + what + " = " + Show(v, ps) + " is outside the bounds [" + Show(lo, ps) +
                                   ", " + Show(hi, ps) + "]");
    };
    if (s.fixed) check_inside(fixed, *s.fixed, "fixed");
    if (s.start) check_inside(start, *s.start, "start");
    choice.settings[name] = s;
  }
  pm.Finish();
  return choice;
}

std::vector<ModelChoice> ReadModels(const Field& f, const std::string& file, const ModelRegistry& registry) {
  f.ExpectList();
  if (f.node.size() == 0) throw InputError(f.at, Quote(f.path) + " is empty: list at least one model");
  std::vector<ModelChoice> out;
  const YAML::Node& list = f.node;
  for (size_t i = 0; i < list.size(); ++i) {
    ModelChoice c = ReadModelChoice(list[i], file, f.path + "[" + std::to_string(i + 1) + "]", registry);
    for (const auto& prior : out)
      if (prior.model_id == c.model_id)
        throw InputError(c.where, "model " + Quote(c.model_id) + " is listed twice in " + Quote(f.path));
    out.push_back(std::move(c));
  }
  return out;
}

// ----------------------------------------------------------------------- data

enum Role { kPc, kPp, kP, kK, kVp, kVs, kRho, kSigmaK, kSigmaVp, kSigmaVs, kSigmaRho, kEpsV, kSigmaEps, kNumRoles };

struct RoleInfo {
  const char* name;
  Quantity quantity;
  bool sigma;         // may be given in '%'
  Measured measured;  // plausible range (porofit/core/plausible.h); of the value it qualifies for a sigma
};

constexpr std::array<RoleInfo, kNumRoles> kRoles = {{
    {"P_c", Quantity::kPressure, false, Measured::kPressure},
    {"P_p", Quantity::kPressure, false, Measured::kPressure},
    {"P", Quantity::kPressure, false, Measured::kPressure},
    {"K", Quantity::kModulus, false, Measured::kModulus},
    {"Vp", Quantity::kVelocity, false, Measured::kVelocity},
    {"Vs", Quantity::kVelocity, false, Measured::kVelocity},
    {"rho", Quantity::kDensity, false, Measured::kDensity},
    {"sigma_K", Quantity::kModulus, true, Measured::kModulus},
    {"sigma_Vp", Quantity::kVelocity, true, Measured::kVelocity},
    {"sigma_Vs", Quantity::kVelocity, true, Measured::kVelocity},
    {"sigma_rho", Quantity::kDensity, true, Measured::kDensity},
    {"eps_v", Quantity::kDimensionless, false, Measured::kStrain},     // strain units: strain_columns.h
    {"sigma_eps", Quantity::kDimensionless, true, Measured::kStrain},
}};

struct Column {
  Role role = kNumRoles;
  std::string header;     // the file's header name (the role name in the list form)
  bool mapped = false;    // named by the map form of data.columns
  std::string unit;       // empty until known, for mapped columns whose unit is in the header
  double factor = 1;      // SI per declared unit (or 0.01 for '%')
  bool relative = false;  // sigma column in '%'
  SourceLocation at;
};

struct Cell {
  double value = 0;  // SI, or fraction for relative sigmas
  double raw = 0;    // as written
  SourceLocation at;
};

struct RawRow {
  SourceLocation where;
  std::array<std::optional<Cell>, kNumRoles> cells;
};

// The role a column name (or a `columns` map key) stands for; throws at `at`.
Role RoleByName(const std::string& name, const SourceLocation& at) {
  std::vector<std::string> names;
  for (const auto& r : kRoles) names.emplace_back(r.name);
  for (int r = 0; r < kNumRoles; ++r)
    if (name == kRoles[static_cast<size_t>(r)].name) return static_cast<Role>(r);
  std::string msg = "unknown column " + Quote(name) + " (columns: " + Join(names) + ")";
  const std::string near = NearestWord(name, names);
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(at, msg);
}

// SI factor of `unit` for a column of role `role`, or nullopt if it does not take it.
std::optional<double> RoleUnitFactor(Role role, const std::string& unit) {
  if (kRoles[role].sigma && unit == "%") return 0.01;
  if (role == kEpsV || role == kSigmaEps) return io::detail::StrainUnitFactor(unit);
  return units::ToSiFactor(kRoles[role].quantity, unit);
}

// Sets the unit of `c` and its factor; throws at `at` for a unit the role does not take.
void SetColumnUnit(Column& c, const std::string& unit, const SourceLocation& at) {
  const std::string name = kRoles[c.role].name;
  c.unit = unit;
  const RoleInfo& info = kRoles[c.role];
  if (info.sigma && c.unit == "%") {
    c.relative = true;
    c.factor = 0.01;
  } else if (c.role == kEpsV || c.role == kSigmaEps) {
    c.factor = io::detail::StrainUnitFactorOrThrow(c.unit, "column " + Quote(name), at);
  } else {
    c.factor = UnitFactor(c.unit, info.quantity, "column " + Quote(name), at);
  }
}

// One entry of the list form of data.columns: "name unit".
Column ParseColumn(const YAML::Node& node, const std::string& file, const std::string& path) {
  Column c;
  c.at = Where(file, node.Mark());
  if (!node.IsScalar())
    throw InputError(c.at, Quote(path) + " must be 'name unit' (e.g. 'P_c MPa'), found " + TypeName(node));
  const std::string text = node.Scalar();
  const size_t space = text.find_first_of(" \t");
  const std::string name = text.substr(0, space);
  c.role = RoleByName(name, c.at);
  c.header = name;
  if (space == std::string::npos || text.find_first_not_of(" \t", space) == std::string::npos)
    throw InputError(c.at, "column " + Quote(name) + " needs a unit (e.g. '" + name + " " +
                               std::string(units::AcceptedUnits(kRoles[c.role].quantity).front()) + "')");
  SetColumnUnit(c, text.substr(text.find_first_not_of(" \t", space)), c.at);
  return c;
}

// One entry of the map form of data.columns: `role: header name` or
// `role: {column: header name, unit: U}`. The unit stays empty (to be taken
// from the file header) unless the study gives it.
Column ParseMappedColumn(const Field& entry, const std::string& file) {
  Column c;
  c.role = RoleByName(entry.key, entry.key_at);
  c.mapped = true;
  const io::detail::MappedName n = io::detail::ReadMappedName(entry, file);
  c.header = n.header;
  c.at = n.at;
  if (!n.unit.empty()) SetColumnUnit(c, n.unit, n.unit_at);
  return c;
}

// data.columns in either form, in the order written.
std::vector<Column> ReadColumnList(const Field& cols, const std::string& file) {
  std::vector<Column> order;
  if (cols.node.IsMap()) {
    if (cols.node.size() == 0) throw InputError(cols.at, "'data.columns' is empty");
    std::vector<std::string> keys;
    for (const auto& kv : cols.node) keys.push_back(kv.first.Scalar());
    MapReader m(cols.node, file, "data.columns", "data.columns");
    for (const std::string& k : keys) order.push_back(ParseMappedColumn(m.Get(k), file));
    m.Finish();
  } else {
    cols.ExpectList();
    if (cols.node.size() == 0) throw InputError(cols.at, "'data.columns' is empty");
    for (size_t i = 0; i < cols.node.size(); ++i)
      order.push_back(ParseColumn(cols.node[i], file, "data.columns[" + std::to_string(i + 1) + "]"));
  }
  for (size_t i = 0; i < order.size(); ++i)
    for (size_t j = 0; j < i; ++j)
      if (order[i].role == order[j].role)
        throw InputError(order[i].at, std::string("column '") + kRoles[order[i].role].name + "' is declared twice");
  return order;
}

// What the file must hold for column `c` (its header name and any unit).
io::detail::ColumnWish WishFor(const Column& c) {
  io::detail::ColumnWish w;
  w.role = kRoles[c.role].name;
  w.header = c.header;
  w.unit = c.unit;
  w.at = c.at;
  const Role role = c.role;
  w.accepts = [role](const std::string& u) { return RoleUnitFactor(role, u).has_value(); };
  return w;
}

// Whether two units of a role are the same (same SI factor, both or neither relative).
bool SameUnit(Role role, const std::string& a, const std::string& b) {
  if ((a == "%") != (b == "%")) return !kRoles[role].sigma && RoleUnitFactor(role, a) == RoleUnitFactor(role, b);
  const auto fa = RoleUnitFactor(role, a), fb = RoleUnitFactor(role, b);
  return fa && fb && *fa == *fb;
}

// Converts one cell's text; `where` is the cell.
Cell ReadCell(const std::string& text, const Column& col, const SourceLocation& where, const std::string& context,
              char decimal = '.') {
  Cell cell;
  cell.at = where;
  if (text.empty())
    throw InputError(where, "empty cell in " + context);
  if (!csv::ParseNumber(text, cell.raw, decimal))
    throw InputError(where, "non-numeric value " + Quote(text) + " in " + context + csv::DecimalHint(text, decimal));
  if (!std::isfinite(cell.raw)) throw InputError(where, kRoles[col.role].name + std::string(" = ") + text + " is not finite");
  cell.value = cell.raw * col.factor;
  if (!std::isfinite(cell.value))
    throw InputError(where, kRoles[col.role].name + std::string(" = ") + text + " " + col.unit +
                                " is out of range: not a finite number once converted to SI units");
  return cell;
}

std::string ShowCell(const Cell& c, const Column& col) { return FormatNumber(c.raw) + " " + col.unit; }

std::string ResolveDataPath(const std::string& study_path, const std::string& file) {
  const std::filesystem::path p(file);
  if (p.is_absolute()) return file;
  return (std::filesystem::path(study_path).parent_path() / p).lexically_normal().string();
}

// ------------------------------------------------------- grain modulus, fluid, bands

// "0.8", "80 %" or "0.8 fraction" -> fraction.
double ParseFraction(const Field& f) {
  const std::string& text = f.Scalar();
  auto nt = SplitNumberUnit(text);
  if (!nt) throw InputError(f.at, Quote(f.path) + " = " + Quote(text) + " is not a number");
  double factor = 1;
  if (!nt->unit.empty()) factor = UnitFactor(nt->unit, Quantity::kDimensionless, Quote(f.path), f.at);
  const double v = nt->value * factor;
  if (!std::isfinite(v)) throw InputError(f.at, Quote(f.path) + " = " + text + " is not finite");
  return v;
}

// A non-negative uncertainty of `value`: a quantity or "%" of it.
double ParseSigmaOf(const Field& f, Quantity q, double value) {
  const std::string& text = f.Scalar();
  auto nt = SplitNumberUnit(text);
  if (!nt || nt->unit.empty())
    throw InputError(f.at, Quote(f.path) + " = " + Quote(text) + " must be a number with a unit or '%' (e.g. '2 %')");
  const double v = nt->unit == "%" ? nt->value / 100.0 * std::fabs(value)
                                   : nt->value * UnitFactor(nt->unit, q, Quote(f.path), f.at);
  if (!std::isfinite(v)) throw InputError(f.at, Quote(f.path) + " = " + text + " is not finite");
  if (v < 0) throw InputError(f.at, Quote(f.path) + " = " + text + " must be >= 0");
  return v;
}

std::string RequiredText(const Field& f, const MapReader& m, const std::string& what) {
  if (!f) throw InputError(m.at(), "missing required key " + Quote(f.path) + " in " + what);
  const std::string& s = f.Scalar();
  if (s.empty()) throw InputError(f.at, Quote(f.path) + " must not be empty");
  return s;
}

// `minerals:` at the top level: name -> {bulk, shear, density, sigma_bulk, sigma_shear, clay, source}.
std::vector<poro::Mineral> ReadMinerals(const Field& f, const std::string& file) {
  if (!f.node.IsMap()) throw InputError(f.at, "'minerals' must be a mapping of mineral names, found " + TypeName(f.node));
  MapReader list(f.node, file, "the study minerals", "minerals");
  std::vector<poro::Mineral> out;
  for (auto it = f.node.begin(); it != f.node.end(); ++it) {
    const std::string name = it->first.Scalar();
    const Field entry = list.Get(name);
    bool ok = !name.empty();
    for (char c : name) ok = ok && (std::islower(static_cast<unsigned char>(c)) || std::isdigit(static_cast<unsigned char>(c)) || c == '_');
    if (!ok)
      throw InputError(entry.key_at, "mineral name " + Quote(name) + " must use lowercase letters, digits and '_'");
    const std::string what = "mineral " + Quote(name);
    MapReader m(entry.node, file, what, entry.path);
    Field bulk = m.Get("bulk"), shear = m.Get("shear"), density = m.Get("density"), sb = m.Get("sigma_bulk"),
          ss = m.Get("sigma_shear"), clay = m.Get("clay"), source = m.Get("source"), checked = m.Get("checked");
    m.Finish();
    for (const Field* r : {&bulk, &shear, &density, &sb, &ss})
      if (!*r) throw InputError(m.at(), "missing required key " + Quote(r->path) + " in " + what);
    poro::Mineral x;
    x.name = name;
    x.where = m.at();
    x.bulk = ParseQuantity(bulk, Quantity::kModulus);
    x.shear = ParseQuantity(shear, Quantity::kModulus);
    x.density = ParseQuantity(density, Quantity::kDensity);
    if (!(x.bulk > 0)) throw InputError(bulk.at, Quote(bulk.path) + " = " + bulk.Scalar() + " must be > 0");
    if (!(x.shear >= 0)) throw InputError(shear.at, Quote(shear.path) + " = " + shear.Scalar() + " must be >= 0");
    if (!(x.density > 0)) throw InputError(density.at, Quote(density.path) + " = " + density.Scalar() + " must be > 0");
    RequirePlausibleText(Measured::kModulus, bulk.path, bulk.Scalar(), x.bulk, bulk.at);
    RequirePlausibleText(Measured::kModulus, shear.path, shear.Scalar(), x.shear, shear.at);
    RequirePlausibleText(Measured::kDensity, density.path, density.Scalar(), x.density, density.at);
    x.sigma_bulk = ParseSigmaOf(sb, Quantity::kModulus, x.bulk);
    x.sigma_shear = ParseSigmaOf(ss, Quantity::kModulus, x.shear);
    RequirePlausibleSigmaText(Measured::kModulus, sb.path, sb.Scalar(), x.sigma_bulk, x.bulk, sb.at);
    RequirePlausibleSigmaText(Measured::kModulus, ss.path, ss.Scalar(), x.sigma_shear, x.shear, ss.at);
    if (clay) x.clay = clay.Boolean();
    x.source = RequiredText(source, m, what + " (the published source: author, year, title, table)");
    if (checked) {
      const std::string issue = poro::MineralCheckIssue(Quote(checked.path), checked.Scalar());
      if (!issue.empty()) throw InputError(checked.at, issue);
      x.checked = checked.Scalar();
    }
    out.push_back(std::move(x));
  }
  list.Finish();
  return out;
}

// {measured: {...}} or {mineralogy: {...}}.
GrainModulusChoice ReadGrainSpec(const Field& f, const std::string& file, const std::string& owner,
                                 const poro::MineralTable& table) {
  MapReader m(f.node, file, "grain modulus of " + owner, f.path);
  Field measured = m.Get("measured"), mineralogy = m.Get("mineralogy");
  m.Finish();
  if (measured && mineralogy)
    throw InputError(mineralogy.key_at, "give 'measured' or 'mineralogy' for the grain modulus of " + owner + ", not both");
  if (!measured && !mineralogy)
    throw InputError(m.at(), "grain modulus of " + owner + " needs 'measured' (value and sigma) or 'mineralogy' "
                             "(mineral fractions)");
  GrainModulusChoice g;
  g.given = true;
  g.where = m.at();
  if (measured) {
    const std::string what = "measured grain modulus of " + owner;
    MapReader r(measured.node, file, what, measured.path);
    Field ks = r.Get("K_s"), sigma = r.Get("sigma"), mu = r.Get("mu_s"), smu = r.Get("sigma_mu_s"),
          source = r.Get("source");
    r.Finish();
    if (!ks) throw InputError(r.at(), "missing required key " + Quote(ks.path) + " in " + what);
    if (!sigma)
      throw InputError(r.at(), "missing required key " + Quote(sigma.path) + " in " + what +
                                   " (its 1-sigma; K_s uncertainty often dominates alpha's)");
    const double k = ParseQuantity(ks, Quantity::kModulus);
    if (!(k > 0)) throw InputError(ks.at, Quote(ks.path) + " = " + ks.Scalar() + " must be > 0");
    RequirePlausibleText(Measured::kModulus, ks.path, ks.Scalar(), k, ks.at);
    const double s = ParseSigmaOf(sigma, Quantity::kModulus, k);
    RequirePlausibleSigmaText(Measured::kModulus, sigma.path, sigma.Scalar(), s, k, sigma.at);
    std::optional<double> mu_s;
    double s_mu = 0;
    if (smu && !mu) throw InputError(smu.key_at, Quote(smu.path) + " is given without 'mu_s'");
    if (mu) {
      mu_s = ParseQuantity(mu, Quantity::kModulus);
      if (!(*mu_s > 0)) throw InputError(mu.at, Quote(mu.path) + " = " + mu.Scalar() + " must be > 0");
      RequirePlausibleText(Measured::kModulus, mu.path, mu.Scalar(), *mu_s, mu.at);
      if (smu) s_mu = ParseSigmaOf(smu, Quantity::kModulus, *mu_s);
      if (smu) RequirePlausibleSigmaText(Measured::kModulus, smu.path, smu.Scalar(), s_mu, *mu_s, smu.at);
    }
    g.sources.push_back(RequiredText(source, r, what + " (e.g. 'unjacketed test, lab sheet 12')"));
    g.value = poro::MeasuredGrainModulus(k, s, mu_s, s_mu, r.at());
    return g;
  }
  const std::string what = "mineralogy of " + owner;
  MapReader r(mineralogy.node, file, what, mineralogy.path);
  Field basis = r.Get("basis"), fractions = r.Get("fractions");
  r.Finish();
  if (!basis)
    throw InputError(r.at(), "missing required key " + Quote(basis.path) + " in " + what +
                                 " ('weight' as XRD reports, or 'volume')");
  if (!fractions) throw InputError(r.at(), "missing required key " + Quote(fractions.path) + " in " + what);
  poro::Composition c;
  c.basis = ParseChoice<poro::FractionBasis>(
      basis, {{"weight", poro::FractionBasis::kWeight}, {"volume", poro::FractionBasis::kVolume}});
  c.where = fractions.at;
  if (!fractions.node.IsMap())
    throw InputError(fractions.at, Quote(fractions.path) + " must map mineral names to fractions (e.g. "
                                                           "'{quartz: 0.8, calcite: 0.2}'), found " +
                                       TypeName(fractions.node));
  MapReader fm(fractions.node, file, what, fractions.path);  // rejects a mineral written twice
  for (auto it = fractions.node.begin(); it != fractions.node.end(); ++it) {
    const Field e = fm.Get(it->first.Scalar());
    poro::MineralFraction mf;
    mf.mineral = e.key;
    mf.fraction = ParseFraction(e);
    mf.where = e.key_at;
    c.entries.push_back(mf);
    g.fractions.push_back(mf.fraction);
  }
  fm.Finish();
  if (auto issue = poro::ValidateComposition(table, c)) {
    std::string msg = issue->message;
    if (issue->entry >= 0 && msg.find("unknown") != std::string::npos)
      msg += "; known minerals are the built-in table plus the study's 'minerals:' section "
             "('porofit minerals STUDY.yaml' lists them)";
    throw InputError(issue->Where(c), msg);
  }
  g.basis = c.basis;
  g.value = poro::GrainModulusFromMineralogy(table, c);
  for (const auto& e : c.entries) {
    const poro::Mineral& x = table.Get(e.mineral);
    g.sources.push_back(x.name + ": " + x.source);
    g.checked.push_back(x.name + ": " + (x.checked.empty() ? std::string("not stated") : x.checked));
  }
  return g;
}

FluidModulus ReadFluid(const Field& f, const std::string& file, const std::string& owner) {
  const std::string what = "fluid modulus of " + owner;
  MapReader m(f.node, file, what, f.path);
  Field kf = m.Get("K_f"), sigma = m.Get("sigma"), source = m.Get("source");
  m.Finish();
  if (!kf) throw InputError(m.at(), "missing required key " + Quote(kf.path) + " in " + what);
  if (!sigma) throw InputError(m.at(), "missing required key " + Quote(sigma.path) + " in " + what + " (0 GPa if exact)");
  FluidModulus out;
  out.where = m.at();
  out.k_f = ParseQuantity(kf, Quantity::kModulus);
  if (!(out.k_f > 0)) throw InputError(kf.at, Quote(kf.path) + " = " + kf.Scalar() + " must be > 0");
  RequirePlausibleText(Measured::kFluidModulus, kf.path, kf.Scalar(), out.k_f, kf.at);
  out.sigma = ParseSigmaOf(sigma, Quantity::kModulus, out.k_f);
  RequirePlausibleSigmaText(Measured::kFluidModulus, sigma.path, sigma.Scalar(), out.sigma, out.k_f, sigma.at);
  if (source) out.source = source.Scalar();
  return out;
}

// vti_stiffness: {columns: [P MPa, C11 GPa, C12 GPa, C13 GPa, C33 GPa], rows: [[...], ...],
//                 fit: <model id> (optional)}
std::vector<VtiPoint> ReadVti(const Field& f, const std::string& file, const std::string& owner,
                              const ModelRegistry& registry, std::string& fit_model, SourceLocation& fit_where) {
  const std::string what = "VTI stiffnesses of " + owner;
  MapReader m(f.node, file, what, f.path);
  Field cols = m.Get("columns"), rows = m.Get("rows"), fit = m.Get("fit");
  m.Finish();
  const ModelSpec* fit_spec = nullptr;
  if (fit) {
    if (!fit.node.IsScalar() || fit.Scalar().empty())
      throw InputError(fit.at, Quote(fit.path) + " must be one model id (e.g. 'exp-modulus'), found " +
                                   TypeName(fit.node));
    fit_spec = registry.Find(fit.Scalar());
    if (fit_spec == nullptr) {
      std::string msg = Quote(fit.path) + " = " + Quote(fit.Scalar()) + " is not a model in the catalogue; known: " +
                        Join(registry.ids());
      const std::string near = NearestWord(fit.Scalar(), registry.ids());
      if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
      throw InputError(fit.at, msg);
    }
    fit_model = fit.Scalar();
    fit_where = fit.at;
  }
  if (!cols) throw InputError(m.at(), "missing required key " + Quote(cols.path) + " in " + what);
  if (!rows) throw InputError(m.at(), "missing required key " + Quote(rows.path) + " in " + what);
  cols.ExpectList();
  rows.ExpectList();
  static const std::vector<std::string> kNames = {"P", "C11", "C12", "C13", "C33"};
  std::array<int, 5> index{-1, -1, -1, -1, -1};
  std::vector<double> factor(cols.node.size(), 1.0);
  std::vector<std::string> unit_of(cols.node.size());
  for (size_t i = 0; i < cols.node.size(); ++i) {
    const YAML::Node c = cols.node[i];
    const SourceLocation at = Where(file, c.Mark());
    if (!c.IsScalar()) throw InputError(at, Quote(cols.path) + " entries must be 'name unit' (e.g. 'C11 GPa')");
    const std::string text = c.Scalar();
    const size_t sp = text.find_first_of(" \t");
    const std::string name = text.substr(0, sp);
    int k = -1;
    for (size_t j = 0; j < kNames.size(); ++j)
      if (kNames[j] == name) k = static_cast<int>(j);
    if (k < 0) {
      std::string msg = "unknown column " + Quote(name) + " in " + Quote(cols.path) + " (columns: P, C11, C12, C13, C33)";
      const std::string near = NearestWord(name, kNames);
      if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
      throw InputError(at, msg);
    }
    if (index[static_cast<size_t>(k)] >= 0) throw InputError(at, "column " + Quote(name) + " is declared twice");
    if (sp == std::string::npos || text.find_first_not_of(" \t", sp) == std::string::npos)
      throw InputError(at, "column " + Quote(name) + " needs a unit (e.g. '" + name + (k == 0 ? " MPa'" : " GPa'") + ")");
    const std::string unit = text.substr(text.find_first_not_of(" \t", sp));
    factor[i] = UnitFactor(unit, k == 0 ? Quantity::kPressure : Quantity::kModulus, "column " + Quote(name), at);
    unit_of[i] = unit;
    index[static_cast<size_t>(k)] = static_cast<int>(i);
  }
  for (size_t j = 0; j < kNames.size(); ++j)
    if (index[j] < 0) throw InputError(cols.at, Quote(cols.path) + " needs a column " + Quote(kNames[j]));
  if (rows.node.size() == 0) throw InputError(rows.at, Quote(rows.path) + " is empty");
  std::vector<VtiPoint> out;
  for (size_t i = 0; i < rows.node.size(); ++i) {
    const YAML::Node row = rows.node[i];
    const SourceLocation at = Where(file, row.Mark());
    if (!row.IsSequence() || row.size() != cols.node.size())
      throw InputError(at, Quote(rows.path) + " row " + std::to_string(i + 1) + " must be a list of " +
                               std::to_string(cols.node.size()) + " numbers (one per column)");
    std::array<double, 5> v{};
    for (size_t j = 0; j < kNames.size(); ++j) {
      const size_t col = static_cast<size_t>(index[j]);
      const YAML::Node cell = row[col];
      double x = 0;
      if (!cell.IsScalar() || !csv::ParseNumber(cell.Scalar(), x) || !std::isfinite(x))
        throw InputError(Where(file, cell.Mark()), "non-numeric value in " + Quote(rows.path) + " row " +
                                                       std::to_string(i + 1) + " (" + kNames[j] + ")");
      v[j] = x * factor[col];
      if (!std::isfinite(v[j]))
        throw InputError(Where(file, cell.Mark()), kNames[j] + " = " + cell.Scalar() +
                                                       " is out of range: not a finite number once converted to SI units");
      if (j == 0 ? !(v[j] >= 0) : !(v[j] > 0))
        throw InputError(Where(file, cell.Mark()), kNames[j] + " = " + cell.Scalar() +
                                                       (j == 0 ? " is negative; pressures must be >= 0" : " must be > 0"));
      units::RequirePlausible(j == 0 ? Measured::kPressure : Measured::kModulus, kNames[j], x, unit_of[col], v[j],
                              true, Where(file, cell.Mark()));
    }
    out.push_back({v[0], v[1], v[2], v[3], v[4], at});
  }
  if (fit_spec != nullptr) {
    // Each stiffness fit needs at least one degree of freedom left over.
    const size_t need = fit_spec->parameters.size() + 1;
    if (out.size() < need)
      throw InputError(fit.at, Quote(fit.path) + " = " + Quote(fit.Scalar()) + " has " +
                                   std::to_string(fit_spec->parameters.size()) + " parameters and needs >= " +
                                   std::to_string(need) + " rows in " + Quote(rows.path) + ", found " +
                                   std::to_string(out.size()));
  }
  return out;
}

// `bands:` mapping over `into` (key by key; a given `grid` or `methods` replaces the default's).
void ReadBandSettings(const Field& f, const std::string& file, const std::string& owner, BandSettings& into) {
  MapReader m(f.node, file, "band options of " + owner, f.path);
  Field conf = m.Get("confidence"), methods = m.Get("methods"), draws = m.Get("monte_carlo_draws"),
        reps = m.Get("bootstrap_replicates"), kind = m.Get("bootstrap_kind"), seed = m.Get("seed"),
        grid = m.Get("grid");
  m.Finish();
  bands::BandOptions& o = into.options;
  std::vector<std::pair<std::string, SourceLocation>> keys;
  if (conf) {
    keys.emplace_back("confidence", conf.at);
    o.confidence = conf.Number();
    if (!(o.confidence > 0 && o.confidence < 1))
      throw InputError(conf.at, Quote(conf.path) + " = " + conf.Scalar() + " is outside (0, 1) (e.g. 0.95)");
  }
  if (methods) {
    methods.ExpectList();
    if (methods.node.size() == 0) throw InputError(methods.at, Quote(methods.path) + " is empty: list at least one method");
    o.delta = o.monte_carlo = o.bootstrap = false;
    for (size_t i = 0; i < methods.node.size(); ++i) {
      Field e;
      e.node = methods.node[i];
      e.path = methods.path + "[" + std::to_string(i + 1) + "]";
      e.at = Where(file, e.node.Mark());
      e.present = true;
      const int which = ParseChoice<int>(e, {{"delta", 0}, {"monte-carlo", 1}, {"bootstrap", 2}});
      bool& flag = which == 0 ? o.delta : which == 1 ? o.monte_carlo : o.bootstrap;
      if (flag) throw InputError(e.at, "method " + Quote(e.Scalar()) + " is listed twice in " + Quote(methods.path));
      flag = true;
    }
  }
  if (draws) keys.emplace_back("monte_carlo_draws", draws.at), o.monte_carlo_draws = ToInt(draws);
  if (reps) keys.emplace_back("bootstrap_replicates", reps.at), o.bootstrap_replicates = ToInt(reps);
  if (kind)
    o.bootstrap_kind = ParseChoice<bands::BootstrapKind>(
        kind, {{"residual", bands::BootstrapKind::kResidual}, {"wild", bands::BootstrapKind::kWild}});
  if (seed) {
    const long long v = seed.Integer();
    if (v < 0) throw InputError(seed.at, Quote(seed.path) + " = " + seed.Scalar() + " must be >= 0");
    o.seed = static_cast<std::uint64_t>(v);
  }
  if (const std::string bad = o.Validate(); !bad.empty()) {
    SourceLocation where = m.at();
    for (const auto& [key, at] : keys)
      if (bad.rfind("bands." + key + " ", 0) == 0) where = at;
    throw InputError(where, bad);
  }
  if (grid) {
    MapReader g(grid.node, file, "pressure grid of " + owner, grid.path);
    Field pressures = g.Get("pressures"), from = g.Get("from"), to = g.Get("to"), count = g.Get("count"),
          spacing = g.Get("spacing");
    g.Finish();
    bands::GridSpec spec;
    if (pressures) {
      for (const Field* x : {&from, &to, &count, &spacing})
        if (*x) throw InputError(x->key_at, "give either " + Quote(pressures.path) + " or from/to/count/spacing, not both");
      pressures.ExpectList();
      spec.spacing = bands::GridSpacing::kExplicit;
      for (size_t i = 0; i < pressures.node.size(); ++i) {
        Field e;
        e.node = pressures.node[i];
        e.path = pressures.path + "[" + std::to_string(i + 1) + "]";
        e.at = Where(file, e.node.Mark());
        e.present = true;
        const double p = ParseQuantity(e, Quantity::kPressure);
        if (!(p >= 0)) throw InputError(e.at, Quote(e.path) + " = " + e.Scalar() + " is negative; pressures must be >= 0");
        spec.pressures.push_back(p);
      }
    } else {
      if (spacing)
        spec.spacing = ParseChoice<bands::GridSpacing>(
            spacing, {{"linear", bands::GridSpacing::kLinear}, {"log", bands::GridSpacing::kLog}});
      if (from) spec.from = ParseQuantity(from, Quantity::kPressure);
      if (to) spec.to = ParseQuantity(to, Quantity::kPressure);
      if (count) spec.count = ToInt(count);
    }
    if (const std::string bad = spec.Validate(); !bad.empty()) {
      SourceLocation where = g.at();
      for (const Field* x : {&pressures, &from, &to, &count, &spacing})
        if (*x && bad.rfind("grid." + x->key, 0) == 0) where = x->at;
      throw InputError(where, f.path + "." + bad);  // "bands.grid.count = ..."
    }
    into.grid = spec;
  }
}

// ---------------------------------------------------------------- the loader

class Loader {
 public:
  Loader(std::string path, const ModelRegistry& registry) : file_(std::move(path)), registry_(&registry) {}

  Study Parse(std::string_view text);

 private:
  void ReadSample(const YAML::Node& node, size_t index);
  std::vector<RawRow> ReadData(const Field& data, const std::string& sample_what,
                               std::array<std::optional<Column>, kNumRoles>& columns);
  std::vector<RawRow> ReadCsvData(const Field& file, const csv::ReadOptions& dialect, const std::vector<Column>& order,
                                  std::array<std::optional<Column>, kNumRoles>& columns);
  std::vector<const Column*> MatchHeader(const csv::Table& table, const std::string& name,
                                         const std::vector<Column>& order,
                                         std::array<std::optional<Column>, kNumRoles>& columns);
  void Warn(const SourceLocation& at, const std::string& message) {
    study_.warnings.push_back(at.ToString() + ": warning: " + message);
  }

  std::string file_;
  const ModelRegistry* registry_;  // the given catalogue, or it plus the study's user models
  ModelRegistry with_user_models_;
  Study study_;
  FitOptionsRead defaults_fit_;
  bool has_default_fit_ = false;
  std::vector<ModelChoice> default_models_;
  BandSettings default_bands_;
  poro::MineralTable minerals_ = poro::MineralTable::Builtin();
  std::map<std::string, GrainModulusChoice> groups_;
  // Whether each sample wrote `grain_modulus` (a study that gives any K_s
  // must state it, or `none`, for every sample).
  std::vector<bool> wrote_grain_;
  bool any_grain_ = false;
};

Study Loader::Parse(std::string_view text) {
  const YAML::Node root = io::detail::LoadSingleDocument(std::string(text), file_, "the study file");
  if (root.IsNull()) throw InputError({file_, 0, 0}, "study file is empty");
  study_.path = file_;
  study_.inputs.push_back({file_, "study"});

  MapReader top(root, file_, "the study");
  Field version = top.Get("version"), name = top.Get("name"), description = top.Get("description"),
        defaults = top.Get("defaults"), samples = top.Get("samples"), minerals = top.Get("minerals"),
        grain_moduli = top.Get("grain_moduli"), branch_tests = top.Get("branch_tests"),
        joint_fits = top.Get("joint_fits"), user_models = top.Get("user_models"),
        sample_table = top.Get("sample_table"), invented = top.Get("invented");
  Field comparison = top.Get("comparison");
  Field depth_tables = top.Get("depth_tables");
  top.Finish();
  if (version && version.Integer() != 1)
    throw InputError(version.at, "version = " + version.Scalar() + " is not supported (this loader reads version 1)");
  if (!name) throw InputError(top.at(), "missing required key 'name' in the study");
  study_.name = name.Scalar();
  if (description) study_.description = description.Scalar();
  if (invented) study_.invented = invented.Boolean();
  if (branch_tests) study_.branch_tests = io::detail::ReadBranchTestSettings(branch_tests, file_);
  if (user_models) {  // before defaults and samples, which may name them
    study_.user_models = io::detail::ReadUserModels(user_models, file_, text, *registry_);
    with_user_models_ = *registry_;
    for (const ModelSpec& m : study_.user_models) with_user_models_.Add(m);
    registry_ = &with_user_models_;
  }

  if (minerals) {
    poro::MineralTable overrides;
    for (poro::Mineral& x : ReadMinerals(minerals, file_)) overrides.Set(std::move(x));
    for (const auto& [n, x] : overrides.minerals()) study_.mineral_overrides.push_back(x);
    minerals_ = poro::MineralTable::Builtin().Merge(overrides);
  }
  if (grain_moduli) {
    if (!grain_moduli.node.IsMap())
      throw InputError(grain_moduli.at, "'grain_moduli' must map group names to grain moduli, found " +
                                            TypeName(grain_moduli.node));
    MapReader g(grain_moduli.node, file_, "the study grain moduli", "grain_moduli");
    for (auto it = grain_moduli.node.begin(); it != grain_moduli.node.end(); ++it) {
      const Field e = g.Get(it->first.Scalar());
      if (e.key.empty() || e.key == "none")
        throw InputError(e.key_at, "grain modulus group name " + Quote(e.key) + " is reserved or empty");
      GrainModulusChoice c = ReadGrainSpec(e, file_, "group " + Quote(e.key), minerals_);
      c.group = e.key;
      groups_[e.key] = std::move(c);
      any_grain_ = true;
    }
    g.Finish();
  }

  if (defaults) {
    MapReader d(defaults.node, file_, "the study defaults", "defaults");
    Field fit = d.Get("fit"), models = d.Get("models"), bands = d.Get("bands");
    d.Finish();
    if (bands) ReadBandSettings(bands, file_, "the study defaults", default_bands_);
    if (fit) {
      ReadFitOptions(fit, file_, "the study defaults", defaults_fit_);
      has_default_fit_ = true;
    }
    if (models) default_models_ = ReadModels(models, file_, *registry_);
  }

  if (comparison) io::detail::ReadComparison(comparison, file_, study_.comparison);
  if (!samples && !sample_table) throw InputError(top.at(), "missing required key 'samples' in the study");
  if (samples) {
    samples.ExpectList();
    if (samples.node.size() == 0) throw InputError(samples.at, "'samples' is empty: the study has no samples");
    if (samples.node.size() > kMaxStudySamples)
      throw InputError(samples.at, "'samples' lists " + std::to_string(samples.node.size()) +
                                       " samples, over the limit of " + std::to_string(kMaxStudySamples));
    const YAML::Node& list = samples.node;
    for (size_t i = 0; i < list.size(); ++i) ReadSample(list[i], i);
  }
  if (sample_table) {  // the batch form (study_batch.cc)
    io::detail::BatchDefaults b{&default_models_, defaults_fit_.options, defaults_fit_.scale_covariance,
                                defaults_fit_.scale_covariance_at, default_bands_, &groups_, any_grain_};
    io::detail::ReadSampleTable(sample_table, file_, *registry_, b, study_);
  }
  if (joint_fits)
    study_.joint_fits = io::detail::ReadJointFits(
        joint_fits, file_, study_.samples, *registry_,
        [&](const YAML::Node& n, const std::string& p) { return ReadModelChoice(n, file_, p, *registry_); });

  if (any_grain_) {
    for (size_t i = 0; i < wrote_grain_.size(); ++i)
      if (!wrote_grain_[i])
        throw InputError(study_.samples[i].sample.where,
                         "sample " + Quote(study_.samples[i].sample.id) +
                             " states no grain_modulus; this study computes alpha, so give one (measured, "
                             "mineralogy or a group name) or 'none' (K_s is never defaulted)");
  }
  if (depth_tables)  // after the samples and their grain moduli, which the tables name
    study_.depth_tables = io::detail::ReadDepthTables(depth_tables, file_, study_.samples, study_.inputs);
  return std::move(study_);
}

std::vector<RawRow> Loader::ReadData(const Field& data, const std::string& sample_what,
                                     std::array<std::optional<Column>, kNumRoles>& columns) {
  MapReader d(data.node, file_, "data of " + sample_what, "data");
  Field cols = d.Get("columns"), rows = d.Get("rows"), file = d.Get("file"), delimiter = d.Get("delimiter"),
        decimal = d.Get("decimal");
  d.Finish();
  if (!cols) throw InputError(d.at(), "missing required key 'data.columns' in " + sample_what);
  const std::vector<Column> order = ReadColumnList(cols, file_);
  for (const Column& c : order) columns[c.role] = c;
  if (rows && file) throw InputError(file.key_at, "give either 'data.rows' or 'data.file', not both");
  if (!rows && !file) throw InputError(d.at(), "missing 'data.rows' or 'data.file' in " + sample_what);
  if (file) return ReadCsvData(file, io::detail::ReadDialectKeys(delimiter, decimal), order, columns);
  for (const Field* f : {&delimiter, &decimal})
    if (*f) throw InputError(f->key_at, Quote(f->path) + " applies to 'data.file' only; inline rows are YAML numbers");
  if (cols.node.IsMap())
    throw InputError(cols.at, "a 'data.columns' map names columns of a file; inline 'data.rows' need the list form "
                              "('name unit', in row order)");

  rows.ExpectList();
  if (rows.node.size() == 0) throw InputError(rows.at, "'data.rows' is empty: " + sample_what + " has no data points");
  std::vector<RawRow> out;
  const YAML::Node& row_list = rows.node;
  for (size_t i = 0; i < row_list.size(); ++i) {
    const YAML::Node row = row_list[i];
    RawRow r;
    r.where = Where(file_, row.Mark());
    if (!row.IsSequence())
      throw InputError(r.where, "data row " + std::to_string(i + 1) + " must be a list of " +
                                    std::to_string(order.size()) + " numbers, found " + TypeName(row));
    if (row.size() != order.size())
      throw InputError(r.where, "data row " + std::to_string(i + 1) + " has " + std::to_string(row.size()) +
                                    " values, expected " + std::to_string(order.size()) + " (one per column)");
    for (size_t j = 0; j < order.size(); ++j) {
      const YAML::Node cell = row[j];
      const SourceLocation at = Where(file_, cell.Mark());
      const std::string context = "data row " + std::to_string(i + 1) + ", column " + std::to_string(j + 1) +
                                  " (" + kRoles[order[j].role].name + ")";
      if (!cell.IsScalar()) throw InputError(at, "non-numeric value in " + context + ": found " + TypeName(cell));
      r.cells[order[j].role] = ReadCell(cell.Scalar(), order[j], at, context);
    }
    out.push_back(std::move(r));
  }
  return out;
}

// Places each declared column in the file's header (setting units taken from
// the header on `columns`); returns, per header field, its column or nullptr
// (a field the columns map does not name, which is then not read).
std::vector<const Column*> Loader::MatchHeader(const csv::Table& table, const std::string& name,
                                               const std::vector<Column>& order,
                                               std::array<std::optional<Column>, kNumRoles>& columns) {
  std::vector<const Column*> by_field(table.header.fields.size(), nullptr);
  std::vector<io::detail::FoundColumn> found;
  std::vector<std::string> declared;
  const bool list_form = !order.front().mapped;
  for (const Column& c : order) {
    found.push_back(io::detail::FindColumn(table, WishFor(c)));
    if (found.back()) by_field[static_cast<size_t>(found.back().index)] = &*columns[c.role];
    declared.push_back(c.header);
  }
  for (size_t i = 0; list_form && i < by_field.size(); ++i) {
    if (by_field[i] != nullptr) continue;
    const std::string hname = csv::SplitHeaderField(table.header.fields[i]).name;
    std::string msg = "header mismatch: column " + Quote(hname) + " of " + Quote(name) +
                      " is not declared in data.columns (" + Join(declared) + ")";
    const std::string near = NearestWord(hname, declared);
    if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
    throw InputError(table.header.Where(table.file, i), msg);
  }
  for (size_t k = 0; k < order.size(); ++k) {
    Column& c = *columns[order[k].role];
    const io::detail::FoundColumn& f = found[k];
    if (!f && list_form)
      throw InputError({table.file, table.header.line, 0}, "declared column '" + c.header +
                                                               "' is missing from the header of " + Quote(name));
    if (!f) io::detail::ThrowColumnNotInHeader(table, WishFor(c), name);
    const Role role = c.role;
    const std::string unit = io::detail::ColumnUnit(
        f, WishFor(c), [role](const std::string& a, const std::string& b) { return SameUnit(role, a, b); });
    if (c.unit.empty()) SetColumnUnit(c, unit, f.at);
  }
  return by_field;
}

std::vector<RawRow> Loader::ReadCsvData(const Field& file, const csv::ReadOptions& dialect,
                                        const std::vector<Column>& order,
                                        std::array<std::optional<Column>, kNumRoles>& columns) {
  const std::string& name = file.Scalar();
  const std::string path = ResolveDataPath(file_, name);
  const std::string text = ReadInputFile({path, "data file", name, file.key_at, kMaxTableFileBytes});
  bool seen = false;
  for (const auto& in : study_.inputs) seen = seen || (in.path == path && in.role == "data");
  if (!seen) study_.inputs.push_back({path, "data"});
  const csv::Table table = csv::ParseCsv(text, path, dialect);
  if (!table.has_header) throw InputError({path, 0, 0}, "data file " + Quote(name) + " has no header line");

  const std::vector<const Column*> by_field = MatchHeader(table, name, order, columns);
  if (table.rows.empty())
    throw InputError({path, table.header.line, 0}, "data file " + Quote(name) + " has no data rows");
  std::vector<RawRow> out;
  for (const auto& row : table.rows) {
    RawRow r;
    r.where = {path, row.line, 0};
    if (row.fields.size() != by_field.size())
      throw InputError(r.where, "expected " + std::to_string(by_field.size()) + " fields (as in the header), found " +
                                    std::to_string(row.fields.size()));
    for (size_t j = 0; j < row.fields.size(); ++j) {
      if (by_field[j] == nullptr) continue;
      const Column& col = *by_field[j];
      const std::string context = "column " + std::to_string(j + 1) + " (" + kRoles[col.role].name + ")";
      r.cells[col.role] = ReadCell(row.fields[j], col, row.Where(path, j), context, row.decimal);
    }
    out.push_back(std::move(r));
  }
  return out;
}

void Loader::ReadSample(const YAML::Node& node, size_t index) {
  // Name the sample by its id in messages when it has a readable one.
  std::string slot = "samples[" + std::to_string(index + 1) + "]";
  // (Iterated, not node["id"]: on a const node a missing key is an invalid
  // node, and asking an invalid node its type throws.)
  if (node.IsMap())
    for (auto it = node.begin(); it != node.end(); ++it)
      if (it->first.IsScalar() && it->first.Scalar() == "id" && it->second.IsScalar())
        slot = "sample " + Quote(it->second.Scalar());
  MapReader m(node, file_, slot);
  Field id = m.Get("id"), lithology = m.Get("lithology"), porosity = m.Get("porosity"),
        density = m.Get("bulk_density"), orientation = m.Get("orientation"), measurement = m.Get("measurement"),
        branch = m.Get("branch"), cycle = m.Get("cycle"), coefficient = m.Get("effective_pressure_coefficient"),
        pore_pressure = m.Get("pore_pressure"), uncertainty = m.Get("uncertainty"), data = m.Get("data"),
        models = m.Get("models"), fit = m.Get("fit"), grain = m.Get("grain_modulus"),
        fluid = m.Get("fluid_modulus"), vti = m.Get("vti_stiffness"), band = m.Get("bands"),
        plug = m.Get("plug");
  m.Finish();

  StudySample ss;
  Sample& s = ss.sample;
  s.where = m.at();
  if (!id) throw InputError(m.at(), "missing required key 'id' in " + slot);
  s.id = id.Scalar();
  CheckSampleId(s.id, id.at);
  for (const auto& prior : study_.samples)
    if (prior.sample.id == s.id)
      throw InputError(id.at, "duplicate sample id " + Quote(s.id) + " (first used at line " +
                                  std::to_string(prior.sample.where.line) + ")");
  const std::string what = "sample " + Quote(s.id);
  auto require = [&](const Field& f) {
    if (!f) throw InputError(m.at(), "missing required key " + Quote(f.key) + " in " + what);
  };

  require(lithology);
  s.lithology = lithology.Scalar();

  require(porosity);
  {
    const std::string& text = porosity.Scalar();
    auto nt = SplitNumberUnit(text);
    if (!nt) throw InputError(porosity.at, "porosity = " + Quote(text) + " is not a number");
    double factor = 1;
    if (!nt->unit.empty()) factor = UnitFactor(nt->unit, Quantity::kDimensionless, "porosity", porosity.at);
    s.porosity = nt->value * factor;
    if (!(std::isfinite(s.porosity) && s.porosity >= 0 && s.porosity < 1))
      throw InputError(porosity.at, "porosity = " + text + " is outside [0, 1)" +
                                        (s.porosity >= 1 ? units::SlipHint(Measured::kPorosity, nt->value, factor, false)
                                                         : std::string()));
    RequirePlausibleText(Measured::kPorosity, "porosity", text, s.porosity, porosity.at);
  }

  require(density);
  s.bulk_density = ParseQuantity(density, Quantity::kDensity);
  if (!(s.bulk_density > 0))
    throw InputError(density.at, "bulk_density = " + density.Scalar() + " must be > 0");
  RequirePlausibleText(Measured::kDensity, "bulk_density", density.Scalar(), s.bulk_density, density.at);

  if (orientation)
    s.orientation = ParseChoice<Orientation>(orientation, {{"vertical", Orientation::kVertical},
                                                           {"horizontal", Orientation::kHorizontal},
                                                           {"inclined", Orientation::kInclined},
                                                           {"unknown", Orientation::kUnknown}});
  require(measurement);
  s.kind = ParseChoice<MeasurementKind>(
      measurement, {{"static", MeasurementKind::kStatic}, {"dynamic", MeasurementKind::kDynamic}});
  if (branch)
    s.branch = ParseChoice<Branch>(branch, {{"loading", Branch::kLoading}, {"unloading", Branch::kUnloading}});
  if (cycle) {
    const long long c = cycle.Integer();
    if (c < 1 || c > 1000000) throw InputError(cycle.at, "cycle = " + cycle.Scalar() + " must be >= 1");
    s.cycle = static_cast<int>(c);
  }
  if (plug) {  // branch sets: docs/study-file.md
    s.plug = plug.Scalar();
    if (s.plug.empty()) throw InputError(plug.at, "'plug' must not be empty");
    io::detail::CheckPlugIsUnambiguous(study_.samples, s, plug.at);
    if (const std::string w = io::detail::PlugConsistencyWarning(study_.samples, s); !w.empty()) Warn(plug.at, w);
  }
  if (coefficient) {
    s.effective_pressure_coefficient = coefficient.Number();
    if (!(s.effective_pressure_coefficient >= 0 && s.effective_pressure_coefficient <= 2))
      throw InputError(coefficient.at,
                       "effective_pressure_coefficient = " + coefficient.Scalar() + " is outside [0, 2]");
  }
  std::optional<double> constant_pore;
  if (pore_pressure) {
    constant_pore = ParseQuantity(pore_pressure, Quantity::kPressure);
    if (!(*constant_pore >= 0))
      throw InputError(pore_pressure.at, "pore_pressure = " + pore_pressure.Scalar() + " must be >= 0");
    RequirePlausibleText(Measured::kPressure, "pore_pressure", pore_pressure.Scalar(), *constant_pore, pore_pressure.at);
  }

  // Uncertainties declared for the whole sample.
  std::optional<Sigma> u_k, u_vp, u_vs, u_rho, u_eps;
  std::optional<bool> calibrated;
  Field u_calibrated;
  if (uncertainty) {
    MapReader u(uncertainty.node, file_, "uncertainty of " + what, "uncertainty");
    Field fk = u.Get("K"), fvp = u.Get("Vp"), fvs = u.Get("Vs"), frho = u.Get("rho"), feps = u.Get("eps_v");
    u_calibrated = u.Get("calibrated");
    u.Finish();
    const bool dyn = s.kind == MeasurementKind::kDynamic;
    for (const Field* f : {&fvp, &fvs, &frho})
      if (*f && !dyn)
        throw InputError(f->key_at, Quote(f->path) + " applies to dynamic samples only; " + what +
                                        " is static (give uncertainty.K)");
    if (feps && dyn)
      throw InputError(feps.key_at, "'uncertainty.eps_v' applies to static strain samples only; " + what + " is dynamic");
    if (feps) u_eps = ParseSigma(feps, Quantity::kDimensionless, true);
    if (fk && dyn)
      throw InputError(fk.key_at, "'uncertainty.K' does not apply to dynamic " + what +
                                      ": give Vp, Vs and rho uncertainties, K's is propagated");
    if (fk) u_k = ParseSigma(fk, Quantity::kModulus);
    if (fvp) u_vp = ParseSigma(fvp, Quantity::kVelocity);
    if (fvs) u_vs = ParseSigma(fvs, Quantity::kVelocity);
    if (frho) u_rho = ParseSigma(frho, Quantity::kDensity);
    if (u_calibrated) calibrated = u_calibrated.Boolean();
  }

  // Data.
  require(data);
  std::array<std::optional<Column>, kNumRoles> columns;
  std::vector<RawRow> rows = ReadData(data, what, columns);
  const bool dyn = s.kind == MeasurementKind::kDynamic;
  auto forbid = [&](Role r, const std::string& why) {
    if (columns[r]) throw InputError(columns[r]->at, std::string("column '") + kRoles[r].name + "' " + why);
  };
  auto need = [&](Role r, const std::string& why) {
    if (!columns[r])
      throw InputError(data.at, "data of " + what + " needs a column '" + kRoles[r].name + "' " + why);
  };
  if (columns[kP]) {
    forbid(kPc, "cannot be combined with a differential pressure column 'P'");
    forbid(kPp, "cannot be combined with a differential pressure column 'P'");
    if (coefficient)
      throw InputError(coefficient.key_at, "effective_pressure_coefficient applies to P_c and P_p columns, but " +
                                               what + " gives the differential pressure 'P' directly");
    if (pore_pressure)
      throw InputError(pore_pressure.key_at, "pore_pressure applies to a P_c column, but " + what +
                                                 " gives the differential pressure 'P' directly");
  } else {
    need(kPc, "(confining pressure) or 'P' (differential pressure)");
    if (columns[kPp] && pore_pressure)
      throw InputError(pore_pressure.key_at, "pore_pressure is given both as a column 'P_p' and as a constant");
    if (coefficient && !columns[kPp] && !pore_pressure)
      throw InputError(coefficient.key_at, "effective_pressure_coefficient has no effect: " + what +
                                               " gives no pore pressure (a 'P_p' column or 'pore_pressure')");
  }
  if (dyn) {
    forbid(kK, "is for static samples; " + what + " is dynamic (K is computed from Vp, Vs and rho)");
    forbid(kSigmaK, "is for static samples; dynamic K uncertainty is propagated from Vp, Vs and rho");
    need(kVp, "(dynamic sample)");
    need(kVs, "(dynamic sample)");
  } else {
    for (Role r : {kVp, kVs, kRho, kSigmaVp, kSigmaVs, kSigmaRho})
      forbid(r, "is for dynamic samples; " + what + " is static");
    if (columns[kEpsV]) {  // a strain sample: one response per sample
      forbid(kK, "cannot be combined with a strain column 'eps_v': give one response per sample (K or eps_v)");
      forbid(kSigmaK, "is the uncertainty of K, but " + what + " gives strain (use 'sigma_eps')");
      if (u_k) throw InputError(uncertainty.at, "'uncertainty.K' does not apply to " + what +
                                                    ", which gives strain (use 'uncertainty.eps_v')");
      s.response = Response::kStrain;
    } else {
      need(kK, "(static bulk modulus) or 'eps_v' (volumetric strain)");
      forbid(kSigmaEps, "needs a strain column 'eps_v' in " + what);
      if (u_eps) throw InputError(uncertainty.at, "'uncertainty.eps_v' needs a strain column 'eps_v' in " + what);
    }
  }
  if (dyn) {
    forbid(kEpsV, "is for static samples; " + what + " is dynamic");
    forbid(kSigmaEps, "is for static samples; " + what + " is dynamic");
  }
  auto both = [&](Role r, const std::optional<Sigma>& u, const char* key) {
    if (columns[r] && u)
      throw InputError(columns[r]->at, std::string("column '") + kRoles[r].name + "' and 'uncertainty." + key +
                                           "' both give this uncertainty; keep one");
  };
  both(kSigmaK, u_k, "K");
  both(kSigmaVp, u_vp, "Vp");
  both(kSigmaVs, u_vs, "Vs");
  both(kSigmaRho, u_rho, "rho");
  both(kSigmaEps, u_eps, "eps_v");
  const bool has_sigma = u_k || u_vp || u_vs || u_rho || u_eps || columns[kSigmaK] || columns[kSigmaVp] ||
                         columns[kSigmaVs] || columns[kSigmaRho] || columns[kSigmaEps];
  if (has_sigma && !calibrated)
    throw InputError(uncertainty ? uncertainty.at : m.at(),
                     what + " gives uncertainties but not 'uncertainty.calibrated' (true: the sigmas are absolute "
                            "1-sigma errors and the covariance is not rescaled; false: they are relative weights)");
  if (!has_sigma && calibrated)
    throw InputError(u_calibrated.key_at, "'uncertainty.calibrated' is given but " + what + " has no uncertainties");

  // Points.
  const double n = s.effective_pressure_coefficient;
  for (const RawRow& r : rows) {
    DataPoint p;
    p.where = r.where;
    auto cell = [&](Role role) -> const Cell* { return r.cells[role] ? &*r.cells[role] : nullptr; };
    auto nonnegative = [&](Role role) {
      const Cell* c = cell(role);
      if (c && !(c->value >= 0))
        throw InputError(c->at, std::string(kRoles[role].name) + " = " + ShowCell(*c, *columns[role]) +
                                    " is negative; pressures must be >= 0");
    };
    auto positive = [&](Role role) {
      const Cell* c = cell(role);
      if (c && !(c->value > 0))
        throw InputError(c->at, std::string(kRoles[role].name) + " = " + ShowCell(*c, *columns[role]) + " must be > 0");
    };
    for (Role role : {kPc, kPp, kP}) nonnegative(role);
    for (Role role : {kK, kVp, kVs, kRho, kSigmaK, kSigmaVp, kSigmaVs, kSigmaRho, kSigmaEps}) positive(role);
    for (Role role : {kPc, kPp, kP, kK, kVp, kVs, kRho, kEpsV})
      if (const Cell* c = cell(role))
        units::RequirePlausible(kRoles[role].measured, kRoles[role].name, c->raw, columns[role]->unit, c->value, true,
                                c->at);
    // A sigma (column or uncertainty.*) against the value it qualifies: plausible_sigma.
    auto plausible_sigma = [&](Role sigma_role, const std::optional<Sigma>& u, double value, double sigma) {
      if (const Cell* c = cell(sigma_role))
        units::RequirePlausibleSigma(kRoles[sigma_role].measured, kRoles[sigma_role].name, c->raw,
                                     columns[sigma_role]->unit, sigma, value, true, c->at);
      else if (u)
        RequirePlausibleSigmaText(kRoles[sigma_role].measured, u->path, u->text, sigma, value, u->at);
    };
    if (cell(kP)) {
      p.pressure = cell(kP)->value;
      p.confining = p.pressure;
      p.pore = 0;
    } else {
      p.confining = cell(kPc)->value;
      p.pore = cell(kPp) ? cell(kPp)->value : constant_pore.value_or(0.0);
      p.pressure = p.confining - n * p.pore;
      if (!(p.pressure >= 0))
        throw InputError(r.where, "differential pressure P_c - n P_p = " + FormatNumber(p.pressure / 1e6) +
                                      " MPa is negative (n = " + FormatNumber(n) + ")");
    }
    auto sigma_of = [&](Role col_role, const std::optional<Sigma>& u, double value) -> double {
      if (const Cell* c = cell(col_role)) return columns[col_role]->relative ? c->value * std::fabs(value) : c->value;
      return u ? u->Of(value) : 0.0;
    };
    if (s.response == Response::kStrain) {
      p.strain = cell(kEpsV)->value;
      p.modulus = std::numeric_limits<double>::quiet_NaN();
      p.sigma = sigma_of(kSigmaEps, u_eps, p.strain);
      plausible_sigma(kSigmaEps, u_eps, p.strain, p.sigma);
      if (has_sigma && !(std::isfinite(p.sigma) && p.sigma > 0))
        throw InputError(r.where, "uncertainty of eps_v = " + FormatNumber(p.sigma) +
                                      " must be > 0 (a relative uncertainty of a zero strain is zero)");
    } else if (!dyn) {
      p.modulus = cell(kK)->value;
      p.sigma = sigma_of(kSigmaK, u_k, p.modulus);
      plausible_sigma(kSigmaK, u_k, p.modulus, p.sigma);
    } else {
      WaveData w;
      w.vp = cell(kVp)->value;
      w.vs = cell(kVs)->value;
      w.rho = cell(kRho) ? cell(kRho)->value : s.bulk_density;
      w.sigma_vp = sigma_of(kSigmaVp, u_vp, w.vp);
      w.sigma_vs = sigma_of(kSigmaVs, u_vs, w.vs);
      w.sigma_rho = sigma_of(kSigmaRho, u_rho, w.rho);
      plausible_sigma(kSigmaVp, u_vp, w.vp, w.sigma_vp);
      plausible_sigma(kSigmaVs, u_vs, w.vs, w.sigma_vs);
      plausible_sigma(kSigmaRho, u_rho, w.rho, w.sigma_rho);
      const double ratio = w.vp / w.vs;
      if (!(ratio > kMinVpVsForPositiveBulk))
        throw InputError(r.where, "Vp = " + ShowCell(*cell(kVp), *columns[kVp]) + ", Vs = " +
                                      ShowCell(*cell(kVs), *columns[kVs]) + ": Vp/Vs = " + Fixed(ratio, 4) +
                                      " must exceed sqrt(4/3) = 1.1547 (otherwise K < 0)");
      const DynamicModuli dm = ComputeDynamicModuli(w);
      if (ratio <= kMinVpVsForPositivePoisson)
        Warn(r.where, what + ": Vp/Vs = " + Fixed(ratio, 4) +
                          " <= sqrt(2): Poisson ratio " + Fixed(dm.poisson, 3) + " <= 0, unusual for rock");
      p.modulus = dm.bulk;
      p.sigma = has_sigma ? dm.sigma_bulk : 0.0;
      p.waves = w;
      p.dynamic = dm;
    }
    if (has_sigma && !(std::isfinite(p.sigma) && p.sigma > 0))
      throw InputError(r.where, "uncertainty of K = " + FormatNumber(p.sigma / 1e9) + " GPa must be > 0");
    s.points.push_back(std::move(p));
  }
  s.sigma_absolute = has_sigma && *calibrated;
  if (s.response == Response::kStrain)
    for (const auto& [at, message] : io::detail::CheckStrainSeries(s.points, what, data.at)) Warn(at, message);

  // Models and fit options.
  if (models) ss.models = ReadModels(models, file_, *registry_);
  else ss.models = default_models_;
  if (ss.models.empty())
    throw InputError(m.at(), what + " has no models: list them under 'models' here or in 'defaults'");
  if (s.response == Response::kStrain)
    for (const ModelChoice& c : ss.models)
      if (const ModelSpec* spec = registry_->Find(c.model_id); spec && !HasStrainForm(*spec))
        throw InputError(c.where, "model " + Quote(c.model_id) + " has no strain form, but " + what +
                                      " gives strain (eps_v); fit it to K data or choose another model");
  FitOptionsRead opts = defaults_fit_;
  if (fit) {
    FitOptionsRead own;
    own.options = defaults_fit_.options;
    own.scale_covariance = defaults_fit_.scale_covariance;
    own.scale_covariance_at = defaults_fit_.scale_covariance_at;
    ReadFitOptions(fit, file_, what, own);
    opts = own;
  }
  ss.options = opts.options;
  if (opts.scale_covariance) {
    if (!*opts.scale_covariance && !has_sigma)
      throw InputError(opts.scale_covariance_at, "scale_covariance = false needs calibrated uncertainties, but " +
                                                     what + " has none");
    if (!*opts.scale_covariance && !s.sigma_absolute)
      throw InputError(opts.scale_covariance_at, "scale_covariance = false contradicts uncertainty.calibrated = "
                                                 "false of " + what);
    ss.options.scale_covariance = *opts.scale_covariance;
  } else {
    ss.options.scale_covariance = !s.sigma_absolute;
  }

  // Grain modulus, fluid, VTI stiffnesses and band settings (alpha outputs).
  wrote_grain_.push_back(static_cast<bool>(grain));
  if (grain) {
    if (grain.node.IsScalar()) {
      const std::string& g = grain.Scalar();
      if (g != "none") {
        auto it = groups_.find(g);
        if (it == groups_.end()) {
          std::vector<std::string> names = {"none"};
          for (const auto& [group_name, c] : groups_) names.push_back(group_name);
          std::string msg = "grain_modulus = " + Quote(g) + " is not a group under 'grain_moduli' (nor 'none'); "
                            "known: " + Join(names);
          const std::string near = NearestWord(g, names);
          if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
          throw InputError(grain.at, msg);
        }
        ss.grain = it->second;
      }
    } else {
      ss.grain = ReadGrainSpec(grain, file_, what, minerals_);
      any_grain_ = true;
    }
    ss.grain.where = grain.at;
  }
  auto needs_grain = [&](const Field& f) {
    if (f && !ss.grain.given)
      throw InputError(f.key_at, Quote(f.key) + " has no effect: " + what + " has no grain modulus (alpha is not computed)");
  };
  needs_grain(fluid);
  needs_grain(vti);
  needs_grain(band);
  if (fluid) ss.fluid = ReadFluid(fluid, file_, what);
  if (vti) ss.vti = ReadVti(vti, file_, what, *registry_, ss.vti_fit_model, ss.vti_fit_where);
  ss.bands = default_bands_;
  if (band) ReadBandSettings(band, file_, what, ss.bands);
  study_.samples.push_back(std::move(ss));
}

}  // namespace

Study ParseStudy(std::string_view yaml_text, const std::string& path, const ModelRegistry& registry) {
  Loader loader(path, registry);
  return io::detail::WithYamlLocations(path, [&] { return loader.Parse(yaml_text); });
}

Study LoadStudy(const std::string& path, const ModelRegistry& registry) {
  InputFileRequest request;
  request.path = path;
  request.what = "study file";
  request.max_bytes = kMaxStudyFileBytes;
  return ParseStudy(ReadInputFile(request), path, registry);
}

Study LoadStudy(const std::string& path) { return LoadStudy(path, ModelRegistry::Builtin()); }

}  // namespace porofit

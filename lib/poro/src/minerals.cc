#include "porofit/poro/minerals.h"

#include <yaml-cpp/yaml.h>

#include <algorithm>
#include <array>
#include <cmath>
#include <fstream>
#include <set>
#include <sstream>

#include "porofit/core/input_file.h"
#include "porofit/core/units.h"

namespace porofit::poro {
namespace {

SourceLocation At(const std::string& file, const YAML::Mark& m) {
  // yaml-cpp marks are zero-based; an unset mark is -1.
  if (m.line < 0) return {file, 0, 0};
  return {file, m.line + 1, m.column + 1};
}

std::string Quoted(const std::string& s) { return "'" + s + "'"; }

// Rejects keys of `map` that are not in `allowed`, suggesting the nearest one.
template <size_t N>
void CheckKeys(const YAML::Node& map, const std::array<const char*, N>& allowed,
               const std::string& context, const std::string& file) {
  for (auto it = map.begin(); it != map.end(); ++it) {
    const std::string key = it->first.Scalar();
    bool known = false;
    for (const char* a : allowed) known = known || key == a;
    if (known) continue;
    std::string msg = "unknown key " + Quoted(key) + " in " + context;
    const std::string near = NearestWord(key, allowed);
    if (!near.empty()) msg += " (did you mean " + Quoted(near) + "?)";
    throw InputError(At(file, it->first.Mark()), msg);
  }
}

// The value of `key` in `map`, which must exist and not be null. `context`
// names the map in "missing key" messages, `prefix` starts the field name
// ("quartz." -> "quartz.bulk"); `owner` locates a missing key.
YAML::Node Required(const YAML::Node& map, const char* key, const std::string& context,
                    const std::string& prefix, const YAML::Mark& owner, const std::string& file) {
  YAML::Node v = map[key];
  if (!v) throw InputError(At(file, owner), "missing key " + Quoted(key) + " in " + context);
  if (v.IsNull()) throw InputError(At(file, v.Mark()), prefix + key + " has no value");
  return v;
}

double Number(const YAML::Node& v, const std::string& field, const std::string& file) {
  if (!v.IsScalar()) throw InputError(At(file, v.Mark()), field + " must be a number");
  double x = 0;
  try {
    x = v.as<double>();
  } catch (const YAML::BadConversion&) {
    throw InputError(At(file, v.Mark()), field + " = " + Quoted(v.Scalar()) + " is not a number");
  }
  if (!std::isfinite(x)) throw InputError(At(file, v.Mark()), field + " = " + v.Scalar() + " is not finite");
  return x;
}

bool ValidName(const std::string& s) {
  if (s.empty()) return false;
  for (char c : s) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_';
    if (!ok) return false;
  }
  return true;
}

double UnitFactor(const YAML::Node& units, const char* key, units::Quantity q,
                  const YAML::Mark& owner, const std::string& file) {
  const YAML::Node v = Required(units, key, "units", "units.", owner, file);
  const std::string name = v.IsScalar() ? v.Scalar() : std::string();
  const auto f = units::ToSiFactor(q, name);
  if (!f) {
    throw InputError(At(file, v.Mark()),
                     std::string("units.") + key + " = " + Quoted(name) + " is not a " +
                         std::string(units::QuantityName(q)) + " unit (accepted: " +
                         units::AcceptedUnitsList(q) + ")");
  }
  return *f;
}

constexpr std::array<const char*, 2> kRootKeys = {"units", "minerals"};
constexpr std::array<const char*, 2> kUnitKeys = {"modulus", "density"};
constexpr std::array<const char*, 8> kMineralKeys = {"bulk",       "shear", "density", "sigma_bulk",
                                                     "sigma_shear", "clay",  "source",  "checked"};

Mineral ParseMineral(const std::string& name, const YAML::Node& key, const YAML::Node& node,
                     double modulus_factor, double density_factor, const std::string& file) {
  if (!node.IsMap()) throw InputError(At(file, key.Mark()), "mineral " + Quoted(name) + " must be a map of properties");
  CheckKeys(node, kMineralKeys, "mineral " + Quoted(name), file);
  Mineral m;
  m.name = name;
  m.where = At(file, key.Mark());

  // Reads key as a number, checks it against its rule, converts to SI.
  auto value = [&](const char* k, bool strictly_positive, double factor) {
    const YAML::Node v = Required(node, k, "mineral " + Quoted(name), name + ".", key.Mark(), file);
    const std::string field = name + "." + k;
    const double x = Number(v, field, file);
    if (strictly_positive && !(x > 0)) throw InputError(At(file, v.Mark()), field + " = " + v.Scalar() + " must be > 0");
    if (!strictly_positive && x < 0) throw InputError(At(file, v.Mark()), field + " = " + v.Scalar() + " must be >= 0");
    return x * factor;
  };
  m.bulk = value("bulk", true, modulus_factor);
  m.shear = value("shear", true, modulus_factor);
  m.density = value("density", true, density_factor);
  m.sigma_bulk = value("sigma_bulk", false, modulus_factor);
  m.sigma_shear = value("sigma_shear", false, modulus_factor);

  if (const YAML::Node c = node["clay"]) {
    bool b = false;
    if (!c.IsScalar() || !YAML::convert<bool>::decode(c, b))
      throw InputError(At(file, c.Mark()), name + ".clay = " + Quoted(c.IsScalar() ? c.Scalar() : "") + " is not true or false");
    m.clay = b;
  }

  const YAML::Node s = Required(node, "source", "mineral " + Quoted(name), name + ".", key.Mark(), file);
  if (!s.IsScalar()) throw InputError(At(file, s.Mark()), name + ".source must be text");
  m.source = s.Scalar();
  if (m.source.find_first_not_of(" \t") == std::string::npos)
    throw InputError(At(file, s.Mark()), name + ".source is empty; give the published source (author, year, title, table)");

  if (const YAML::Node c = node["checked"]) {
    const std::string text = c.IsScalar() ? c.Scalar() : std::string();
    const std::string issue = MineralCheckIssue(name + ".checked", text);
    if (!issue.empty()) throw InputError(At(file, c.Mark()), issue);
    m.checked = text;
  }
  return m;
}

}  // namespace

bool Mineral::SameValues(const Mineral& o) const {
  return name == o.name && bulk == o.bulk && shear == o.shear && density == o.density &&
         sigma_bulk == o.sigma_bulk && sigma_shear == o.sigma_shear && clay == o.clay && source == o.source &&
         checked == o.checked;
}

const std::vector<std::string>& MineralCheckValues() {
  static const std::vector<std::string> values = {"against source excerpt", "against secondary citation",
                                                  "from memory"};
  return values;
}

std::string MineralCheckIssue(const std::string& field, const std::string& value) {
  const auto& allowed = MineralCheckValues();
  if (std::find(allowed.begin(), allowed.end(), value) != allowed.end()) return {};
  std::string msg = field + " = " + Quoted(value) + " is not one of ";
  for (size_t i = 0; i < allowed.size(); ++i) msg += (i ? ", " : "") + Quoted(allowed[i]);
  return msg;
}

const MineralTable& MineralTable::Builtin() {
  static const MineralTable table = ParseMineralTable(BuiltinMineralTableText(), "<builtin>/config/minerals.yaml");
  return table;
}

const Mineral* MineralTable::Find(std::string_view name) const {
  const auto it = minerals_.find(name);
  return it == minerals_.end() ? nullptr : &it->second;
}

const Mineral& MineralTable::Get(std::string_view name, const SourceLocation& where) const {
  if (const Mineral* m = Find(name)) return *m;
  throw InputError(where, UnknownMineralMessage(*this, name));
}

void MineralTable::Set(Mineral mineral) {
  POROFIT_CHECK(!mineral.name.empty(), "mineral without a name");
  std::string key = mineral.name;
  minerals_.insert_or_assign(std::move(key), std::move(mineral));
}

MineralTable MineralTable::Merge(const MineralTable& overrides) const {
  MineralTable out = *this;
  for (const auto& [name, m] : overrides.minerals_) out.Set(m);
  return out;
}

std::vector<std::string> MineralTable::Names() const {
  std::vector<std::string> names;
  names.reserve(minerals_.size());
  for (const auto& [name, m] : minerals_) names.push_back(name);
  return names;
}

static MineralTable ParseTable(std::string_view text, const std::string& file) {
  const YAML::Node root = YAML::Load(std::string(text));
  if (!root.IsMap()) throw InputError({file, 1, 1}, "mineral table must be a map with keys 'units' and 'minerals'");
  CheckKeys(root, kRootKeys, "mineral table", file);
  const YAML::Mark top = root.Mark();

  const YAML::Node units_node = Required(root, "units", "mineral table", "", top, file);
  if (!units_node.IsMap()) throw InputError(At(file, units_node.Mark()), "units must be a map with keys 'modulus' and 'density'");
  CheckKeys(units_node, kUnitKeys, "units", file);
  const double modulus_factor = UnitFactor(units_node, "modulus", units::Quantity::kModulus, units_node.Mark(), file);
  const double density_factor = UnitFactor(units_node, "density", units::Quantity::kDensity, units_node.Mark(), file);

  const YAML::Node list = Required(root, "minerals", "mineral table", "", top, file);
  if (!list.IsMap()) throw InputError(At(file, list.Mark()), "minerals must be a map from mineral name to properties");

  MineralTable table;
  std::set<std::string> seen;
  for (auto it = list.begin(); it != list.end(); ++it) {
    const std::string name = it->first.IsScalar() ? it->first.Scalar() : std::string();
    if (!ValidName(name))
      throw InputError(At(file, it->first.Mark()),
                       "mineral name " + Quoted(name) + " must use only lowercase letters, digits and '_'");
    // yaml-cpp keeps duplicate keys; a silent last-wins would hide a typo.
    if (!seen.insert(name).second)
      throw InputError(At(file, it->first.Mark()), "mineral " + Quoted(name) + " is listed twice");
    table.Set(ParseMineral(name, it->first, it->second, modulus_factor, density_factor, file));
  }
  if (table.empty()) throw InputError(At(file, list.Mark()), "minerals is empty");
  return table;
}

MineralTable ParseMineralTable(std::string_view text, const std::string& file) {
  // Any yaml-cpp failure (syntax, or a value the checks of ParseTable did not foresee)
  // is reported at its mark.
  try {
    return ParseTable(text, file);
  } catch (const YAML::Exception& e) {
    throw InputError(At(file, e.mark), e.msg);
  }
}

MineralTable LoadMineralTable(const std::string& path) {
  return ParseMineralTable(ReadInputFile({path, "mineral table", "", {}, kMaxStudyFileBytes}), path);
}

}  // namespace porofit::poro

// The `sample_table:` batch form of a study: one CSV row per sample and one
// long data CSV keyed by sample id (docs/study-file.md). Built for thousands
// of samples: every lookup is by hash, never a scan over earlier samples.
#include "study_batch.h"

#include <algorithm>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <unordered_map>
#include <unordered_set>

#include "porofit/core/units.h"
#include "porofit/io/csv.h"

namespace porofit::io::detail {
namespace {

using units::Quantity;

std::string Quote(const std::string& s) { return "'" + s + "'"; }

std::string Join(const std::vector<std::string>& words) {
  std::string s;
  for (const auto& w : words) s += (s.empty() ? "" : ", ") + w;
  return s;
}

std::string Resolve(const std::string& study_path, const std::string& file) {
  const std::filesystem::path p(file);
  if (p.is_absolute()) return file;
  return (std::filesystem::path(study_path).parent_path() / p).lexically_normal().string();
}

// Reads and parses one CSV named by `f` (a scalar field), recording it as a
// "data" input. The header line is required.
csv::Table ReadTable(const Field& f, const std::string& study_file, Study& study, const std::string& what) {
  const std::string& name = f.Scalar();
  const std::string path = Resolve(study_file, name);
  std::ifstream in(path, std::ios::binary);
  if (!in)
    throw InputError(f.at, "cannot open " + what + " " + Quote(name) +
                               (path == name ? std::string() : " (looked for " + Quote(path) + ")"));
  std::ostringstream buffer;
  buffer << in.rdbuf();
  bool seen = false;
  for (const auto& x : study.inputs) seen = seen || (x.path == path && x.role == "data");
  if (!seen) study.inputs.push_back({path, "data"});
  csv::Table t = csv::ParseCsv(buffer.str(), path);
  if (!t.has_header) throw InputError({path, 0, 0}, what + " " + Quote(name) + " has no header line");
  if (t.rows.empty()) throw InputError({path, t.header.line, 0}, what + " " + Quote(name) + " has no data rows");
  return t;
}

// "P_c [MPa]", "P_c (MPa)" or "P_c MPa" -> name and unit (unit may be empty).
std::pair<std::string, std::string> SplitHeader(const std::string& field) {
  const size_t cut = field.find_first_of(" \t[(");
  if (cut == std::string::npos) return {field, ""};
  const std::string rest = field.substr(cut);
  const size_t a = rest.find_first_not_of(" \t[(");
  const size_t b = rest.find_last_not_of(" \t])");
  return {field.substr(0, cut), a == std::string::npos ? "" : rest.substr(a, b - a + 1)};
}

double Factor(Quantity q, const std::string& unit, const std::string& column, const SourceLocation& at) {
  if (auto f = units::ToSiFactor(q, unit)) return *f;
  std::string msg = "unknown " + std::string(units::QuantityName(q)) + " unit " + Quote(unit) + " for column " +
                    Quote(column) + "; accepted: " + units::AcceptedUnitsList(q);
  const std::string near = NearestWord(unit, units::AcceptedUnits(q));
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(at, msg);
}

// A numeric column of either table.
struct NumColumn {
  int index = -1;
  double factor = 1;
  bool relative = false;  // sigma_K in '%'
  std::string name, unit;
  explicit operator bool() const { return index >= 0; }
};

double Cell(const csv::Row& row, const NumColumn& c, const std::string& file) {
  const std::string& text = row.fields[static_cast<size_t>(c.index)];
  const SourceLocation at = row.Where(file, static_cast<size_t>(c.index));
  if (text.empty()) throw InputError(at, "empty cell in column " + Quote(c.name));
  double v = 0;
  if (!csv::ParseNumber(text, v)) throw InputError(at, "non-numeric value " + Quote(text) + " in column " + Quote(c.name));
  if (!std::isfinite(v)) throw InputError(at, c.name + " = " + text + " is not finite");
  return v * c.factor;
}

template <class E>
E Choice(const std::string& text, const SourceLocation& at, const std::string& column,
         const std::vector<std::pair<std::string, E>>& choices) {
  std::vector<std::string> names;
  for (const auto& [n, v] : choices) {
    if (n == text) return v;
    names.push_back(n);
  }
  std::string msg = column + " = " + Quote(text) + " is not one of " + Join(names);
  const std::string near = NearestWord(text, names);
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(at, msg);
}

void CheckRowWidth(const csv::Row& row, const csv::Table& t) {
  if (row.fields.size() != t.header.fields.size())
    throw InputError({t.file, row.line, 0}, "expected " + std::to_string(t.header.fields.size()) +
                                                " fields (as in the header), found " + std::to_string(row.fields.size()));
}

// Columns of the sample table with a fixed meaning; any other column is kept
// as a sample field (StudySample::fields).
const std::vector<std::string>& SampleKeys() {
  static const std::vector<std::string> k = {"id",          "lithology", "porosity", "bulk_density",
                                             "measurement", "branch",    "cycle",    "orientation",
                                             "grain_modulus", "models"};
  return k;
}

}  // namespace

void ReadSampleTable(const Field& table, const std::string& study_file, const ModelRegistry& registry,
                     const BatchDefaults& defaults, Study& study) {
  MapReader m(table.node, study_file, "the sample table", "sample_table");
  Field file = m.Get("file"), data = m.Get("data"), key = m.Get("sample_column"),
        calibrated = m.Get("uncertainty_calibrated");
  m.Finish();
  if (!file) throw InputError(m.at(), "missing required key 'sample_table.file' (the CSV with one row per sample)");
  if (!data) throw InputError(m.at(), "missing required key 'sample_table.data' (the CSV of every sample's points)");
  const std::string key_name = key ? key.Scalar() : std::string("sample");
  if (key_name.empty()) throw InputError(key.at, "'sample_table.sample_column' must not be empty");

  // ---- the sample table's header
  const csv::Table st = ReadTable(file, study_file, study, "sample table");
  const std::string& sf = st.file;
  std::unordered_map<std::string, int> col;
  NumColumn porosity, density, cycle;
  std::vector<int> extras;
  for (size_t i = 0; i < st.header.fields.size(); ++i) {
    const auto [name, unit] = SplitHeader(st.header.fields[i]);
    const SourceLocation at = st.header.Where(sf, i);
    if (name.empty()) throw InputError(at, "empty column name in the header of the sample table");
    if (col.count(name)) throw InputError(at, "column " + Quote(name) + " appears twice in the sample table");
    col[name] = static_cast<int>(i);
    const int idx = static_cast<int>(i);
    if (name == "porosity") {
      porosity = {idx, unit.empty() ? 1.0 : Factor(Quantity::kDimensionless, unit, name, at), false, name, unit};
    } else if (name == "bulk_density") {
      if (unit.empty())
        throw InputError(at, "column 'bulk_density' needs a unit in the header, e.g. 'bulk_density [g/cc]'; "
                             "accepted: " + units::AcceptedUnitsList(Quantity::kDensity));
      density = {idx, Factor(Quantity::kDensity, unit, name, at), false, name, unit};
    } else if (name == "cycle") {
      cycle = {idx, 1.0, false, name, unit};
    } else if (std::find(SampleKeys().begin(), SampleKeys().end(), name) == SampleKeys().end()) {
      extras.push_back(idx);
    } else if (!unit.empty()) {
      throw InputError(at, "column " + Quote(name) + " takes no unit (found " + Quote(unit) + ")");
    }
  }
  auto index_of = [&](const std::string& n) {
    auto it = col.find(n);
    return it == col.end() ? -1 : it->second;
  };
  for (const char* required : {"id", "lithology", "porosity", "bulk_density"})
    if (index_of(required) < 0)
      throw InputError({sf, st.header.line, 0},
                       std::string("the sample table has no column '") + required +
                           "' (required: id, lithology, porosity, bulk_density [unit])");
  const int c_id = index_of("id"), c_lith = index_of("lithology"), c_meas = index_of("measurement"),
            c_branch = index_of("branch"), c_orient = index_of("orientation"), c_grain = index_of("grain_modulus"),
            c_models = index_of("models");
  if (defaults.any_grain && c_grain < 0)
    throw InputError({sf, st.header.line, 0},
                     "this study computes alpha, so the sample table needs a 'grain_modulus' column (a group "
                     "under 'grain_moduli' or 'none' per sample; K_s is never defaulted)");

  // ---- the data table's header
  const csv::Table dt = ReadTable(data, study_file, study, "sample data file");
  const std::string& df = dt.file;
  int c_key = -1;
  NumColumn p, pc, pp, k, sk;
  for (size_t i = 0; i < dt.header.fields.size(); ++i) {
    // Named references, not a structured binding: the lambda below captures
    // them, which clang 14 does not allow for bindings.
    const std::pair<std::string, std::string> header = SplitHeader(dt.header.fields[i]);
    const std::string& name = header.first;
    const std::string& unit = header.second;
    const SourceLocation at = dt.header.Where(df, i);
    const int idx = static_cast<int>(i);
    auto numeric = [&](NumColumn& c, Quantity q, bool sigma) {
      if (c) throw InputError(at, "column " + Quote(name) + " appears twice in the sample data file");
      if (unit.empty())
        throw InputError(at, "column " + Quote(name) + " needs a unit in the header, e.g. '" + name + " [" +
                                 std::string(units::AcceptedUnits(q).front()) + "]'");
      c.index = idx;
      c.name = name;
      c.unit = unit;
      if (sigma && unit == "%") {
        c.relative = true;
        c.factor = 0.01;
      } else {
        c.factor = Factor(q, unit, name, at);
      }
    };
    if (name == key_name) {
      if (c_key >= 0) throw InputError(at, "column " + Quote(name) + " appears twice in the sample data file");
      c_key = idx;
    } else if (name == "P") {
      numeric(p, Quantity::kPressure, false);
    } else if (name == "P_c") {
      numeric(pc, Quantity::kPressure, false);
    } else if (name == "P_p") {
      numeric(pp, Quantity::kPressure, false);
    } else if (name == "K") {
      numeric(k, Quantity::kModulus, false);
    } else if (name == "sigma_K") {
      numeric(sk, Quantity::kModulus, true);
    } else {
      const std::vector<std::string> known = {key_name, "P", "P_c", "P_p", "K", "sigma_K"};
      std::string msg = "unknown column " + Quote(name) + " in the sample data file (columns: " + Join(known) + ")";
      const std::string near = NearestWord(name, known);
      if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
      throw InputError(at, msg);
    }
  }
  if (c_key < 0)
    throw InputError({df, dt.header.line, 0}, "the sample data file has no sample-id column " + Quote(key_name) +
                                                  " (set sample_table.sample_column to its name)");
  if (!k) throw InputError({df, dt.header.line, 0}, "the sample data file needs a column 'K [unit]' (static bulk modulus)");
  if (p && (pc || pp))
    throw InputError(dt.header.Where(df, static_cast<size_t>((pc ? pc : pp).index)),
                     "columns 'P_c'/'P_p' cannot be combined with a differential pressure column 'P'");
  if (!p && !pc)
    throw InputError({df, dt.header.line, 0},
                     "the sample data file needs a column 'P' (differential pressure) or 'P_c' (confining pressure)");
  const bool has_sigma = static_cast<bool>(sk);
  if (has_sigma && !calibrated)
    throw InputError(m.at(), "the sample data file gives sigma_K but 'sample_table.uncertainty_calibrated' is not "
                             "set (true: absolute 1-sigma errors, covariance not rescaled; false: relative weights)");
  if (!has_sigma && calibrated)
    throw InputError(calibrated.key_at, "'sample_table.uncertainty_calibrated' is given but the sample data file has "
                                        "no sigma_K column");
  const bool absolute = has_sigma && calibrated.Boolean();
  if (defaults.scale_covariance && !*defaults.scale_covariance) {
    if (!has_sigma)
      throw InputError(defaults.scale_covariance_at,
                       "scale_covariance = false needs calibrated uncertainties, but the sample table's data have none");
    if (!absolute)
      throw InputError(defaults.scale_covariance_at,
                       "scale_covariance = false contradicts sample_table.uncertainty_calibrated = false");
  }

  // ---- samples, in table order
  std::unordered_set<std::string> ids;
  for (const StudySample& s : study.samples) ids.insert(s.sample.id);
  const size_t first = study.samples.size();
  std::unordered_map<std::string, size_t> slot;  // id -> index in study.samples
  study.samples.reserve(first + st.rows.size());
  std::vector<std::string> model_ids = registry.ids();
  for (const csv::Row& row : st.rows) {
    CheckRowWidth(row, st);
    auto text = [&](int c) -> const std::string& { return row.fields[static_cast<size_t>(c)]; };
    auto at = [&](int c) { return row.Where(sf, static_cast<size_t>(c)); };
    StudySample ss;
    Sample& s = ss.sample;
    s.where = {sf, row.line, 0};
    s.id = text(c_id);
    if (s.id.empty()) throw InputError(at(c_id), "'id' must not be empty");
    if (!ids.insert(s.id).second) throw InputError(at(c_id), "duplicate sample id " + Quote(s.id));
    const std::string what = "sample " + Quote(s.id);
    s.lithology = text(c_lith);
    s.porosity = Cell(row, porosity, sf);
    if (!(s.porosity >= 0 && s.porosity < 1))
      throw InputError(at(porosity.index), "porosity = " + text(porosity.index) +
                                               (porosity.unit.empty() ? "" : " " + porosity.unit) + " is outside [0, 1)");
    s.bulk_density = Cell(row, density, sf);
    if (!(s.bulk_density > 0))
      throw InputError(at(density.index), "bulk_density = " + text(density.index) + " " + density.unit + " must be > 0");
    if (c_meas >= 0 && !text(c_meas).empty()) {
      s.kind = Choice<MeasurementKind>(text(c_meas), at(c_meas), "measurement",
                                       {{"static", MeasurementKind::kStatic}, {"dynamic", MeasurementKind::kDynamic}});
      if (s.kind == MeasurementKind::kDynamic)
        throw InputError(at(c_meas), "measurement = 'dynamic' is not supported in a sample table (its data file has "
                                     "no Vp, Vs columns); list dynamic samples under 'samples'");
    }
    if (c_branch >= 0 && !text(c_branch).empty())
      s.branch = Choice<Branch>(text(c_branch), at(c_branch), "branch",
                                {{"loading", Branch::kLoading}, {"unloading", Branch::kUnloading}});
    if (c_orient >= 0 && !text(c_orient).empty())
      s.orientation = Choice<Orientation>(text(c_orient), at(c_orient), "orientation",
                                          {{"vertical", Orientation::kVertical},
                                           {"horizontal", Orientation::kHorizontal},
                                           {"inclined", Orientation::kInclined},
                                           {"unknown", Orientation::kUnknown}});
    if (cycle && !text(cycle.index).empty()) {
      const double c = Cell(row, cycle, sf);
      if (!(c >= 1 && c <= 1000000 && c == std::floor(c)))
        throw InputError(at(cycle.index), "cycle = " + text(cycle.index) + " must be an integer >= 1");
      s.cycle = static_cast<int>(c);
    }
    s.sigma_absolute = absolute;

    // Models: ids separated by ';' or blanks; empty = the study defaults.
    if (c_models >= 0 && !text(c_models).empty()) {
      std::string word;
      auto flush = [&] {
        if (word.empty()) return;
        if (registry.Find(word) == nullptr) {
          std::string msg = "model " + Quote(word) + " is not in the catalogue (models: " + Join(model_ids) + ")";
          const std::string near = NearestWord(word, model_ids);
          if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
          throw InputError(at(c_models), msg);
        }
        for (const ModelChoice& prior : ss.models)
          if (prior.model_id == word) throw InputError(at(c_models), "model " + Quote(word) + " is listed twice");
        ss.models.push_back({word, {}, at(c_models)});
        word.clear();
      };
      for (char ch : text(c_models)) {
        if (ch == ';' || ch == ' ' || ch == '\t') flush();
        else word += ch;
      }
      flush();
    } else if (defaults.models != nullptr) {
      ss.models = *defaults.models;
    }
    if (ss.models.empty())
      throw InputError(s.where, what + " has no models: give a 'models' column or list them under 'defaults'");
    ss.options = defaults.options;
    ss.options.scale_covariance = defaults.scale_covariance ? *defaults.scale_covariance : !absolute;
    ss.bands = defaults.bands;

    if (c_grain >= 0) {
      const std::string& g = text(c_grain);
      if (g.empty()) throw InputError(at(c_grain), "empty grain_modulus: give a group under 'grain_moduli' or 'none'");
      if (g != "none") {
        static const std::map<std::string, GrainModulusChoice> kNoGroups;
        const auto& groups = defaults.groups != nullptr ? *defaults.groups : kNoGroups;
        const auto it = groups.find(g);
        if (it == groups.end()) {
          std::vector<std::string> names = {"none"};
          for (const auto& [n, c] : groups) names.push_back(n);
          std::string msg = "grain_modulus = " + Quote(g) + " is not a group under 'grain_moduli' (nor 'none'); known: " +
                            Join(names);
          const std::string near = NearestWord(g, names);
          if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
          throw InputError(at(c_grain), msg);
        }
        ss.grain = it->second;
      }
      ss.grain.where = at(c_grain);
    }
    for (int c : extras) ss.fields.emplace_back(SplitHeader(st.header.fields[static_cast<size_t>(c)]).first, text(c));
    slot[s.id] = study.samples.size();
    study.samples.push_back(std::move(ss));
  }

  // ---- data points, in file order within each sample
  for (const csv::Row& row : dt.rows) {
    CheckRowWidth(row, dt);
    const std::string& id = row.fields[static_cast<size_t>(c_key)];
    const auto it = slot.find(id);
    if (it == slot.end())
      throw InputError(row.Where(df, static_cast<size_t>(c_key)),
                       "sample " + Quote(id) + " is not in the sample table " + Quote(file.Scalar()));
    Sample& s = study.samples[it->second].sample;
    DataPoint pt;
    pt.where = {df, row.line, 0};
    auto nonnegative = [&](const NumColumn& c, double v) {
      if (!(v >= 0))
        throw InputError(row.Where(df, static_cast<size_t>(c.index)),
                         c.name + " = " + row.fields[static_cast<size_t>(c.index)] + " " + c.unit +
                             " is negative; pressures must be >= 0");
    };
    if (p) {
      pt.pressure = Cell(row, p, df);
      nonnegative(p, pt.pressure);
      pt.confining = pt.pressure;
    } else {
      pt.confining = Cell(row, pc, df);
      nonnegative(pc, pt.confining);
      if (pp) {
        pt.pore = Cell(row, pp, df);
        nonnegative(pp, pt.pore);
      }
      pt.pressure = pt.confining - s.effective_pressure_coefficient * pt.pore;
      if (!(pt.pressure >= 0))
        throw InputError(pt.where, "differential pressure P_c - n P_p = " + FormatNumber(pt.pressure / 1e6) +
                                       " MPa is negative (n = 1)");
    }
    pt.modulus = Cell(row, k, df);
    if (!(pt.modulus > 0))
      throw InputError(row.Where(df, static_cast<size_t>(k.index)),
                       "K = " + row.fields[static_cast<size_t>(k.index)] + " " + k.unit + " must be > 0");
    if (has_sigma) {
      const double v = Cell(row, sk, df);
      pt.sigma = sk.relative ? v * std::fabs(pt.modulus) : v;
      if (!(std::isfinite(pt.sigma) && pt.sigma > 0))
        throw InputError(row.Where(df, static_cast<size_t>(sk.index)),
                         "sigma_K = " + row.fields[static_cast<size_t>(sk.index)] + " " + sk.unit + " must be > 0");
    }
    s.points.push_back(std::move(pt));
  }
  for (size_t i = first; i < study.samples.size(); ++i)
    if (study.samples[i].sample.points.empty())
      throw InputError(study.samples[i].sample.where, "sample " + Quote(study.samples[i].sample.id) +
                                                          " has no rows in the sample data file " +
                                                          Quote(data.Scalar()));
}

}  // namespace porofit::io::detail

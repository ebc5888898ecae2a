#include "study_joint.h"

#include <algorithm>

namespace porofit::io::detail {
namespace {

std::string Quote(const std::string& s) { return "'" + s + "'"; }

std::string Join(const std::vector<std::string>& words) {
  std::string s;
  for (const auto& w : words) s += (s.empty() ? "" : ", ") + w;
  return s;
}

bool Weighted(const Sample& s) {
  if (s.points.empty()) return false;
  for (const DataPoint& p : s.points)
    if (!(p.sigma > 0)) return false;
  return true;
}

JointFitChoice ReadEntry(const YAML::Node& node, const std::string& file, const std::string& path,
                         const std::vector<StudySample>& samples, const ModelRegistry& registry,
                         const ModelChoiceReader& read_choice) {
  MapReader m(node, file, Quote(path), path);
  Field name = m.Get("name"), model = m.Get("model"), list = m.Get("samples"), where = m.Get("where"),
        shared = m.Get("shared"), parameters = m.Get("parameters"), mixed = m.Get("allow_mixed_branches");
  m.Finish();
  JointFitChoice j;
  j.where = m.at();
  if (!name) throw InputError(m.at(), "missing required key '" + path + ".name'");
  if (!model) throw InputError(m.at(), "missing required key '" + path + ".model'");
  if (!shared) throw InputError(m.at(), "missing required key '" + path + ".shared'");
  if (!list && !where) throw InputError(m.at(), Quote(path) + " selects no samples: give 'samples' and/or 'where'");
  j.name = name.Scalar();
  if (j.name.empty()) throw InputError(name.at, Quote(name.path) + " is empty");

  // Model and parameter settings, read exactly as a `models:` entry.
  YAML::Node choice(YAML::NodeType::Map);
  choice["id"] = model.node;
  if (parameters) choice["parameters"] = parameters.node;
  ModelChoice c = read_choice(choice, path);
  j.model_id = c.model_id;
  j.settings = std::move(c.settings);
  const ModelSpec* spec = registry.Find(j.model_id);
  std::vector<std::string> names;
  for (const auto& p : spec->parameters) names.push_back(p.name);

  shared.ExpectList();
  if (shared.node.size() == 0) throw InputError(shared.at, Quote(shared.path) + " is empty: name at least one parameter");
  for (const YAML::Node& item : shared.node) {
    const SourceLocation at = Where(file, item.Mark());
    if (!item.IsScalar()) throw InputError(at, Quote(shared.path) + " must list parameter names, found " + TypeName(item));
    const std::string p = item.Scalar();
    if (spec->ParameterIndex(p) < 0) {
      std::string msg = "model " + Quote(j.model_id) + " has no parameter " + Quote(p) + " (parameters: " +
                        Join(names) + ")";
      const std::string near = NearestWord(p, names);
      if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
      throw InputError(at, msg);
    }
    if (std::find(j.shared.begin(), j.shared.end(), p) != j.shared.end())
      throw InputError(at, "parameter " + Quote(p) + " is listed twice in " + Quote(shared.path));
    j.shared.push_back(p);
  }
  if (mixed) j.allow_mixed_branches = mixed.Boolean();

  // Members: explicit ids first, then the `where:` matches.
  std::vector<std::string> ids;
  for (const StudySample& s : samples) ids.push_back(s.sample.id);
  if (list) {
    list.ExpectList();
    for (const YAML::Node& item : list.node) {
      const SourceLocation at = Where(file, item.Mark());
      if (!item.IsScalar()) throw InputError(at, Quote(list.path) + " must list sample ids, found " + TypeName(item));
      const std::string id = item.Scalar();
      const auto it = std::find(ids.begin(), ids.end(), id);
      if (it == ids.end()) {
        std::string msg = "sample " + Quote(id) + " of " + Quote(list.path) + " is not in the study";
        const std::string near = NearestWord(id, ids);
        if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
        throw InputError(at, msg);
      }
      const auto index = static_cast<size_t>(it - ids.begin());
      if (std::find(j.samples.begin(), j.samples.end(), index) != j.samples.end())
        throw InputError(at, "sample " + Quote(id) + " is listed twice in " + Quote(list.path));
      j.samples.push_back(index);
    }
  }
  if (where) {
    MapReader w(where.node, file, Quote(where.path), where.path);
    Field lithology = w.Get("lithology"), orientation = w.Get("orientation");
    w.Finish();
    if (!lithology && !orientation)
      throw InputError(where.at, Quote(where.path) + " is empty: give 'lithology' and/or 'orientation'");
    std::string lith, orient;
    if (lithology) lith = lithology.Scalar();
    if (orientation) {
      orient = orientation.Scalar();
      const std::vector<std::string> kinds = {"vertical", "horizontal", "inclined", "unknown"};
      if (std::find(kinds.begin(), kinds.end(), orient) == kinds.end()) {
        std::string msg = Quote(orientation.path) + " = " + Quote(orient) + " is not one of " + Join(kinds);
        const std::string near = NearestWord(orient, kinds);
        if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
        throw InputError(orientation.at, msg);
      }
    }
    size_t matched = 0;
    for (size_t i = 0; i < samples.size(); ++i) {
      const Sample& s = samples[i].sample;
      if (lithology && s.lithology != lith) continue;
      if (orientation && std::string(ToString(s.orientation)) != orient) continue;
      ++matched;
      if (std::find(j.samples.begin(), j.samples.end(), i) == j.samples.end()) j.samples.push_back(i);
    }
    if (matched == 0) throw InputError(where.at, Quote(where.path) + " matches no sample of the study");
  }
  const SourceLocation& members_at = list ? list.at : where.at;
  if (j.samples.size() < 2)
    throw InputError(members_at, "joint fit " + Quote(j.name) + " has " + std::to_string(j.samples.size()) +
                                     " sample; a joint fit needs at least 2");

  // Members must be comparable: one kind of measurement, one branch (unless
  // allowed), weights that mean the same thing.
  const Sample& first = samples[j.samples.front()].sample;
  for (size_t i : j.samples) {
    const Sample& s = samples[i].sample;
    if (s.kind != first.kind)
      throw InputError(members_at, "joint fit " + Quote(j.name) + " mixes static and dynamic samples (" +
                                       Quote(first.id) + " is " + std::string(ToString(first.kind)) + ", " +
                                       Quote(s.id) + " is " + std::string(ToString(s.kind)) +
                                       "); static and dynamic moduli are never fitted together");
    if (s.branch != first.branch) {
      j.mixed_branches = true;
      if (!j.allow_mixed_branches)
        throw InputError(members_at, "joint fit " + Quote(j.name) + " mixes loading and unloading branches (" +
                                         Quote(first.id) + " is " + std::string(ToString(first.branch)) + ", " +
                                         Quote(s.id) + " is " + std::string(ToString(s.branch)) +
                                         "); set 'allow_mixed_branches: true' to fit them together anyway");
    }
    if (Weighted(s) != Weighted(first))
      throw InputError(members_at, "joint fit " + Quote(j.name) + " mixes weighted and unweighted samples (" +
                                       Quote(first.id) + ", " + Quote(s.id) +
                                       "): give K uncertainties for all members or for none");
    if (s.sigma_absolute != first.sigma_absolute)
      throw InputError(members_at, "joint fit " + Quote(j.name) + " mixes calibrated and relative uncertainties (" +
                                       Quote(first.id) + ", " + Quote(s.id) +
                                       "): the weights must mean the same in every member");
  }
  return j;
}

}  // namespace

std::vector<JointFitChoice> ReadJointFits(const Field& f, const std::string& file,
                                          const std::vector<StudySample>& samples, const ModelRegistry& registry,
                                          const ModelChoiceReader& read_choice) {
  f.ExpectList();
  std::vector<JointFitChoice> out;
  for (size_t i = 0; i < f.node.size(); ++i) {
    JointFitChoice j =
        ReadEntry(f.node[i], file, f.path + "[" + std::to_string(i + 1) + "]", samples, registry, read_choice);
    for (const JointFitChoice& prior : out)
      if (prior.name == j.name)
        throw InputError(j.where, "joint fit name " + Quote(j.name) + " is used twice in " + Quote(f.path));
    out.push_back(std::move(j));
  }
  return out;
}

}  // namespace porofit::io::detail

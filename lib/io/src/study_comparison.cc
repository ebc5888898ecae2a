#include "study_comparison.h"

#include <algorithm>

#include "porofit/core/error.h"

namespace porofit::io::detail {

namespace {

std::string Quote(const std::string& s) { return "'" + s + "'"; }

std::string JoinWords(const std::vector<std::string>& w) {
  std::string s;
  for (const std::string& x : w) s += (s.empty() ? "" : ", ") + x;
  return s;
}

// A word from a fixed list; the error lists them and suggests the nearest.
std::string Word(const Field& f, const std::vector<std::string>& allowed, const std::string& path) {
  const std::string& text = f.Scalar();
  if (std::find(allowed.begin(), allowed.end(), text) != allowed.end()) return text;
  std::string msg = Quote(path) + " = " + Quote(text) + " is not one of " + JoinWords(allowed);
  const std::string near = NearestWord(text, allowed);
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(f.at, msg);
}

}  // namespace

void ReadComparison(const Field& f, const std::string& file, compare::ComparisonOptions& out) {
  if (!f.node.IsMap())
    throw InputError(f.at, "'comparison' must be a mapping of comparison options, found " + TypeName(f.node));
  MapReader m(f.node, file, "the comparison options", "comparison");
  Field criterion = m.Get("criterion"), level = m.Get("f_test_level"), group_by = m.Get("group_by"),
        cv = m.Get("cross_validation");
  m.Finish();
  if (criterion) {
    const std::string c = Word(criterion, {"aicc", "aic", "bic"}, "comparison.criterion");
    out.criterion = c == "aicc" ? compare::Criterion::kAicc : c == "aic" ? compare::Criterion::kAic
                                                                         : compare::Criterion::kBic;
  }
  if (level) {
    const double v = level.Number();
    if (!(v > 0 && v < 1))
      throw InputError(level.at, "'comparison.f_test_level' = " + level.Scalar() + " is outside (0, 1)");
    out.f_test_level = v;
  }
  if (group_by) {
    group_by.ExpectList();
    out.group_by.clear();
    const std::vector<std::string>& known = compare::StandardSampleFields();
    for (size_t i = 0; i < group_by.node.size(); ++i) {
      Field e;
      e.key = std::to_string(i);
      e.path = "comparison.group_by[" + std::to_string(i + 1) + "]";
      e.node = group_by.node[i];
      e.at = Where(file, e.node.Mark());
      e.key_at = e.at;
      e.present = true;
      const std::string name = Word(e, known, e.path);
      if (std::find(out.group_by.begin(), out.group_by.end(), name) != out.group_by.end())
        throw InputError(e.at, "sample field " + Quote(name) + " is listed twice in 'comparison.group_by'");
      out.group_by.push_back(name);
    }
  }
  if (cv) {
    if (!cv.node.IsMap())
      throw InputError(cv.at, "'comparison.cross_validation' must be a mapping, found " + TypeName(cv.node));
    MapReader c(cv.node, file, "the cross-validation options", "comparison.cross_validation");
    Field loo = c.Get("leave_one_out"), hold = c.Get("high_pressure_holdout"), points = c.Get("holdout_points");
    c.Finish();
    if (loo) out.cross_validation.leave_one_out = loo.Boolean();
    if (hold) out.cross_validation.high_pressure_holdout = hold.Boolean();
    if (points) {
      const long long h = points.Integer();
      if (h < 1 || h > 1000000)
        throw InputError(points.at, "'comparison.cross_validation.holdout_points' = " + points.Scalar() +
                                        " must be between 1 and 1000000");
      out.cross_validation.holdout_points = static_cast<int>(h);
    }
  }
  const std::string bad = out.Validate();  // belt and braces: the checks above cover every rule
  if (!bad.empty()) throw InputError(f.at, "comparison: " + bad);
}

}  // namespace porofit::io::detail

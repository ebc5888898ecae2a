#include "branch_settings.h"

#include <string>
#include <vector>

namespace porofit::io::detail {

BranchTestSettings ReadBranchTestSettings(const Field& f, const std::string& file) {
  MapReader m(f.node, file, "the branch test settings", "branch_tests");
  Field level = m.Get("level"), grid_points = m.Get("grid_points");
  m.Finish();
  BranchTestSettings out;
  out.where = m.at();
  if (level) {
    out.level = level.Number();
    if (!(out.level > 0 && out.level < 1))
      throw InputError(level.at, "'branch_tests.level' = " + level.Scalar() + " is outside (0, 1) (e.g. 0.95)");
  }
  if (grid_points) {
    const long long n = grid_points.Integer();
    if (n < 2 || n > 1000)
      throw InputError(grid_points.at,
                       "'branch_tests.grid_points' = " + grid_points.Scalar() + " is outside [2, 1000]");
    out.grid_points = static_cast<int>(n);
  }
  return out;
}

void CheckPlugIsUnambiguous(const std::vector<StudySample>& prior, const Sample& s, const SourceLocation& at) {
  for (const StudySample& p : prior) {
    const Sample& o = p.sample;
    if (o.plug == s.plug && o.kind == s.kind && o.branch == s.branch && o.cycle == s.cycle)
      throw InputError(at, "plug '" + s.plug + "' already has a " + std::string(ToString(s.kind)) + " " +
                               std::string(ToString(s.branch)) + " sample of cycle " + std::to_string(s.cycle) +
                               " ('" + o.id + "', line " + std::to_string(o.where.line) +
                               "): ambiguous; give each branch and cycle of a plug one sample");
  }
}

std::string PlugConsistencyWarning(const std::vector<StudySample>& prior, const Sample& s) {
  for (const StudySample& p : prior) {
    const Sample& o = p.sample;
    if (o.plug != s.plug) continue;
    std::vector<std::string> diffs;
    if (o.lithology != s.lithology) diffs.push_back("lithology");
    if (o.porosity != s.porosity) diffs.push_back("porosity");
    if (o.bulk_density != s.bulk_density) diffs.push_back("bulk_density");
    if (o.orientation != s.orientation) diffs.push_back("orientation");
    if (diffs.empty()) return {};
    std::string list;
    for (const std::string& d : diffs) list += (list.empty() ? "" : ", ") + d;
    return "sample '" + s.id + "' of plug '" + s.plug + "' differs from '" + o.id + "' of the same plug in " + list +
           "; one plug is one piece of rock: check the sample descriptions";
  }
  return {};
}

}  // namespace porofit::io::detail

// Looking curves up in a read LAS file, and deciding which of a curve's
// defects are errors: a curve that is used must be unique and numeric; the
// same defects on a curve that is not used are warnings (docs/las.md).
#include <algorithm>

#include "las_internal.h"
#include "porofit/depth/las.h"

namespace porofit::depth {

using las_detail::Upper;

std::string LasWarning::ToString() const { return where.ToString() + ": warning: " + message; }

const LasCurve* LasFile::Find(const std::string& mnemonic) const {
  const std::string m = Upper(mnemonic);
  for (const LasCurve& c : curves) {
    if (Upper(c.header.mnemonic) == m) return &c;
  }
  return nullptr;
}

size_t LasFile::Count(const std::string& mnemonic) const {
  const std::string m = Upper(mnemonic);
  return static_cast<size_t>(
      std::count_if(curves.begin(), curves.end(), [&](const LasCurve& c) { return Upper(c.header.mnemonic) == m; }));
}

const LasHeaderItem* LasFile::FindWell(const std::string& mnemonic) const {
  const std::string m = Upper(mnemonic);
  for (const LasHeaderItem& it : well) {
    if (Upper(it.mnemonic) == m) return &it;
  }
  return nullptr;
}

double LasDensityFactor(const std::string& unit) {
  const std::string u = Upper(unit);
  for (const char* g : {"G/CC", "G/C3", "GM/CC", "GM/C3", "G/CM3", "GR/CC"}) {
    if (u == g) return 1000.0;
  }
  if (u == "KG/M3" || u == "K/M3") return 1.0;
  return 0.0;
}

namespace {

// The second curve with the mnemonic of `c`, or nullptr.
const LasCurve* Duplicate(const LasFile& las, const LasCurve& c) {
  const std::string m = Upper(c.header.mnemonic);
  for (const LasCurve& o : las.curves) {
    if (&o != &c && Upper(o.header.mnemonic) == m) return &o;
  }
  return nullptr;
}

std::string BadText(const LasCurve& c) {
  return "curve " + c.header.mnemonic + " holds " + std::to_string(c.bad_count) + " value(s) that are not numbers (the first, '" +
         c.first_bad.text + "')";
}

}  // namespace

const LasCurve& UsableCurve(const LasFile& las, const std::string& mnemonic, const std::string& role) {
  const LasCurve* c = las.Find(mnemonic);
  if (c == nullptr) {
    std::vector<std::string> names;
    std::string list;
    for (const LasCurve& x : las.curves) {
      names.push_back(x.header.mnemonic);
      list += (list.empty() ? "" : ", ") + x.header.mnemonic;
    }
    std::string msg = role + " curve " + mnemonic + " is not in ~C (curves: " + list + ")";
    const std::string near = NearestWord(mnemonic, names);
    if (!near.empty()) msg += "; did you mean " + near + "?";
    throw InputError({las.path, las.curve_section_line, 0}, msg);
  }
  if (const LasCurve* d = Duplicate(las, *c)) {
    throw InputError({las.path, d->header.line, 0},
                     role + " curve " + mnemonic + " is ambiguous: " + d->header.mnemonic +
                         " appears twice in ~C (first at line " + std::to_string(c->header.line) + ")");
  }
  if (c->bad_count > 0) {
    throw InputError({las.path, c->first_bad.line, c->first_bad.column},
                     "value '" + c->first_bad.text + "' of the " + role + " curve " + c->header.mnemonic +
                         " is not a number (" + std::to_string(c->bad_count) + " such value(s) in that curve)");
  }
  return *c;
}

std::vector<LasWarning> WarningsFor(const LasFile& las, const std::vector<std::string>& used) {
  std::vector<LasWarning> out = las.warnings;
  auto is_used = [&](const LasCurve& c) {
    if (&c == &las.curves.front()) return true;
    const std::string m = Upper(c.header.mnemonic);
    return std::any_of(used.begin(), used.end(), [&](const std::string& u) { return Upper(u) == m; });
  };
  for (const LasCurve& c : las.curves) {
    if (is_used(c)) continue;
    const LasCurve* d = Duplicate(las, c);
    if (d != nullptr && d < &c) {
      out.push_back(las_detail::MakeWarning(las.path, c.header.line, 0,
                                            "curve " + c.header.mnemonic + " appears twice in ~C (first at line " +
                                                std::to_string(d->header.line) + "); not used, so not read"));
    }
    if (c.bad_count > 0) {
      out.push_back(las_detail::MakeWarning(las.path, c.first_bad.line, c.first_bad.column,
                                            BadText(c) + "; not used, so not read"));
    }
  }
  return out;
}

}  // namespace porofit::depth

// Curves of a LAS file against table depth, and the density profile built
// from a density curve (common practice, docs/depth-method.md: MD -> TVD, datum,
// bridged and flagged gaps, bad-hole screen, flagged fill above the log top).
#include <algorithm>
#include <cctype>
#include <cmath>

#include "porofit/depth/las.h"

namespace porofit::depth {
namespace {

std::string Upper(std::string s) {
  for (char& c : s) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  return s;
}

// The fill trend is held to this far above the first log sample (m); the
// profile is linear across this short join.
constexpr double kFillJoin = 0.01;

std::string M(double z) { return FormatNumber(std::round(z * 1e4) / 1e4) + " m"; }

// kg/m^3 per unit of the curve, or 0 if the unit is not a density unit.
double DensityFactor(const std::string& unit) {
  const std::string u = Upper(unit);
  if (u == "G/C3" || u == "G/CC" || u == "G/CM3") return 1000.0;
  if (u == "K/M3" || u == "KG/M3") return 1.0;
  return 0.0;
}

const LasCurve& RequireCurve(const LasFile& las, const std::string& mnemonic, const char* role) {
  if (const LasCurve* c = las.Find(mnemonic)) return *c;
  std::vector<std::string> names;
  for (const LasCurve& c : las.curves) names.push_back(c.header.mnemonic);
  std::string list;
  for (const std::string& n : names) list += (list.empty() ? "" : ", ") + n;
  std::string msg = std::string(role) + " curve " + mnemonic + " is not in ~C (curves: " + list + ")";
  const std::string near = NearestWord(mnemonic, names);
  if (!near.empty()) msg += "; did you mean " + near + "?";
  throw InputError({las.path, las.curve_section_line, 0}, msg);
}

// Index (m) + offset, then through the survey; checks the survey once.
class DepthMap {
 public:
  DepthMap(const LasFile& las, double offset, const std::vector<double>& md, const std::vector<double>& tvd)
      : las_(las), offset_(offset), md_(md), tvd_(tvd) {
    if (!std::isfinite(offset)) throw InputError({las.path}, "index_offset = " + FormatNumber(offset) + " is not finite");
    if (md.size() != tvd.size()) {
      throw InputError({las.path}, "survey has " + std::to_string(md.size()) + " MD values but " +
                                       std::to_string(tvd.size()) + " TVD values");
    }
    if (md.size() == 1) throw InputError({las.path}, "survey has one station; at least two are needed");
    for (size_t i = 1; i < md.size(); ++i) {
      if (!(md[i] > md[i - 1])) {
        throw InputError({las.path}, "survey MD " + FormatNumber(md[i]) + " m does not increase after " +
                                         FormatNumber(md[i - 1]) + " m");
      }
      if (!(tvd[i] >= tvd[i - 1])) {
        throw InputError({las.path}, "survey TVD " + FormatNumber(tvd[i]) + " m at MD " + FormatNumber(md[i]) +
                                         " m is above the previous station (TVD must not decrease)");
      }
    }
  }

  double operator()(double index_m) const {
    const double z = index_m + offset_;
    if (md_.empty()) return z;
    const double slack = 1e-9;
    if (z < md_.front() - slack || z > md_.back() + slack) {
      throw InputError({las_.path}, "log depth MD " + M(z) + " is outside the survey (" + M(md_.front()) + " to " +
                                        M(md_.back()) + "); the survey is not extrapolated");
    }
    const auto it = std::upper_bound(md_.begin(), md_.end(), z);
    if (it == md_.end()) return tvd_.back();
    if (it == md_.begin()) return tvd_.front();
    const size_t k1 = static_cast<size_t>(it - md_.begin()), k = k1 - 1;
    return tvd_[k] + (tvd_[k1] - tvd_[k]) * (z - md_[k]) / (md_[k1] - md_[k]);
  }

 private:
  const LasFile& las_;
  double offset_;
  const std::vector<double>& md_;
  const std::vector<double>& tvd_;
};

void RequireAscending(const LasFile& las, const LasCurve& c, const std::vector<double>& z, size_t i) {
  if (i > 0 && !(z[i] > z[i - 1])) {
    throw InputError({las.path, c.header.line, 0},
                     "curve " + c.header.mnemonic + ": the survey maps two log depths to the same TVD " + M(z[i]) +
                         " (a horizontal stretch cannot be a profile against depth)");
  }
}

double TrendAt(const DensityTrend& t, double z) {
  if (z <= t.depth.front()) return t.density.front();
  if (z >= t.depth.back()) return t.density.back();
  const auto it = std::upper_bound(t.depth.begin(), t.depth.end(), z);
  const size_t k1 = static_cast<size_t>(it - t.depth.begin()), k = k1 - 1;
  return t.density[k] + (t.density[k1] - t.density[k]) * (z - t.depth[k]) / (t.depth[k1] - t.depth[k]);
}

void CheckTrend(const LasFile& las, const DensityTrend& t) {
  if (t.depth.empty() || t.depth.size() != t.density.size()) {
    throw InputError({las.path}, "fill trend needs one density per depth and at least one point (has " +
                                     std::to_string(t.depth.size()) + " depths, " + std::to_string(t.density.size()) +
                                     " densities)");
  }
  for (size_t i = 0; i < t.depth.size(); ++i) {
    if (!std::isfinite(t.depth[i]) || (i > 0 && !(t.depth[i] > t.depth[i - 1]))) {
      throw InputError({las.path}, "fill trend depths must be finite and strictly ascending (at " +
                                       FormatNumber(t.depth[i]) + " m)");
    }
    if (!std::isfinite(t.density[i]) || !(t.density[i] > 0)) {
      throw InputError({las.path}, "fill trend density = " + FormatNumber(t.density[i]) + " kg/m^3 must be > 0");
    }
  }
}

}  // namespace

CurveSeries ExtractCurve(const LasFile& las, const std::string& mnemonic, double index_offset,
                         const std::vector<double>& survey_md, const std::vector<double>& survey_tvd) {
  const LasCurve& c = RequireCurve(las, mnemonic, "requested");
  const DepthMap map(las, index_offset, survey_md, survey_tvd);
  CurveSeries out;
  out.mnemonic = c.header.mnemonic;
  out.unit = c.header.unit;
  out.line = c.header.line;
  const std::vector<double>& index = las.curves.front().values;
  for (size_t i = 0; i < c.values.size(); ++i) {
    if (std::isnan(c.values[i])) continue;
    out.depth.push_back(map(index[i]));
    out.value.push_back(c.values[i]);
    RequireAscending(las, c, out.depth, out.depth.size() - 1);
  }
  if (out.depth.empty()) {
    throw InputError({las.path, c.header.line, 0}, "curve " + c.header.mnemonic + " has no valid (non-NULL) value");
  }
  return out;
}

DensityProfile BuildDensityProfile(const LasFile& las, const DensityLogSpec& spec) {
  const LasCurve& rho_c = RequireCurve(las, spec.curve, "density");
  const double factor = DensityFactor(rho_c.header.unit);
  if (factor == 0) {
    throw InputError({las.path, rho_c.header.line, 0},
                     "density curve " + rho_c.header.mnemonic + " unit '" + rho_c.header.unit +
                         "' is not a density unit (G/C3, G/CC, G/CM3, K/M3 or KG/M3)");
  }
  const LasCurve* corr_c = nullptr;
  double corr_factor = 0;
  if (!spec.correction_curve.empty()) {
    corr_c = &RequireCurve(las, spec.correction_curve, "correction");
    corr_factor = DensityFactor(corr_c->header.unit);
    if (corr_factor == 0) {
      throw InputError({las.path, corr_c->header.line, 0},
                       "correction curve " + corr_c->header.mnemonic + " unit '" + corr_c->header.unit +
                           "' is not a density unit (G/C3, G/CC, G/CM3, K/M3 or KG/M3)");
    }
    if (!std::isfinite(spec.correction_limit) || !(spec.correction_limit > 0)) {
      throw InputError({las.path}, "correction_limit = " + FormatNumber(spec.correction_limit) +
                                       " kg/m^3 must be > 0 when a correction curve is screened");
    }
  }
  if (!std::isfinite(spec.rock_top)) throw InputError({las.path}, "rock_top is not finite");
  const DepthMap map(las, spec.index_offset, spec.survey_md, spec.survey_tvd);
  const std::vector<double>& index = las.curves.front().values;
  const std::string& mn = rho_c.header.mnemonic;

  // Classify each row: valid, NULL, or screened.
  enum class Row { kValid, kNull, kScreened };
  std::vector<Row> cls(index.size(), Row::kNull);
  size_t last_valid = index.size();  // none yet
  size_t unscreened = 0;             // valid density, but the correction curve is NULL there
  for (size_t i = 0; i < index.size(); ++i) {
    const double v = rho_c.values[i];
    if (std::isnan(v)) continue;
    if (!(v > 0)) {
      throw InputError({las.path, rho_c.header.line, 0},
                       "density curve " + mn + " = " + FormatNumber(v) + " " + rho_c.header.unit + " at index " +
                           FormatNumber(index[i]) + " m is not positive");
    }
    cls[i] = Row::kValid;
    if (corr_c != nullptr) {
      const double c = corr_c->values[i];
      if (std::isnan(c)) {
        ++unscreened;
      } else if (std::fabs(c * corr_factor) > spec.correction_limit) {
        cls[i] = Row::kScreened;
      }
    }
    if (cls[i] == Row::kValid) last_valid = i;
  }
  if (last_valid == index.size()) {
    throw InputError({las.path, rho_c.header.line, 0},
                     "density curve " + mn + " has no valid sample" +
                         (corr_c ? " after the " + corr_c->header.mnemonic + " screen" : std::string()));
  }
  // Rows below the last valid one end the profile; they are not mapped (the
  // survey need not reach them).
  const size_t trailing = index.size() - 1 - last_valid;
  const double trailing_to = index.back() + spec.index_offset;

  // Map rows to table depth. Rows above the rock top are not used; invalid rows
  // before the first valid one are dropped (the fill covers them).
  std::vector<double> z, rho;
  std::vector<Row> kind;
  size_t above_rock_top = 0;
  double prev_valid_z = NAN, prev_valid_rho = NAN;  // last valid row above the rock top, for the cut
  for (size_t i = 0; i <= last_valid; ++i) {
    const Row k = cls[i];
    const double v = rho_c.values[i];
    if (k != Row::kValid && z.empty()) {
      prev_valid_z = NAN;  // never bridge a gap into the rock top
      continue;
    }
    const double zi = map(index[i]);
    if (zi < spec.rock_top) {
      if (k == Row::kValid) {
        ++above_rock_top;
        prev_valid_z = zi;
        prev_valid_rho = v * factor;
      }
      continue;
    }
    if (z.empty() && !std::isnan(prev_valid_z) && k == Row::kValid && zi > spec.rock_top) {
      // The log crosses the rock top: start the profile there, interpolated.
      const double t = (spec.rock_top - prev_valid_z) / (zi - prev_valid_z);
      z.push_back(spec.rock_top);
      rho.push_back(prev_valid_rho + t * (v * factor - prev_valid_rho));
      kind.push_back(Row::kValid);
    }
    if (!z.empty() && !(zi > z.back())) {
      throw InputError({las.path, rho_c.header.line, 0},
                       "curve " + mn + ": the survey maps two log depths to the same TVD " + M(zi) +
                           " (a horizontal stretch cannot be a profile against depth)");
    }
    z.push_back(zi);
    rho.push_back(k == Row::kValid ? v * factor : NAN);
    kind.push_back(k);
  }
  if (z.empty()) {
    throw InputError({las.path, rho_c.header.line, 0},
                     "density curve " + mn + " has no valid sample below the rock top at " + M(spec.rock_top));
  }

  DensityProfile out;
  out.notes.push_back("density from " + las.path + " curve " + mn + " (" + rho_c.header.unit + ", ~C line " +
                      std::to_string(rho_c.header.line) + "), " + M(z.front()) + " to " + M(z.back()) +
                      " below datum; index in " + las.index_unit + ", offset " + FormatNumber(spec.index_offset) +
                      " m" + (spec.survey_md.empty() ? ", taken as TVD" : ", MD to TVD by the survey (linear)"));
  if (above_rock_top > 0) {
    out.notes.push_back(std::to_string(above_rock_top) + " valid " + mn + " samples above the rock top at " +
                        M(spec.rock_top) + " ignored");
  }
  if (corr_c != nullptr) {
    out.notes.push_back("bad-hole screen: samples with |" + corr_c->header.mnemonic + "| > " +
                        FormatNumber(spec.correction_limit / 1000.0) + " g/cc rejected and bridged");
    if (unscreened > 0) {
      out.notes.push_back(std::to_string(unscreened) + " " + mn + " samples kept unscreened because " +
                          corr_c->header.mnemonic + " is NULL there");
    }
  }

  // Fill above the first valid sample.
  if (z.front() > spec.rock_top + 1e-9) {
    if (!spec.fill_above) {
      throw InputError({las.path, rho_c.header.line, 0},
                       "density curve " + mn + " starts at " + M(z.front()) + ", below the rock top at " +
                           M(spec.rock_top) + ": a fill trend above the log top is needed");
    }
    const DensityTrend& t = *spec.fill_above;
    CheckTrend(las, t);
    out.depth.push_back(spec.rock_top);
    out.density.push_back(TrendAt(t, spec.rock_top));
    out.source.push_back(DensitySource::kFilled);
    for (size_t i = 0; i < t.depth.size(); ++i) {
      if (t.depth[i] > spec.rock_top && t.depth[i] < z.front()) {
        out.depth.push_back(t.depth[i]);
        out.density.push_back(t.density[i]);
        out.source.push_back(DensitySource::kFilled);
      }
    }
    // Hold the trend down to just above the log top so the profile does not
    // ramp from the last trend point to the first log value over the whole fill.
    const double hold = std::min(kFillJoin, 0.5 * (z.front() - out.depth.back()));
    out.depth.push_back(z.front() - hold);
    out.density.push_back(TrendAt(t, z.front() - hold));
    out.source.push_back(DensitySource::kFilled);
    out.notes.push_back("filled from the rock top at " + M(spec.rock_top) + " to the first valid " + mn + " at " +
                        M(z.front()) + " (trend held to " + FormatNumber(hold) + " m above it) with the user trend: " +
                        (t.description.empty() ? std::string("(no description)") : t.description));
  }

  // Measured samples, with invalid runs bridged between their valid neighbours.
  for (size_t i = 0; i < z.size();) {
    if (kind[i] == Row::kValid) {
      out.depth.push_back(z[i]);
      out.density.push_back(rho[i]);
      out.source.push_back(DensitySource::kMeasured);
      ++i;
      continue;
    }
    size_t j = i;
    while (kind[j] != Row::kValid) ++j;  // a valid row closes every run (trailing ones were removed)
    const size_t a = i - 1;              // i > 0: the first row is valid
    for (size_t k = i; k < j; ++k) {
      const double t = (z[k] - z[a]) / (z[j] - z[a]);
      out.depth.push_back(z[k]);
      out.density.push_back(rho[a] + t * (rho[j] - rho[a]));
      out.source.push_back(kind[k] == Row::kNull ? DensitySource::kBridged : DensitySource::kBadHole);
    }
    // One note per stretch of one cause.
    for (size_t k = i; k < j;) {
      size_t e = k;
      while (e + 1 < j && kind[e + 1] == kind[k]) ++e;
      const std::string what = kind[k] == Row::kNull
                                   ? mn + " NULL"
                                   : mn + " rejected by the " + corr_c->header.mnemonic + " screen";
      out.notes.push_back(what + " from " + M(z[k]) + " to " + M(z[e]) + " (" + std::to_string(e - k + 1) +
                          " samples), bridged linearly between " + M(z[a]) + " and " + M(z[j]));
      k = e + 1;
    }
    i = j;
  }
  if (trailing > 0) {
    out.notes.push_back("profile ends at the last valid " + mn + " sample at " + M(z.back()) + "; " +
                        std::to_string(trailing) + " NULL or screened samples below it, down to " + M(trailing_to) +
                        " (index depth + offset), are not used");
  }
  return out;
}

}  // namespace porofit::depth

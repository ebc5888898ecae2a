// Curves of a LAS file against table depth, and the density profile built
// from a density curve (docs/las.md: MD -> TVD, datum, bridged and flagged
// gaps, bad-hole and plausible-range screens, flagged fill above the log top).
// BuildDensityProfile runs in stages: resolve the curves, classify the rows,
// map them to depth, state sources and warnings, fill, bridge.
#include <algorithm>
#include <cmath>

#include "las_internal.h"
#include "porofit/depth/las.h"

namespace porofit::depth {
namespace {

// The fill trend is held to this far above the first log sample (m); the
// profile is linear across this short join.
constexpr double kFillJoin = 0.01;

std::string M(double z) { return FormatNumber(std::round(z * 1e4) / 1e4) + " m"; }

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
  const LasCurve& c = UsableCurve(las, mnemonic, "requested");
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
  for (const LasWarning& w : WarningsFor(las, {mnemonic})) out.warnings.push_back(w.ToString());
  return out;
}

namespace {

// What each log row contributes. kValid and kKept are anchors of bridges.
enum class Row { kValid, kNull, kScreened, kOutOfRange, kKept };
bool IsAnchor(Row r) { return r == Row::kValid || r == Row::kKept; }

DensitySource SourceOf(Row r) {
  switch (r) {
    case Row::kValid: return DensitySource::kMeasured;
    case Row::kNull: return DensitySource::kBridged;
    case Row::kScreened: return DensitySource::kBadHole;
    case Row::kOutOfRange: return DensitySource::kOutOfRange;
    case Row::kKept: return DensitySource::kOutOfRangeKept;
  }
  return DensitySource::kMeasured;
}

std::string GramsPerCc(double kg_per_m3) { return FormatNumber(kg_per_m3 / 1000.0) + " g/cc"; }

// The density curve and the optional correction curve, checked against the spec.
struct LogCurves {
  const LasCurve* rho = nullptr;
  double factor = 0;  // kg/m^3 per curve unit
  const LasCurve* corr = nullptr;
  double corr_factor = 0;
};

double DensityUnitOf(const LasFile& las, const LasCurve& c, const char* role) {
  const double f = LasDensityFactor(c.header.unit);
  if (f == 0) {
    throw InputError({las.path, c.header.line, 0}, std::string(role) + " curve " + c.header.mnemonic + " unit '" +
                                                       c.header.unit + "' is not a density unit (" + kDensityUnitsText +
                                                       ")");
  }
  return f;
}

LogCurves ResolveCurves(const LasFile& las, const DensityLogSpec& spec) {
  LogCurves out;
  out.rho = &UsableCurve(las, spec.curve, "density");
  out.factor = DensityUnitOf(las, *out.rho, "density");
  if (!spec.correction_curve.empty()) {
    out.corr = &UsableCurve(las, spec.correction_curve, "correction");
    out.corr_factor = DensityUnitOf(las, *out.corr, "correction");
    if (!std::isfinite(spec.correction_limit) || !(spec.correction_limit > 0)) {
      throw InputError({las.path}, "correction_limit = " + FormatNumber(spec.correction_limit) +
                                       " kg/m^3 must be > 0 when a correction curve is screened");
    }
  }
  if (!(spec.plausible_min > 0 && spec.plausible_max > spec.plausible_min)) {
    throw InputError({las.path}, "plausible density range " + FormatNumber(spec.plausible_min) + " to " +
                                     FormatNumber(spec.plausible_max) + " kg/m^3 must have 0 < min < max");
  }
  if (!std::isfinite(spec.rock_top)) throw InputError({las.path}, "rock_top is not finite");
  return out;
}

// Row classes, and what the warnings and notes count.
struct Classes {
  std::vector<Row> row;
  size_t last_anchor = 0;
  size_t unscreened = 0;    // valid density, but the correction curve is NULL there
  size_t outside = 0;       // valid densities outside the plausible range
  size_t first = 0, lowest = 0, highest = 0;  // rows outside it: the first, the extremes (when outside > 0)
};

int RowLine(const LasFile& las, size_t i) { return i < las.row_line.size() ? las.row_line[i] : 0; }

Classes ClassifyRows(const LasFile& las, const DensityLogSpec& spec, const LogCurves& lc) {
  const size_t n = las.curves.front().values.size();
  Classes out;
  out.row.assign(n, Row::kNull);
  out.last_anchor = n;  // none yet
  for (size_t i = 0; i < n; ++i) {
    const double v = lc.rho->values[i];
    if (std::isnan(v)) continue;
    const double rho = v * lc.factor;
    const bool implausible = !(rho >= spec.plausible_min && rho <= spec.plausible_max);
    if (implausible) {
      if (out.outside == 0) out.first = i;
      if (out.outside == 0 || rho < lc.rho->values[out.lowest] * lc.factor) out.lowest = i;
      if (out.outside == 0 || rho > lc.rho->values[out.highest] * lc.factor) out.highest = i;
      ++out.outside;
      if (!spec.screen_implausible && !(rho > 0)) {
        throw InputError({las.path, RowLine(las, i), 0},
                         "density curve " + lc.rho->header.mnemonic + " = " + FormatNumber(v) + " " +
                             lc.rho->header.unit + " is not positive and cannot be kept (screen_implausible off)");
      }
    }
    Row r = implausible ? (spec.screen_implausible ? Row::kOutOfRange : Row::kKept) : Row::kValid;
    if (lc.corr != nullptr && r != Row::kOutOfRange) {
      const double c = lc.corr->values[i];
      if (std::isnan(c)) {
        ++out.unscreened;
      } else if (std::fabs(c * lc.corr_factor) > spec.correction_limit) {
        r = Row::kScreened;
      }
    }
    out.row[i] = r;
    if (IsAnchor(r)) out.last_anchor = i;
  }
  if (out.last_anchor == n) {
    throw InputError({las.path, lc.rho->header.line, 0},
                     "density curve " + lc.rho->header.mnemonic + " has no valid sample" +
                         (lc.corr || out.outside > 0 ? std::string(" after the screens") : std::string()));
  }
  return out;
}

// Rows down to the last anchor, mapped to table depth. Rows above the rock
// top are not used; invalid rows before the first valid one are dropped (the
// fill covers them); a log crossing the rock top starts there, interpolated.
struct Mapped {
  std::vector<double> z, rho;  // rho NaN where not an anchor
  std::vector<Row> kind;
  size_t above_rock_top = 0;
};

Mapped MapRows(const LasFile& las, const DensityLogSpec& spec, const LogCurves& lc, const Classes& cls,
               const DepthMap& map) {
  const std::vector<double>& index = las.curves.front().values;
  const std::string& mn = lc.rho->header.mnemonic;
  Mapped m;
  double prev_z = NAN, prev_rho = NAN;  // last anchor above the rock top, for the cut
  for (size_t i = 0; i <= cls.last_anchor; ++i) {
    const Row k = cls.row[i];
    const double v = lc.rho->values[i] * lc.factor;
    if (!IsAnchor(k) && m.z.empty()) {
      prev_z = NAN;  // never bridge a gap into the rock top
      continue;
    }
    const double zi = map(index[i]);
    if (zi < spec.rock_top) {
      if (IsAnchor(k)) {
        ++m.above_rock_top;
        prev_z = zi;
        prev_rho = v;
      }
      continue;
    }
    if (m.z.empty() && !std::isnan(prev_z) && IsAnchor(k) && zi > spec.rock_top) {
      const double t = (spec.rock_top - prev_z) / (zi - prev_z);
      m.z.push_back(spec.rock_top);
      m.rho.push_back(prev_rho + t * (v - prev_rho));
      m.kind.push_back(Row::kValid);
    }
    if (!m.z.empty() && !(zi > m.z.back())) {
      throw InputError({las.path, lc.rho->header.line, 0},
                       "curve " + mn + ": the survey maps two log depths to the same TVD " + M(zi) +
                           " (a horizontal stretch cannot be a profile against depth)");
    }
    m.z.push_back(zi);
    m.rho.push_back(IsAnchor(k) ? v : NAN);
    m.kind.push_back(k);
  }
  if (m.z.empty()) {
    throw InputError({las.path, lc.rho->header.line, 0},
                     "density curve " + mn + " has no valid sample below the rock top at " + M(spec.rock_top));
  }
  return m;
}

void StateSources(const LasFile& las, const DensityLogSpec& spec, const LogCurves& lc, const Classes& cls,
                  const Mapped& m, DensityProfile& out) {
  const std::string& mn = lc.rho->header.mnemonic;
  out.notes.push_back("density from " + las.path + " curve " + mn + " (" + lc.rho->header.unit + ", ~C line " +
                      std::to_string(lc.rho->header.line) + "), " + M(m.z.front()) + " to " + M(m.z.back()) +
                      " below datum; index in " + las.index_unit + ", offset " + FormatNumber(spec.index_offset) +
                      " m" + (spec.survey_md.empty() ? ", taken as TVD" : ", MD to TVD by the survey (linear)"));
  out.notes.push_back("plausible density range " + GramsPerCc(spec.plausible_min) + " to " +
                      GramsPerCc(spec.plausible_max) + "; samples outside it are " +
                      (spec.screen_implausible ? "rejected and bridged" : "kept as measured") + " and flagged");
  if (m.above_rock_top > 0) {
    out.notes.push_back(std::to_string(m.above_rock_top) + " valid " + mn + " samples above the rock top at " +
                        M(spec.rock_top) + " ignored");
  }
  if (lc.corr != nullptr) {
    out.notes.push_back("bad-hole screen: samples with |" + lc.corr->header.mnemonic + "| > " +
                        GramsPerCc(spec.correction_limit) + " rejected and bridged");
    if (cls.unscreened > 0) {
      out.notes.push_back(std::to_string(cls.unscreened) + " " + mn + " samples kept unscreened because " +
                          lc.corr->header.mnemonic + " is NULL there");
    }
  }
}

// The warnings of this use of the file, then the count of implausible densities.
void StateWarnings(const LasFile& las, const DensityLogSpec& spec, const LogCurves& lc, const Classes& cls,
                   DensityProfile& out) {
  std::vector<std::string> used = {spec.curve};
  if (lc.corr != nullptr) used.push_back(spec.correction_curve);
  for (const LasWarning& w : WarningsFor(las, used)) out.warnings.push_back(w.ToString());
  if (cls.outside == 0) return;
  const std::string& mn = lc.rho->header.mnemonic;
  auto at = [&](size_t i) {
    return GramsPerCc(lc.rho->values[i] * lc.factor) + " at index " + M(las.curves.front().values[i]) + " (line " +
           std::to_string(RowLine(las, i)) + ")";
  };
  const LasWarning w = las_detail::MakeWarning(
      las.path, RowLine(las, cls.first), 0,
      std::to_string(cls.outside) + " " + mn + " sample(s) outside the plausible range " +
                         GramsPerCc(spec.plausible_min) + " to " + GramsPerCc(spec.plausible_max) + " (lowest " +
                         at(cls.lowest) + ", highest " + at(cls.highest) + "); " +
                         (spec.screen_implausible ? "rejected and bridged like NULLs" : "kept as measured") +
                         ", and flagged log-density-range in every row below them");
  out.warnings.push_back(w.ToString());
}

// Fill from the rock top to just above the first log sample with the trend.
void AddFill(const LasFile& las, const DensityLogSpec& spec, const std::string& mn, double log_top,
             DensityProfile& out) {
  if (!(log_top > spec.rock_top + 1e-9)) return;
  if (!spec.fill_above) {
    throw InputError({las.path, las.Find(spec.curve)->header.line, 0},
                     "density curve " + mn + " starts at " + M(log_top) + ", below the rock top at " +
                         M(spec.rock_top) + ": a fill trend above the log top is needed");
  }
  const DensityTrend& t = *spec.fill_above;
  CheckTrend(las, t);
  auto push = [&](double z, double rho) {
    out.depth.push_back(z);
    out.density.push_back(rho);
    out.source.push_back(DensitySource::kFilled);
  };
  push(spec.rock_top, TrendAt(t, spec.rock_top));
  for (size_t i = 0; i < t.depth.size(); ++i) {
    if (t.depth[i] > spec.rock_top && t.depth[i] < log_top) push(t.depth[i], t.density[i]);
  }
  // Hold the trend down to just above the log top so the profile does not
  // ramp from the last trend point to the first log value over the whole fill.
  const double hold = std::min(kFillJoin, 0.5 * (log_top - out.depth.back()));
  push(log_top - hold, TrendAt(t, log_top - hold));
  out.notes.push_back("filled from the rock top at " + M(spec.rock_top) + " to the first valid " + mn + " at " +
                      M(log_top) + " (trend held to " + FormatNumber(hold) + " m above it) with the user trend: " +
                      (t.description.empty() ? std::string("(no description)") : t.description));
}

std::string StretchCause(Row k, const std::string& mn, const LogCurves& lc) {
  switch (k) {
    case Row::kNull: return mn + " NULL";
    case Row::kScreened: return mn + " rejected by the " + lc.corr->header.mnemonic + " screen";
    default: return mn + " outside the plausible density range";
  }
}

// Anchors as measured; runs of other rows bridged between their anchors, one note per stretch of one cause.
void AddLogSamples(const Mapped& m, const LogCurves& lc, DensityProfile& out) {
  const std::string& mn = lc.rho->header.mnemonic;
  for (size_t i = 0; i < m.z.size();) {
    if (IsAnchor(m.kind[i])) {
      out.depth.push_back(m.z[i]);
      out.density.push_back(m.rho[i]);
      out.source.push_back(SourceOf(m.kind[i]));
      ++i;
      continue;
    }
    size_t j = i;
    while (!IsAnchor(m.kind[j])) ++j;  // an anchor closes every run (trailing ones were removed)
    const size_t a = i - 1;            // i > 0: the first row is an anchor
    for (size_t k = i; k < j; ++k) {
      const double t = (m.z[k] - m.z[a]) / (m.z[j] - m.z[a]);
      out.depth.push_back(m.z[k]);
      out.density.push_back(m.rho[a] + t * (m.rho[j] - m.rho[a]));
      out.source.push_back(SourceOf(m.kind[k]));
    }
    for (size_t k = i; k < j;) {
      size_t e = k;
      while (e + 1 < j && m.kind[e + 1] == m.kind[k]) ++e;
      out.notes.push_back(StretchCause(m.kind[k], mn, lc) + " from " + M(m.z[k]) + " to " + M(m.z[e]) + " (" +
                          std::to_string(e - k + 1) + " samples), bridged linearly between " + M(m.z[a]) + " and " +
                          M(m.z[j]));
      k = e + 1;
    }
    i = j;
  }
}

}  // namespace

DensityProfile BuildDensityProfile(const LasFile& las, const DensityLogSpec& spec) {
  const LogCurves lc = ResolveCurves(las, spec);
  const DepthMap map(las, spec.index_offset, spec.survey_md, spec.survey_tvd);
  const Classes cls = ClassifyRows(las, spec, lc);
  const Mapped m = MapRows(las, spec, lc, cls, map);
  DensityProfile out;
  StateSources(las, spec, lc, cls, m, out);
  StateWarnings(las, spec, lc, cls, out);
  AddFill(las, spec, lc.rho->header.mnemonic, m.z.front(), out);
  AddLogSamples(m, lc, out);
  // Rows below the last anchor end the profile; they are not mapped (the survey need not reach them).
  const size_t trailing = cls.row.size() - 1 - cls.last_anchor;
  if (trailing > 0) {
    out.notes.push_back("profile ends at the last valid " + lc.rho->header.mnemonic + " sample at " + M(m.z.back()) +
                        "; " + std::to_string(trailing) + " NULL or screened samples below it, down to " +
                        M(las.curves.front().values.back() + spec.index_offset) +
                        " (index depth + offset), are not used");
  }
  return out;
}

}  // namespace porofit::depth

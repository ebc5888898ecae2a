// `depth_tables:` (docs/study-file.md, "Depth tables"): every number with its
// unit, nothing defaulted silently, every mistake an InputError at its place.
#include "study_depth.h"

#include <algorithm>
#include <cctype>
#include <cmath>
#include <filesystem>
#include <fstream>
#include <limits>
#include <optional>

#include "porofit/core/input_file.h"
#include "porofit/core/units.h"
#include "porofit/depth/las.h"
#include "scalar.h"

namespace porofit {

std::string_view ToString(DepthUnits u) { return u == DepthUnits::kField ? "field" : "si"; }
std::string_view ToString(BandConvention c) {
  return c == BandConvention::kNonExceedance ? "non-exceedance" : "exceedance";
}

namespace io::detail {
namespace {

using units::Quantity;

std::string Quote(const std::string& s) { return "'" + s + "'"; }

std::string Join(const std::vector<std::string>& words) {
  std::string s;
  for (const auto& w : words) s += (s.empty() ? "" : ", ") + w;
  return s;
}

std::string Metres(double v) { return FormatNumber(v) + " m"; }

std::string Example(Quantity q) {
  switch (q) {
    case Quantity::kLength: return "1500 m";
    case Quantity::kDensity: return "2.30 g/cc";
    case Quantity::kPressureGradient: return "10.1 kPa/m";
    default: return "10 MPa";
  }
}

// "1500 m" -> SI, for quantity q. The unit is required.
double Qty(const std::string& text, const SourceLocation& at, const std::string& path, Quantity q) {
  auto nt = SplitNumberUnit(text);
  if (!nt)
    throw InputError(at, Quote(path) + " = " + Quote(text) + " is not a number with a unit (e.g. '" + Example(q) +
                             "')");
  if (nt->unit.empty())
    throw InputError(at, Quote(path) + " = " + text + " needs a unit; accepted: " + units::AcceptedUnitsList(q));
  auto f = units::ToSiFactor(q, nt->unit);
  if (!f) {
    std::string msg;
    if (q == Quantity::kPressureGradient && units::ToSiFactor(Quantity::kPressure, nt->unit))
      msg = Quote(path) + " = " + Quote(text) + " is a pressure, not a gradient; give a unit per depth; accepted: " +
            units::AcceptedUnitsList(q);
    else if (q == Quantity::kPressure && units::ToSiFactor(Quantity::kPressureGradient, nt->unit))
      msg = Quote(path) + " = " + Quote(text) + " is a gradient, not a pressure; accepted: " +
            units::AcceptedUnitsList(q);
    else
      msg = "unknown " + std::string(units::QuantityName(q)) + " unit " + Quote(nt->unit) + " for " + Quote(path) +
            "; accepted: " + units::AcceptedUnitsList(q);
    const std::string near = NearestWord(nt->unit, units::AcceptedUnits(q));
    if (!near.empty() && msg.rfind("unknown", 0) == 0) msg += "; did you mean " + Quote(near) + "?";
    throw InputError(at, msg);
  }
  const double v = nt->value * *f;
  if (!std::isfinite(v)) throw InputError(at, Quote(path) + " = " + text + " is not finite");
  return v;
}

double Qty(const Field& f, Quantity q) { return Qty(f.Scalar(), f.at, f.path, q); }

double QtyNode(const YAML::Node& n, const std::string& file, const std::string& path, Quantity q) {
  const SourceLocation at = Where(file, n.Mark());
  if (!n.IsScalar()) throw InputError(at, Quote(path) + " must be a single value, found " + TypeName(n));
  return Qty(n.Scalar(), at, path, q);
}

double Positive(const Field& f, Quantity q) {
  const double v = Qty(f, q);
  if (!(v > 0)) throw InputError(f.at, Quote(f.path) + " = " + f.Scalar() + " must be > 0");
  return v;
}

// A density of the overburden or the sea: > 0 and in the plausible range (porofit/core/plausible.h).
double Density(const Field& f) {
  const double v = Positive(f, Quantity::kDensity);
  RequirePlausibleText(units::Measured::kDensity, f.path, f.Scalar(), v, f.at);
  return v;
}

void Require(const Field& f, const MapReader& m, const std::string& path) {
  if (!f) throw InputError(m.at(), "missing required key " + Quote(path) + " in " + m.what());
}

// A data file next to the study file; recorded for provenance.
std::string DataPath(const Field& f, const std::string& study_file, std::vector<InputFile>& inputs) {
  const std::string& name = f.Scalar();
  if (name.empty()) throw InputError(f.at, Quote(f.path) + " is empty");
  const std::filesystem::path p(name);
  const std::string path =
      p.is_absolute() ? name : (std::filesystem::path(study_file).parent_path() / p).lexically_normal().string();
  CheckRegularInputFile({path, "LAS file", name, f.at, kMaxLasFileBytes});  // read when the table is built
  bool seen = false;
  for (const InputFile& in : inputs) seen = seen || (in.path == path && in.role == "data");
  if (!seen) inputs.push_back({path, "data"});
  return path;
}

// A survey: [[md, tvd], ...] with units, MD strictly ascending, TVD non-decreasing.
void ReadSurvey(const Field& f, const std::string& file, std::vector<double>& md, std::vector<double>& tvd) {
  f.ExpectList();
  if (f.node.size() < 2) throw InputError(f.at, Quote(f.path) + " needs at least 2 stations [md, tvd]");
  for (size_t i = 0; i < f.node.size(); ++i) {
    const YAML::Node row = f.node[i];
    const SourceLocation at = Where(file, row.Mark());
    const std::string p = f.path + "[" + std::to_string(i + 1) + "]";
    if (!row.IsSequence() || row.size() != 2)
      throw InputError(at, Quote(p) + " must be a pair [md, tvd] with units (e.g. [1500 m, 1480 m])");
    const double m = QtyNode(row[0], file, p + ".md", Quantity::kLength);
    const double t = QtyNode(row[1], file, p + ".tvd", Quantity::kLength);
    if (!md.empty() && !(m > md.back()))
      throw InputError(at, Quote(p) + ": measured depth " + Metres(m) + " must exceed the previous " + Metres(md.back()));
    if (!tvd.empty() && t < tvd.back())
      throw InputError(at, Quote(p) + ": vertical depth " + Metres(t) + " is above the previous " + Metres(tvd.back()));
    if (t > m + 1e-9) throw InputError(at, Quote(p) + ": vertical depth " + Metres(t) + " exceeds measured depth " + Metres(m));
    md.push_back(m);
    tvd.push_back(t);
  }
}

// Appends the warnings not already there (two references to one LAS file give
// the same file-level warnings once).
void AddWarnings(std::vector<std::string>& to, const std::vector<std::string>& from) {
  for (const std::string& w : from)
    if (std::find(to.begin(), to.end(), w) == to.end()) to.push_back(w);
}

// `plausible_range` ([min, max] densities) and `outside_range` (screen or keep)
// of a density log; defaults 1.0 to 3.3 g/cc, screen.
void ReadPlausibleRange(const Field& range, const Field& outside, const std::string& file,
                        depth::DensityLogSpec& spec) {
  if (range) {
    range.ExpectList();
    if (range.node.size() != 2)
      throw InputError(range.at, Quote(range.path) + " must be a pair [min, max] of densities (e.g. [1.0 g/cc, 3.3 g/cc])");
    const double lo = QtyNode(range.node[0], file, range.path + "[1]", Quantity::kDensity);
    const double hi = QtyNode(range.node[1], file, range.path + "[2]", Quantity::kDensity);
    if (!(lo > 0 && hi > lo))
      throw InputError(range.at, Quote(range.path) + " = [" + FormatNumber(lo / 1000) + ", " + FormatNumber(hi / 1000) +
                                     "] g/cc must have 0 < min < max");
    spec.plausible_min = lo;
    spec.plausible_max = hi;
  }
  if (outside) spec.screen_implausible = ParseChoice<bool>(outside, {{"screen", true}, {"keep", false}});
}

// The common keys of a log reference: file, curve, index_offset, survey.
struct LogRef {
  std::string path, name, curve;
  double offset = 0;
  std::vector<double> md, tvd;
  depth::LasFile las;
};

LogRef ReadLogRef(MapReader& m, Field& file_f, Field& curve_f, Field& offset_f, Field& survey_f,
                  const std::string& file, std::vector<InputFile>& inputs) {
  Require(file_f, m, file_f.path.empty() ? "file" : file_f.path);
  LogRef r;
  if (!curve_f) throw InputError(m.at(), "missing required key 'curve' in " + m.what() + " (the curve mnemonic)");
  if (!offset_f)
    throw InputError(m.at(), "missing required key 'index_offset' in " + m.what() +
                                 " (depth below the table datum of the log's index zero, e.g. '0 m' or '-25 m')");
  r.name = file_f.Scalar();
  r.curve = curve_f.Scalar();
  r.offset = Qty(offset_f, Quantity::kLength);
  if (survey_f) ReadSurvey(survey_f, file, r.md, r.tvd);
  r.path = DataPath(file_f, file, inputs);
  r.las = depth::ReadLas(r.path);  // its own errors carry its own lines
  return r;
}

depth::Datum ReadDatum(const Field& f, const std::string& file) {
  MapReader m(f.node, file, Quote(f.path), f.path);
  Field reference = m.Get("reference"), water_depth = m.Get("water_depth"), water_density = m.Get("water_density"),
        air_gap = m.Get("air_gap");
  m.Finish();
  Require(reference, m, f.path + ".reference");
  depth::Datum d;
  d.kind = ParseChoice<depth::DatumKind>(reference, {{"KB", depth::DatumKind::kKellyBushing},
                                                {"MSL", depth::DatumKind::kMeanSeaLevel},
                                                {"GL", depth::DatumKind::kGroundLevel}});
  if (d.kind == depth::DatumKind::kKellyBushing) {
    if (!air_gap)
      throw InputError(m.at(), "a KB datum needs 'air_gap' (height of the kelly bushing above sea level offshore, "
                               "above ground onshore)");
    d.air_gap = Qty(air_gap, Quantity::kLength);
    if (d.air_gap < 0) throw InputError(air_gap.at, Quote(air_gap.path) + " = " + air_gap.Scalar() + " must be >= 0");
  } else if (air_gap) {
    throw InputError(air_gap.key_at, Quote(air_gap.path) + " applies to a KB datum only (this datum is " +
                                         reference.Scalar() + "; shift KB-referenced logs with 'index_offset')");
  }
  if (water_depth) {
    if (d.kind == depth::DatumKind::kGroundLevel)
      throw InputError(water_depth.key_at, "a GL (ground level) datum is onshore: 'water_depth' does not apply");
    d.water_depth = Qty(water_depth, Quantity::kLength);
    if (d.water_depth < 0)
      throw InputError(water_depth.at, Quote(water_depth.path) + " = " + water_depth.Scalar() + " must be >= 0");
  }
  if (d.water_depth > 0) {
    if (!water_density)
      throw InputError(m.at(), "offshore datum (water_depth " + water_depth.Scalar() +
                                   ") needs 'water_density' (e.g. 1.03 g/cc); it is never defaulted");
    d.water_density = Density(water_density);
  } else if (water_density) {
    throw InputError(water_density.key_at, Quote(water_density.path) + " needs a 'water_depth' > 0");
  }
  return d;
}

depth::OverburdenSpec ReadOverburden(const Field& f, const std::string& file, const depth::DepthTableSpec& t,
                                     std::vector<InputFile>& inputs, std::vector<std::string>& notes) {
  MapReader m(f.node, file, Quote(f.path), f.path);
  Field gradient = m.Get("gradient"), layers = m.Get("layers"), log = m.Get("log");
  m.Finish();
  const int given = (gradient ? 1 : 0) + (layers ? 1 : 0) + (log ? 1 : 0);
  if (given != 1)
    throw InputError(m.at(), Quote(f.path) + " needs exactly one of 'gradient', 'layers' or 'log' (" +
                                 std::to_string(given) + " given)");
  depth::OverburdenSpec o;
  const double rock_top = t.datum.RockTop();
  if (gradient) {
    o.kind = depth::OverburdenKind::kGradient;
    o.gradient = Positive(gradient, Quantity::kPressureGradient);
    o.source = "constant gradient " + gradient.Scalar() + " below the rock top";
    return o;
  }
  if (layers) {
    o.kind = depth::OverburdenKind::kLayers;
    layers.ExpectList();
    if (layers.node.size() == 0) throw InputError(layers.at, Quote(layers.path) + " is empty");
    for (size_t i = 0; i < layers.node.size(); ++i) {
      const std::string p = layers.path + "[" + std::to_string(i + 1) + "]";
      MapReader l(layers.node[i], file, Quote(p), p);
      Field base = l.Get("base"), density = l.Get("density");
      l.Finish();
      Require(base, l, p + ".base");
      Require(density, l, p + ".density");
      depth::DensityLayer x{Qty(base, Quantity::kLength), Density(density)};
      const double above = o.layers.empty() ? rock_top : o.layers.back().base;
      if (!(x.base > above))
        throw InputError(base.at, Quote(base.path) + " = " + base.Scalar() + " must be below " +
                                      (o.layers.empty() ? "the rock top (" : "the previous base (") + Metres(above) + ")");
      o.layers.push_back(x);
    }
    if (o.layers.back().base < t.base - 1e-9)
      throw InputError(layers.at, "the last layer base (" + Metres(o.layers.back().base) + ") is above the table base (" +
                                      Metres(t.base) + "): the layers must reach it");
    o.source = "density layers (" + std::to_string(o.layers.size()) + ") below the rock top";
    return o;
  }
  // Density log.
  MapReader l(log.node, file, Quote(log.path), log.path);
  Field lfile = l.Get("file"), curve = l.Get("curve"), offset = l.Get("index_offset"), survey = l.Get("survey"),
        correction = l.Get("correction_curve"), limit = l.Get("correction_limit"), fill = l.Get("fill_above"),
        range = l.Get("plausible_range"), outside = l.Get("outside_range");
  l.Finish();
  if (correction && !limit)
    throw InputError(correction.key_at, "'correction_curve' needs 'correction_limit' (e.g. 0.1 g/cc)");
  if (limit && !correction) throw InputError(limit.key_at, "'correction_limit' needs 'correction_curve'");
  if (!lfile) throw InputError(l.at(), "missing required key " + Quote(log.path + ".file") + " (the LAS file)");
  LogRef r = ReadLogRef(l, lfile, curve, offset, survey, file, inputs);
  depth::DensityLogSpec spec;
  spec.curve = r.curve;
  spec.index_offset = r.offset;
  spec.survey_md = r.md;
  spec.survey_tvd = r.tvd;
  spec.rock_top = rock_top;
  if (correction) {
    spec.correction_curve = correction.Scalar();
    spec.correction_limit = Positive(limit, Quantity::kDensity);
  }
  ReadPlausibleRange(range, outside, file, spec);
  if (fill) {
    fill.ExpectList();
    if (fill.node.size() == 0) throw InputError(fill.at, Quote(fill.path) + " is empty");
    depth::DensityTrend trend;
    std::string words;
    for (size_t i = 0; i < fill.node.size(); ++i) {
      const std::string p = fill.path + "[" + std::to_string(i + 1) + "]";
      MapReader pt(fill.node[i], file, Quote(p), p);
      Field d = pt.Get("depth"), rho = pt.Get("density");
      pt.Finish();
      Require(d, pt, p + ".depth");
      Require(rho, pt, p + ".density");
      const double z = Qty(d, Quantity::kLength);
      if (!trend.depth.empty() && !(z > trend.depth.back()))
        throw InputError(d.at, Quote(d.path) + " = " + d.Scalar() + " must be below the previous point");
      trend.depth.push_back(z);
      trend.density.push_back(Density(rho));
      words += (words.empty() ? "" : ", ") + rho.Scalar() + " at " + d.Scalar();
    }
    trend.description = "user fill trend " + words + (trend.depth.size() == 1 ? " (constant)" : " (linear between)");
    spec.fill_above = trend;
  }
  o.kind = depth::OverburdenKind::kDensityProfile;
  o.profile = depth::BuildDensityProfile(r.las, spec);
  if (o.profile.depth.empty() || o.profile.depth.back() < t.base - 1e-9)
    throw InputError(lfile.at, "density log " + Quote(r.name) + " ends at " +
                                   Metres(o.profile.depth.empty() ? rock_top : o.profile.depth.back()) +
                                   " below datum, above the table base " + Metres(t.base) +
                                   " (a log is never extrapolated)");
  o.source = "density log " + r.name + " curve " + r.curve + " (index offset " + offset.Scalar() + ")";
  notes.push_back("density log file: " + r.name);
  return o;
}

depth::PorePressureSpec ReadPorePressure(const Field& f, const std::string& file, const depth::DepthTableSpec& t,
                                         std::vector<InputFile>& inputs, std::vector<std::string>& warnings) {
  MapReader m(f.node, file, Quote(f.path), f.path);
  Field hydrostatic = m.Get("hydrostatic"), zero = m.Get("zero_depth"), table = m.Get("table"), log = m.Get("log");
  m.Finish();
  const int given = (hydrostatic ? 1 : 0) + (table ? 1 : 0) + (log ? 1 : 0);
  if (given != 1)
    throw InputError(m.at(), Quote(f.path) + " needs exactly one of 'hydrostatic', 'table' or 'log' (" +
                                 std::to_string(given) + " given; overpressure only from a table or log)");
  if (zero && !hydrostatic) throw InputError(zero.key_at, "'zero_depth' applies to 'hydrostatic' only");
  depth::PorePressureSpec p;
  if (hydrostatic) {
    p.kind = depth::PorePressureKind::kHydrostatic;
    p.gradient = Positive(hydrostatic, Quantity::kPressureGradient);
    p.zero_depth = zero ? Qty(zero, Quantity::kLength) : t.datum.SurfaceDepth();
    p.source = "hydrostatic " + hydrostatic.Scalar() + " from " +
               (zero ? zero.Scalar() : std::string(t.datum.water_depth > 0 ? "the sea surface" : "the surface")) +
               " below datum";
    return p;
  }
  auto check_cover = [&](const SourceLocation& at, const std::string& what) {
    if (p.depth.front() > t.top + 1e-9 || p.depth.back() < t.base - 1e-9)
      throw InputError(at, what + " covers " + Metres(p.depth.front()) + " to " + Metres(p.depth.back()) +
                               ", not the table's " + Metres(t.top) + " to " + Metres(t.base) +
                               " (pore pressure is never extrapolated)");
  };
  if (table) {
    p.kind = depth::PorePressureKind::kTable;
    table.ExpectList();
    if (table.node.size() < 2) throw InputError(table.at, Quote(table.path) + " needs at least 2 rows [depth, pressure]");
    for (size_t i = 0; i < table.node.size(); ++i) {
      const YAML::Node row = table.node[i];
      const SourceLocation at = Where(file, row.Mark());
      const std::string q = table.path + "[" + std::to_string(i + 1) + "]";
      if (!row.IsSequence() || row.size() != 2)
        throw InputError(at, Quote(q) + " must be a pair [depth, pressure] with units (e.g. [2000 m, 21 MPa])");
      const double z = QtyNode(row[0], file, q + ".depth", Quantity::kLength);
      const double pp = QtyNode(row[1], file, q + ".pressure", Quantity::kPressure);
      if (!p.depth.empty() && !(z > p.depth.back()))
        throw InputError(at, Quote(q) + ": depth " + Metres(z) + " must exceed the previous " + Metres(p.depth.back()));
      if (pp < 0) throw InputError(at, Quote(q) + ": pressure must be >= 0");
      p.depth.push_back(z);
      p.pressure.push_back(pp);
    }
    check_cover(table.at, Quote(table.path));
    p.source = "table";
    return p;
  }
  MapReader l(log.node, file, Quote(log.path), log.path);
  Field lfile = l.Get("file"), curve = l.Get("curve"), offset = l.Get("index_offset"), survey = l.Get("survey");
  l.Finish();
  if (!lfile) throw InputError(l.at(), "missing required key " + Quote(log.path + ".file") + " (the LAS file)");
  LogRef r = ReadLogRef(l, lfile, curve, offset, survey, file, inputs);
  const depth::CurveSeries s = depth::ExtractCurve(r.las, r.curve, r.offset, r.md, r.tvd);
  AddWarnings(warnings, s.warnings);
  std::string unit = s.unit;
  static const std::vector<std::pair<std::string, std::string>> kSpellings = {
      {"PSI", "psi"}, {"PSIA", "psi"}, {"KPA", "kPa"}, {"MPA", "MPa"}, {"PA", "Pa"}, {"BAR", "bar"}};
  std::optional<double> factor;
  std::string upper;
  for (char c : unit) upper += static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  for (const auto& [las_unit, ours] : kSpellings)
    if (upper == las_unit) factor = units::ToSiFactor(Quantity::kPressure, ours);
  if (!factor)
    throw InputError({r.path, s.line, 0}, "pore-pressure curve " + Quote(r.curve) + " has unit " + Quote(unit) +
                                              "; a pressure unit is needed (PSI, KPA, MPA, PA or BAR)");
  p.kind = depth::PorePressureKind::kProfile;
  p.depth = s.depth;
  for (double v : s.value) p.pressure.push_back(v * *factor);
  check_cover(lfile.at, "pore-pressure curve " + Quote(r.curve) + " of " + Quote(r.name));
  p.source = "log " + r.name + " curve " + r.curve;
  return p;
}

depth::StressSpec ReadStress(const Field& f, const std::string& file) {
  MapReader m(f.node, file, Quote(f.path), f.path);
  Field measure = m.Get("measure"), law = m.Get("law"), horizontal = m.Get("horizontal"),
        tolerance = m.Get("tolerance"), iterations = m.Get("max_iterations");
  m.Finish();
  Require(measure, m, f.path + ".measure");
  Require(law, m, f.path + ".law");
  depth::StressSpec s;
  s.measure = ParseChoice<depth::StressMeasure>(
      measure, {{"vertical", depth::StressMeasure::kVerticalEffective}, {"mean", depth::StressMeasure::kMeanEffective}});
  s.law = ParseChoice<depth::EffectiveStressLaw>(
      law, {{"terzaghi", depth::EffectiveStressLaw::kTerzaghi}, {"biot", depth::EffectiveStressLaw::kBiot}});
  if (tolerance) {
    s.tolerance = tolerance.Number();
    if (!(s.tolerance > 0 && s.tolerance < 0.1))
      throw InputError(tolerance.at, Quote(tolerance.path) + " = " + tolerance.Scalar() + " must be in (0, 0.1)");
  }
  if (iterations) {
    const long long n = iterations.Integer();
    if (n < 1 || n > 100000)
      throw InputError(iterations.at, Quote(iterations.path) + " = " + iterations.Scalar() + " must be in [1, 100000]");
    s.max_iterations = static_cast<int>(n);
  }
  if (!horizontal) {
    if (s.measure == depth::StressMeasure::kMeanEffective)
      throw InputError(m.at(), "measure 'mean' needs 'horizontal' ({ratio: k} or {uniaxial: {poisson: nu}}): the "
                               "horizontal stress is never assumed");
    s.horizontal = depth::HorizontalStressKind::kNone;
    return s;
  }
  MapReader h(horizontal.node, file, Quote(horizontal.path), horizontal.path);
  Field ratio = h.Get("ratio"), ratio_max = h.Get("ratio_max"), uniaxial = h.Get("uniaxial");
  h.Finish();
  if ((ratio ? 1 : 0) + (uniaxial ? 1 : 0) != 1)
    throw InputError(h.at(), Quote(horizontal.path) + " needs exactly one of 'ratio' or 'uniaxial'");
  if (ratio_max && !ratio) throw InputError(ratio_max.key_at, "'ratio_max' needs 'ratio'");
  auto in_range = [](const Field& x, double lo, double hi) {
    const double v = x.Number();
    if (!(v > lo && v < hi))
      throw InputError(x.at, Quote(x.path) + " = " + x.Scalar() + " must be in (" + FormatNumber(lo) + ", " +
                                 FormatNumber(hi) + ")");
    return v;
  };
  if (ratio) {
    s.horizontal = depth::HorizontalStressKind::kRatio;
    s.ratio = in_range(ratio, 0, 10);
    if (ratio_max) s.ratio_max = in_range(ratio_max, 0, 10);
    return s;
  }
  MapReader u(uniaxial.node, file, Quote(uniaxial.path), uniaxial.path);
  Field poisson = u.Get("poisson");
  u.Finish();
  Require(poisson, u, uniaxial.path + ".poisson");
  s.horizontal = depth::HorizontalStressKind::kUniaxial;
  s.poisson = in_range(poisson, 0, 0.5);
  return s;
}

// The fit a rule names: sample id and model id, checked against the study.
size_t CurveFor(const Field& sample, const Field& model, const std::string& file, const std::vector<StudySample>& samples,
                const depth::DepthTableSpec& spec, std::vector<DepthCurveChoice>& curves,
                std::vector<depth::FittedCurve>& fitted) {
  (void)file;
  const std::string id = sample.Scalar();
  std::vector<std::string> ids;
  for (const StudySample& s : samples) ids.push_back(s.sample.id);
  const auto it = std::find(ids.begin(), ids.end(), id);
  if (it == ids.end()) {
    std::string msg = "sample " + Quote(id) + " of " + Quote(sample.path) + " is not in the study";
    const std::string near = NearestWord(id, ids);
    if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
    throw InputError(sample.at, msg);
  }
  const auto si = static_cast<size_t>(it - ids.begin());
  const StudySample& ss = samples[si];
  const std::string mid = model.Scalar();
  std::vector<std::string> fitted_ids;
  for (const ModelChoice& c : ss.models) fitted_ids.push_back(c.model_id);
  const auto mt = std::find(fitted_ids.begin(), fitted_ids.end(), mid);
  if (mt == fitted_ids.end()) {
    std::string msg = "sample " + Quote(id) + " does not fit model " + Quote(mid) + " (its models: " +
                      Join(fitted_ids) + ")";
    const std::string near = NearestWord(mid, fitted_ids);
    if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
    throw InputError(model.at, msg);
  }
  if (!ss.grain.given)
    throw InputError(sample.at, "sample " + Quote(id) + " has no grain modulus (K_s)" +
                                    std::string(spec.stress.law == depth::EffectiveStressLaw::kBiot
                                                    ? ": law 'biot' and alpha need one"
                                                    : ": alpha needs one") +
                                    " (K_s is never defaulted)");
  const auto mi = static_cast<size_t>(mt - fitted_ids.begin());
  for (size_t c = 0; c < curves.size(); ++c)
    if (curves[c].sample == si && curves[c].model == mi) return c;
  depth::FittedCurve fc;
  fc.sample_id = id;
  fc.model_id = mid;
  fc.k_s = ss.grain.value.k_s;
  fc.sigma_k_s = ss.grain.value.sigma_k_s;
  fc.porosity = ss.sample.porosity;
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (const DataPoint& p : ss.sample.points) {
    lo = std::min(lo, p.pressure);
    hi = std::max(hi, p.pressure);
  }
  fc.lab_min = std::isfinite(lo) ? lo : 0;
  fc.lab_max = std::isfinite(hi) ? hi : 0;
  fitted.push_back(fc);
  curves.push_back({si, mi, sample.at});
  return curves.size() - 1;
}

void ReadIntervals(const Field& f, const std::string& file, const std::vector<StudySample>& samples,
                   DepthTableChoice& t) {
  f.ExpectList();
  if (f.node.size() == 0) throw InputError(f.at, Quote(f.path) + " is empty");
  std::vector<SourceLocation> where;
  for (size_t i = 0; i < f.node.size(); ++i) {
    const std::string p = f.path + "[" + std::to_string(i + 1) + "]";
    MapReader m(f.node[i], file, Quote(p), p);
    Field top = m.Get("top"), base = m.Get("base"), sample = m.Get("sample"), model = m.Get("model");
    m.Finish();
    Require(top, m, p + ".top");
    Require(base, m, p + ".base");
    Require(sample, m, p + ".sample");
    Require(model, m, p + ".model");
    depth::IntervalRule r;
    r.top = Qty(top, Quantity::kLength);
    r.base = Qty(base, Quantity::kLength);
    if (!(r.base > r.top))
      throw InputError(base.at, Quote(base.path) + " = " + base.Scalar() + " must be below top " + top.Scalar());
    for (size_t k = 0; k < t.spec.intervals.size(); ++k) {
      const depth::IntervalRule& o = t.spec.intervals[k];
      if (r.top < o.base && o.top < r.base)
        throw InputError(m.at(), "interval " + Metres(r.top) + " to " + Metres(r.base) + " of " + Quote(p) +
                                     " overlaps interval " + std::to_string(k + 1) + " (" + Metres(o.top) + " to " +
                                     Metres(o.base) + ")");
    }
    r.curve = CurveFor(sample, model, file, samples, t.spec, t.curves, t.spec.curves);
    t.spec.intervals.push_back(r);
  }
}

void ReadFacies(const Field& f, const std::string& file, const std::vector<StudySample>& samples,
                std::vector<InputFile>& inputs, DepthTableChoice& t) {
  MapReader m(f.node, file, Quote(f.path), f.path);
  Field lfile = m.Get("file"), curve = m.Get("curve"), offset = m.Get("index_offset"), survey = m.Get("survey"),
        codes = m.Get("codes");
  m.Finish();
  if (!lfile) throw InputError(m.at(), "missing required key " + Quote(f.path + ".file") + " (the LAS file)");
  Require(codes, m, f.path + ".codes");
  LogRef r = ReadLogRef(m, lfile, curve, offset, survey, file, inputs);
  const depth::CurveSeries s = depth::ExtractCurve(r.las, r.curve, r.offset, r.md, r.tvd);
  AddWarnings(t.spec.warnings, s.warnings);
  depth::FaciesCurve fc;
  fc.depth = s.depth;
  for (double v : s.value) {
    if (std::fabs(v - std::round(v)) > 1e-6 || std::fabs(v) > 1e9)
      throw InputError({r.path, s.line, 0}, "facies curve " + Quote(r.curve) + " holds " + FormatNumber(v) +
                                                ", not a whole-number code");
    fc.code.push_back(static_cast<int>(std::lround(v)));
  }
  fc.source = "facies curve " + r.curve + " of " + r.name;
  t.spec.facies = fc;
  codes.ExpectList();
  if (codes.node.size() == 0) throw InputError(codes.at, Quote(codes.path) + " is empty");
  for (size_t i = 0; i < codes.node.size(); ++i) {
    const std::string p = codes.path + "[" + std::to_string(i + 1) + "]";
    MapReader c(codes.node[i], file, Quote(p), p);
    Field code = c.Get("code"), sample = c.Get("sample"), model = c.Get("model");
    c.Finish();
    Require(code, c, p + ".code");
    Require(sample, c, p + ".sample");
    Require(model, c, p + ".model");
    const long long v = code.Integer();
    if (std::llabs(v) > 1000000000LL) throw InputError(code.at, Quote(code.path) + " is too large");
    for (const depth::FaciesRule& o : t.spec.facies_rules)
      if (o.code == static_cast<int>(v))
        throw InputError(code.at, "facies code " + code.Scalar() + " is mapped twice in " + Quote(codes.path));
    depth::FaciesRule rule;
    rule.code = static_cast<int>(v);
    rule.curve = CurveFor(sample, model, file, samples, t.spec, t.curves, t.spec.curves);
    t.spec.facies_rules.push_back(rule);
  }
}

bool FileNameSafe(const std::string& s) {
  if (s.empty() || s.size() > 64 || s == "." || s == "..") return false;
  for (char c : s)
    if (!(std::isalnum(static_cast<unsigned char>(c)) || c == '-' || c == '_' || c == '.')) return false;
  return true;
}

DepthTableChoice ReadEntry(const YAML::Node& node, const std::string& file, const std::string& path,
                           const std::vector<StudySample>& samples, std::vector<InputFile>& inputs) {
  MapReader m(node, file, Quote(path), path);
  Field name = m.Get("name"), units_f = m.Get("units"), datum = m.Get("datum"), depths = m.Get("depths"),
        overburden = m.Get("overburden"), pore = m.Get("pore_pressure"), stress = m.Get("stress"),
        intervals = m.Get("intervals"), facies = m.Get("facies"), bands = m.Get("bands"),
        depletion = m.Get("depletion");
  m.Finish();
  for (const auto& [f, key] : std::vector<std::pair<const Field*, std::string>>{
           {&name, "name"}, {&units_f, "units"}, {&datum, "datum"}, {&depths, "depths"},
           {&overburden, "overburden"}, {&pore, "pore_pressure"}, {&stress, "stress"}, {&bands, "bands"}})
    if (!*f)
      throw InputError(m.at(), "missing required key " + Quote(path + "." + key) +
                                   " (a depth table states every assumption; nothing is defaulted)");
  if (intervals && facies) throw InputError(facies.key_at, "give either 'intervals' or 'facies', not both");
  if (!intervals && !facies)
    throw InputError(m.at(), Quote(path) + " maps no curve to depth: give 'intervals' or 'facies'");

  DepthTableChoice t;
  t.where = m.at();
  t.spec.name = name.Scalar();
  if (!FileNameSafe(t.spec.name))
    throw InputError(name.at, Quote(name.path) + " = " + Quote(t.spec.name) +
                                  " must be 1 to 64 letters, digits, '-', '_' or '.' (it names the file depth_" +
                                  t.spec.name + ".csv)");
  t.units = ParseChoice<DepthUnits>(units_f, {{"field", DepthUnits::kField}, {"si", DepthUnits::kSi}});
  t.spec.datum = ReadDatum(datum, file);

  {
    MapReader d(depths.node, file, Quote(depths.path), depths.path);
    Field top = d.Get("top"), base = d.Get("base"), step = d.Get("step");
    d.Finish();
    Require(top, d, depths.path + ".top");
    Require(base, d, depths.path + ".base");
    Require(step, d, depths.path + ".step");
    t.spec.top = Qty(top, Quantity::kLength);
    t.spec.base = Qty(base, Quantity::kLength);
    t.spec.step = Qty(step, Quantity::kLength);
    if (!(t.spec.step > 0)) throw InputError(step.at, Quote(step.path) + " = " + step.Scalar() + " must be > 0");
    if (t.spec.top < 0) throw InputError(top.at, Quote(top.path) + " = " + top.Scalar() + " must be >= 0 (below datum)");
    if (t.spec.base < t.spec.top)
      throw InputError(base.at, Quote(base.path) + " = " + base.Scalar() + " is above top " + top.Scalar());
    if ((t.spec.base - t.spec.top) / t.spec.step > 1e6)
      throw InputError(step.at, Quote(step.path) + " = " + step.Scalar() + " gives more than 1000000 rows");
  }
  t.spec.overburden = ReadOverburden(overburden, file, t.spec, inputs, t.notes);
  AddWarnings(t.spec.warnings, t.spec.overburden.profile.warnings);
  t.spec.pore_pressure = ReadPorePressure(pore, file, t.spec, inputs, t.spec.warnings);
  t.spec.stress = ReadStress(stress, file);

  {
    MapReader b(bands.node, file, Quote(bands.path), bands.path);
    Field level = b.Get("level"), convention = b.Get("convention");
    b.Finish();
    Require(level, b, bands.path + ".level");
    Require(convention, b, bands.path + ".convention");
    auto nt = SplitNumberUnit(level.Scalar());
    if (!nt || !(nt->unit.empty() || nt->unit == "%"))
      throw InputError(level.at, Quote(level.path) + " = " + Quote(level.Scalar()) + " must be a fraction or a percentage (e.g. 0.80 or 80 %)");
    t.spec.band_level = nt->unit == "%" ? nt->value / 100.0 : nt->value;
    if (!(t.spec.band_level > 0 && t.spec.band_level < 1))
      throw InputError(level.at, Quote(level.path) + " = " + level.Scalar() + " must be in (0, 1)");
    t.convention = ParseChoice<BandConvention>(convention, {{"non-exceedance", BandConvention::kNonExceedance},
                                                       {"exceedance", BandConvention::kExceedance}});
  }
  if (intervals) ReadIntervals(intervals, file, samples, t);
  if (facies) ReadFacies(facies, file, samples, inputs, t);
  if (depletion) {
    depletion.ExpectList();
    for (size_t i = 0; i < depletion.node.size(); ++i) {
      const std::string p = depletion.path + "[" + std::to_string(i + 1) + "]";
      MapReader s(depletion.node[i], file, Quote(p), p);
      Field dname = s.Get("name"), drop = s.Get("drop");
      s.Finish();
      Require(dname, s, p + ".name");
      Require(drop, s, p + ".drop");
      depth::DepletionScenario sc{dname.Scalar(), Positive(drop, Quantity::kPressure)};
      if (sc.name.empty()) throw InputError(dname.at, Quote(dname.path) + " is empty");
      for (const auto& o : t.spec.depletion)
        if (o.name == sc.name) throw InputError(dname.at, "depletion scenario " + Quote(sc.name) + " is named twice");
      t.spec.depletion.push_back(sc);
    }
  }
  return t;
}

}  // namespace

std::vector<DepthTableChoice> ReadDepthTables(const Field& f, const std::string& file,
                                              const std::vector<StudySample>& samples,
                                              std::vector<InputFile>& inputs) {
  f.ExpectList();
  std::vector<DepthTableChoice> out;
  for (size_t i = 0; i < f.node.size(); ++i) {
    DepthTableChoice t = ReadEntry(f.node[i], file, f.path + "[" + std::to_string(i + 1) + "]", samples, inputs);
    for (const DepthTableChoice& prior : out)
      if (prior.spec.name == t.spec.name)
        throw InputError(t.where, "depth table name " + Quote(t.spec.name) + " is used twice in " + Quote(f.path));
    out.push_back(std::move(t));
  }
  return out;
}

}  // namespace io::detail
}  // namespace porofit

// Alpha-versus-depth tables (Study::depth_tables): one CSV per table
// (depth_<name>.csv) in the table's output units, the results.json
// "depth_tables" section (SI-based units in the field names) and the summary
// lines. Layouts: docs/outputs.md, "Depth tables".
#include <array>
#include <cmath>
#include <cstdio>

#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"

namespace porofit {
using detail::CsvField;
using detail::CsvRow;
using detail::Num;

namespace {

using Json = nlohmann::ordered_json;

Json Number(double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); }

std::string Sig(double v, const char* fmt = "%.4g") {
  if (!std::isfinite(v)) return "n/a";
  char buf[32];
  std::snprintf(buf, sizeof buf, fmt, v);
  return buf;
}

// The CSV's units: SI value / factor = shown value.
struct OutUnits {
  std::string depth, stress, gradient, emw, modulus;  // column suffixes
  std::string depth_word, stress_word, gradient_word, emw_word, modulus_word;  // as read in the header
  double depth_f, stress_f, gradient_f, emw_f, modulus_f;
};

OutUnits UnitsOf(DepthUnits u) {
  if (u == DepthUnits::kField)
    return {"ft", "psi", "psi_per_ft", "ppg", "mpsi", "ft", "psi", "psi/ft", "ppg", "Mpsi",
            units::kFoot, units::kPsi, units::kPsi / units::kFoot, units::kPpg * units::kStandardGravity,
            1e6 * units::kPsi};
  return {"m", "mpa", "kpa_per_m", "g_cc", "gpa", "m", "MPa", "kPa/m", "g/cc", "GPa",
          1.0, 1e6, 1e3, 1e3 * units::kStandardGravity, 1e9};
}

// "p10" for 10, "p2_5" for 2.5.
std::string Percentile(double p) {
  std::string s = Sig(p, "%.6g");
  for (char& c : s)
    if (c == '.') c = '_';
  return "p" + s;
}

struct BandNames {
  double low_pct = 10, high_pct = 90;  // percentiles named in the columns
  std::string low, high;               // "p10", "p90"
  bool low_is_lower = true;            // non-exceedance: p10 is the low value
};

BandNames NamesOf(const DepthTableChoice& c) {
  BandNames b;
  const double tail = 100.0 * (1.0 - c.spec.band_level) / 2.0;
  b.low_pct = tail;
  b.high_pct = 100.0 - tail;
  b.low = Percentile(b.low_pct);
  b.high = Percentile(b.high_pct);
  b.low_is_lower = c.convention == BandConvention::kNonExceedance;
  return b;
}

std::string MeasureText(const depth::StressSpec& s) {
  const bool biot = s.law == depth::EffectiveStressLaw::kBiot;
  const std::string n = biot ? "alpha" : "1";
  std::string law = biot ? " (Biot: n = alpha(P) at the same depth, solved by fixed-point iteration)"
                         : " (Terzaghi: n = 1)";
  if (s.measure == depth::StressMeasure::kVerticalEffective) return "vertical effective stress S_v - " + n + " P_p" + law;
  return "mean effective stress (S_v + S_H + S_h)/3 - " + n + " P_p" + law;
}

std::string HorizontalText(const depth::StressSpec& s) {
  switch (s.horizontal) {
    case depth::HorizontalStressKind::kNone: return "not used (S_h and S_H not reported)";
    case depth::HorizontalStressKind::kRatio:
      return "effective-stress ratio k = sigma'_h/sigma'_v = " + FormatNumber(s.ratio) + ", sigma'_H/sigma'_v = " +
             (std::isnan(s.ratio_max) ? FormatNumber(s.ratio) + " (equal to k)" : FormatNumber(s.ratio_max));
    case depth::HorizontalStressKind::kUniaxial:
      return "uniaxial strain, sigma'_h = sigma'_H = nu/(1 - nu) sigma'_v with nu = " + FormatNumber(s.poisson);
  }
  return "";
}

// Depth-specific cautions (common practice), after CautionText().
const std::vector<std::string>& DepthCautions() {
  static const std::vector<std::string> c = {
      "depth tables are decision support only: they may feed mud-weight windows, casing seats, fracture-gradient, "
      "injection-limit, caprock and subsidence estimates, where mistakes can cause loss of well control, injury, "
      "environmental harm or asset loss",
      "any operational use needs review and sign-off by qualified geomechanics or petroleum engineers",
      "local regulations and operator standards govern (well-control, injection-permit and subsidence rules differ "
      "by jurisdiction)",
      "plug data are small samples biased toward competent rock, altered by coring and stress release, and tested "
      "under hydrostatic load at room temperature: a hydrostatic K_dry evaluated at in-situ stress is an "
      "approximation; an error in alpha enters effective stresses scaled by the pore pressure",
  };
  return c;
}

size_t FlaggedRows(const depth::DepthTable& t) {
  size_t n = 0;
  for (const depth::DepthRow& r : t.rows) n += r.flags != 0 ? 1 : 0;
  return n;
}

std::string FlagCounts(const depth::DepthTable& t) {
  std::array<size_t, 32> count{};
  for (const depth::DepthRow& r : t.rows)
    for (size_t b = 0; b < 32; ++b)
      if (r.flags & (1u << b)) ++count[b];
  std::string s;
  for (size_t b = 0; b < 32; ++b)
    if (count[b] > 0)
      s += (s.empty() ? "" : ", ") + depth::FlagsToString(1u << b) + " " + std::to_string(count[b]);
  return s;
}

std::vector<std::string> HeaderLines(const StudyRun& run, size_t index) {
  const DepthTableChoice& c = run.study.depth_tables[index];
  const depth::DepthTableSpec& s = c.spec;
  const OutUnits u = UnitsOf(c.units);
  const BandNames b = NamesOf(c);
  auto len = [&](double m) { return Sig(m / u.depth_f, "%.6g") + " " + u.depth_word; };
  std::vector<std::string> h;
  h.push_back("depth table '" + s.name + "': depths " + len(s.top) + " to " + len(s.base) + " below datum, step " +
              len(s.step) + " (TVD)");
  std::string datum = "datum: " + std::string(depth::ToString(s.datum.kind));
  if (s.datum.kind == depth::DatumKind::kKellyBushing) datum += ", air gap " + len(s.datum.air_gap);
  if (s.datum.water_depth > 0)
    datum += ", offshore: water depth " + len(s.datum.water_depth) + ", seawater density " +
             Sig(s.datum.water_density / 1e3, "%.6g") + " g/cc, mudline " + len(s.datum.RockTop()) + " below datum";
  else
    datum += ", onshore: rock from " + len(s.datum.RockTop()) + " below datum";
  h.push_back(datum);
  h.push_back("units (" + std::string(ToString(c.units)) + "): depth " + u.depth_word + " TVD below datum; stresses "
              "and pressures " + u.stress_word + "; gradients " + u.gradient_word +
              " (stress / depth below datum); pp_emw = pore pressure as an equivalent fluid density in " +
              u.emw_word + " (P_p / (g z), g = 9.80665 m/s^2); moduli " + u.modulus_word +
              "; alpha dimensionless; results.json holds the same table in m, MPa and GPa");
  h.push_back("K_dry evaluated at sigma_eval = " + MeasureText(s.stress));
  h.push_back("horizontal stress: " + HorizontalText(s.stress));
  const std::string lvl = Sig(100 * s.band_level, "%.6g");
  const std::string conv = c.convention == BandConvention::kNonExceedance ? "non-exceedance" : "exceedance";
  h.push_back("k_dry_" + b.low + " / k_dry_" + b.high + " and alpha_" + b.low + " / alpha_" + b.high +
              ": two-sided " + lvl + " % band; convention " + conv + ": " + b.low + " = " + Sig(b.low_pct, "%.6g") +
              " % " + conv + " (the " + (b.low_is_lower ? "low" : "high") + " value), " + b.high + " = " +
              Sig(b.high_pct, "%.6g") + " % " + conv + " (the " + (b.low_is_lower ? "high" : "low") +
              " value); mid = plug-in value; alpha = 1 - K_dry/K_s falls where K_dry rises, so alpha_" + b.low +
              " pairs with k_dry_" + b.high);
  for (size_t i = 0; i < s.curves.size(); ++i) {
    const depth::FittedCurve& f = s.curves[i];
    h.push_back("curve " + std::to_string(i + 1) + ": sample " + f.sample_id + ", model " + f.model_id + ", K_s " +
                Sig(f.k_s / 1e9) + " +/- " + Sig(f.sigma_k_s / 1e9) + " GPa, porosity " + Sig(f.porosity) +
                ", lab pressure range " + Sig(f.lab_min / 1e6) + " to " + Sig(f.lab_max / 1e6) + " MPa");
  }
  h.push_back("pore pressure: " + s.pore_pressure.source + " (pp_source column)");
  h.push_back("overburden: " + s.overburden.source);
  for (size_t k = 0; k < s.depletion.size(); ++k)
    h.push_back("depletion d" + std::to_string(k + 1) + " = '" + s.depletion[k].name + "': P_p lowered by " +
                Sig(s.depletion[k].drop / u.stress_f, "%.6g") + " " + u.stress_word +
                " at every step; d" + std::to_string(k + 1) + "_* columns are plug-in values after depletion");
  for (const std::string& n : c.notes) h.push_back(n);
  for (const std::string& w : s.warnings) h.push_back(w);
  const DepthTableRun* r = index < run.depth_tables.size() ? &run.depth_tables[index] : nullptr;
  if (r != nullptr)
    for (const std::string& a : r->table.assumptions) h.push_back("assumption: " + a);
  h.push_back("flags (';'-joined, see docs/outputs.md): below-lab-range, above-lab-range (extrapolated K), log-gap, "
              "log-fill, alpha-outside-bounds (alpha < porosity or > 1; never clipped), fixed-point-not-converged, "
              "unmapped, non-positive-effective-stress, in-water, model-undefined, negative-pore-pressure (depletion drop > P_p), "
              "log-density-range (the S_v integral crosses log densities outside the plausible range); "
              "blank cell = not computed");
  for (const std::string& x : DepthCautions()) h.push_back("CAUTION: " + x);
  if (r == nullptr || !r->computed)
    h.push_back("NOT COMPUTED: " + (r == nullptr ? std::string("the table was not run") : r->message));
  else
    h.push_back(std::to_string(r->table.rows.size()) + " rows, " + std::to_string(FlaggedRows(r->table)) +
                " flagged; fixed-point failures " + std::to_string(r->table.fixed_point_failures));
  return h;
}

double Lower(const depth::DepthRow& r, bool k, bool low_col, bool low_is_lower) {
  const bool want_lower = low_col == low_is_lower;
  if (k) return want_lower ? r.k_dry_lower : r.k_dry_upper;
  return want_lower ? r.alpha_lower : r.alpha_upper;
}

}  // namespace

std::string DepthTableFileName(const DepthTableChoice& t) { return "depth_" + t.spec.name + ".csv"; }

void WriteDepthTableCsv(const StudyRun& run, size_t index, std::ostream& out) {
  POROFIT_CHECK(index < run.study.depth_tables.size(), "depth table index out of range");
  const DepthTableChoice& c = run.study.depth_tables[index];
  const OutUnits u = UnitsOf(c.units);
  const BandNames b = NamesOf(c);
  out << detail::CsvPreamble("alpha-versus-depth table '" + c.spec.name + "', one row per depth step", run.study,
                             run.metadata.started_utc, run.metadata.tool_version, HeaderLines(run, index));
  std::vector<std::string> head = {
      "tvd_" + u.depth, "sample", "model", "sv_" + u.stress, "sv_gradient_" + u.gradient, "pp_" + u.stress,
      "pp_emw_" + u.emw, "sh_" + u.stress, "sh_max_" + u.stress, "sigma_eval_" + u.stress,
      "sigma_v_biot_" + u.stress, "k_dry_" + b.low + "_" + u.modulus, "k_dry_mid_" + u.modulus,
      "k_dry_" + b.high + "_" + u.modulus, "alpha_" + b.low, "alpha_mid", "alpha_" + b.high, "iterations",
      "pp_source", "flags"};
  for (size_t k = 0; k < c.spec.depletion.size(); ++k) {
    const std::string d = "d" + std::to_string(k + 1) + "_";
    for (const std::string& x : {"pp_" + u.stress, "sigma_eval_" + u.stress, "sigma_v_biot_" + u.stress,
                                 "k_dry_mid_" + u.modulus, std::string("alpha_mid"), std::string("flags")})
      head.push_back(d + x);
  }
  out << detail::Join(head, ",") << "\n";
  if (index >= run.depth_tables.size() || !run.depth_tables[index].computed) return;
  const depth::DepthTable& t = run.depth_tables[index].table;
  for (const depth::DepthRow& r : t.rows) {
    const bool mapped = r.curve >= 0 && static_cast<size_t>(r.curve) < t.spec.curves.size();
    const double z = r.depth;
    auto grad = [&](double p) { return z > 0 ? p / z / u.gradient_f : std::nan(""); };
    auto emw = [&](double p) { return z > 0 ? p / z / u.emw_f : std::nan(""); };
    std::vector<std::string> f = {
        Num(z / u.depth_f),
        mapped ? CsvField(t.spec.curves[static_cast<size_t>(r.curve)].sample_id) : "",
        mapped ? CsvField(t.spec.curves[static_cast<size_t>(r.curve)].model_id) : "",
        Num(r.vertical_stress / u.stress_f),
        Num(grad(r.vertical_stress)),
        Num(r.pore_pressure / u.stress_f),
        Num(emw(r.pore_pressure)),
        Num(r.horizontal_stress / u.stress_f),
        Num(r.horizontal_stress_max / u.stress_f),
        Num(r.evaluation_pressure / u.stress_f),
        Num(r.biot_vertical_effective / u.stress_f),
        Num(Lower(r, true, true, b.low_is_lower) / u.modulus_f),
        Num(r.k_dry / u.modulus_f),
        Num(Lower(r, true, false, b.low_is_lower) / u.modulus_f),
        Num(Lower(r, false, true, b.low_is_lower)),
        Num(r.alpha),
        Num(Lower(r, false, false, b.low_is_lower)),
        std::to_string(r.iterations),
        CsvField(t.spec.pore_pressure.source),
        depth::FlagsToString(r.flags)};
    for (size_t k = 0; k < c.spec.depletion.size(); ++k) {
      if (k < r.depletion.size()) {
        const depth::DepletionValues& d = r.depletion[k];
        f.insert(f.end(), {Num(d.pore_pressure / u.stress_f), Num(d.evaluation_pressure / u.stress_f),
                           Num(d.vertical_effective / u.stress_f), Num(d.k_dry / u.modulus_f), Num(d.alpha),
                           depth::FlagsToString(d.flags)});
      } else {
        f.insert(f.end(), {"", "", "", "", "", ""});
      }
    }
    out << CsvRow(f);
  }
}

nlohmann::ordered_json DepthTablesJson(const StudyRun& run) {
  Json all = Json::array();
  for (size_t i = 0; i < run.study.depth_tables.size(); ++i) {
    const DepthTableChoice& c = run.study.depth_tables[i];
    const depth::DepthTableSpec& s = c.spec;
    const DepthTableRun* r = i < run.depth_tables.size() ? &run.depth_tables[i] : nullptr;
    const BandNames b = NamesOf(c);
    Json j;
    j["name"] = s.name;
    j["file"] = DepthTableFileName(c);
    j["csv_units"] = std::string(ToString(c.units));
    j["computed"] = r != nullptr && r->computed;
    j["message"] = r != nullptr ? r->message : std::string("the table was not run");
    j["datum"] = {{"reference", std::string(depth::ToString(s.datum.kind))},
                  {"air_gap_m", s.datum.air_gap},
                  {"water_depth_m", s.datum.water_depth},
                  {"water_density_kg_per_m3", Number(s.datum.water_density)},
                  {"rock_top_m", s.datum.RockTop()}};
    j["depths"] = {{"top_m", s.top}, {"base_m", s.base}, {"step_m", s.step}};
    j["evaluation_pressure"] = MeasureText(s.stress);
    j["horizontal_stress"] = HorizontalText(s.stress);
    j["band"] = {{"level", s.band_level},
                 {"convention", std::string(ToString(c.convention))},
                 {"low_percentile", b.low_pct},
                 {"high_percentile", b.high_pct},
                 {"low_percentile_is", b.low_is_lower ? "lower limit" : "upper limit"}};
    j["pore_pressure_source"] = s.pore_pressure.source;
    j["overburden_source"] = s.overburden.source;
    Json curves = Json::array();
    for (const depth::FittedCurve& f : s.curves)
      curves.push_back({{"sample", f.sample_id},
                        {"model", f.model_id},
                        {"k_s_GPa", f.k_s / 1e9},
                        {"sigma_k_s_GPa", f.sigma_k_s / 1e9},
                        {"porosity", Number(f.porosity)},
                        {"lab_min_MPa", f.lab_min / 1e6},
                        {"lab_max_MPa", f.lab_max / 1e6}});
    j["curves"] = curves;
    Json dep = Json::array();
    for (const depth::DepletionScenario& d : s.depletion) dep.push_back({{"name", d.name}, {"drop_MPa", d.drop / 1e6}});
    j["depletion"] = dep;
    j["assumptions"] = r != nullptr ? r->table.assumptions : std::vector<std::string>{};
    j["notes"] = c.notes;
    j["warnings"] = s.warnings;
    std::vector<std::string> cautions = {CautionText()};
    cautions.insert(cautions.end(), DepthCautions().begin(), DepthCautions().end());
    j["cautions"] = cautions;
    Json rows = Json::array();
    if (r != nullptr && r->computed) {
      j["fixed_point_failures"] = r->table.fixed_point_failures;
      j["flagged_rows"] = FlaggedRows(r->table);
      for (const depth::DepthRow& x : r->table.rows) {
        const bool mapped = x.curve >= 0 && static_cast<size_t>(x.curve) < s.curves.size();
        Json row = {{"tvd_m", x.depth},
                    {"sample", mapped ? Json(s.curves[static_cast<size_t>(x.curve)].sample_id) : Json(nullptr)},
                    {"model", mapped ? Json(s.curves[static_cast<size_t>(x.curve)].model_id) : Json(nullptr)},
                    {"sv_MPa", Number(x.vertical_stress / 1e6)},
                    {"pp_MPa", Number(x.pore_pressure / 1e6)},
                    {"sh_MPa", Number(x.horizontal_stress / 1e6)},
                    {"sh_max_MPa", Number(x.horizontal_stress_max / 1e6)},
                    {"sigma_eval_MPa", Number(x.evaluation_pressure / 1e6)},
                    {"sigma_v_biot_MPa", Number(x.biot_vertical_effective / 1e6)},
                    {"k_dry_GPa", Number(x.k_dry / 1e9)},
                    {"k_dry_lower_GPa", Number(x.k_dry_lower / 1e9)},
                    {"k_dry_upper_GPa", Number(x.k_dry_upper / 1e9)},
                    {"alpha", Number(x.alpha)},
                    {"alpha_lower", Number(x.alpha_lower)},
                    {"alpha_upper", Number(x.alpha_upper)},
                    {"iterations", x.iterations},
                    {"flags", depth::FlagsToString(x.flags)}};
        Json d = Json::array();
        for (const depth::DepletionValues& v : x.depletion)
          d.push_back({{"pp_MPa", Number(v.pore_pressure / 1e6)},
                       {"sigma_eval_MPa", Number(v.evaluation_pressure / 1e6)},
                       {"sigma_v_biot_MPa", Number(v.vertical_effective / 1e6)},
                       {"k_dry_GPa", Number(v.k_dry / 1e9)},
                       {"alpha", Number(v.alpha)},
                       {"flags", depth::FlagsToString(v.flags)}});
        row["depletion"] = d;
        rows.push_back(row);
      }
    }
    j["rows"] = rows;
    all.push_back(j);
  }
  return all;
}

void WriteDepthSummary(const StudyRun& run, std::ostream& out) {
  if (run.study.depth_tables.empty()) return;
  for (size_t i = 0; i < run.study.depth_tables.size(); ++i) {
    const DepthTableChoice& c = run.study.depth_tables[i];
    const depth::DepthTableSpec& s = c.spec;
    const OutUnits u = UnitsOf(c.units);
    auto len = [&](double m) { return Sig(m / u.depth_f, "%.6g") + " " + u.depth_word; };
    out << "\nDepth table " << s.name << " (" << DepthTableFileName(c) << "): " << len(s.top) << " to " << len(s.base)
        << " below " << depth::ToString(s.datum.kind) << ", step " << len(s.step) << "\n";
    out << "  K_dry at " << MeasureText(s.stress) << "\n";
    for (const std::string& w : s.warnings) out << "  " << w << "\n";
    const DepthTableRun* r = i < run.depth_tables.size() ? &run.depth_tables[i] : nullptr;
    if (r == nullptr || !r->computed) {
      out << "  NOT COMPUTED: " << (r == nullptr ? std::string("the table was not run") : r->message) << "\n";
      continue;
    }
    const depth::DepthTable& t = r->table;
    double lo = INFINITY, hi = -INFINITY, blo = INFINITY, bhi = -INFINITY;
    size_t with_alpha = 0;
    for (const depth::DepthRow& x : t.rows) {
      if (!std::isfinite(x.alpha)) continue;
      ++with_alpha;
      lo = std::min(lo, x.alpha);
      hi = std::max(hi, x.alpha);
      if (std::isfinite(x.alpha_lower)) blo = std::min(blo, x.alpha_lower);
      if (std::isfinite(x.alpha_upper)) bhi = std::max(bhi, x.alpha_upper);
    }
    out << "  " << t.rows.size() << " rows, " << with_alpha << " with alpha";
    if (with_alpha > 0)
      out << ": alpha " << Sig(lo) << " to " << Sig(hi) << " (plug-in), " << Sig(100 * s.band_level, "%.6g")
          << " % band " << Sig(blo) << " to " << Sig(bhi);
    out << "\n  flagged rows " << FlaggedRows(t) << " of " << t.rows.size();
    const std::string counts = FlagCounts(t);
    if (!counts.empty()) out << " (" << counts << ")";
    out << "\n";
    for (size_t k = 0; k < s.depletion.size(); ++k) {
      double dlo = INFINITY, dhi = -INFINITY;
      for (const depth::DepthRow& x : t.rows)
        if (k < x.depletion.size() && std::isfinite(x.depletion[k].alpha)) {
          dlo = std::min(dlo, x.depletion[k].alpha);
          dhi = std::max(dhi, x.depletion[k].alpha);
        }
      out << "  depletion '" << s.depletion[k].name << "': alpha " << Sig(dlo) << " to " << Sig(dhi) << "\n";
    }
  }
  out << "Depth tables: " << DepthCautions()[0] << "; " << DepthCautions()[1] << "; " << DepthCautions()[2] << ".\n";
}

}  // namespace porofit

// The figures of the HTML report: which series each figure shows and what
// its caption says (html_figures.h). Drawing is porofit::plot's; the small
// adapter at the end maps these series onto its API.
#include <cstdint>
#include <limits>
#include "html_figures.h"

#include <algorithm>
#include <cmath>

#include "format.h"
#include "html_util.h"
#include "porofit/bands/bands.h"
#include "porofit/core/units.h"
#include "porofit/plot/figure.h"

namespace porofit::detail {
namespace {

// ---- what a figure shows (plain data; drawn by Draw() below)

enum class SeriesKind { kLine, kPoints, kBand, kMarkers, kLevel };

struct Series {
  SeriesKind kind = SeriesKind::kLine;
  std::string label;               ///< legend text ("" = not in the legend)
  int colour = 0;                  ///< model index (the same colour in every figure of a sample)
  bool secondary = false;          ///< lighter band (prediction) / dashed line
  std::vector<double> x, y;        ///< kLine, kPoints, kMarkers; kLevel: y[0] only
  std::vector<double> lower, upper;  ///< kBand
  std::vector<double> error;       ///< kPoints: +/- error bar (empty = none)
};

struct FigureData {
  std::string key;  ///< data-figure value
  std::string title, x_label, y_label;
  bool y_down = false;  ///< y axis increasing downward (depth)
  bool x_is_value = false;  ///< depth figures: x = value, y = depth
  std::vector<Series> series;
};

std::string Draw(const FigureData& f);

constexpr int kDataColour = -1;  // black: measured data

std::vector<double> Scaled(const std::vector<double>& v, double unit) {
  std::vector<double> out(v.size());
  for (size_t i = 0; i < v.size(); ++i) out[i] = v[i] / unit;
  return out;
}

bool AllFinite(const std::vector<double>& v) {
  return !v.empty() && std::all_of(v.begin(), v.end(), [](double x) { return std::isfinite(x); });
}

std::vector<double> Linspace(double a, double b, int n) {
  std::vector<double> v(static_cast<size_t>(n));
  for (int i = 0; i < n; ++i) v[static_cast<size_t>(i)] = a + (b - a) * i / (n - 1);
  return v;
}

// K curve and, when no band run exists, its delta-method confidence band from
// the fit's covariance (g^T Cov g, t quantile with n - p dof when scaled).
struct Curve {
  std::vector<double> p, k, lower, upper;  // SI
};

Curve FallbackCurve(const FitResult& r, const ModelSpec& spec, const std::vector<double>& grid, double level) {
  Curve c;
  c.p = grid;
  if (spec.parameters.size() != r.parameters.size()) return c;
  const bands::CurveGradient g = bands::EvaluateCurve(r, spec, grid);
  c.k = g.value;
  const auto p = static_cast<Eigen::Index>(r.free_index.size());
  if (!r.covariance_ok || r.covariance.rows() != p) return c;
  const double q = bands::TwoSidedT(level, r.covariance_scaled ? static_cast<double>(r.dof)
                                                                : std::numeric_limits<double>::infinity());
  c.lower.resize(grid.size());
  c.upper.resize(grid.size());
  for (size_t i = 0; i < grid.size(); ++i) {
    double v = 0;
    for (Eigen::Index a = 0; a < p; ++a)
      for (Eigen::Index b = 0; b < p; ++b)
        v += g.gradient[i][static_cast<size_t>(a)] * r.covariance(a, b) * g.gradient[i][static_cast<size_t>(b)];
    const double se = std::sqrt(std::max(v, 0.0));
    c.lower[i] = c.k[i] - q * se;
    c.upper[i] = c.k[i] + q * se;
  }
  return c;
}

bool BandUsable(const SampleRun& sr, size_t k) {
  return k < sr.bands.size() && sr.bands[k].computed && sr.bands[k].delta.computed;
}

FigureData KFigure(const StudySample& ss, const SampleRun& sr, const ModelRegistry& registry, std::string& caption) {
  const Sample& s = ss.sample;
  const bool strain = IsStrainSample(ss);
  const double level = ss.bands.options.confidence;
  FigureData f;
  f.title = "K_dry(P): " + s.id;
  f.x_label = "differential pressure P (MPa)";
  f.y_label = "K_dry (GPa)";
  double pmin = INFINITY, pmax = -INFINITY;
  for (const DataPoint& p : s.points) {
    pmin = std::min(pmin, p.pressure);
    pmax = std::max(pmax, p.pressure);
  }
  bool any_prediction = false, any_fallback = false, any_curve = false;
  for (size_t k = 0; k < sr.fits.size(); ++k) {
    const FitResult& r = sr.fits[k];
    if (r.status != FitStatus::kConverged) continue;  // failed fits: no curve
    const ModelSpec* spec = registry.Find(r.model_id);
    if (spec == nullptr) continue;
    const int colour = static_cast<int>(k);
    if (BandUsable(sr, k)) {
      const bands::BandResult& b = sr.bands[k];
      const std::vector<double> x = Scaled(b.grid.pressure, units::kMPa);
      if (AllFinite(b.delta.k_prediction.lower) && AllFinite(b.delta.k_prediction.upper)) {
        f.series.push_back({SeriesKind::kBand, "", colour, true, x, {}, Scaled(b.delta.k_prediction.lower, units::kGPa),
                            Scaled(b.delta.k_prediction.upper, units::kGPa), {}});
        any_prediction = true;
      }
      if (AllFinite(b.delta.k_confidence.lower))
        f.series.push_back({SeriesKind::kBand, "", colour, false, x, {}, Scaled(b.delta.k_confidence.lower, units::kGPa),
                            Scaled(b.delta.k_confidence.upper, units::kGPa), {}});
      f.series.push_back({SeriesKind::kLine, r.model_id, colour, false, x, Scaled(b.k, units::kGPa), {}, {}, {}});
      any_curve = true;
    } else if (std::isfinite(pmin) && pmax > pmin) {
      const Curve c = FallbackCurve(r, *spec, Linspace(pmin, pmax, 61), level);
      if (!AllFinite(c.k)) continue;
      const std::vector<double> x = Scaled(c.p, units::kMPa);
      if (AllFinite(c.lower)) {
        f.series.push_back({SeriesKind::kBand, "", colour, false, x, {}, Scaled(c.lower, units::kGPa),
                            Scaled(c.upper, units::kGPa), {}});
        any_fallback = true;
      }
      f.series.push_back({SeriesKind::kLine, r.model_id, colour, false, x, Scaled(c.k, units::kGPa), {}, {}, {}});
      any_curve = true;
    }
  }
  // Data last, on top of the bands.
  Series data{SeriesKind::kPoints, strain ? "data chords" : "data", kDataColour, false, {}, {}, {}, {}, {}};
  bool errors = false;
  if (strain) {
    for (const StrainModulusPoint& m : sr.strain_moduli) {
      if (m.source != "data-chord" || !std::isfinite(m.chord)) continue;
      data.x.push_back(m.pressure / units::kMPa);
      data.y.push_back(m.chord / units::kGPa);
    }
  } else {
    for (const DataPoint& p : s.points) {
      data.x.push_back(p.pressure / units::kMPa);
      data.y.push_back(p.modulus / units::kGPa);
      data.error.push_back(p.sigma > 0 ? p.sigma / units::kGPa : 0.0);
      errors = errors || p.sigma > 0;
    }
    if (!errors) data.error.clear();
  }
  f.series.push_back(std::move(data));

  caption = "<strong>" + Esc(s.id) + ": K_dry against pressure.</strong> ";
  caption += strain ? "Points: chord moduli &Delta;P/&Delta;&epsilon; of the strain data (the fit is in strain form); "
                    : (errors ? "Points: data with error bars of &plusmn;1&sigma; as given; "
                              : "Points: data (no uncertainties given); ");
  if (any_curve) {
    caption += "lines: the fitted curve of each converged model; shaded: its " + LevelText(level) +
               " delta-method confidence band (darker)";
    if (any_prediction) caption += " and " + LevelText(level) + " prediction band of a new measurement (lighter)";
    caption += any_fallback ? ", from the fit's covariance over the data range (no band run for this sample)" : "";
    caption += any_prediction || any_fallback ? "." : " (no prediction band for this sample).";
  } else {
    caption += "no model converged, so no curve is drawn.";
  }
  std::vector<std::string> failed;
  for (const FitResult& r : sr.fits)
    if (r.status != FitStatus::kConverged) failed.push_back(Esc(r.model_id));
  if (!failed.empty()) caption += " Not drawn (fit failed): " + Join(failed, ", ") + ".";
  return f;
}

// Residuals (raw or standardised) against pressure for every fit with residuals.
FigureData ResidualFigure(const StudySample& ss, const SampleRun& sr, bool standardised, std::string& caption) {
  const bool strain = IsStrainSample(ss);
  FigureData f;
  f.title = std::string(standardised ? "Standardised residuals: " : "Residuals: ") + ss.sample.id;
  f.x_label = "differential pressure P (MPa)";
  f.y_label = standardised ? "standardised residual" : (strain ? "residual (microstrain)" : "residual (GPa)");
  for (size_t k = 0; k < sr.fits.size(); ++k) {
    const FitResult& r = sr.fits[k];
    if (r.status != FitStatus::kConverged) continue;
    const Eigen::VectorXd& v = standardised ? r.residuals.standardized : r.residuals.raw;
    if (v.size() == 0 || v.size() != r.residuals.x.size()) continue;
    Series s{SeriesKind::kPoints, r.model_id, static_cast<int>(k), false, {}, {}, {}, {}, {}};
    for (Eigen::Index i = 0; i < v.size(); ++i) {
      if (!std::isfinite(v[i])) continue;
      s.x.push_back(r.residuals.x[i] / units::kMPa);
      s.y.push_back(standardised ? v[i] : (strain ? v[i] * 1e6 : v[i] / units::kGPa));
    }
    f.series.push_back(std::move(s));
  }
  f.series.push_back({SeriesKind::kLevel, "", kDataColour, false, {}, {0.0}, {}, {}, {}});
  if (standardised) {
    f.series.push_back({SeriesKind::kLevel, "", kDataColour, true, {}, {2.0}, {}, {}, {}});
    f.series.push_back({SeriesKind::kLevel, "", kDataColour, true, {}, {-2.0}, {}, {}, {}});
  }
  caption = "<strong>" + Esc(ss.sample.id) + ": " + (standardised ? "standardised residuals" : "residuals") +
            " against pressure</strong>, one colour per converged model. ";
  caption += standardised
                 ? "Internally studentised: raw / (s &sigma;<sub>i</sub> &radic;(1 &minus; h<sub>ii</sub>)); dashed "
                   "lines at &plusmn;2. A trend or long runs of one sign point to a model that misses the curve's shape."
                 : std::string("Observed minus fitted, ") + (strain ? "in microstrain" : "in GPa") +
                       "; the line marks zero.";
  return f;
}

bool AnyResiduals(const SampleRun& sr) {
  for (const FitResult& r : sr.fits)
    if (r.status == FitStatus::kConverged && r.residuals.raw.size() > 0) return true;
  return false;
}

// alpha(P) with its band per model; flagged grid points marked.
FigureData AlphaFigure(const StudySample& ss, const SampleRun& sr, std::string& caption) {
  FigureData f;
  f.title = "Biot coefficient alpha(P): " + ss.sample.id;
  f.x_label = "differential pressure P (MPa)";
  f.y_label = "alpha = 1 - K_dry/K_s";
  std::string method;
  double level = ss.bands.options.confidence;
  bool any = false, flagged_extrapolated = false, flagged_bounds = false;
  std::vector<std::string> not_computed;
  for (size_t k = 0; k < sr.fits.size() && k < sr.bands.size(); ++k) {
    const bands::BandResult& b = sr.bands[k];
    if (!b.computed || sr.fits[k].status != FitStatus::kConverged) {
      not_computed.push_back(Esc(sr.fits[k].model_id));
      continue;
    }
    const int colour = static_cast<int>(k);
    const std::vector<double> x = Scaled(b.grid.pressure, units::kMPa);
    const bands::Band* band = nullptr;
    if (b.delta.computed) {
      band = &b.delta.alpha_confidence;
      method = "delta-method";
    } else if (b.monte_carlo.computed) {
      band = &b.monte_carlo.alpha;
      method = "Monte Carlo percentile";
    } else if (b.bootstrap.computed) {
      band = &b.bootstrap.alpha;
      method = "bootstrap percentile";
    }
    level = b.confidence;
    if (band != nullptr && AllFinite(band->lower))
      f.series.push_back({SeriesKind::kBand, "", colour, false, x, {}, band->lower, band->upper, {}});
    f.series.push_back({SeriesKind::kLine, sr.fits[k].model_id, colour, false, x, b.alpha, {}, {}, {}});
    any = true;
    // Flag markers: extrapolated points, and alpha outside [phi, 1].
    Series ext{SeriesKind::kMarkers, "", colour, false, {}, {}, {}, {}, {}};
    Series out{SeriesKind::kMarkers, "", colour, true, {}, {}, {}, {}, {}};
    for (size_t j = 0; j < b.flags.size() && j < x.size(); ++j) {
      if (b.flags[j].alpha_below_porosity || b.flags[j].alpha_above_one) {
        out.x.push_back(x[j]);
        out.y.push_back(b.alpha[j]);
      } else if (b.flags[j].extrapolated) {
        ext.x.push_back(x[j]);
        ext.y.push_back(b.alpha[j]);
      }
    }
    if (!ext.x.empty()) {
      ext.label = sr.fits[k].model_id + ": extrapolated";
      f.series.push_back(std::move(ext));
      flagged_extrapolated = true;
    }
    if (!out.x.empty()) {
      out.label = sr.fits[k].model_id + ": alpha outside [phi, 1]";
      f.series.push_back(std::move(out));
      flagged_bounds = true;
    }
  }
  f.series.push_back({SeriesKind::kLevel, "alpha = 1", kDataColour, true, {}, {1.0}, {}, {}, {}});
  if (ss.sample.porosity > 0)
    f.series.push_back({SeriesKind::kLevel, "alpha = phi", kDataColour, true, {}, {ss.sample.porosity}, {}, {}, {}});
  caption = "<strong>" + Esc(ss.sample.id) + ": alpha(P) = 1 &minus; K_dry(P)/K_s</strong> with K_s = " +
            HtmlNum("%.2f", ss.grain.value.k_s / units::kGPa) + " &plusmn; " +
            HtmlNum("%.2f", ss.grain.value.sigma_k_s / units::kGPa) + " GPa. ";
  if (any) {
    caption += "Lines: each converged model; shaded: its " + LevelText(level) + " " + (method.empty() ? "" : method) +
               " confidence band (K_s variance included). Dashed lines: alpha = 1 and alpha = phi = " +
               HtmlNum("%.3f", ss.sample.porosity) + ". ";
    caption += flagged_extrapolated ? "Open markers: grid points outside the tested pressure range (extrapolation). "
                                    : "No grid point is extrapolated. ";
    caption += flagged_bounds ? "Filled markers: alpha outside [phi, 1] (flagged, not clipped)."
                              : "alpha stays within [phi, 1] on the grid.";
  } else {
    caption += "No alpha curve: no converged fit with bands.";
  }
  if (!not_computed.empty()) caption += " Not drawn: " + Join(not_computed, ", ") + ".";
  return f;
}

// ---- the adapter to porofit::plot

// Axis titles are written "quantity (unit)" in FigureData; plot::Axis keeps
// them apart.
void SetAxis(plot::Axis& a, const std::string& title) {
  const size_t open = title.rfind(" (");
  if (open != std::string::npos && title.back() == ')') {
    a.label = title.substr(0, open);
    a.unit = title.substr(open + 2, title.size() - open - 3);
  } else {
    a.label = title;
  }
}

plot::Style StyleOf(const Series& s) {
  plot::Style st;
  // Models keep their colour across a sample's figures; data and reference
  // lines are black (palette index 6).
  st.colour = s.colour < 0 ? 6 : (s.colour >= 6 ? s.colour + 1 : s.colour);
  return st;
}

std::string Draw(const FigureData& f) {
  plot::Figure fig(f.key, f.title, 560, 380);
  SetAxis(fig.x(), f.x_label);
  SetAxis(fig.y(), f.y_label);
  fig.y().reversed = f.y_down;
  // Bands first (under everything), then reference lines, lines, points, markers.
  for (const Series& s : f.series) {
    if (s.kind != SeriesKind::kBand) continue;
    if (!f.x_is_value) {
      fig.AddBand(s.label, s.x, s.lower, s.upper, StyleOf(s));
    } else {
      // The band runs along the vertical (depth) axis: x = depth here, the
      // edges are values.
      fig.AddBandAlongY(s.label, s.x, s.lower, s.upper, StyleOf(s));
    }
  }
  for (const Series& s : f.series) {
    plot::Style st = StyleOf(s);
    switch (s.kind) {
      case SeriesKind::kBand: break;
      case SeriesKind::kLevel:
        st.dash = s.secondary ? plot::Dash::kDashed : plot::Dash::kSolid;
        st.line_width = 1.5;
        if (f.x_is_value) fig.AddVerticalLine(s.y[0], s.label, st);
        else fig.AddHorizontalLine(s.y[0], s.label, st);
        break;
      case SeriesKind::kLine:
        st.dash = s.secondary ? plot::Dash::kDashed : plot::Dash::kSolid;
        st.marker = plot::Marker::kNone;
        fig.AddLine({s.label, s.x, s.y, {}, {}, st});
        break;
      case SeriesKind::kPoints:
        st.marker = s.colour < 0 ? plot::Marker::kCircle : std::optional<plot::Marker>{};
        fig.AddPoints({s.label, s.x, s.y, s.error, {}, st});
        break;
      case SeriesKind::kMarkers:
        if (s.secondary) {  // alpha outside [phi, 1]: filled, so it reads apart from extrapolation
          st.marker = plot::Marker::kDiamond;
          fig.AddPoints({s.label, s.x, s.y, {}, {}, st});
        } else {
          st.marker = plot::Marker::kCircle;
          st.hollow = true;
          fig.AddMarkers({s.label, s.x, s.y, {}, {}, st});
        }
        break;
    }
  }
  fig.set_legend(plot::LegendPlace::kBelow);
  return plot::SvgDocument(fig);
}

}  // namespace

std::vector<SampleFigure> DrawSampleFigures(const StudySample& ss, const SampleRun& sr, const ModelRegistry& registry,
                                            const std::string& key_prefix) {
  std::vector<SampleFigure> out;
  auto add = [&](const char* name, FigureData f, std::string caption) {
    f.key = key_prefix + "_" + name;
    out.push_back({name, Draw(f), std::move(caption)});
  };
  std::string caption;
  FigureData k = KFigure(ss, sr, registry, caption);
  add("k-fit", std::move(k), caption);
  if (AnyResiduals(sr)) {
    FigureData r = ResidualFigure(ss, sr, false, caption);
    add("residuals", std::move(r), caption);
    FigureData z = ResidualFigure(ss, sr, true, caption);
    add("std-residuals", std::move(z), caption);
  }
  if (ss.grain.given) {
    FigureData a = AlphaFigure(ss, sr, caption);
    add("alpha", std::move(a), caption);
  }
  return out;
}

std::string DepthSlug(const std::string& name) {
  std::string s;
  for (char c : name) {
    const bool ok = (c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' ||
                    c == '-';
    s += ok ? c : '_';
  }
  return s.empty() ? std::string("table") : s;
}

std::vector<SampleFigure> DrawDepthFigures(const depth::DepthTable& table, bool field_units,
                                           const std::string& key_prefix) {
  const double z_unit = field_units ? units::kFoot : 1.0;
  const double p_unit = field_units ? units::kPsi : units::kMPa;
  const std::string z_label = std::string("depth below datum (") + (field_units ? "ft" : "m") + ")";
  const std::string p_name = field_units ? "psi" : "MPa";
  std::vector<double> z, sv, pp, pe, k, kl, ku, a, al, au, fz_a, fa, fz_k, fk;
  // Markers show the flags about the evaluation itself (extrapolation, alpha
  // bounds, fixed point, stress, model); log gap/fill flags concern S_v and are
  // in the stress figure's caption and the table, else they would mark every
  // row below a filled log top.
  const std::uint32_t marked = depth::kBelowLabRange | depth::kAboveLabRange | depth::kAlphaOutsideBounds |
                               depth::kFixedPointNotConverged | depth::kNegativeEffectiveStress |
                               depth::kModelUndefined;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  int previous_curve = -2;
  for (const depth::DepthRow& r : table.rows) {
    // A change of curve (interval or facies boundary) breaks the lines: the
    // profile jumps there, it is not a gradual change.
    if (previous_curve != -2 && r.curve != previous_curve) {
      for (std::vector<double>* v : {&k, &kl, &ku, &a, &al, &au}) v->push_back(nan);
      for (std::vector<double>* v : {&z, &sv, &pp, &pe}) v->push_back(v->back());
    }
    previous_curve = r.curve;
    z.push_back(r.depth / z_unit);
    sv.push_back(r.vertical_stress / p_unit);
    pp.push_back(r.pore_pressure / p_unit);
    pe.push_back(r.evaluation_pressure / p_unit);
    k.push_back(r.k_dry / units::kGPa);
    kl.push_back(r.k_dry_lower / units::kGPa);
    ku.push_back(r.k_dry_upper / units::kGPa);
    a.push_back(r.alpha);
    al.push_back(r.alpha_lower);
    au.push_back(r.alpha_upper);
    if ((r.flags & marked) != 0 && std::isfinite(r.alpha)) {
      fz_a.push_back(r.depth / z_unit);
      fa.push_back(r.alpha);
    }
    if ((r.flags & marked) != 0 && std::isfinite(r.k_dry)) {
      fz_k.push_back(r.depth / z_unit);
      fk.push_back(r.k_dry / units::kGPa);
    }
  }
  size_t gap_rows = 0, fill_rows = 0;
  for (const depth::DepthRow& r : table.rows) {
    gap_rows += (r.flags & depth::kLogGap) != 0 ? 1 : 0;
    fill_rows += (r.flags & depth::kLogFill) != 0 ? 1 : 0;
  }
  std::string log_note;
  if (gap_rows + fill_rows > 0)
    log_note = " S_v of " + std::to_string(fill_rows) + " of " + std::to_string(table.rows.size()) +
               " rows integrates the user's fill trend above the log top (log-fill), and of " + std::to_string(gap_rows) +
               " rows bridged or screened log samples (log-gap).";
  const std::string level = LevelText(table.spec.band_level);
  const std::string band_label = HtmlNum("%.0f", 100 * table.spec.band_level) + " % band";  // SVG text, no entities
  std::vector<SampleFigure> out;
  auto fig = [&](const char* name, const std::string& title, const std::string& x_label) {
    FigureData f;
    f.key = key_prefix + "_" + name;
    f.title = title;
    f.x_label = x_label;
    f.y_label = z_label;
    f.y_down = true;
    f.x_is_value = true;
    return f;
  };
  {
    FigureData f = fig("stress", "Stress profiles: " + table.spec.name, "stress / pressure (" + p_name + ")");
    f.series.push_back({SeriesKind::kLine, "S_v (vertical stress)", 0, false, sv, z, {}, {}, {}});
    f.series.push_back({SeriesKind::kLine, "P_p (pore pressure)", 1, false, pp, z, {}, {}, {}});
    f.series.push_back({SeriesKind::kLine, "evaluation pressure", 2, false, pe, z, {}, {}, {}});
    out.push_back({"stress", Draw(f),
                   "<strong>" + Esc(table.spec.name) + ": vertical stress S_v, pore pressure P_p and the pressure at "
                   "which K_dry is evaluated</strong>, against depth (increasing downward)." + log_note});
  }
  auto with_band = [&](const char* name, const std::string& title, const std::string& x_label,
                       const std::vector<double>& v, const std::vector<double>& lo, const std::vector<double>& hi,
                       const std::vector<double>& flag_z, const std::vector<double>& flag_v, const std::string& what) {
    FigureData f = fig(name, title, x_label);
    // Bands against depth: lower/upper are x values at each depth.
    f.series.push_back({SeriesKind::kBand, band_label, 0, false, z, {}, lo, hi, {}});
    f.series.push_back({SeriesKind::kLine, what, 0, false, v, z, {}, {}, {}});
    if (!flag_z.empty())
      f.series.push_back({SeriesKind::kMarkers, "flagged (extrapolated, bounds...)", 0, true, flag_v, flag_z, {}, {}, {}});
    out.push_back({name, Draw(f),
                   "<strong>" + Esc(table.spec.name) + ": " + what + " against depth</strong> (increasing downward) "
                   "with its " + level + " delta-method band (shaded; K_s variance included, pressure treated as "
                   "exact). " +
                   (flag_z.empty() ? std::string("No row is flagged.")
                                   : "Markers: rows flagged for extrapolation beyond the lab pressures, alpha outside [phi, 1], "
                                     "a fixed point that did not converge, a non-positive effective stress or an "
                                     "undefined model (see the flags column of the table).")});
  };
  with_band("alpha", "alpha(z): " + table.spec.name, "alpha", a, al, au, fz_a, fa, "alpha(z)");
  with_band("k", "K_dry(z): " + table.spec.name, "K_dry (GPa)", k, kl, ku, fz_k, fk, "K_dry(z)");
  return out;
}

std::string InlineSvg(const std::string& svg) {
  if (svg.rfind("<?xml", 0) == 0) {
    const size_t end = svg.find("?>");
    if (end != std::string::npos) {
      size_t start = end + 2;
      while (start < svg.size() && (svg[start] == '\n' || svg[start] == '\r')) ++start;
      return svg.substr(start);
    }
  }
  return svg;
}

}  // namespace porofit::detail

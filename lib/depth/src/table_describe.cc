// The assumption sentences of a depth table (its CSV header lines and JSON
// "assumptions"): every choice that shaped a number, in plain words, SI units.
#include <cstdio>
#include <cmath>

#include "porofit/core/error.h"
#include "table_internal.h"

namespace porofit::depth::detail {
namespace {

std::string Pct(double level) { return Num(100.0 * level) + " %"; }

std::string CurveLabel(const FittedCurve& c) { return "'" + c.sample_id + "' " + c.model_id; }

}  // namespace

std::vector<std::string> DescribeAssumptions(const DepthTableSpec& s) {
  std::vector<std::string> a;
  const Datum& d = s.datum;
  const double surface = d.SurfaceDepth(), rock_top = d.RockTop();

  // Datum and rows.
  std::string datum = "depths: true vertical depth (TVD) in m below the " + std::string(ToString(d.kind)) + " datum";
  if (d.water_depth > 0) {
    datum += d.kind == DatumKind::kKellyBushing ? "; sea surface " + Num(d.air_gap) + " m below it (air gap)"
                                                : "; sea surface at the datum";
    datum += "; seabed (rock top) " + Num(d.water_depth) + " m below the sea surface, at " + Num(rock_top) +
             " m; sea water of " + Num(d.water_density) + " kg/m^3 above it";
  } else {
    datum += d.kind == DatumKind::kKellyBushing ? "; ground (rock top) " + Num(d.air_gap) + " m below it"
                                                : "; ground (rock top) at the datum";
  }
  a.push_back(datum);
  a.push_back("rows every " + Num(s.step) + " m from " + Num(s.top) + " to " + Num(s.base) + " m");
  a.push_back("rows above the rock top (" + Num(rock_top) + " m) are in " +
              std::string(d.water_depth > 0 ? "water" : "air") +
              ": vertical stress and pore pressure only, no K or alpha (flag in-water)");

  // Overburden.
  const OverburdenSpec& ob = s.overburden;
  std::string sv = "vertical stress S_v = ";
  if (d.water_depth > 0) sv += "water load rho_w g (depth - " + Num(surface) + " m, down to the seabed) + ";
  sv += "rock load below the rock top, g = 9.80665 m/s^2; rock load ";
  switch (ob.kind) {
    case OverburdenKind::kGradient:
      sv += "from a constant gradient of " + Num(ob.gradient) + " Pa/m (average bulk density " +
            Num(ob.gradient / kGravity) + " kg/m^3)";
      break;
    case OverburdenKind::kLayers: {
      sv += "from " + std::to_string(ob.layers.size()) + " layers of constant density (";
      double top = rock_top;
      for (size_t j = 0; j < ob.layers.size(); ++j) {
        if (j) sv += ", ";
        sv += Num(ob.layers[j].density) + " kg/m^3 over [" + Num(top) + ", " + Num(ob.layers[j].base) + ") m";
        top = ob.layers[j].base;
      }
      sv += ")";
      break;
    }
    case OverburdenKind::kDensityProfile:
      sv += "from the integral of a density profile (trapezoid rule on its samples, linear between them); rows "
            "whose integral crosses bridged or screened samples are flagged log-gap, those crossing the fill "
            "trend log-fill";
      break;
  }
  if (!ob.source.empty()) sv += "; source: " + ob.source;
  a.push_back(sv);
  if (ob.kind == OverburdenKind::kDensityProfile)
    for (const std::string& note : ob.profile.notes) a.push_back("density profile: " + note);

  // Pore pressure.
  const PorePressureSpec& pp = s.pore_pressure;
  std::string pps = "pore pressure P_p ";
  if (pp.kind == PorePressureKind::kHydrostatic) {
    const double z0 = std::isnan(pp.zero_depth) ? surface : pp.zero_depth;
    pps += "hydrostatic: " + Num(pp.gradient) + " Pa/m (" + Num(pp.gradient / kGravity) +
           " kg/m^3 equivalent) times the depth below " + Num(z0) + " m" +
           (std::isnan(pp.zero_depth) ? std::string(d.water_depth > 0 ? " (the sea surface)" : " (the ground)")
                                      : std::string(" (the water table given)")) +
           ", 0 above it; no overpressure";
  } else {
    pps += "from " + std::to_string(pp.depth.size()) + " (depth, pressure) pairs " +
           (pp.kind == PorePressureKind::kProfile ? std::string("of a log curve ") : std::string()) + "between " +
           Num(pp.depth.front()) + " and " + Num(pp.depth.back()) +
           " m, linear between them, never extrapolated (rows in water outside them have no P_p)";
  }
  if (!pp.source.empty()) pps += "; source: " + pp.source;
  a.push_back(pps);

  // Stress measure, law, horizontal stress.
  const StressSpec& st = s.stress;
  const bool biot = st.law == EffectiveStressLaw::kBiot;
  const std::string n = biot ? "alpha" : "1";
  a.push_back(std::string("effective-stress law: ") +
              (biot ? "Biot, n = alpha(P) at each row, solved by the fixed point alpha_(k+1) = 1 - K(c (S_v - "
                      "alpha_k P_p))/K_s from the Terzaghi alpha (n = 1), stopped when |alpha_(k+1) - alpha_k| < " +
                          Num(st.tolerance) + " or after " + std::to_string(st.max_iterations) +
                          " iterations; rows that do not converge keep the last iterate and are flagged "
                          "fixed-point-not-converged"
                    : "Terzaghi, n = 1"));
  if (st.measure == StressMeasure::kVerticalEffective) {
    a.push_back("K_dry is evaluated at the vertical effective stress sigma'_v = S_v - " + n + " P_p");
  } else {
    a.push_back("K_dry is evaluated at the mean effective stress sigma'_m = (sigma'_v + sigma'_H + sigma'_h)/3, "
                "sigma'_v = S_v - " + n + " P_p, i.e. " + Num(EvaluationFactor(st)) + " sigma'_v");
  }
  switch (st.horizontal) {
    case HorizontalStressKind::kNone:
      a.push_back("no horizontal-stress assumption: S_h and S_H are not reported");
      break;
    case HorizontalStressKind::kRatio:
      a.push_back("horizontal stress from effective-stress ratios: sigma'_h = " + Num(st.ratio) + " sigma'_v, sigma'_H = " +
                  Num(std::isnan(st.ratio_max) ? st.ratio : st.ratio_max) + " sigma'_v" +
                  (std::isnan(st.ratio_max) ? " (no ratio for sigma'_H given: taken equal to the sigma'_h ratio)" : ""));
      break;
    case HorizontalStressKind::kUniaxial:
      a.push_back("horizontal stress from uniaxial strain: sigma'_h = sigma'_H = nu/(1 - nu) sigma'_v = " +
                  Num(UniaxialStrainRatio(st.poisson)) + " sigma'_v with nu = " + Num(st.poisson) +
                  " (Eaton 1969 with n = 1; poroelastic form with n = alpha)");
      break;
  }
  if (st.horizontal != HorizontalStressKind::kNone)
    a.push_back("total horizontal stresses S_h = sigma'_h + " + n + " P_p and S_H = sigma'_H + " + n + " P_p");
  a.push_back("Biot vertical effective stress S_v - alpha P_p uses the row's plug-in alpha");
  a.push_back("the lab K_dry(P) was measured under hydrostatic load; applying it at the field stress measure "
              "ignores stress-induced crack anisotropy (cracks normal to the largest stress close first): an approximation");

  // Bands.
  const double tail = 0.5 * (1.0 - s.band_level);
  std::string rule;
  switch (s.band_quantile) {
    case bands::DeltaQuantile::kWelchSatterthwaite:
      rule = "Student t with Welch-Satterthwaite effective degrees of freedom (the fit's part has n - p, the K_s "
             "part is known)";
      break;
    case bands::DeltaQuantile::kStudentT: rule = "Student t with n - p degrees of freedom"; break;
    case bands::DeltaQuantile::kNormal: rule = "the normal quantile"; break;
  }
  a.push_back("bands: two-sided " + Pct(s.band_level) +
              " pointwise confidence bands of the fitted curve by the delta method, Var K = g^T Cov g with the fit's "
              "parameter covariance, Var alpha = Var K/K_s^2 + (K/K_s^2)^2 sigma_K_s^2; K quantile t(n - p), alpha "
              "quantile " + rule + "; lower and upper are the " + Pct(tail) + " and " + Pct(1 - tail) +
              " non-exceedance values (symmetric about the plug-in value)");
  a.push_back("the evaluation pressure is treated as exact: uncertainty of S_v, P_p, the horizontal-stress "
              "assumption and the Biot fixed point is not in the bands");
  bool any_sigma = false;
  for (const FittedCurve& c : s.curves) any_sigma = any_sigma || c.sigma_k_s > 0;
  a.push_back(any_sigma ? "the K_s variance is in every alpha band and is fully correlated across depths (and across "
                          "curves sharing K_s): alpha bands at different depths are not independent"
                        : "K_s is taken as exact (sigma_K_s = 0): the alpha bands hold the fit's uncertainty only");
  a.push_back("K and alpha outside a sample's lab pressure range extrapolate the fitted curve (flags "
              "below-lab-range, above-lab-range); alpha outside [porosity, 1] is flagged, never clipped");

  // Mapping.
  if (s.facies.has_value()) {
    std::string m = "curves by facies: a row takes the code of the nearest facies sample at or above it";
    if (!s.facies->source.empty()) m += " (" + s.facies->source + ")";
    m += "; rows above the first sample, more than one sampling interval below the last, or with a code without a "
         "rule are unmapped";
    for (const FaciesRule& r : s.facies_rules)
      m += "; code " + std::to_string(r.code) + " -> " + CurveLabel(s.curves[r.curve]);
    a.push_back(m);
  } else if (!s.intervals.empty()) {
    std::string m = "curves by depth interval [top, base)";
    for (const IntervalRule& r : s.intervals)
      m += "; [" + Num(r.top) + ", " + Num(r.base) + ") m -> " + CurveLabel(s.curves[r.curve]);
    m += "; rows outside every interval are unmapped";
    a.push_back(m);
  } else {
    a.push_back("no mapping rule: every row in rock is unmapped (no K or alpha)");
  }
  for (const FittedCurve& c : s.curves)
    a.push_back("curve " + CurveLabel(c) + ": K_s = " + porofit::FormatPlusMinus(c.k_s / 1e9, c.sigma_k_s / 1e9) +
                " GPa, porosity " +
                (std::isnan(c.porosity) ? std::string("unknown (alpha checked against 0 instead)")
                                        : porofit::FormatRounded(c.porosity)) +
                ", lab pressures " + porofit::FormatRounded(c.lab_min / 1e6) + " to " + porofit::FormatRounded(c.lab_max / 1e6) + " MPa");

  // Depletion.
  for (const DepletionScenario& sc : s.depletion)
    a.push_back("depletion scenario '" + sc.name + "': P_p lowered by " + Num(sc.drop) +
                " Pa at every row, S_v unchanged, the horizontal-stress assumption applied again to the new "
                "sigma'_v (no stress path), the evaluation pressure" +
                std::string(biot ? ", the Biot fixed point" : "") + ", K and alpha recomputed (plug-in, no bands)");
  return a;
}

std::string Num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

}  // namespace porofit::depth::detail

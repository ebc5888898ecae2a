// Physical checks, derived properties and the driver that runs every method.
#include "porofit/bands/bands.h"

#include <ceres/jet.h>

#include "common.h"
#include "porofit/core/error.h"
#include "porofit/poro/poroelastic.h"

namespace porofit::bands {
namespace {

using detail::kInf;
using detail::kNaN;

// Derived properties as templates of (K, K_s), so ceres::Jet gives their exact
// partial derivatives. The formulas are those of porofit::poro (BiotModulus,
// UndrainedBulkModulus, SkemptonCoefficient); tests check the values agree.
template <typename T>
T Alpha(const T& k, const T& ks) {
  return T(1.0) - k / ks;
}
template <typename T>
T Modulus(const T& k, const T& ks, double phi, double kf) {
  return T(1.0) / ((Alpha(k, ks) - T(phi)) / ks + T(phi / kf));
}
template <typename T>
T Undrained(const T& k, const T& ks, double phi, double kf) {
  const T a = Alpha(k, ks);
  return k + a * a * Modulus(k, ks, phi, kf);
}
template <typename T>
T Skempton(const T& k, const T& ks, double phi, double kf) {
  return Alpha(k, ks) * Modulus(k, ks, phi, kf) / Undrained(k, ks, phi, kf);
}

template <class F>
DerivedBand Derive(const char* name, const char* unit, const BandRequest& r, const DeltaResult& delta,
                   const std::vector<double>& k, F f) {
  DerivedBand out;
  out.name = name;
  out.unit = unit;
  const size_t G = k.size();
  if (std::isnan(r.porosity) || std::isnan(r.fluid_modulus)) {
    out.message = "needs porosity and fluid modulus";
    return out;
  }
  if (!delta.computed) {
    out.message = "needs the delta method: " + delta.message;
    return out;
  }
  using J = ceres::Jet<double, 2>;
  // Work in GPa: the Jet arithmetic then stays near 1 (any consistent unit works).
  constexpr double kScale = 1e9;
  const double ks = r.k_s / kScale, var_ks = (r.sigma_k_s / kScale) * (r.sigma_k_s / kScale);
  const double phi = r.porosity, kf = r.fluid_modulus / kScale;
  const double out_scale = std::string(unit) == "Pa" ? kScale : 1.0;
  out.se.assign(G, kNaN);
  out.confidence.estimate.assign(G, kNaN);
  out.confidence.lower.assign(G, kNaN);
  out.confidence.upper.assign(G, kNaN);
  const detail::TQuantileCurve tq(r.options.confidence, delta.k_dof);
  for (size_t i = 0; i < G; ++i) {
    const J y = f(J(k[i] / kScale, 0), J(ks, 1), phi, kf);
    const double var_k = (delta.k_se[i] / kScale) * (delta.k_se[i] / kScale);
    const double v_fit = y.v[0] * y.v[0] * var_k;
    const double v_grain = y.v[1] * y.v[1] * var_ks;
    double dof = delta.k_dof;
    if (delta.quantile_rule == DeltaQuantile::kWelchSatterthwaite) dof = WelchSatterthwaiteDof(v_fit, delta.k_dof, v_grain);
    if (delta.quantile_rule == DeltaQuantile::kNormal) dof = kInf;
    const double se = std::sqrt(v_fit + v_grain) * out_scale;
    const double c = y.a * out_scale;
    const double half = tq(dof) * se;
    out.se[i] = se;
    out.confidence.estimate[i] = c;
    out.confidence.lower[i] = c - half;
    out.confidence.upper[i] = c + half;
  }
  out.computed = true;
  return out;
}

}  // namespace

std::vector<PointFlags> CheckGrid(const BandRequest& r, const std::vector<double>& k) {
  std::vector<PointFlags> flags(r.grid.size());
  for (size_t i = 0; i < flags.size(); ++i) {
    PointFlags& fl = flags[i];
    fl.extrapolated = i < r.grid.extrapolated.size() && r.grid.extrapolated[i];
    if (!std::isfinite(k[i])) {
      fl.model_undefined = true;
      continue;
    }
    const double alpha = poro::BiotCoefficient(k[i], r.k_s);
    const poro::BiotChecks c = poro::CheckBiotCoefficient(alpha, r.porosity, k[i], r.k_s, r.mu_s);
    fl.alpha_below_porosity = c.below_porosity;
    fl.alpha_above_one = c.above_one;
    fl.alpha_below_hs_limit = c.below_hs_limit;
    fl.k_dry_not_below_k_s = c.k_dry_not_below_k_s;
    fl.hs_limit = c.hs_limit;
  }
  return flags;
}

BandResult ComputeBands(const BandRequest& r) {
  BandResult out;
  const std::string why = detail::CheckRequest(r, false, false);
  out.grid = r.grid;
  out.confidence = r.options.confidence;
  if (!why.empty()) {
    out.message = why;
    return out;
  }
  const ModelSpec& m = r.curve_model != nullptr ? *r.curve_model : *r.fit_request->model;
  const CurveGradient cg = EvaluateCurve(*r.fit, m, r.grid.pressure);
  out.k = cg.value;
  out.alpha.resize(out.k.size());
  for (size_t i = 0; i < out.k.size(); ++i) out.alpha[i] = poro::BiotCoefficient(out.k[i], r.k_s);
  out.flags = CheckGrid(r, out.k);

  if (r.options.delta) out.delta = ComputeDeltaBands(r);
  else out.delta.message = "not requested";
  if (r.options.monte_carlo) out.monte_carlo = ComputeMonteCarloBands(r);
  else out.monte_carlo.message = "not requested";
  if (r.options.bootstrap) out.bootstrap = ComputeBootstrapBands(r);
  else out.bootstrap.message = "not requested";

  // Derived properties need the delta method's K standard errors; compute
  // them even when the delta bands were not requested.
  const DeltaResult delta = out.delta.computed ? out.delta : ComputeDeltaBands(r);
  out.biot_modulus = Derive("biot_modulus", "Pa", r, delta, out.k,
                            [](auto k, auto ks, double phi, double kf) { return Modulus(k, ks, phi, kf); });
  out.undrained_modulus = Derive("undrained_bulk_modulus", "Pa", r, delta, out.k,
                                 [](auto k, auto ks, double phi, double kf) { return Undrained(k, ks, phi, kf); });
  out.skempton = Derive("skempton_b", "1", r, delta, out.k,
                        [](auto k, auto ks, double phi, double kf) { return Skempton(k, ks, phi, kf); });

  if (r.sigma_k_s > 0) {
    double lo = kInf, hi = -kInf;
    for (double s : delta.grain_share)
      if (std::isfinite(s)) {
        lo = std::min(lo, s);
        hi = std::max(hi, s);
      }
    std::string share = lo <= hi ? " (K_s gives " + FormatNumber(std::round(lo * 1000) / 10) + "-" +
                                       FormatNumber(std::round(hi * 1000) / 10) + " % of the alpha variance)"
                                 : std::string();
    out.notes.push_back(
        "alpha errors are fully correlated across pressures through K_s, and across every sample that shares this "
        "K_s" + share + "; do not treat them as independent");
  }
  if (out.monte_carlo.computed && out.monte_carlo.rejected() > 0)
    out.notes.push_back("monte carlo: " + std::to_string(out.monte_carlo.rejected()) + " of " +
                        std::to_string(out.monte_carlo.draws) + " draws rejected as unphysical (K_s <= 0: " +
                        std::to_string(out.monte_carlo.rejected_grain) + ", outside bounds: " +
                        std::to_string(out.monte_carlo.rejected_bounds) + ", K <= 0 or undefined on the grid: " +
                        std::to_string(out.monte_carlo.rejected_curve) + ")");
  if (out.bootstrap.computed && out.bootstrap.failed() > 0)
    out.notes.push_back("bootstrap: " + std::to_string(out.bootstrap.failed()) + " of " +
                        std::to_string(out.bootstrap.replicates) + " refits failed and were excluded (not converged: " +
                        std::to_string(out.bootstrap.failed_status) + ", K <= 0 or undefined on the grid: " +
                        std::to_string(out.bootstrap.failed_curve) + ")");
  size_t extrapolated = 0;
  for (const PointFlags& f : out.flags) extrapolated += f.extrapolated ? 1 : 0;
  if (extrapolated > 0)
    out.notes.push_back(std::to_string(extrapolated) + " of " + std::to_string(out.flags.size()) +
                        " grid pressures lie outside the data range: extrapolated");
  out.computed = true;
  return out;
}

}  // namespace porofit::bands

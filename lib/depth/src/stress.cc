// Stress at depth: vertical stress (water + rock load), pore pressure, the
// horizontal-stress relations and the Biot fixed point (docs/depth-method.md).
#include <algorithm>
#include <cmath>

#include "porofit/core/error.h"
#include "table_internal.h"

namespace porofit::depth {

double UniaxialStrainRatio(double poisson) { return poisson / (1.0 - poisson); }

double TotalHorizontalStress(double vertical_stress, double pore_pressure, double n, double ratio) {
  return ratio * (vertical_stress - n * pore_pressure) + n * pore_pressure;
}

double EvaluationFactor(const StressSpec& s) {
  if (s.measure == StressMeasure::kVerticalEffective) return 1.0;
  switch (s.horizontal) {
    case HorizontalStressKind::kRatio: {
      const double k_max = std::isnan(s.ratio_max) ? s.ratio : s.ratio_max;
      return (1.0 + s.ratio + k_max) / 3.0;
    }
    case HorizontalStressKind::kUniaxial: return (1.0 + 2.0 * UniaxialStrainRatio(s.poisson)) / 3.0;
    case HorizontalStressKind::kNone: break;
  }
  return detail::kNaN;
}

FixedPointResult SolveBiotFixedPoint(const FittedCurve& curve, double total, double pore, double tolerance,
                                     int max_iterations) {
  if (curve.model == nullptr || curve.fit == nullptr) throw InputError({}, "biot fixed point: curve has no model or fit");
  return detail::SolveFixedPoint(detail::CurveEval(curve), total, pore, tolerance, max_iterations);
}

namespace detail {

CurveEval::CurveEval(const FittedCurve& c)
    : model_(c.model),
      x_si_(c.model->x_si_factor),
      y_si_(c.model->y_si_factor),
      k_s_(c.k_s),
      positive_x_(c.model->requires_positive_x) {
  theta_.resize(model_->parameters.size());
  for (size_t j = 0; j < theta_.size() && j < c.fit->parameters.size(); ++j)
    theta_[j] = c.fit->parameters[j].estimate / model_->parameters[j].si_factor;
}

double CurveEval::K(double p) const {
  if (!std::isfinite(p) || (positive_x_ && p <= 0)) return kNaN;
  const double k = model_->value(theta_.data(), p / x_si_) * y_si_;
  return std::isfinite(k) ? k : kNaN;
}

FixedPointResult SolveFixedPoint(const CurveEval& c, double total, double pore, double tolerance,
                                 int max_iterations) {
  // Start from the Terzaghi alpha (n = 1): the pressure is then the plain
  // differential pressure, the usual default reading (common practice)
  // and which is defined wherever a Terzaghi row is.
  FixedPointResult r;
  const double ks = c.k_s();
  double alpha = 1.0 - c.K(total - pore) / ks;
  if (!std::isfinite(alpha)) {
    r.pressure = total - pore;
    return r;
  }
  for (int it = 1; it <= max_iterations; ++it) {
    const double p = total - alpha * pore;
    const double next = 1.0 - c.K(p) / ks;
    r.iterations = it;
    if (!std::isfinite(next)) break;  // keep the last finite iterate
    if (std::abs(next - alpha) < tolerance) {
      r.alpha = next;
      r.pressure = total - next * pore;
      r.converged = true;
      return r;
    }
    alpha = next;
  }
  r.alpha = alpha;
  r.pressure = total - alpha * pore;
  return r;
}

namespace {

// Rows may sit a rounding error below the base the caller asked for.
constexpr double kDepthSlack = 1e-9;

void ThrowAt(const std::string& where, const std::string& what) { throw InputError({}, where + what); }

}  // namespace

Overburden ComputeOverburden(const DepthTableSpec& spec, const std::vector<double>& depth, const std::string& where) {
  const Datum& d = spec.datum;
  const double surface = d.SurfaceDepth(), rock_top = d.RockTop();
  const OverburdenSpec& ob = spec.overburden;
  const size_t n = depth.size();
  Overburden out;
  out.vertical_stress.assign(n, 0.0);
  out.flags.assign(n, 0u);
  const double water_gradient = d.water_depth > 0 ? d.water_density * kGravity : 0.0;
  // First row in rock (rows ascend).
  const size_t first_rock =
      static_cast<size_t>(std::lower_bound(depth.begin(), depth.end(), rock_top) - depth.begin());
  for (size_t i = 0; i < n; ++i) {
    const double z = depth[i];
    out.vertical_stress[i] = z > surface ? water_gradient * (std::min(z, rock_top) - surface) : 0.0;
  }
  if (first_rock == n) return out;
  const double deepest = depth.back();

  switch (ob.kind) {
    case OverburdenKind::kGradient:
      for (size_t i = first_rock; i < n; ++i) out.vertical_stress[i] += ob.gradient * (depth[i] - rock_top);
      break;
    case OverburdenKind::kLayers: {
      const std::vector<DensityLayer>& L = ob.layers;
      if (L.empty()) ThrowAt(where, "overburden has no density layers");
      double previous = rock_top;
      for (size_t j = 0; j < L.size(); ++j) {
        const std::string name = "overburden.layers[" + std::to_string(j) + "]";
        if (!(std::isfinite(L[j].density) && L[j].density > 0))
          ThrowAt(where, name + ".density = " + FormatNumber(L[j].density) + " kg/m^3 must be > 0");
        if (!(std::isfinite(L[j].base) && L[j].base > previous))
          ThrowAt(where, name + ".base = " + FormatNumber(L[j].base) + " m must be deeper than " +
                             (j == 0 ? "the rock top " : "the previous base ") + FormatNumber(previous) + " m");
        previous = L[j].base;
      }
      if (L.back().base < deepest - kDepthSlack)
        ThrowAt(where, "overburden.layers end at " + FormatNumber(L.back().base) + " m, above the table base " +
                           FormatNumber(deepest) + " m (the last layer base must reach it)");
      // Walk the layers with the rows, carrying the load at each layer's top.
      size_t j = 0;
      double layer_top = rock_top, load_top = 0.0;
      for (size_t i = first_rock; i < n; ++i) {
        const double z = depth[i];
        while (j + 1 < L.size() && z >= L[j].base) {
          load_top += L[j].density * kGravity * (L[j].base - layer_top);
          layer_top = L[j].base;
          ++j;
        }
        out.vertical_stress[i] += load_top + L[j].density * kGravity * (z - layer_top);
      }
      break;
    }
    case OverburdenKind::kDensityProfile: {
      const DensityProfile& p = ob.profile;
      if (p.depth.empty() || p.depth.size() != p.density.size())
        ThrowAt(where, "overburden density profile has " + std::to_string(p.depth.size()) + " depths and " +
                           std::to_string(p.density.size()) + " densities");
      if (p.source.size() != p.depth.size())
        ThrowAt(where, "overburden density profile has " + std::to_string(p.depth.size()) + " depths and " +
                           std::to_string(p.source.size()) + " source flags");
      if (p.depth.front() > rock_top + 1e-6)
        ThrowAt(where, "overburden density profile starts at " + FormatNumber(p.depth.front()) +
                           " m, below the rock top " + FormatNumber(rock_top) +
                           " m (fill it from the rock top down)");
      if (p.depth.back() < deepest - kDepthSlack)
        ThrowAt(where, "overburden density profile ends at " + FormatNumber(p.depth.back()) +
                           " m, above the table base " + FormatNumber(deepest) + " m (never extrapolated)");
      std::vector<double> at(n - first_rock + 1);
      at[0] = rock_top;
      for (size_t i = first_rock; i < n; ++i) at[i - first_rock + 1] = std::min(depth[i], p.depth.back());
      const std::vector<double> load = CumulativeLoad(p, at);
      const SourceIndex sources(p);
      for (size_t i = first_rock; i < n; ++i) {
        out.vertical_stress[i] += load[i - first_rock + 1] - load[0];
        const std::uint8_t s = sources.SourcesAbove(depth[i]);
        const auto has = [s](DensitySource k) { return (s & (1u << static_cast<unsigned>(k))) != 0; };
        if (has(DensitySource::kBridged) || has(DensitySource::kBadHole) || has(DensitySource::kOutOfRange))
          out.flags[i] |= kLogGap;
        if (has(DensitySource::kOutOfRange) || has(DensitySource::kOutOfRangeKept)) out.flags[i] |= kLogDensityRange;
        if (has(DensitySource::kFilled)) out.flags[i] |= kLogFill;
      }
      break;
    }
  }
  return out;
}

std::vector<double> ComputePorePressure(const DepthTableSpec& spec, const std::vector<double>& depth,
                                        const std::string& where) {
  const PorePressureSpec& pp = spec.pore_pressure;
  const size_t n = depth.size();
  std::vector<double> out(n, kNaN);
  if (pp.kind == PorePressureKind::kHydrostatic) {
    const double z0 = std::isnan(pp.zero_depth) ? spec.datum.SurfaceDepth() : pp.zero_depth;
    for (size_t i = 0; i < n; ++i) out[i] = pp.gradient * std::max(0.0, depth[i] - z0);
    return out;
  }
  // Pairs were validated (sizes, order, finiteness) by ValidateSpec.
  const std::vector<double>& zd = pp.depth;
  const std::vector<double>& pv = pp.pressure;
  const double rock_top = spec.datum.RockTop();
  const std::string kind = pp.kind == PorePressureKind::kTable ? "table" : "profile";
  size_t j = 0;
  for (size_t i = 0; i < n; ++i) {
    const double z = depth[i];
    if (z < zd.front() - kDepthSlack || z > zd.back() + kDepthSlack) {
      if (z < rock_top) continue;  // in water: no K needs it
      ThrowAt(where, "pore pressure at " + FormatNumber(z) + " m is outside the pore-pressure " + kind + " range [" +
                         FormatNumber(zd.front()) + ", " + FormatNumber(zd.back()) + "] m (never extrapolated)");
    }
    if (zd.size() == 1) {
      out[i] = pv[0];
      continue;
    }
    while (j + 2 < zd.size() && z > zd[j + 1]) ++j;
    const double t = std::clamp((z - zd[j]) / (zd[j + 1] - zd[j]), 0.0, 1.0);
    out[i] = pv[j] + t * (pv[j + 1] - pv[j]);
  }
  return out;
}

}  // namespace detail
}  // namespace porofit::depth

// The depth-table engine: rows, stresses, the pressure K is evaluated at,
// K_dry and alpha with delta-method bands, flags and depletion scenarios
// (method: docs/depth-method.md; bands as in lib/bands).
#include <algorithm>
#include <cmath>

#include <Eigen/Core>

#include "porofit/bands/bands.h"
#include "porofit/bands/quantile.h"
#include "porofit/core/error.h"
#include "table_internal.h"

namespace porofit::depth {
namespace {

using detail::kInf;
using detail::kNaN;

// Rows may sit a rounding error below the base the caller asked for.
constexpr double kDepthSlack = 1e-9;

// Curve index of every row, -1 where no rule applies (rows in water are
// skipped by the caller). Rows ascend, so both mappings walk once.
std::vector<int> MapRows(const DepthTableSpec& s, const std::vector<double>& depth) {
  std::vector<int> out(depth.size(), -1);
  if (s.facies.has_value()) {
    const FaciesCurve& f = *s.facies;
    // The last sample stands for one sampling interval below it; deeper rows
    // are beyond the curve and unmapped (never extended silently).
    const double reach =
        f.depth.size() > 1 ? f.depth.back() + (f.depth.back() - f.depth[f.depth.size() - 2]) : f.depth.back();
    size_t j = 0;
    for (size_t i = 0; i < depth.size(); ++i) {
      const double z = depth[i];
      if (z < f.depth.front() - kDepthSlack || z > reach + kDepthSlack) continue;
      while (j + 1 < f.depth.size() && f.depth[j + 1] <= z + kDepthSlack) ++j;
      const int code = f.code[j];
      for (const FaciesRule& r : s.facies_rules)
        if (r.code == code) out[i] = static_cast<int>(r.curve);
    }
    return out;
  }
  std::vector<IntervalRule> rules = s.intervals;
  std::sort(rules.begin(), rules.end(), [](const IntervalRule& a, const IntervalRule& b) { return a.top < b.top; });
  size_t j = 0;
  for (size_t i = 0; i < depth.size(); ++i) {
    const double z = depth[i];
    while (j < rules.size() && z >= rules[j].base) ++j;
    if (j < rules.size() && z >= rules[j].top) out[i] = static_cast<int>(rules[j].curve);
  }
  return out;
}

// Flags that follow from the pressure, K and alpha at one point.
std::uint32_t PointFlags(const FittedCurve& c, double pressure, double k, double alpha) {
  std::uint32_t f = 0;
  if (std::isfinite(pressure)) {
    if (pressure <= 0) f |= kNegativeEffectiveStress;
    if (pressure < c.lab_min) f |= kBelowLabRange;
    if (pressure > c.lab_max) f |= kAboveLabRange;
  }
  if (!std::isfinite(k)) {
    f |= kModelUndefined;
  } else if (alpha > 1 || alpha < (std::isnan(c.porosity) ? 0.0 : c.porosity)) {
    // Unknown porosity: alpha >= phi >= 0 still bounds it below by 0.
    f |= kAlphaOutsideBounds;
  }
  return f;
}

struct Context {
  const DepthTableSpec& spec;
  std::vector<detail::CurveEval> curves;
  double factor = 1;  // evaluation pressure = factor (S_v - n P_p)
  bool biot = false;
};

// The state at one point in rock for pore pressure pp: evaluation pressure,
// plug-in K and alpha, fixed-point outcome. `curve` < 0: unmapped.
struct Point {
  double pressure = kNaN, k = kNaN, alpha = kNaN;
  int iterations = 0;
  bool converged = true;
};

Point Solve(const Context& cx, double sv, double pp, int curve, bool evaluate_k) {
  Point p;
  if (!cx.biot) {
    p.pressure = cx.factor * (sv - pp);
  } else if (curve >= 0) {
    const FixedPointResult r =
        detail::SolveFixedPoint(cx.curves[static_cast<size_t>(curve)], cx.factor * sv, cx.factor * pp,
                                cx.spec.stress.tolerance, cx.spec.stress.max_iterations);
    p.pressure = r.pressure;
    p.iterations = r.iterations;
    p.converged = r.converged;
  }
  if (evaluate_k && curve >= 0) {
    const detail::CurveEval& c = cx.curves[static_cast<size_t>(curve)];
    p.k = c.K(p.pressure);
    p.alpha = 1.0 - p.k / c.k_s();
  }
  return p;
}

// Delta-method K and alpha bands of the rows mapped to one curve, in one
// batch: exactly lib/bands' rule (bands/src/delta.cc) at each row's pressure.
void BandRows(const DepthTableSpec& s, size_t curve, const std::vector<size_t>& rows_of_curve,
              std::vector<DepthRow>& rows) {
  if (rows_of_curve.empty()) return;
  const FittedCurve& c = s.curves[curve];
  const FitResult& f = *c.fit;
  std::vector<double> pressure(rows_of_curve.size());
  for (size_t i = 0; i < rows_of_curve.size(); ++i) pressure[i] = rows[rows_of_curve[i]].evaluation_pressure;
  const bands::CurveGradient cg = bands::EvaluateCurve(f, *c.model, pressure);

  const double level = s.band_level;
  const double k_dof = f.covariance_scaled ? static_cast<double>(f.dof) : kInf;
  const bands::DeltaQuantile rule = s.band_quantile;
  const double k_quantile = bands::TwoSidedT(level, rule == bands::DeltaQuantile::kNormal ? kInf : k_dof);
  const bands::TQuantileCurve tq(level, k_dof);
  const double ks = c.k_s, var_ks = c.sigma_k_s * c.sigma_k_s;
  const Eigen::MatrixXd& cov = f.covariance;
  const auto np = static_cast<Eigen::Index>(f.free_index.size());
  // The alpha dof is the same at every row when K_s is exact or the rule
  // ignores it: one quantile then serves them all (same value as per row).
  const bool one_dof = var_ks == 0 || rule != bands::DeltaQuantile::kWelchSatterthwaite;
  const double one_q = tq(rule == bands::DeltaQuantile::kNormal ? kInf
                          : rule == bands::DeltaQuantile::kStudentT ? k_dof
                                                                    : bands::WelchSatterthwaiteDof(1.0, k_dof, 0.0));
  Eigen::VectorXd g(np), cg_times(np);
  for (size_t i = 0; i < rows_of_curve.size(); ++i) {
    DepthRow& r = rows[rows_of_curve[i]];
    // A model defined only for P > 0 is not evaluated at P <= 0.
    const bool defined = !(c.model->requires_positive_x && !(r.evaluation_pressure > 0));
    const double k = defined ? cg.value[i] : kNaN;
    const double alpha = 1.0 - k / ks;
    r.flags |= PointFlags(c, r.evaluation_pressure, std::isfinite(k) ? k : kNaN, alpha);
    if (!std::isfinite(k)) continue;
    for (Eigen::Index a = 0; a < np; ++a) g(a) = cg.gradient[i][static_cast<size_t>(a)];
    cg_times.noalias() = cov * g;
    const double var_k = std::max(0.0, g.dot(cg_times));
    const double v_fit = var_k / (ks * ks);
    const double v_grain = (k / (ks * ks)) * (k / (ks * ks)) * var_ks;
    double dof = k_dof;
    switch (rule) {
      case bands::DeltaQuantile::kWelchSatterthwaite: dof = bands::WelchSatterthwaiteDof(v_fit, k_dof, v_grain); break;
      case bands::DeltaQuantile::kStudentT: dof = k_dof; break;
      case bands::DeltaQuantile::kNormal: dof = kInf; break;
    }
    const double k_half = k_quantile * std::sqrt(var_k);
    const double a_half = (one_dof ? one_q : tq(dof)) * std::sqrt(v_fit + v_grain);
    r.k_dry = k;
    r.k_dry_lower = k - k_half;
    r.k_dry_upper = k + k_half;
    r.alpha = alpha;
    r.alpha_lower = alpha - a_half;
    r.alpha_upper = alpha + a_half;
  }
}

}  // namespace

DepthTable BuildDepthTable(const DepthTableSpec& spec) {
  const std::string where = "depth table '" + spec.name + "': ";
  detail::ValidateSpec(spec, where);
  DepthTable out;
  out.spec = spec;
  const size_t n = static_cast<size_t>(std::floor((spec.base - spec.top + kDepthSlack) / spec.step)) + 1;
  std::vector<double> depth(n);
  for (size_t i = 0; i < n; ++i) depth[i] = spec.top + static_cast<double>(i) * spec.step;

  const detail::Overburden ob = detail::ComputeOverburden(spec, depth, where);
  const std::vector<double> pp = detail::ComputePorePressure(spec, depth, where);
  const std::vector<int> map = MapRows(spec, depth);

  Context cx{spec, {}, EvaluationFactor(spec.stress), spec.stress.law == EffectiveStressLaw::kBiot};
  cx.curves.reserve(spec.curves.size());
  for (const FittedCurve& c : spec.curves) cx.curves.emplace_back(c);

  const StressSpec& st = spec.stress;
  double ratio_h = kNaN, ratio_hmax = kNaN;
  if (st.horizontal == HorizontalStressKind::kRatio) {
    ratio_h = st.ratio;
    ratio_hmax = std::isnan(st.ratio_max) ? st.ratio : st.ratio_max;
  } else if (st.horizontal == HorizontalStressKind::kUniaxial) {
    ratio_h = ratio_hmax = UniaxialStrainRatio(st.poisson);
  }
  const double rock_top = spec.datum.RockTop();

  // Pass 1: stresses and the evaluation pressure of every row.
  out.rows.resize(n);
  std::vector<std::vector<size_t>> rows_of_curve(spec.curves.size());
  for (auto& v : rows_of_curve) v.reserve(n);
  for (size_t i = 0; i < n; ++i) {
    DepthRow& r = out.rows[i];
    r.depth = depth[i];
    r.vertical_stress = ob.vertical_stress[i];
    r.pore_pressure = pp[i];
    r.flags = ob.flags[i];
    if (depth[i] < rock_top) {
      r.flags |= kInWater;
      r.evaluation_pressure = kNaN;
      continue;
    }
    r.curve = map[i];
    if (r.curve < 0) r.flags |= kUnmapped;
    const Point p = Solve(cx, r.vertical_stress, r.pore_pressure, r.curve, false);
    r.evaluation_pressure = p.pressure;
    r.iterations = p.iterations;
    if (!p.converged) {
      r.flags |= kFixedPointNotConverged;
      ++out.fixed_point_failures;
    }
    if (r.curve >= 0) {
      rows_of_curve[static_cast<size_t>(r.curve)].push_back(i);
    } else if (std::isfinite(p.pressure) && p.pressure <= 0) {
      r.flags |= kNegativeEffectiveStress;
    }
  }

  // Pass 2: K, alpha and their bands, one batch per curve.
  for (size_t c = 0; c < spec.curves.size(); ++c) BandRows(spec, c, rows_of_curve[c], out.rows);

  // Pass 3: what depends on alpha (n = alpha for Biot), and the depletion scenarios.
  const size_t scenarios = spec.depletion.size();
  for (size_t i = 0; i < n; ++i) {
    DepthRow& r = out.rows[i];
    const bool in_rock = (r.flags & kInWater) == 0;
    if (in_rock) {
      if (std::isfinite(r.alpha)) r.biot_vertical_effective = r.vertical_stress - r.alpha * r.pore_pressure;
      const double n_eff = cx.biot ? r.alpha : 1.0;
      if (st.horizontal != HorizontalStressKind::kNone && std::isfinite(n_eff)) {
        r.horizontal_stress = TotalHorizontalStress(r.vertical_stress, r.pore_pressure, n_eff, ratio_h);
        r.horizontal_stress_max = TotalHorizontalStress(r.vertical_stress, r.pore_pressure, n_eff, ratio_hmax);
      }
    }
    if (scenarios == 0) continue;
    r.depletion.resize(scenarios);
    // Flags that do not depend on the pore pressure carry over to each scenario.
    const std::uint32_t carried = r.flags & (kLogGap | kLogFill | kLogDensityRange | kUnmapped | kInWater);
    for (size_t k = 0; k < scenarios; ++k) {
      DepletionValues& v = r.depletion[k];
      v.pore_pressure = r.pore_pressure - spec.depletion[k].drop;
      v.flags = carried;
      if (v.pore_pressure < 0) v.flags |= kNegativePorePressure;
      v.evaluation_pressure = v.alpha = v.k_dry = v.vertical_effective = kNaN;
      if (!in_rock) continue;
      const Point p = Solve(cx, r.vertical_stress, v.pore_pressure, r.curve, true);
      v.evaluation_pressure = p.pressure;
      v.k_dry = p.k;
      v.alpha = p.alpha;
      const double n_eff = cx.biot ? p.alpha : 1.0;
      v.vertical_effective = r.vertical_stress - n_eff * v.pore_pressure;
      if (!p.converged) {
        v.flags |= kFixedPointNotConverged;
        ++out.depletion_fixed_point_failures;
      }
      if (r.curve >= 0) {
        v.flags |= PointFlags(spec.curves[static_cast<size_t>(r.curve)], p.pressure, p.k, p.alpha);
      } else if (std::isfinite(p.pressure) && p.pressure <= 0) {
        v.flags |= kNegativeEffectiveStress;
      }
    }
  }
  out.assumptions = detail::DescribeAssumptions(spec);
  return out;
}

}  // namespace porofit::depth

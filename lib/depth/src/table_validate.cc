// Validation of a depth-table spec: every message names the field, its value
// and the rule ("depth table 'A': step = 0 m must be > 0").
#include <algorithm>
#include <cmath>
#include <set>

#include "porofit/core/error.h"
#include "table_internal.h"

namespace porofit::depth::detail {
namespace {

class Checker {
 public:
  explicit Checker(const std::string& where) : where_(where) {}
  [[noreturn]] void Fail(const std::string& what) const { throw InputError({}, where_ + what); }
  void Finite(const std::string& field, double v, const std::string& unit) const {
    if (!std::isfinite(v)) Fail(field + " = " + FormatNumber(v) + unit + " must be finite");
  }
  void Positive(const std::string& field, double v, const std::string& unit) const {
    if (!(std::isfinite(v) && v > 0)) Fail(field + " = " + FormatNumber(v) + unit + " must be > 0");
  }
  void NonNegative(const std::string& field, double v, const std::string& unit) const {
    if (!(std::isfinite(v) && v >= 0)) Fail(field + " = " + FormatNumber(v) + unit + " must be >= 0");
  }
  void Ascending(const std::string& field, const std::vector<double>& v, const std::string& unit) const {
    for (size_t i = 0; i < v.size(); ++i) {
      Finite(field + "[" + std::to_string(i) + "]", v[i], unit);
      if (i > 0 && !(v[i] > v[i - 1]))
        Fail(field + "[" + std::to_string(i) + "] = " + FormatNumber(v[i]) + unit + " must be greater than " + field +
             "[" + std::to_string(i - 1) + "] = " + FormatNumber(v[i - 1]) + unit);
    }
  }

 private:
  const std::string& where_;
};

std::string CurveName(const DepthTableSpec& s, size_t i) {
  const FittedCurve& c = s.curves[i];
  return "curves[" + std::to_string(i) + "] ('" + c.sample_id + "' " + c.model_id + ")";
}

void CheckCurveIndex(const Checker& ck, const DepthTableSpec& s, const std::string& field, size_t curve) {
  if (curve >= s.curves.size())
    ck.Fail(field + " = " + std::to_string(curve) + " is not a curve index (" + std::to_string(s.curves.size()) +
            " curves)");
}

}  // namespace

void ValidateSpec(const DepthTableSpec& s, const std::string& where) {
  const Checker ck(where);
  // Rows.
  ck.Finite("top", s.top, " m");
  ck.Finite("base", s.base, " m");
  ck.Positive("step", s.step, " m");
  if (!(s.base >= s.top))
    ck.Fail("base = " + FormatNumber(s.base) + " m must be >= top = " + FormatNumber(s.top) + " m");
  if ((s.base - s.top) / s.step > 1e7)
    ck.Fail("step = " + FormatNumber(s.step) + " m gives more than 10,000,000 rows from " + FormatNumber(s.top) +
            " to " + FormatNumber(s.base) + " m");

  // Datum.
  const Datum& d = s.datum;
  ck.NonNegative("datum.air_gap", d.air_gap, " m");
  ck.NonNegative("datum.water_depth", d.water_depth, " m");
  if (d.water_depth > 0) {
    if (d.kind == DatumKind::kGroundLevel)
      ck.Fail("datum.water_depth = " + FormatNumber(d.water_depth) +
              " m with a ground-level datum: a GL datum is onshore (water_depth = 0)");
    if (!(std::isfinite(d.water_density) && d.water_density > 0))
      ck.Fail("datum.water_density = " + FormatNumber(d.water_density) + " kg/m^3 must be > 0 when water_depth > 0");
  }
  if (d.kind != DatumKind::kKellyBushing && d.air_gap != 0)
    ck.Fail("datum.air_gap = " + FormatNumber(d.air_gap) + " m must be 0 for a " + std::string(ToString(d.kind)) +
            " datum (only a KB datum sits above the surface)");

  // Overburden (layers and profiles are checked against the rows later).
  if (s.overburden.kind == OverburdenKind::kGradient)
    ck.Positive("overburden.gradient", s.overburden.gradient, " Pa/m");

  // Pore pressure.
  const PorePressureSpec& pp = s.pore_pressure;
  if (pp.kind == PorePressureKind::kHydrostatic) {
    ck.Positive("pore_pressure.gradient", pp.gradient, " Pa/m");
    if (!std::isnan(pp.zero_depth)) ck.Finite("pore_pressure.zero_depth", pp.zero_depth, " m");
  } else {
    if (pp.depth.empty()) ck.Fail("pore_pressure has no (depth, pressure) pairs");
    if (pp.depth.size() != pp.pressure.size())
      ck.Fail("pore_pressure has " + std::to_string(pp.depth.size()) + " depths and " +
              std::to_string(pp.pressure.size()) + " pressures");
    ck.Ascending("pore_pressure.depth", pp.depth, " m");
    for (size_t i = 0; i < pp.pressure.size(); ++i)
      ck.NonNegative("pore_pressure.pressure[" + std::to_string(i) + "]", pp.pressure[i], " Pa");
  }

  // Stress.
  const StressSpec& st = s.stress;
  if (st.measure == StressMeasure::kMeanEffective && st.horizontal == HorizontalStressKind::kNone)
    ck.Fail("stress.measure = mean effective needs a horizontal-stress assumption (ratio or uniaxial strain)");
  if (st.horizontal == HorizontalStressKind::kRatio) {
    if (!(std::isfinite(st.ratio) && st.ratio > 0))
      ck.Fail("stress.ratio = " + FormatNumber(st.ratio) + " must be > 0 (sigma'_h/sigma'_v)");
    if (!std::isnan(st.ratio_max) && !(std::isfinite(st.ratio_max) && st.ratio_max >= st.ratio))
      ck.Fail("stress.ratio_max = " + FormatNumber(st.ratio_max) + " must be >= stress.ratio = " +
              FormatNumber(st.ratio) + " (sigma'_H >= sigma'_h)");
  }
  if (st.horizontal == HorizontalStressKind::kUniaxial && !(st.poisson > 0 && st.poisson < 0.5))
    ck.Fail("stress.poisson = " + FormatNumber(st.poisson) + " must be in (0, 0.5)");
  if (st.law == EffectiveStressLaw::kBiot) {
    if (!(std::isfinite(st.tolerance) && st.tolerance > 0))
      ck.Fail("stress.tolerance = " + FormatNumber(st.tolerance) + " must be > 0");
    if (st.max_iterations < 1)
      ck.Fail("stress.max_iterations = " + std::to_string(st.max_iterations) + " must be >= 1");
    if (s.curves.empty()) ck.Fail("stress.law = biot needs a fitted curve (curves is empty)");
  }

  if (!(s.band_level > 0 && s.band_level < 1))
    ck.Fail("band_level = " + FormatNumber(s.band_level) + " must be in (0, 1)");

  // Curves.
  for (size_t i = 0; i < s.curves.size(); ++i) {
    const FittedCurve& c = s.curves[i];
    const std::string name = CurveName(s, i);
    if (c.model == nullptr || c.fit == nullptr) ck.Fail(name + " has no model or no fit");
    const FitResult& f = *c.fit;
    if (f.status != FitStatus::kConverged)
      ck.Fail(name + ": fit status is " + std::string(ToString(f.status)) + ", not converged");
    if (f.parameters.size() != c.model->parameters.size())
      ck.Fail(name + ": fit result does not match model " + c.model->id);
    const auto p = static_cast<Eigen::Index>(f.free_index.size());
    if (!f.covariance_ok || f.covariance.rows() != p || f.covariance.cols() != p)
      ck.Fail(name + ": fit has no usable covariance (the bands need it)");
    ck.Positive(name + ".k_s", c.k_s, " Pa");
    ck.NonNegative(name + ".sigma_k_s", c.sigma_k_s, " Pa");
    if (!std::isnan(c.porosity) && !(c.porosity >= 0 && c.porosity < 1))
      ck.Fail(name + ".porosity = " + FormatNumber(c.porosity) + " is outside [0, 1)");
    ck.Finite(name + ".lab_min", c.lab_min, " Pa");
    ck.Finite(name + ".lab_max", c.lab_max, " Pa");
    if (!(c.lab_max >= c.lab_min))
      ck.Fail(name + ".lab_max = " + FormatNumber(c.lab_max) + " Pa must be >= lab_min = " +
              FormatNumber(c.lab_min) + " Pa");
  }

  // Mapping.
  if (s.facies.has_value()) {
    if (!s.intervals.empty()) ck.Fail("both intervals and a facies curve are given: use one mapping");
    const FaciesCurve& fc = *s.facies;
    if (fc.depth.empty()) ck.Fail("facies curve has no samples");
    if (fc.depth.size() != fc.code.size())
      ck.Fail("facies curve has " + std::to_string(fc.depth.size()) + " depths and " +
              std::to_string(fc.code.size()) + " codes");
    ck.Ascending("facies.depth", fc.depth, " m");
    std::set<int> seen;
    for (size_t i = 0; i < s.facies_rules.size(); ++i) {
      const FaciesRule& r = s.facies_rules[i];
      CheckCurveIndex(ck, s, "facies_rules[" + std::to_string(i) + "].curve", r.curve);
      if (!seen.insert(r.code).second)
        ck.Fail("facies_rules[" + std::to_string(i) + "].code = " + std::to_string(r.code) +
                " has a rule already (one curve per code)");
    }
  } else {
    if (!s.facies_rules.empty()) ck.Fail("facies_rules are given without a facies curve");
    std::vector<size_t> order(s.intervals.size());
    for (size_t i = 0; i < order.size(); ++i) {
      const IntervalRule& r = s.intervals[i];
      const std::string name = "intervals[" + std::to_string(i) + "]";
      ck.Finite(name + ".top", r.top, " m");
      ck.Finite(name + ".base", r.base, " m");
      if (!(r.top < r.base))
        ck.Fail(name + ".top = " + FormatNumber(r.top) + " m must be above base = " + FormatNumber(r.base) + " m");
      CheckCurveIndex(ck, s, name + ".curve", r.curve);
      order[i] = i;
    }
    std::sort(order.begin(), order.end(), [&](size_t a, size_t b) { return s.intervals[a].top < s.intervals[b].top; });
    for (size_t k = 1; k < order.size(); ++k) {
      const IntervalRule& a = s.intervals[order[k - 1]];
      const IntervalRule& b = s.intervals[order[k]];
      if (b.top < a.base)
        ck.Fail("intervals[" + std::to_string(order[k - 1]) + "] [" + FormatNumber(a.top) + ", " +
                FormatNumber(a.base) + ") m and intervals[" + std::to_string(order[k]) + "] [" + FormatNumber(b.top) +
                ", " + FormatNumber(b.base) + ") m overlap");
    }
  }

  // Depletion.
  std::set<std::string> names;
  for (size_t i = 0; i < s.depletion.size(); ++i) {
    const DepletionScenario& sc = s.depletion[i];
    const std::string name = "depletion[" + std::to_string(i) + "]";
    if (sc.name.empty()) ck.Fail(name + " has no name");
    if (!names.insert(sc.name).second) ck.Fail(name + " name '" + sc.name + "' is used twice");
    ck.Positive(name + " ('" + sc.name + "').drop", sc.drop, " Pa");
  }
}

}  // namespace porofit::depth::detail

// Depth tables with fitted curves: the delta bands at depth, the Biot fixed
// point, flags, mapping and depletion. Samples are invented synthetic data
// fitted with porofit::Fit (tests/bands/simulate.h).
#include "porofit/depth/table.h"

#include <gtest/gtest.h>

#include <cmath>
#include <random>
#include <string>

#include "bands/simulate.h"
#include "porofit/bands/bands.h"
#include "porofit/core/error.h"
#include "porofit/models/registry.h"

namespace porofit::depth {
namespace {

using porofit::testing::RequestFor;
using porofit::testing::Sample;
using porofit::testing::Simulate;

constexpr double kG = 9.80665;

FittedCurve CurveOf(const Sample& s, double k_s, double sigma_k_s, const std::string& id = "S1") {
  FittedCurve c;
  c.sample_id = id;
  c.model_id = s.request.model->id;
  c.model = s.request.model;
  c.fit = &s.fit;
  c.k_s = k_s;
  c.sigma_k_s = sigma_k_s;
  c.lab_min = s.request.data.x.front();
  c.lab_max = s.request.data.x.back();
  return c;
}

// Invented exp-modulus sample: truth K_inf 20 GPa, K_0 8 GPa, P_close 10 MPa
// (the shape of check value 12, docs/check-values.md), 15 points at 5, 10, ..., 75 MPa,
// 1 % noise, seeded.
const Sample& ExpSample() {
  static const Sample s = [] {
    std::mt19937_64 rng(7101);
    return Simulate("exp-modulus", {20.0, 8.0, 10.0}, 15, 0.01, rng, 5.0, 75.0);
  }();
  return s;
}

// Onshore, ground-level datum: S_v = 22 kPa/m z, P_p = 12 kPa/m z, so
// sigma'_v = 10 kPa/m z exactly in binary (20 MPa at 2000 m, a lab pressure).
DepthTableSpec Onshore(const Sample& s, double sigma_k_s = 1e9) {
  DepthTableSpec t;
  t.name = "W";
  t.datum.kind = DatumKind::kGroundLevel;
  t.top = 0;
  t.base = 8000;
  t.step = 100;
  t.overburden.gradient = 22000;
  t.pore_pressure.gradient = 12000;
  t.curves.push_back(CurveOf(s, 37e9, sigma_k_s));
  t.intervals.push_back({0, 1e4, 0});
  return t;
}

const DepthRow& RowAt(const DepthTable& t, double z) {
  for (const DepthRow& r : t.rows)
    if (std::abs(r.depth - z) < 1e-6) return r;
  ADD_FAILURE() << "no row at " << z;
  return t.rows.front();
}

double Rel(double a, double b) { return std::abs(a - b) / std::max(std::abs(b), 1e-300); }

// K (Pa) of a fitted curve at p (Pa), straight from the model.
double KOf(const FittedCurve& c, double p) {
  std::vector<double> th;
  for (size_t j = 0; j < c.model->parameters.size(); ++j)
    th.push_back(c.fit->parameters[j].estimate / c.model->parameters[j].si_factor);
  return c.model->value(th.data(), p / c.model->x_si_factor) * c.model->y_si_factor;
}

std::string MessageOf(const DepthTableSpec& s) {
  try {
    BuildDepthTable(s);
  } catch (const InputError& e) {
    return e.message();
  }
  return "no error";
}

// ---------------------------------------------------------------- bands

TEST(DepthTableBands, RowAtALabPressureReproducesTheSampleDeltaBand) {
  const Sample& s = ExpSample();
  ASSERT_EQ(s.fit.status, FitStatus::kConverged);
  ASSERT_DOUBLE_EQ(s.request.data.x[3], 20e6);
  for (double sigma_ks : {0.0, 1e9}) {
    for (double level : {0.80, 0.95}) {
      for (bands::DeltaQuantile rule : {bands::DeltaQuantile::kWelchSatterthwaite, bands::DeltaQuantile::kStudentT}) {
        DepthTableSpec t = Onshore(s, sigma_ks);
        t.band_level = level;
        t.band_quantile = rule;
        const DepthTable built = BuildDepthTable(t);  // keep the rows alive
        const DepthRow& r = RowAt(built, 2000);
        ASSERT_EQ(r.evaluation_pressure, 20e6);

        bands::BandRequest q = RequestFor(s, 37e9, sigma_ks, {20.0});
        q.options.confidence = level;
        q.options.delta_quantile = rule;
        const bands::DeltaResult d = bands::ComputeDeltaBands(q);
        ASSERT_TRUE(d.computed) << d.message;
        const std::string at = "sigma_k_s " + std::to_string(sigma_ks) + " level " + std::to_string(level);
        EXPECT_LT(Rel(r.k_dry, d.k_confidence.estimate[0]), 1e-12) << at;
        EXPECT_LT(Rel(r.k_dry_lower, d.k_confidence.lower[0]), 1e-12) << at;
        EXPECT_LT(Rel(r.k_dry_upper, d.k_confidence.upper[0]), 1e-12) << at;
        EXPECT_LT(Rel(r.alpha, d.alpha_confidence.estimate[0]), 1e-12) << at;
        EXPECT_LT(Rel(r.alpha_lower, d.alpha_confidence.lower[0]), 1e-12) << at;
        EXPECT_LT(Rel(r.alpha_upper, d.alpha_confidence.upper[0]), 1e-12) << at;
        EXPECT_GT(r.alpha_upper - r.alpha_lower, 0.0);
        EXPECT_EQ(r.flags, 0u) << FlagsToString(r.flags);
      }
    }
  }
}

TEST(DepthTableBands, EveryRowOfACurveMatchesTheBandOnTheSameGrid) {
  // The batch over rows equals one band call on all their pressures.
  const Sample& s = ExpSample();
  const DepthTable t = BuildDepthTable(Onshore(s));
  std::vector<double> grid_mpa;
  for (const DepthRow& r : t.rows) grid_mpa.push_back(r.evaluation_pressure / 1e6);
  bands::BandRequest q = RequestFor(s, 37e9, 1e9, grid_mpa);
  q.options.confidence = 0.80;
  const bands::DeltaResult d = bands::ComputeDeltaBands(q);
  for (size_t i = 0; i < t.rows.size(); ++i) {
    // GridAt sorts; the rows already ascend in pressure.
    ASSERT_NEAR(q.grid.pressure[i], t.rows[i].evaluation_pressure, 1e-6);
    EXPECT_LT(Rel(t.rows[i].alpha_lower, d.alpha_confidence.lower[i]), 1e-9) << t.rows[i].depth;
    EXPECT_LT(Rel(t.rows[i].k_dry_upper, d.k_confidence.upper[i]), 1e-9) << t.rows[i].depth;
  }
}

// ---------------------------------------------------------------- Biot fixed point

// Bisection on f(alpha) = alpha - 1 + K(total - alpha pore)/K_s over [0, 1].
double BisectAlpha(const FittedCurve& c, double total, double pore) {
  auto f = [&](double a) { return a - 1.0 + KOf(c, total - a * pore) / c.k_s; };
  double lo = 0, hi = 1;
  EXPECT_LT(f(lo), 0);
  EXPECT_GT(f(hi), 0);
  for (int i = 0; i < 200 && hi - lo > 1e-15; ++i) {
    const double mid = 0.5 * (lo + hi);
    (f(mid) < 0 ? lo : hi) = mid;
  }
  return 0.5 * (lo + hi);
}

TEST(BiotFixedPoint, AgreesWithADirectRootSolveForSeveralModelsAndStresses) {
  struct Case {
    std::string model;
    std::vector<double> truth;
  };
  // Invented truths, in the models' working units (GPa, MPa, 1/GPa).
  const std::vector<Case> cases = {{"exp-modulus", {20.0, 8.0, 10.0}},
                                   {"exp-compliance", {0.05, 0.2, 10.0}},
                                   {"linear-exp", {15.0, 0.05, 7.0, 0.1}},
                                   {"power-offset", {8.0, 0.3, 5.0}}};
  std::mt19937_64 rng(424242);
  for (const Case& k : cases) {
    const Sample s = Simulate(k.model, k.truth, 12, 0.01, rng, 2.0, 60.0);
    ASSERT_EQ(s.fit.status, FitStatus::kConverged) << k.model;
    const FittedCurve c = CurveOf(s, 37e9, 0);
    // (total, pore): vertical (c = 1) and mean-stress (c < 1) combinations.
    for (const auto& [total, pore] : std::vector<std::pair<double, double>>{
             {55.2e6, 30.3e6}, {40e6, 20e6}, {70e6, 35e6}, {0.7333 * 55.2e6, 0.7333 * 30.3e6}, {30e6, 5e6}}) {
      const FixedPointResult r = SolveBiotFixedPoint(c, total, pore, 1e-14, 500);
      ASSERT_TRUE(r.converged) << k.model << " " << total;
      EXPECT_NEAR(r.alpha, BisectAlpha(c, total, pore), 1e-10) << k.model << " " << total;
      EXPECT_NEAR(r.pressure, total - r.alpha * pore, 1e-6);
      EXPECT_GT(r.iterations, 0);
    }
  }
}

TEST(BiotFixedPoint, NonConvergenceOnASteepCurveIsFlaggedAndCountedNotHidden) {
  // Invented steep linear curve K = 5 GPa + 2 GPa/MPa P: the map's slope is
  // b P_p / K_s = 2000 P_p / 37 GPa, above 1 once P_p > 18.5 MPa, so the
  // iteration runs away from the fixed point there.
  std::mt19937_64 rng(99);
  const Sample s = Simulate("linear", {5.0, 2.0}, 10, 0.005, rng, 1.0, 10.0);
  ASSERT_EQ(s.fit.status, FitStatus::kConverged);
  DepthTableSpec t = Onshore(s, 0);
  t.top = 1000;  // P_p 12, 24, 36 MPa: slopes 0.65, 1.3, 1.9
  t.base = 3000;
  t.step = 1000;
  t.stress.law = EffectiveStressLaw::kBiot;
  const DepthTable table = BuildDepthTable(t);
  const double b = s.fit.parameters[1].estimate;  // Pa/Pa
  int flagged = 0;
  for (const DepthRow& r : table.rows) {
    const bool steep = b * r.pore_pressure / 37e9 > 1.0;
    EXPECT_EQ((r.flags & kFixedPointNotConverged) != 0, steep) << r.depth << " " << FlagsToString(r.flags);
    if (steep) {
      ++flagged;
      EXPECT_EQ(r.iterations, t.stress.max_iterations);
      // The last iterate is kept (not NaN, not clipped) and flagged outside [phi, 1].
      EXPECT_TRUE(std::isfinite(r.evaluation_pressure));
      EXPECT_NE(r.flags & kAlphaOutsideBounds, 0u);
    } else {
      EXPECT_LT(r.iterations, t.stress.max_iterations);
    }
  }
  EXPECT_GT(flagged, 0);
  EXPECT_LT(flagged, static_cast<int>(table.rows.size()));
  EXPECT_EQ(table.fixed_point_failures, flagged);
  const FixedPointResult direct = SolveBiotFixedPoint(t.curves[0], 66e6, 36e6, 1e-10, 100);
  EXPECT_FALSE(direct.converged);
  EXPECT_EQ(direct.iterations, 100);
}

TEST(DepthTableBiot, RowsSatisfyTheFixedPointAndUseAlphaInEveryStress) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.stress.law = EffectiveStressLaw::kBiot;
  t.stress.measure = StressMeasure::kMeanEffective;
  t.stress.horizontal = HorizontalStressKind::kRatio;
  t.stress.ratio = 0.6;
  t.stress.ratio_max = 0.8;
  t.stress.tolerance = 1e-13;
  const DepthTable table = BuildDepthTable(t);
  const double c = (1 + 0.6 + 0.8) / 3;
  for (const DepthRow& r : table.rows) {
    if (r.depth < 500) continue;
    ASSERT_EQ(r.flags & kFixedPointNotConverged, 0u) << r.depth;
    EXPECT_NEAR(r.evaluation_pressure, c * (r.vertical_stress - r.alpha * r.pore_pressure), 1e-3) << r.depth;
    EXPECT_NEAR(r.alpha, 1 - KOf(t.curves[0], r.evaluation_pressure) / 37e9, 1e-12) << r.depth;
    EXPECT_NEAR(r.biot_vertical_effective, r.vertical_stress - r.alpha * r.pore_pressure, 1e-6);
    EXPECT_NEAR(r.horizontal_stress, 0.6 * (r.vertical_stress - r.alpha * r.pore_pressure) + r.alpha * r.pore_pressure,
                1e-6);
    EXPECT_NEAR(r.horizontal_stress_max,
                0.8 * (r.vertical_stress - r.alpha * r.pore_pressure) + r.alpha * r.pore_pressure, 1e-6);
    EXPECT_GT(r.iterations, 0);
    // n = alpha < 1 leaves more effective stress than Terzaghi: a higher K and a lower alpha.
    EXPECT_GT(r.evaluation_pressure, c * (r.vertical_stress - r.pore_pressure));
  }
  EXPECT_EQ(table.fixed_point_failures, 0);
}

// ---------------------------------------------------------------- flags and mapping

TEST(DepthTableFlags, ExtrapolationUnmappedAndInWaterAreFlagged) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.intervals = {{200, 7800, 0}};
  const DepthTable table = BuildDepthTable(t);
  for (const DepthRow& r : table.rows) {
    const double p = r.evaluation_pressure;
    if (r.depth < 200 || r.depth >= 7800) {
      EXPECT_EQ(r.flags & kUnmapped, kUnmapped) << r.depth;
      EXPECT_EQ(r.curve, -1);
      EXPECT_TRUE(std::isnan(r.k_dry) && std::isnan(r.alpha) && std::isnan(r.alpha_lower));
      continue;
    }
    EXPECT_EQ(r.curve, 0);
    EXPECT_EQ((r.flags & kBelowLabRange) != 0, p < 5e6) << r.depth;
    EXPECT_EQ((r.flags & kAboveLabRange) != 0, p > 75e6) << r.depth;
    EXPECT_TRUE(std::isfinite(r.alpha_lower));
  }
  EXPECT_NE(RowAt(table, 300).flags & kBelowLabRange, 0u);
  EXPECT_NE(RowAt(table, 7700).flags & kAboveLabRange, 0u);
  EXPECT_EQ(FlagsToString(RowAt(table, 100).flags), "unmapped");

  // Offshore: rows above the mudline are in water, not unmapped.
  DepthTableSpec w = Onshore(s);
  w.datum.kind = DatumKind::kMeanSeaLevel;
  w.datum.water_depth = 300;
  w.datum.water_density = 1025;
  const DepthTable wt = BuildDepthTable(w);
  EXPECT_EQ(RowAt(wt, 200).flags, kInWater);
  EXPECT_TRUE(std::isnan(RowAt(wt, 200).alpha));
  EXPECT_NEAR(RowAt(wt, 200).vertical_stress, 1025 * kG * 200, 1e-6);
  EXPECT_NEAR(RowAt(wt, 1300).vertical_stress, 1025 * kG * 300 + 22000 * 1000, 1e-6);
}

TEST(DepthTableFlags, AlphaOutsideThePorosityBoundIsFlaggedNeverClipped) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.curves[0].porosity = 0.5;
  const DepthTable table = BuildDepthTable(t);
  int flagged = 0;
  for (const DepthRow& r : table.rows) {
    EXPECT_EQ((r.flags & kAlphaOutsideBounds) != 0, r.alpha < 0.5) << r.depth;
    flagged += r.alpha < 0.5;
  }
  EXPECT_GT(flagged, 0);  // and those rows keep their alpha below 0.5
}

TEST(DepthTableFlags, NegativeEffectiveStressIsFlaggedAndStillEvaluated) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.base = 2000;
  t.pore_pressure.kind = PorePressureKind::kTable;
  t.pore_pressure.depth = {0, 1000, 2000};
  t.pore_pressure.pressure = {0, 23e6, 40e6};  // invented: above S_v at 1000 m
  const DepthTable built = BuildDepthTable(t);  // keep the rows alive
  const DepthRow& r = RowAt(built, 1000);
  EXPECT_NEAR(r.evaluation_pressure, -1e6, 1e-3);
  EXPECT_EQ(r.flags, kNegativeEffectiveStress | kBelowLabRange) << FlagsToString(r.flags);
  EXPECT_TRUE(std::isfinite(r.k_dry));  // exp-modulus is defined at P < 0

  // A power law with reference pressure is undefined at P <= 0: not evaluated there.
  std::mt19937_64 rng(5150);
  const Sample pw = Simulate("power-ref", {10.0, 0.2, 20.0}, 12, 0.01, rng, 2.0, 60.0);
  ASSERT_EQ(pw.fit.status, FitStatus::kConverged);
  t.curves[0] = CurveOf(pw, 37e9, 1e9);
  const DepthTable table = BuildDepthTable(t);
  const DepthRow& u = RowAt(table, 1000);
  EXPECT_EQ(u.flags, kNegativeEffectiveStress | kBelowLabRange | kModelUndefined) << FlagsToString(u.flags);
  EXPECT_TRUE(std::isnan(u.k_dry) && std::isnan(u.alpha) && std::isnan(u.alpha_upper));
  EXPECT_TRUE(std::isfinite(RowAt(table, 2000).alpha));  // 4 MPa: defined
}

TEST(DepthTableFlags, DensityLogGapAndFillAreFlaggedBelowThemAndIntegrated) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.base = 3000;
  t.overburden.kind = OverburdenKind::kDensityProfile;
  DensityProfile& p = t.overburden.profile;
  p.depth = {0, 500, 1000, 1500, 2000, 3000};
  p.density = {2000, 2100, 2200, 2300, 2400, 2500};
  p.source = {DensitySource::kFilled, DensitySource::kFilled, DensitySource::kMeasured, DensitySource::kBridged,
              DensitySource::kMeasured, DensitySource::kMeasured};
  p.notes = {"invented profile"};
  const DepthTable table = BuildDepthTable(t);
  // Trapezoids by hand (exact for the piecewise-linear profile).
  const double to1000 = kG * (0.5 * (2000 + 2100) * 500 + 0.5 * (2100 + 2200) * 500);
  EXPECT_NEAR(RowAt(table, 1000).vertical_stress, to1000, 1e-6);
  EXPECT_NEAR(RowAt(table, 1300).vertical_stress, to1000 + kG * 0.5 * (2200 + 2260) * 300, 1e-6);
  EXPECT_EQ(RowAt(table, 100).flags & (kLogFill | kLogGap), kLogFill);
  EXPECT_EQ(RowAt(table, 1000).flags & (kLogFill | kLogGap), kLogFill);
  EXPECT_EQ(RowAt(table, 1100).flags & (kLogFill | kLogGap), kLogFill | kLogGap);  // its segment ends on the bridged sample
  EXPECT_EQ(RowAt(table, 2500).flags & (kLogFill | kLogGap), kLogFill | kLogGap);
  bool noted = false;
  for (const std::string& a : table.assumptions) noted = noted || a == "density profile: invented profile";
  EXPECT_TRUE(noted);

  t.base = 3100;
  EXPECT_EQ(MessageOf(t), "depth table 'W': overburden density profile ends at 3000 m, above the table base 3100 m "
                          "(never extrapolated)");
}

TEST(DepthTableMapping, FaciesRowsTakeTheCodeOfTheSampleAtOrAboveThem) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.curves.push_back(CurveOf(s, 45e9, 1e9, "S2"));
  t.intervals.clear();
  t.facies = FaciesCurve{{1000, 1500, 2500, 2600}, {1, 2, 1, 3}, "invented facies"};
  t.facies_rules = {{1, 0}, {2, 1}};
  const DepthTable table = BuildDepthTable(t);
  EXPECT_EQ(RowAt(table, 900).curve, -1);   // above the first sample
  EXPECT_EQ(RowAt(table, 1000).curve, 0);
  EXPECT_EQ(RowAt(table, 1400).curve, 0);
  EXPECT_EQ(RowAt(table, 1500).curve, 1);
  EXPECT_EQ(RowAt(table, 2400).curve, 1);
  EXPECT_EQ(RowAt(table, 2500).curve, 0);
  EXPECT_EQ(RowAt(table, 2600).curve, -1);  // code 3 has no rule
  EXPECT_EQ(RowAt(table, 2700).curve, -1);  // one sampling interval (100 m) below the last sample: code 3
  EXPECT_EQ(RowAt(table, 2800).curve, -1);  // beyond the curve
  EXPECT_NE(RowAt(table, 2800).flags & kUnmapped, 0u);
  // Curve 1 has a larger K_s: a higher alpha at the same pressure.
  EXPECT_NEAR(RowAt(table, 1500).alpha, 1 - KOf(t.curves[1], 15e6) / 45e9, 1e-12);
}

// ---------------------------------------------------------------- depletion

TEST(DepthTableDepletion, DrawdownRaisesTheEvaluationPressureAndLowersAlpha) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.depletion = {{"minus 10 MPa", 10e6}, {"minus 20 MPa", 20e6}};
  const DepthTable table = BuildDepthTable(t);
  const DepthRow& r = RowAt(table, 3000);
  ASSERT_EQ(r.depletion.size(), 2u);
  // By hand: P_p 36 MPa -> 26 MPa, sigma'_v 30 -> 40 MPa, alpha = 1 - K(40 MPa)/K_s.
  const DepletionValues& d = r.depletion[0];
  EXPECT_NEAR(d.pore_pressure, 26e6, 1e-6);
  EXPECT_NEAR(d.evaluation_pressure, 40e6, 1e-6);
  EXPECT_NEAR(d.vertical_effective, 40e6, 1e-6);
  EXPECT_NEAR(d.k_dry, KOf(t.curves[0], 40e6), 1e-3);
  EXPECT_NEAR(d.alpha, 1 - KOf(t.curves[0], 40e6) / 37e9, 1e-12);
  EXPECT_LT(d.alpha, r.alpha);
  EXPECT_LT(r.depletion[1].alpha, d.alpha);
  EXPECT_EQ(d.flags, 0u);
  // At 7000 m the depleted pressure leaves the lab range: the scenario is flagged, the row is not.
  const DepthRow& deep = RowAt(table, 7000);
  EXPECT_EQ(deep.flags, 0u);
  EXPECT_EQ(deep.depletion[1].flags, kAboveLabRange);
  bool stated = false, correlated = false;
  for (const std::string& a : table.assumptions) {
    stated = stated || a.find("'minus 20 MPa'") != std::string::npos;
    correlated = correlated || a.find("fully correlated across depths") != std::string::npos;
  }
  EXPECT_TRUE(stated);
  EXPECT_TRUE(correlated);  // sigma_K_s = 1 GPa here
}

TEST(DepthTableDepletion, BiotScenariosSolveTheFixedPointAgain) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.stress.law = EffectiveStressLaw::kBiot;
  t.stress.tolerance = 1e-13;
  t.depletion = {{"d", 15e6}};
  const DepthTable table = BuildDepthTable(t);
  const DepthRow& r = RowAt(table, 4000);
  const DepletionValues& d = r.depletion[0];
  EXPECT_NEAR(d.pore_pressure, r.pore_pressure - 15e6, 1e-6);
  EXPECT_NEAR(d.alpha, 1 - KOf(t.curves[0], r.vertical_stress - d.alpha * d.pore_pressure) / 37e9, 1e-11);
  EXPECT_NEAR(d.vertical_effective, r.vertical_stress - d.alpha * d.pore_pressure, 1e-6);
  EXPECT_NEAR(d.evaluation_pressure, d.vertical_effective, 1e-3);
  EXPECT_LT(d.alpha, r.alpha);
  EXPECT_EQ(table.depletion_fixed_point_failures, 0);
}

TEST(DepthTableDepletion, ADropLargerThanThePorePressureIsFlagged) {
  // P_p = 12 kPa/m x z: a 20 MPa drop leaves 1000 m at -8 MPa and 2000 m at +4 MPa.
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  t.depletion = {{"minus 20 MPa", 20e6}};
  const DepthTable table = BuildDepthTable(t);
  const DepthRow& shallow = RowAt(table, 1000);
  EXPECT_NEAR(shallow.depletion[0].pore_pressure, -8e6, 1e-6);  // reported, not clipped
  EXPECT_NE(shallow.depletion[0].flags & kNegativePorePressure, 0u);
  EXPECT_EQ(shallow.flags & kNegativePorePressure, 0u);  // the undepleted row is not flagged
  const DepthRow& deeper = RowAt(table, 2000);
  EXPECT_EQ(deeper.depletion[0].flags & kNegativePorePressure, 0u);
  EXPECT_EQ(FlagsToString(kNegativePorePressure), "negative-pore-pressure");
}

// ---------------------------------------------------------------- validation

TEST(DepthTableValidation, CurvesAndMappingsAreChecked) {
  const Sample& s = ExpSample();
  DepthTableSpec t = Onshore(s);
  FitResult no_cov = s.fit;
  no_cov.covariance_ok = false;
  t.curves[0].fit = &no_cov;
  EXPECT_EQ(MessageOf(t),
            "depth table 'W': curves[0] ('S1' exp-modulus): fit has no usable covariance (the bands need it)");
  FitResult failed = s.fit;
  failed.status = FitStatus::kMaxIterations;
  t.curves[0].fit = &failed;
  EXPECT_NE(MessageOf(t).find("not converged"), std::string::npos);
  t = Onshore(s);
  t.curves[0].k_s = 0;
  EXPECT_EQ(MessageOf(t), "depth table 'W': curves[0] ('S1' exp-modulus).k_s = 0 Pa must be > 0");
  t = Onshore(s);
  t.curves[0].porosity = 1.3;
  EXPECT_EQ(MessageOf(t), "depth table 'W': curves[0] ('S1' exp-modulus).porosity = 1.3 is outside [0, 1)");
  t = Onshore(s);
  t.intervals = {{0, 2000, 0}, {1500, 3000, 0}};
  EXPECT_EQ(MessageOf(t), "depth table 'W': intervals[0] [0, 2000) m and intervals[1] [1500, 3000) m overlap");
  t.intervals = {{2000, 2000, 0}};
  EXPECT_EQ(MessageOf(t), "depth table 'W': intervals[0].top = 2000 m must be above base = 2000 m");
  t = Onshore(s);
  t.facies = FaciesCurve{{1000}, {1}, ""};
  EXPECT_EQ(MessageOf(t), "depth table 'W': both intervals and a facies curve are given: use one mapping");
  t.intervals.clear();
  t.facies_rules = {{1, 0}, {1, 0}};
  EXPECT_NE(MessageOf(t).find("facies_rules[1].code = 1 has a rule already"), std::string::npos);
  t.facies.reset();
  t.facies_rules = {{1, 0}};
  EXPECT_EQ(MessageOf(t), "depth table 'W': facies_rules are given without a facies curve");
  t = Onshore(s);
  t.stress.law = EffectiveStressLaw::kBiot;
  t.stress.max_iterations = 0;
  EXPECT_EQ(MessageOf(t), "depth table 'W': stress.max_iterations = 0 must be >= 1");
}

}  // namespace
}  // namespace porofit::depth

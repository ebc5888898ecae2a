// Stress columns of depth tables: vertical stress, pore pressure, effective
// and horizontal stresses, validation. Tables without curves (stress only).
#include <gtest/gtest.h>

#include <cmath>
#include <string>

#include "porofit/core/error.h"
#include "porofit/depth/table.h"

namespace porofit::depth {
namespace {

constexpr double kG = 9.80665;  // standard gravity, m/s^2

// Check value 20 [computed; docs/check-values.md]: 1000 m of sea water (1.03 g/cc)
// over 2000 m of rock at 2.30 g/cc, MSL datum, hydrostatic P_p at 1.03 g/cc.
DepthTableSpec OffshoreColumn() {
  DepthTableSpec s;
  s.name = "A";
  s.datum.kind = DatumKind::kMeanSeaLevel;
  s.datum.water_depth = 1000;
  s.datum.water_density = 1030;
  s.top = 500;
  s.base = 3000;
  s.step = 10;
  s.overburden.kind = OverburdenKind::kGradient;
  s.overburden.gradient = 2300 * kG;
  s.overburden.source = "constant gradient";
  s.pore_pressure.kind = PorePressureKind::kHydrostatic;
  s.pore_pressure.gradient = 1030 * kG;
  return s;
}

const DepthRow& RowAt(const DepthTable& t, double z) {
  for (const DepthRow& r : t.rows)
    if (std::abs(r.depth - z) < 1e-6) return r;
  ADD_FAILURE() << "no row at " << z;
  return t.rows.front();
}

std::string MessageOf(const DepthTableSpec& s) {
  try {
    BuildDepthTable(s);
  } catch (const InputError& e) {
    return e.message();
  }
  return "no error";
}

TEST(DepthStress, OffshoreColumnMatchesCheckValue20) {
  DepthTableSpec s = OffshoreColumn();
  s.stress.measure = StressMeasure::kMeanEffective;
  s.stress.horizontal = HorizontalStressKind::kRatio;
  s.stress.ratio = 0.6;
  const DepthTable t = BuildDepthTable(s);
  const DepthRow& r = RowAt(t, 3000);
  // Check value 20 [computed; docs/check-values.md], to the printed digits.
  EXPECT_NEAR(r.vertical_stress / 1e6, 55.21, 0.005);
  EXPECT_NEAR(r.pore_pressure / 1e6, 30.30, 0.005);
  EXPECT_NEAR((r.vertical_stress - r.pore_pressure) / 1e6, 24.91, 0.005);
  EXPECT_NEAR(r.evaluation_pressure / 1e6, 18.27, 0.005);
  // Total S_h = 0.6 sigma'_v + P_p (Terzaghi).
  EXPECT_NEAR(r.horizontal_stress, 0.6 * (r.vertical_stress - r.pore_pressure) + r.pore_pressure, 1e-6);
  EXPECT_DOUBLE_EQ(r.horizontal_stress_max, r.horizontal_stress);
  EXPECT_EQ(r.flags, kUnmapped);  // no curves: stresses only
  EXPECT_EQ(t.fixed_point_failures, 0);
}

TEST(DepthStress, LayersReproduceTheGradientColumnAndIntegrateEachLayer) {
  DepthTableSpec s = OffshoreColumn();
  s.overburden.kind = OverburdenKind::kLayers;
  s.overburden.layers = {{1500, 2000}, {2200, 2200}, {3000, 2500}};
  const DepthTable t = BuildDepthTable(s);
  // Hand integral: water 1030 g 1000, then 500 m at 2000, 700 m at 2200, the rest at 2500.
  const double water = 1030 * kG * 1000;
  EXPECT_NEAR(RowAt(t, 1000).vertical_stress, water, 1e-6);
  EXPECT_NEAR(RowAt(t, 1500).vertical_stress, water + 2000 * kG * 500, 1e-6);
  EXPECT_NEAR(RowAt(t, 2000).vertical_stress, water + 2000 * kG * 500 + 2200 * kG * 500, 1e-6);
  EXPECT_NEAR(RowAt(t, 3000).vertical_stress, water + kG * (2000 * 500 + 2200 * 700 + 2500 * 800), 1e-6);

  // One layer at 2.30 g/cc equals the gradient column (check value 20 again).
  s.overburden.layers = {{3000, 2300}};
  EXPECT_NEAR(RowAt(BuildDepthTable(s), 3000).vertical_stress / 1e6, 55.21, 0.005);
}

TEST(DepthStress, LayersThatStopAboveTheTableBaseAreAnInputError) {
  DepthTableSpec s = OffshoreColumn();
  s.overburden.kind = OverburdenKind::kLayers;
  s.overburden.layers = {{1500, 2000}, {2800, 2300}};
  EXPECT_EQ(MessageOf(s),
            "depth table 'A': overburden.layers end at 2800 m, above the table base 3000 m (the last layer base must "
            "reach it)");
  s.overburden.layers = {{900, 2000}, {3000, 2300}};
  EXPECT_EQ(MessageOf(s), "depth table 'A': overburden.layers[0].base = 900 m must be deeper than the rock top 1000 m");
  s.overburden.layers = {{1500, 2000}, {1400, 2300}};
  EXPECT_NE(MessageOf(s).find("layers[1].base = 1400 m must be deeper than the previous base 1500 m"),
            std::string::npos);
}

TEST(DepthStress, OnePsiPerFootGradientGivesOnePsiPerFootOfDepth) {
  // Check value 8 [computed; docs/check-values.md]: 1 psi/ft = 22.6206 kPa/m,
  // 2.3067 g/cc; 1 psi = 6894.757 Pa (check value 7: 1 MPa = 145.0377 psi).
  DepthTableSpec s;
  s.name = "onshore";
  s.datum.kind = DatumKind::kGroundLevel;
  s.top = 0;
  s.base = 3048;  // 10,000 ft
  s.step = 304.8;
  s.overburden.gradient = 22620.6;
  s.pore_pressure.gradient = 9790;
  const DepthTable t = BuildDepthTable(s);
  ASSERT_EQ(t.rows.size(), 11u);
  for (const DepthRow& r : t.rows)
    EXPECT_NEAR(r.vertical_stress / 6894.757, r.depth / 0.3048, 1e-5 * r.depth / 0.3048 + 1e-9) << r.depth;
  EXPECT_NEAR(t.rows.back().vertical_stress / 6894.757, 10000, 0.5);
  // The equivalent density, 2.3067 g/cc, as one layer gives the same load to 5 digits.
  s.overburden.kind = OverburdenKind::kLayers;
  s.overburden.layers = {{3048, 2306.7}};
  EXPECT_NEAR(BuildDepthTable(s).rows.back().vertical_stress / 6894.757, 10000, 0.5);
}

TEST(DepthStress, RowsAboveTheRockTopAreInWaterWithoutEvaluationPressure) {
  DepthTableSpec s = OffshoreColumn();
  s.top = 0;
  s.base = 1100;
  s.step = 50;
  const DepthTable t = BuildDepthTable(s);
  for (const DepthRow& r : t.rows) {
    if (r.depth < 1000) {
      EXPECT_EQ(r.flags, kInWater) << r.depth;
      EXPECT_TRUE(std::isnan(r.evaluation_pressure));
      EXPECT_NEAR(r.vertical_stress, 1030 * kG * r.depth, 1e-6);
      EXPECT_EQ(r.curve, -1);
    } else {
      EXPECT_EQ(r.flags & kInWater, 0u) << r.depth;
    }
  }
  // At the mudline the rock load is zero and sea water equals the pore fluid: sigma'_v = 0.
  const DepthRow& mud = RowAt(t, 1000);
  EXPECT_NEAR(mud.evaluation_pressure, 0.0, 1e-6);
  EXPECT_NE(mud.flags & kNegativeEffectiveStress, 0u);
}

TEST(DepthStress, KellyBushingDatumShiftsTheSeaSurfaceAndTheHydrostaticZero) {
  DepthTableSpec s = OffshoreColumn();
  s.datum.kind = DatumKind::kKellyBushing;
  s.datum.air_gap = 25;
  s.top = 0;
  s.base = 3025;
  s.step = 25;
  const DepthTable t = BuildDepthTable(s);
  EXPECT_EQ(RowAt(t, 0).vertical_stress, 0.0);   // in air above the sea
  EXPECT_EQ(RowAt(t, 0).pore_pressure, 0.0);     // hydrostatic zero at the sea surface, 0 above it
  EXPECT_NEAR(RowAt(t, 3025).vertical_stress / 1e6, 55.21, 0.005);  // check value 20, shifted by the air gap
  EXPECT_NEAR(RowAt(t, 3025).pore_pressure / 1e6, 30.30, 0.005);
  // An explicit water table moves the zero.
  s.pore_pressure.zero_depth = 0;
  EXPECT_NEAR(RowAt(BuildDepthTable(s), 3025).pore_pressure, 1030 * kG * 3025, 1e-6);
}

TEST(DepthStress, PorePressureTableIsInterpolatedAndNeverExtrapolated) {
  DepthTableSpec s = OffshoreColumn();
  s.top = 1000;
  s.pore_pressure.kind = PorePressureKind::kTable;
  s.pore_pressure.depth = {1000, 2000, 3000};
  s.pore_pressure.pressure = {10e6, 25e6, 45e6};  // overpressured below 2000 m (invented)
  const DepthTable t = BuildDepthTable(s);
  EXPECT_NEAR(RowAt(t, 1500).pore_pressure, 17.5e6, 1e-6);
  EXPECT_NEAR(RowAt(t, 2750).pore_pressure, 40e6, 1e-6);
  EXPECT_NEAR(RowAt(t, 3000).pore_pressure, 45e6, 1e-6);

  s.base = 3100;
  EXPECT_EQ(MessageOf(s),
            "depth table 'A': pore pressure at 3010 m is outside the pore-pressure table range [1000, 3000] m (never "
            "extrapolated)");
  // Rows in water outside the table need no pore pressure (no K there).
  s.base = 3000;
  s.top = 900;
  const DepthTable w = BuildDepthTable(s);
  EXPECT_TRUE(std::isnan(RowAt(w, 900).pore_pressure));
  EXPECT_EQ(RowAt(w, 900).flags, kInWater);
}

TEST(DepthStress, UniaxialStrainMeanStressIsTheCompactionFactorTimesSigmaV) {
  DepthTableSpec s = OffshoreColumn();
  s.stress.measure = StressMeasure::kMeanEffective;
  s.stress.horizontal = HorizontalStressKind::kUniaxial;
  s.stress.poisson = 0.25;
  const DepthTable built = BuildDepthTable(s);  // keep the rows alive
  const DepthRow& r = RowAt(built, 3000);
  const double sv_eff = r.vertical_stress - r.pore_pressure;
  // Check value 22 [computed; docs/check-values.md]: (1 + nu)/(3 (1 - nu)) = 0.5556 at
  // nu 0.25; under uniaxial strain sigma'_m / sigma'_v is the same factor.
  EXPECT_NEAR(r.evaluation_pressure / sv_eff, 0.5556, 5e-5);
  EXPECT_NEAR(EvaluationFactor(s.stress), 0.5556, 5e-5);
  EXPECT_NEAR(r.horizontal_stress, sv_eff / 3 + r.pore_pressure, 1e-6);  // nu/(1 - nu) = 1/3
}

TEST(DepthStress, HorizontalStressSensitivityToAlphaMatchesCheckValue21) {
  // Check value 21 [computed; docs/check-values.md]: dS_h/d alpha = P_p (1 - 2 nu)/(1 - nu);
  // P_p 30 MPa, nu 0.25, Delta alpha 0.1 -> Delta S_h 2.0 MPa.
  const double r = UniaxialStrainRatio(0.25);
  const double sv = 60e6, pp = 30e6;
  const double dsh = TotalHorizontalStress(sv, pp, 0.8, r) - TotalHorizontalStress(sv, pp, 0.7, r);
  EXPECT_NEAR(dsh / 1e6, 2.0, 1e-9);
}

TEST(DepthStress, RatioMaxDefaultsToRatioAndIsStated) {
  DepthTableSpec s = OffshoreColumn();
  s.stress.horizontal = HorizontalStressKind::kRatio;
  s.stress.ratio = 0.6;
  const DepthTable t = BuildDepthTable(s);
  bool stated = false;
  for (const std::string& a : t.assumptions) stated = stated || a.find("taken equal to the sigma'_h ratio") != std::string::npos;
  EXPECT_TRUE(stated);
  s.stress.ratio_max = 0.9;
  const DepthTable built = BuildDepthTable(s);  // keep the rows alive
  const DepthRow& r = RowAt(built, 3000);
  EXPECT_NEAR(r.horizontal_stress_max, 0.9 * (r.vertical_stress - r.pore_pressure) + r.pore_pressure, 1e-6);
  // Vertical measure: the evaluation pressure is sigma'_v whatever the horizontal assumption.
  EXPECT_NEAR(r.evaluation_pressure, r.vertical_stress - r.pore_pressure, 1e-6);
}

TEST(DepthStress, AssumptionsStateDatumSourcesMeasureAndBands) {
  DepthTableSpec s = OffshoreColumn();
  s.pore_pressure.source = "hydrostatic sea water";
  const DepthTable t = BuildDepthTable(s);
  std::string all;
  for (const std::string& a : t.assumptions) all += a + "\n";
  for (const char* needle : {"MSL datum", "sea water of 1030 kg/m^3", "constant gradient of", "source: constant gradient",
                             "hydrostatic", "source: hydrostatic sea water", "Terzaghi, n = 1",
                             "vertical effective stress sigma'_v = S_v - 1 P_p", "delta method",
                             "treated as exact", "K_s is taken as exact", "80 %", "10 % and 90 %"})
    EXPECT_NE(all.find(needle), std::string::npos) << needle << "\n" << all;
}

TEST(DepthStressValidation, MessagesNameTheFieldValueAndRule) {
  DepthTableSpec s = OffshoreColumn();
  s.step = 0;
  EXPECT_EQ(MessageOf(s), "depth table 'A': step = 0 m must be > 0");
  s = OffshoreColumn();
  s.base = 100;
  EXPECT_EQ(MessageOf(s), "depth table 'A': base = 100 m must be >= top = 500 m");
  s = OffshoreColumn();
  s.datum.water_density = std::nan("");
  EXPECT_EQ(MessageOf(s), "depth table 'A': datum.water_density = nan kg/m^3 must be > 0 when water_depth > 0");
  s = OffshoreColumn();
  s.datum.kind = DatumKind::kGroundLevel;
  EXPECT_NE(MessageOf(s).find("a GL datum is onshore"), std::string::npos);
  s = OffshoreColumn();
  s.datum.air_gap = 20;
  EXPECT_NE(MessageOf(s).find("datum.air_gap = 20 m must be 0 for a MSL datum"), std::string::npos);
  s = OffshoreColumn();
  s.overburden.gradient = -1;
  EXPECT_EQ(MessageOf(s), "depth table 'A': overburden.gradient = -1 Pa/m must be > 0");
  s = OffshoreColumn();
  s.pore_pressure.gradient = 0;
  EXPECT_EQ(MessageOf(s), "depth table 'A': pore_pressure.gradient = 0 Pa/m must be > 0");
  s = OffshoreColumn();
  s.pore_pressure.kind = PorePressureKind::kTable;
  s.pore_pressure.depth = {1000, 900};
  s.pore_pressure.pressure = {1e6, 2e6};
  EXPECT_EQ(MessageOf(s),
            "depth table 'A': pore_pressure.depth[1] = 900 m must be greater than pore_pressure.depth[0] = 1000 m");
  s.pore_pressure.depth = {1000};
  EXPECT_EQ(MessageOf(s), "depth table 'A': pore_pressure has 1 depths and 2 pressures");
  s = OffshoreColumn();
  s.stress.measure = StressMeasure::kMeanEffective;
  EXPECT_NE(MessageOf(s).find("needs a horizontal-stress assumption"), std::string::npos);
  s.stress.horizontal = HorizontalStressKind::kUniaxial;
  s.stress.poisson = 0.5;
  EXPECT_EQ(MessageOf(s), "depth table 'A': stress.poisson = 0.5 must be in (0, 0.5)");
  s.stress.horizontal = HorizontalStressKind::kRatio;
  EXPECT_EQ(MessageOf(s), "depth table 'A': stress.ratio = nan must be > 0 (sigma'_h/sigma'_v)");
  s.stress.ratio = 0.7;
  s.stress.ratio_max = 0.6;
  EXPECT_NE(MessageOf(s).find("stress.ratio_max = 0.6 must be >= stress.ratio = 0.7"), std::string::npos);
  s = OffshoreColumn();
  s.stress.law = EffectiveStressLaw::kBiot;
  EXPECT_EQ(MessageOf(s), "depth table 'A': stress.law = biot needs a fitted curve (curves is empty)");
  s = OffshoreColumn();
  s.band_level = 1;
  EXPECT_EQ(MessageOf(s), "depth table 'A': band_level = 1 must be in (0, 1)");
  s = OffshoreColumn();
  s.depletion = {{"d1", 5e6}, {"d1", 6e6}};
  EXPECT_EQ(MessageOf(s), "depth table 'A': depletion[1] name 'd1' is used twice");
  s.depletion = {{"d1", 0}};
  EXPECT_EQ(MessageOf(s), "depth table 'A': depletion[0] ('d1').drop = 0 Pa must be > 0");
  s = OffshoreColumn();
  s.intervals = {{1000, 2000, 0}};
  EXPECT_EQ(MessageOf(s), "depth table 'A': intervals[0].curve = 0 is not a curve index (0 curves)");
}

}  // namespace
}  // namespace porofit::depth

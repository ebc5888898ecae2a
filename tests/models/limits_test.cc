// Limiting cases and nestings of the catalogue (computed from the model formulas).
#include <gtest/gtest.h>

#include <cmath>
#include <vector>

#include "porofit/models/registry.h"

namespace porofit {
namespace {

const ModelSpec& Model(const char* id) {
  const ModelSpec* m = ModelRegistry::Builtin().Find(id);
  if (m == nullptr) ADD_FAILURE() << "missing model " << id;
  return *m;
}

const std::vector<double> kPressures = {0.0, 0.7, 3, 10, 25, 60, 150};

TEST(ExpModulus, EqualsK0AtZeroPressureAndApproachesKInfAtHighPressure) {
  const ModelSpec& m1 = Model("exp-modulus");
  const double th[] = {20, 8, 10};
  EXPECT_DOUBLE_EQ(m1.value(th, 0.0), 8.0);
  EXPECT_NEAR(m1.value(th, 1e3), 20.0, 1e-12);
  // Monotone approach from below: the gap shrinks by e per P_close.
  EXPECT_NEAR((20 - m1.value(th, 20)) / (20 - m1.value(th, 10)), std::exp(-1.0), 1e-14);
}

TEST(LinearExp, WithZeroSlopeEqualsExpModulus) {
  // B = 0: A = K_inf, C = K_inf - K_0, D = 1/P_close [computed].
  const ModelSpec& m1 = Model("exp-modulus");
  const ModelSpec& m3 = Model("linear-exp");
  for (const std::vector<double>& t1 : {std::vector<double>{20, 8, 10}, {30, 10, 3}, {12, 6, 40}}) {
    const double t3[] = {t1[0], 0.0, t1[0] - t1[1], 1.0 / t1[2]};
    for (double p : kPressures) {
      EXPECT_NEAR(m3.value(t3, p), m1.value(t1.data(), p), 1e-13 * t1[0]) << p;
      EXPECT_NEAR(m3.slope(t3, p), m1.slope(t1.data(), p), 1e-13) << p;
    }
    EXPECT_DOUBLE_EQ(m3.ClosurePressure(t3), m1.ClosurePressure(t1.data()));
  }
}

TEST(PowerOffset, TendsToPowerRefAsOffsetPressureVanishes) {
  // Hold K_0 P_r^(-n) = K_ref P_ref^(-n) while P_r -> 0 [computed].
  const ModelSpec& m5 = Model("power-ref");
  const ModelSpec& m6 = Model("power-offset");
  const double t5[] = {12, 0.2, 20};
  double previous = INFINITY;
  for (double p_r : {1e-2, 1e-4, 1e-6, 1e-9}) {
    const double t6[] = {t5[0] * std::pow(p_r / t5[2], t5[1]), t5[1], p_r};
    double worst = 0;
    for (double p : {0.7, 3.0, 10.0, 60.0})
      worst = std::max(worst, std::abs(m6.value(t6, p) / m5.value(t5, p) - 1));
    EXPECT_LT(worst, previous) << "error must shrink with P_r";
    // (1 + P/P_r)^n vs (P/P_r)^n differ by about n P_r/P.
    EXPECT_LT(worst, 0.2 * p_r / 0.7 * 1.01);
    previous = worst;
  }
  EXPECT_LT(previous, 1e-9);
}

TEST(PowerRef, WithExponentOneThirdAndUnitReferenceEqualsGrainContact) {
  const ModelSpec& m5 = Model("power-ref");
  const ModelSpec& m7 = Model("grain-contact");
  const double t5[] = {2.5, 1.0 / 3.0, 1.0};
  const double t7[] = {2.5};
  for (double p : {0.7, 3.0, 10.0, 25.0, 60.0, 150.0}) {
    EXPECT_NEAR(m5.value(t5, p), m7.value(t7, p), 1e-14 * m7.value(t7, p)) << p;
    EXPECT_NEAR(m5.strain(t5, p), m7.strain(t7, p), 1e-13 * m7.strain(t7, p)) << p;
  }
}

TEST(GrainContact, DoublingPressureMultipliesModulusByCubeRootOfTwo) {
  // Check value 11 [computed; docs/check-values.md]: factor 1.2599.
  const ModelSpec& m7 = Model("grain-contact");
  const double t7[] = {1.616 / std::cbrt(10.0)};
  for (double p : {0.5, 10.0, 40.0}) {
    const double ratio = m7.value(t7, 2 * p) / m7.value(t7, p);
    EXPECT_NEAR(ratio, 1.2599, 5e-5);
    EXPECT_NEAR(ratio, std::cbrt(2.0), 1e-14);
  }
  EXPECT_DOUBLE_EQ(m7.value(t7, 0.0), 0.0);
  EXPECT_TRUE(std::isinf(m7.slope(t7, 0.0))) << "Hertz-Mindlin slope is infinite at P = 0";
}

TEST(ExpCompliance, GivesInverseOfC0AtZeroPressure) {
  const ModelSpec& m2 = Model("exp-compliance");
  const double th[] = {0.05, 0.2, 10};
  EXPECT_DOUBLE_EQ(m2.value(th, 0.0), 1.0 / 0.2);
  EXPECT_NEAR(m2.value(th, 1e3), 1.0 / 0.05, 1e-12);
}

TEST(Linear, StrainTendsToPOverK0AsSlopeVanishes) {
  const ModelSpec& m0 = Model("linear");
  for (double p : {1.0, 10.0, 60.0}) {
    const double exact_b0[] = {8.0, 0.0};
    EXPECT_DOUBLE_EQ(m0.strain(exact_b0, p), p / 8.0);
    for (double b : {1e-6, 1e-8, 1e-13, -1e-13, -1e-8, -1e-6}) {
      const double th[] = {8.0, b};
      // ln(1 + u)/b = (P/K_0)(1 - u/2 + u^2/3 - ...), u = b P/K_0.
      const double u = b * p / 8.0;
      EXPECT_NEAR(m0.strain(th, p), p / 8.0 * (1 - u / 2 + u * u / 3), 1e-14 * p) << b;
    }
    // Away from the limit the closed form ln((K_0 + bP)/K_0)/b holds.
    const double th[] = {8.0, 0.2};
    EXPECT_NEAR(m0.strain(th, p), std::log((8.0 + 0.2 * p) / 8.0) / 0.2, 1e-14 * p);
  }
}

TEST(Linear, IsTheLongClosureLimitOfExpModulus) {
  // Boundary nesting M0 in M1 [computed]: P_close -> inf with
  // (K_inf - K_0)/P_close = b fixed.
  const ModelSpec& m0 = Model("linear");
  const ModelSpec& m1 = Model("exp-modulus");
  const double t0[] = {8.0, 0.1};
  const double p_close = 1e9;  // curvature b P^2/(2 P_close) < 2e-7 here
  const double t1[] = {8.0 + 0.1 * p_close, 8.0, p_close};
  for (double p : {1.0, 10.0, 60.0}) EXPECT_NEAR(m1.value(t1, p), m0.value(t0, p), 1e-6) << p;
}

}  // namespace
}  // namespace porofit

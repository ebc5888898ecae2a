#pragma once
// Strain form of a modulus model: fit volumetric strain eps_v(P) instead of
// the tangent modulus K(P).
//
// Static drained tests record eps_v against P; differentiating noisy strain to
// get K amplifies the noise, so the integrated model
//     eps(P; theta) = integral_0^P dP' / K(P'; theta)     (compression positive)
// is fitted to the strain directly (common practice). The fitted theta are
// the K-model's own parameters: the tangent modulus is K(P; theta_hat) and the
// secant modulus P / eps(P; theta_hat).
//
// Units. The K-model works in MPa and GPa, so its strain is in MPa/GPa =
// 1e-3: the strain form's y is in "millistrain" (y_si_factor = 1e-3; the SI
// value is plain, dimensionless strain).
//
// Reference state. eps(0) = 0: strain is measured from the state at P = 0 (the
// lab's zero). No seating offset eps_0 is fitted; data whose zero is taken at
// another pressure must be re-zeroed before fitting (docs/study-file.md).
#include <limits>
#include <string>
#include <vector>

#include "porofit/models/model.h"

namespace porofit {

/// True if `k_model` has an exact strain with derivatives
/// (ModelSpec::strain_and_gradient): every built-in model does (linear-exp by
/// quadrature); user formula models do not.
bool HasStrainForm(const ModelSpec& k_model);

/// The strain-form fit model of `k_model`: same id, parameters, bounds,
/// transforms, fixed defaults and closure-pressure scale; x = P (MPa), y =
/// eps_v (millistrain); value = k_model.strain, value_and_gradient =
/// k_model.strain_and_gradient, slope = 1/K. Its start heuristic forms the
/// chord moduli Delta P / Delta eps between consecutive data points (sorted by
/// P, with the reference point P = 0, eps = 0 added when the data start above
/// 0), places them at the chord midpoints and hands them to k_model.start: a
/// start only, the fit does the rest. `strain` of the result is empty.
/// Requires HasStrainForm(k_model) (checked: aborts otherwise).
ModelSpec StrainForm(const ModelSpec& k_model);

/// Working-unit name of the strain form's y ("millistrain").
inline constexpr const char* kStrainWorkingUnit = "millistrain";

/// Fixed composite Gauss–Legendre rule for eps(P) = integral_0^P dP'/k(P'):
/// kPanels panels graded towards P = 0 (edges at P (j/kPanels)^3, because
/// crack closure makes 1/K vary fastest at low pressure), 8 nodes each (exact
/// for polynomials of degree 15 on every panel): 128 evaluations of k.
/// Measured on exp-modulus against its closed form (tests/models/strain_test.cc):
/// relative error below 1e-12 for P/P_close <= 50 and below 5e-9 up to
/// P/P_close = 1500 (K_0/K_inf >= 0.05). Works on ceres::Jet, so derivatives
/// through it are exact derivatives of the rule. `k(T)` returns the modulus; a
/// non-positive or non-finite modulus at any node gives NaN. P < 0 gives NaN,
/// P = 0 gives 0.
template <typename T, class K>
T GaussLegendreStrain(const K& k, const T& p) {
  // Nodes and weights on [-1, 1]: roots of the Legendre polynomial P_8 by
  // Newton's method and w = 2/((1 - x^2) P_8'(x)^2) [computed]; they match the
  // usual tables (Abramowitz & Stegun, 1964, Table 25.4 [from memory]).
  static constexpr double kNode[4] = {0.1834346424956498, 0.5255324099163290, 0.7966664774136268,
                                      0.9602898564975363};
  static constexpr double kWeight[4] = {0.3626837833783620, 0.3137066458778874, 0.2223810344533745,
                                        0.1012285362903762};
  constexpr int kPanels = 16;
  if (!(p >= 0.0)) return T(std::numeric_limits<double>::quiet_NaN());
  T sum = T(0.0);
  for (int panel = 0; panel < kPanels; ++panel) {
    const double t0 = double(panel) / kPanels, t1 = double(panel + 1) / kPanels;
    const double c0 = t0 * t0 * t0, c1 = t1 * t1 * t1;
    const T mid = p * (0.5 * (c0 + c1)), half = p * (0.5 * (c1 - c0));
    T panel_sum = T(0.0);
    for (int i = 0; i < 4; ++i) {
      for (double sign : {-1.0, 1.0}) {
        const T kv = k(mid + half * (sign * kNode[i]));
        if (!(kv > 0.0)) return T(std::numeric_limits<double>::quiet_NaN());
        panel_sum += kWeight[i] / kv;
      }
    }
    sum += half * panel_sum;
  }
  return sum;
}

}  // namespace porofit

// M3, linear plus exponential: K = A + B P - C exp(-D P).
#include <algorithm>
#include <cmath>
#include <limits>

#include "builtin.h"
#include "porofit/models/strain_form.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

struct LinearExp {
  static constexpr int kNumParameters = 4;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::exp;
    return th[0] + th[1] * p - th[2] * exp(-th[3] * p);
  }
  // No closed form for integral dP/(A + BP - C exp(-DP)) with B != 0: a fixed
  // composite Gauss–Legendre rule (16 graded panels x 8 nodes), differentiated exactly.
  template <typename T>
  static T Strain(const T* th, const T& p) {
    return GaussLegendreStrain<T>([th](const T& q) { return Eval(th, q); }, p);
  }
};

}  // namespace

ModelSpec MakeLinearExpModel() {
  ModelSpec s;
  s.id = "linear-exp";
  s.name = "Linear plus exponential (M3)";
  s.formula = "K = A + B P - C exp(-D P)";
  s.reference =
      "form of the velocity-pressure law V = A + K P - B exp(-D P) of Eberhart-Phillips, Han & "
      "Zoback (1989), Geophysics 54(1), 82-89 [checked], applied here to the modulus";
  s.notes =
      "A + B P is the stiff (cracks-closed) trend, C the crack softening at P = 0 and 1/D the "
      "closure pressure scale (reported through closure_pressure; D itself is an inverse scale, "
      "so closure_parameter is -1). A and B trade off strongly, and D is weakly determined "
      "without data below about 2/D. 0 <= C < A is expected; only C >= 0 is a box bound. With "
      "B = 0 this is exp-modulus with A = K_inf, C = K_inf - K_0, D = 1/P_close (regular "
      "nesting, F test valid). Shapiro's (2003) stiff/compliant-porosity form has the same "
      "shape and is a reparameterisation, not a separate model (theta_c = A D). Typical B 0-50 "
      "GPa/GPa = 0-0.05 GPa/MPa [from memory]. No closed-form strain: strain fits integrate 1/K "
      "by a fixed Gauss-Legendre rule, 16 graded panels (exact derivatives through the rule).";
  s.parameters = {
      {"A", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "intercept of the stiff (cracks-closed) linear trend"},
      {"B", "GPa/MPa", 1e3, 0.0, kInf, ParameterTransform::kIdentity, false,
       "slope of the stiff linear trend, dK/dP at high pressure"},
      {"C", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "crack softening: stiff trend minus K at P = 0"},
      {"D", "1/MPa", 1e-6, 0.0, kInf, ParameterTransform::kLog, false,
       "inverse closure pressure: the crack term decays as exp(-D P)"},
  };
  AttachFunctor<LinearExp>(s);
  AttachStrainAutodiff<LinearExp>(s, "gauss-legendre");
  s.closure_parameter = -1;
  s.closure_pressure = [](const double* th) { return 1.0 / th[3]; };
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, false, true);
    const DataScale sc = ScaleOf(p);
    const std::vector<double> fallback = {sc.y_typical, 1e-3 * sc.y_typical / sc.x_max,
                                          0.3 * sc.y_typical, 3.0 / sc.x_max};
    if (p.empty()) return FinishStart("linear-exp", params, fallback, fallback);
    const size_t n = p.size(), m = std::min<size_t>(3, n);
    // Stiff trend: a line through the highest-pressure points (up to three).
    const std::span<const double> tx(p.x.data() + (n - m), m), ty(p.y.data() + (n - m), m);
    const double mx = Mean(tx), my = Mean(ty);
    const LineFit top = FitLine(tx, ty);
    double b = top.ok ? top.slope : 0.0;
    // B > 0 strictly, and never so steep that the trend crosses zero before P = 0.
    const double b_min = 1e-4 * sc.y_typical / sc.x_max;
    const double b_max = mx > 0 ? 0.5 * my / mx : kInf;
    b = std::clamp(b, b_min, std::max(b_min, b_max));
    const double a = std::max(my - b * mx, 0.5 * my);
    // D from the decay of the gap between the stiff trend and the data,
    // weighted by gap^2 so that near-zero gaps do not dominate the log.
    std::vector<double> lx, ly, w;
    for (size_t i = 0; i < n; ++i) {
      const double gap = a + b * p.x[i] - p.y[i];
      if (!(gap > 0)) continue;
      lx.push_back(p.x[i]);
      ly.push_back(std::log(gap));
      w.push_back(gap * gap);
    }
    double d = 3.0 / sc.x_max;
    const LineFit decay = FitLine(lx, ly, w);
    if (decay.ok && decay.slope < 0) d = -decay.slope;
    d = std::clamp(d, 1e-3 / sc.x_max, 1e3 / sc.x_max);
    // C = A - K(P_min) (common practice), kept inside 0 < C < A.
    const double c = std::clamp(a - p.y[0], 0.01 * a, 0.99 * a);
    return FinishStart("linear-exp", params, {a, b, c, d}, fallback);
  };
  return s;
}

}  // namespace porofit::detail

// M0, linear baseline: K = K_0 + b P.
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

struct Linear {
  static constexpr int kNumParameters = 2;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    return th[0] + th[1] * p;
  }
  // eps = ln(1 + u)/b with u = b P/K_0, written as (P/K_0) * log1p(u)/u so it
  // stays accurate as b -> 0, where it tends to P/K_0. Near u = 0 the series
  // 1 - u/2 + u^2/3 - u^3/4 (error < u^4/5) keeps d eps/db exact at b = 0.
  template <typename T>
  static T Strain(const T* th, const T& p) {
    using std::abs;
    using std::log1p;
    const T u = th[1] * p / th[0];
    if (!(u > -1.0)) return T(std::numeric_limits<double>::quiet_NaN());
    const T ratio = abs(u) < 1e-4 ? T(1.0) - u * (0.5 - u * (1.0 / 3.0 - 0.25 * u)) : log1p(u) / u;
    return p / th[0] * ratio;
  }
};

}  // namespace

ModelSpec MakeLinearModel() {
  ModelSpec s;
  s.id = "linear";
  s.name = "Linear baseline (M0)";
  s.formula = "K = K_0 + b P";
  s.reference = "straight-line baseline, no specific publication (common practice)";
  s.notes =
      "Baseline against which the crack-closure models are ranked. It is the limit of exp-modulus "
      "as P_close -> infinity with (K_inf - K_0)/P_close held fixed; that is a boundary (limit) "
      "nesting, so the F test is not valid: compare with AICc. b is not bounded below, so a "
      "falling trend can be represented; strain eps = ln(1 + b P/K_0)/b (-> P/K_0 as b -> 0), defined while K_0 + b P > 0.";
  s.parameters = {
      {"K_0", "GPa", 1e9, 0.0, std::numeric_limits<double>::infinity(),
       ParameterTransform::kIdentity, false, "modulus extrapolated to zero pressure"},
      {"b", "GPa/MPa", 1e3, -std::numeric_limits<double>::infinity(),
       std::numeric_limits<double>::infinity(), ParameterTransform::kIdentity, false,
       "pressure derivative of the modulus, dK/dP"},
  };
  AttachFunctor<Linear>(s);
  AttachStrainAutodiff<Linear>(s);
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, false, false);
    const DataScale sc = ScaleOf(p);
    double k0 = sc.y_typical, b = 0;
    const LineFit line = FitLine(p.x, p.y);
    if (line.ok) {
      k0 = line.intercept;
      b = line.slope;
    } else if (p.size() == 1) {
      k0 = p.y[0];
    }
    if (!(k0 > 0)) {
      // A line that crosses zero before P = 0 is not a modulus: pin K_0 below
      // the data and take the slope through the centroid instead.
      double ymin = sc.y_typical;
      for (double v : p.y)
        if (v > 0) ymin = std::min(ymin, v);
      k0 = 0.5 * ymin;
      const double mx = Mean(p.x), my = Mean(p.y);
      b = (mx > 0) ? (my - k0) / mx : 0.0;
    }
    return FinishStart("linear", params, {k0, b}, {sc.y_typical, 0.0});
  };
  return s;
}

}  // namespace porofit::detail

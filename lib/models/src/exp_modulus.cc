// M1, exponential modulus: K = K_inf - (K_inf - K_0) exp(-P/P_close).
#include <algorithm>
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

struct ExpModulus {
  static constexpr int kNumParameters = 3;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::exp;
    return th[0] - (th[0] - th[1]) * exp(-p / th[2]);
  }
  // eps(P) = P/K_inf + (P_close/K_inf) ln[K(P)/K_0]  [computed].
  template <typename T>
  static T Strain(const T* th, const T& p) {
    using std::log;
    return p / th[0] + th[2] / th[0] * log(Eval(th, p) / th[1]);
  }
};

}  // namespace

ModelSpec MakeExpModulusModel() {
  ModelSpec s;
  s.id = "exp-modulus";
  s.name = "Exponential modulus (M1)";
  s.formula = "K = K_inf - (K_inf - K_0) exp(-P/P_close)";
  s.reference =
      "common empirical form, first author not traced [uncertain]; it is the B = 0 case of the "
      "linear-plus-exponential form of Eberhart-Phillips, Han & Zoback (1989), Geophysics 54(1), "
      "82-89 [checked]";
  s.notes =
      "K_0: all cracks open; K_inf: all cracks closed; P_close: closure pressure scale (fitted as "
      "ln P_close). If P_close >> P_max the data are nearly linear, only (K_inf - K_0)/P_close is "
      "identifiable and K_inf, P_close are almost perfectly correlated; if P_close << P_min, K_0 "
      "is unidentifiable. Flag fits with P_close outside [P_min/3, 3 P_max] or any |correlation| "
      "> 0.99 (heuristic). The physical order 0 < K_0 <= K_inf < K_s is not a box bound and is "
      "not enforced here. Nesting: this is linear-exp with B = 0 (regular nesting, F test "
      "valid); linear is its P_close -> infinity limit (boundary nesting, use AICc); not nested "
      "with exp-compliance. Typical dry sandstone [from memory]: K_inf 5-30 GPa, K_0/K_inf "
      "0.2-0.8, P_close 3-30 MPa. Strain: eps = P/K_inf + (P_close/K_inf) ln[K(P)/K_0] "
      "[computed].";
  s.parameters = {
      {"K_inf", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "modulus with all cracks closed (high-pressure asymptote)"},
      {"K_0", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "modulus with all cracks open (value at P = 0)"},
      {"P_close", "MPa", 1e6, 0.0, kInf, ParameterTransform::kLog, false,
       "closure pressure scale: the crack term decays as exp(-P/P_close)"},
  };
  AttachFunctor<ExpModulus>(s);
  AttachStrainAutodiff<ExpModulus>(s);
  s.closure_parameter = 2;
  s.closure_pressure = [](const double* th) { return th[2]; };
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, false, true);
    const DataScale sc = ScaleOf(p);
    std::vector<double> th = SaturatingRiseStart(p, sc.y_typical, sc.x_max / 3);
    // A modulus must stay positive: K_0 no lower than a tenth of K_inf.
    th[1] = std::max(th[1], 0.1 * th[0]);
    return FinishStart("exp-modulus", params, th,
                       {1.25 * sc.y_typical, 0.75 * sc.y_typical, sc.x_max / 3});
  };
  return s;
}

}  // namespace porofit::detail

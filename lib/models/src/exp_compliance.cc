// M2, exponential compressibility: C = C_inf + (C_0 - C_inf) exp(-P/P_close), K = 1/C.
#include <algorithm>
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();

struct ExpCompliance {
  static constexpr int kNumParameters = 3;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::exp;
    return T(1.0) / (th[0] + (th[1] - th[0]) * exp(-p / th[2]));
  }
  // eps = C_inf P + (C_0 - C_inf) P_close (1 - exp(-P/P_close))  [computed].
  template <typename T>
  static T Strain(const T* th, const T& p) {
    using std::expm1;
    return th[0] * p - (th[1] - th[0]) * th[2] * expm1(-p / th[2]);
  }
};

}  // namespace

ModelSpec MakeExpComplianceModel() {
  ModelSpec s;
  s.id = "exp-compliance";
  s.name = "Exponential compressibility (M2)";
  s.formula = "C = C_inf + (C_0 - C_inf) exp(-P/P_close),  K = 1/C";
  s.reference =
      "Zimmerman, Somerton & King (1986), J. Geophys. Res. 91(B12), 12765-12777 [checked]; "
      "Zimmerman (1991), Compressibility of Sandstones, Elsevier";
  s.notes =
      "An exponential spectrum of crack aspect ratios closes exponentially in compressibility "
      "(Zimmerman, 1991). C_0: compressibility with cracks open; C_inf: with cracks closed "
      "(C_0 > C_inf is expected but not enforced by box bounds); P_close: closure pressure scale "
      "(fitted as ln P_close). The same identifiability limits as exp-modulus apply: P_close "
      ">> P_max leaves only (C_0 - C_inf)/P_close identifiable, P_close << P_min leaves C_0 "
      "unidentifiable. Not nested with exp-modulus: compare the two with AICc. The start works "
      "on C = 1/K: C_inf just below the smallest C, C_0 from the first two points extrapolated "
      "to P = 0, P_close from the decay of ln(C - C_inf). Strain: eps = C_inf P + (C_0 - C_inf) "
      "P_close (1 - exp(-P/P_close)).";
  s.parameters = {
      {"C_inf", "1/GPa", 1e-9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "compressibility with all cracks closed (high-pressure asymptote)"},
      {"C_0", "1/GPa", 1e-9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "compressibility with all cracks open (value at P = 0)"},
      {"P_close", "MPa", 1e6, 0.0, kInf, ParameterTransform::kLog, false,
       "closure pressure scale: the crack compliance decays as exp(-P/P_close)"},
  };
  AttachFunctor<ExpCompliance>(s);
  AttachStrainAutodiff<ExpCompliance>(s);
  s.closure_parameter = 2;
  s.closure_pressure = [](const double* th) { return th[2]; };
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    Points p = PreparePoints(x, y, false, true);
    const DataScale sc = ScaleOf(p);
    // Compliance falls towards C_inf, so -C is a saturating rise.
    for (double& v : p.y) v = -1.0 / v;
    const std::vector<double> r = SaturatingRiseStart(p, -1.0 / sc.y_typical, sc.x_max / 3);
    double c_inf = -r[0], c_0 = -r[1];
    c_inf = std::max(c_inf, 1e-6 / sc.y_max);
    c_0 = std::max(c_0, 1.1 * c_inf);
    return FinishStart("exp-compliance", params, {c_inf, c_0, r[2]},
                       {0.8 / sc.y_typical, 1.25 / sc.y_typical, sc.x_max / 3});
  };
  return s;
}

}  // namespace porofit::detail

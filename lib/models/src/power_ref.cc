// M5, power law about a reference pressure: K = K_ref (P/P_ref)^n.
#include <algorithm>
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct PowerRef {
  static constexpr int kNumParameters = 3;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::pow;
    if (!(p > 0.0)) return T(kNaN);  // ln P enters dK/dn: undefined at P <= 0
    return th[0] * pow(p / th[2], th[1]);
  }
  // eps = integral_0^P dP'/K = P / ((1 - n) K(P)) = (P_ref/K_ref) (P/P_ref)^(1-n) / (1 - n):
  // the integral converges at 0 because n < 1, and eps -> 0 as P -> 0 (its
  // parameter derivatives too, so P = 0 gives exactly 0 with zero gradient).
  template <typename T>
  static T Strain(const T* th, const T& p) {
    if (p == 0.0) return th[0] * T(0.0);
    if (!(p > 0.0)) return T(kNaN);
    return p / ((T(1.0) - th[1]) * Eval(th, p));
  }
};

}  // namespace

ModelSpec MakePowerRefModel() {
  ModelSpec s;
  s.id = "power-ref";
  s.name = "Power law with reference pressure (M5)";
  s.formula = "K = K_ref (P/P_ref)^n";
  s.reference = "empirical power law (common practice)";
  s.notes =
      "Linear in log-log space. P_ref is held fixed by default at the geometric mean of the "
      "positive data pressures, which decorrelates K_ref and n; freeing it makes the model "
      "over-parameterised (K_ref and P_ref then trade off exactly). Undefined at P <= 0: such "
      "points must be excluded. With n = 1/3 and P_ref = 1 MPa this is grain-contact (regular "
      "nesting, F test valid); it is the P_r -> 0 limit of power-offset with K_0 P_r^(-n) held "
      "fixed (boundary nesting, use AICc). Typical n [from memory]: 0.05-0.35 consolidated rock, "
      "0.3-0.6 unconsolidated. Strain: eps = P / ((1 - n) K(P)).";
  s.parameters = {
      {"K_ref", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "modulus at the reference pressure"},
      {"n", "1", 1.0, 0.0, 1.0, ParameterTransform::kIdentity, false,
       "power-law exponent, d ln K / d ln P"},
      {"P_ref", "MPa", 1e6, 0.0, kInf, ParameterTransform::kLog, true,
       "reference pressure; start: geometric mean of the positive data pressures"},
  };
  AttachFunctor<PowerRef>(s);
  AttachStrainAutodiff<PowerRef>(s);
  s.requires_positive_x = true;
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, true, true);
    const DataScale sc = ScaleOf(p);
    // Geometric mean over every usable observation (repeats included): that
    // centring is what makes ln K_ref and n uncorrelated.
    double sum_log = 0;
    size_t count = 0;
    for (size_t i = 0; i < std::min(x.size(), y.size()); ++i) {
      if (std::isfinite(x[i]) && std::isfinite(y[i]) && x[i] > 0 && y[i] > 0) {
        sum_log += std::log(x[i]);
        ++count;
      }
    }
    const double p_ref = count > 0 ? std::exp(sum_log / static_cast<double>(count)) : sc.x_max;
    std::vector<double> lx, ly;
    for (size_t i = 0; i < p.size(); ++i) {
      lx.push_back(std::log(p.x[i] / p_ref));
      ly.push_back(std::log(p.y[i]));
    }
    const LineFit line = FitLine(lx, ly);
    const double n = std::clamp(line.ok ? line.slope : 0.2, 0.02, 0.95);
    double k_ref = sc.y_typical;
    if (!lx.empty()) {
      double acc = 0;
      for (size_t i = 0; i < lx.size(); ++i) acc += ly[i] - n * lx[i];
      k_ref = std::exp(acc / static_cast<double>(lx.size()));
    }
    return FinishStart("power-ref", params, {k_ref, n, p_ref}, {sc.y_typical, 0.2, sc.x_max});
  };
  return s;
}

}  // namespace porofit::detail

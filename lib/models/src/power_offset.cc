// M6, power law with a pressure offset: K = K_0 (1 + P/P_r)^n.
#include <algorithm>
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct PowerOffset {
  static constexpr int kNumParameters = 3;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::pow;
    const T base = T(1.0) + p / th[2];
    if (!(base > 0.0)) return T(kNaN);
    return th[0] * pow(base, th[1]);
  }
  // eps = P_r / (K_0 (1 - n)) [(1 + P/P_r)^(1-n) - 1], via expm1/log1p so that
  // small P/P_r keeps full precision.
  template <typename T>
  static T Strain(const T* th, const T& p) {
    using std::expm1;
    using std::log1p;
    const T u = p / th[2];
    if (!(u > -1.0)) return T(kNaN);
    const T m = T(1.0) - th[1];
    return th[2] / (th[0] * m) * expm1(m * log1p(u));
  }
};

}  // namespace

ModelSpec MakePowerOffsetModel() {
  ModelSpec s;
  s.id = "power-offset";
  s.name = "Power law with pressure offset (M6)";
  s.formula = "K = K_0 (1 + P/P_r)^n";
  s.reference = "empirical power law (common practice)";
  s.notes =
      "Unlike power-ref, K stays finite at P = 0 (K = K_0). P_r is the pressure scale above "
      "which the power law sets in (fitted as ln P_r); it is poorly determined when it lies "
      "below the lowest data pressure, where K_0 and P_r trade off along K_0 P_r^(-n). As "
      "P_r -> 0 with K_0 P_r^(-n) fixed it tends to power-ref: a boundary (limit) nesting, so "
      "the F test is invalid; compare with AICc. Typical n as for power-ref [from memory]. Strain: eps = P_r [(1 + P/P_r)^(1-n) - 1] / "
      "(K_0 (1 - n)).";
  s.parameters = {
      {"K_0", "GPa", 1e9, 0.0, kInf, ParameterTransform::kIdentity, false,
       "modulus at P = 0"},
      {"n", "1", 1.0, 0.0, 1.0, ParameterTransform::kIdentity, false,
       "power-law exponent at P >> P_r"},
      {"P_r", "MPa", 1e6, 0.0, kInf, ParameterTransform::kLog, false,
       "pressure scale of the transition from constant to power-law modulus"},
  };
  AttachFunctor<PowerOffset>(s);
  AttachStrainAutodiff<PowerOffset>(s);
  s.closure_parameter = 2;
  s.closure_pressure = [](const double* th) { return th[2]; };
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, false, true);
    const DataScale sc = ScaleOf(p);
    // P_r at the median data pressure (common practice), then K_0 and n by a
    // straight line of ln K against ln(1 + P/P_r).
    std::vector<double> xs;
    for (size_t i = 0; i < std::min(x.size(), y.size()); ++i)
      if (std::isfinite(x[i]) && std::isfinite(y[i]) && y[i] > 0) xs.push_back(x[i]);
    double p_r = Median(xs);
    if (!(p_r > 0)) p_r = 0.5 * sc.x_max;
    std::vector<double> lu, ly;
    for (size_t i = 0; i < p.size(); ++i) {
      const double u = p.x[i] / p_r;
      if (!(u > -1)) continue;
      lu.push_back(std::log1p(u));
      ly.push_back(std::log(p.y[i]));
    }
    const LineFit line = FitLine(lu, ly);
    const double n = std::clamp(line.ok ? line.slope : 0.2, 0.02, 0.95);
    double k_0 = sc.y_typical;
    if (!lu.empty()) {
      double acc = 0;
      for (size_t i = 0; i < lu.size(); ++i) acc += ly[i] - n * lu[i];
      k_0 = std::exp(acc / static_cast<double>(lu.size()));
    }
    return FinishStart("power-offset", params, {k_0, n, p_r},
                       {sc.y_typical, 0.2, 0.5 * sc.x_max});
  };
  return s;
}

}  // namespace porofit::detail

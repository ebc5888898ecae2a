// The t quantile of the alpha bands at every depth row.
#include <cmath>
#include <cstdio>
#include <numbers>

#include "porofit/bands/bands.h"
#include "table_internal.h"

namespace porofit::depth::detail {

// Every row has its own Welch–Satterthwaite dof, and an exact Boost quantile
// costs microseconds; lib/bands interpolates q(u) = t_q(nu_fit/u) on u in
// [0, 1] by Chebyshev polynomials on 24 nodes. The same nodes and the same
// arithmetic here make a row at a lab pressure match the band grid's quantile
// to the last bit (checked by tests/depth/table_test.cc).
TQuantile::TQuantile(double level, double nu_fit) : level_(level), nu_fit_(nu_fit) {
  if (!(nu_fit >= 2) || std::isinf(nu_fit)) return;
  constexpr int N = 24;
  double f[N];
  for (int k = 0; k < N; ++k) {
    const double x = std::cos(std::numbers::pi * (k + 0.5) / N);
    const double u = 0.5 * (x + 1.0);
    f[k] = bands::TwoSidedT(level, u > 0 ? nu_fit / u : kInf);
  }
  for (int j = 0; j < N; ++j) {
    double acc = 0;
    for (int k = 0; k < N; ++k) acc += f[k] * std::cos(std::numbers::pi * j * (k + 0.5) / N);
    coef_[j] = 2.0 * acc / N;
  }
  coef_[0] *= 0.5;
  exact_ = false;
}

double TQuantile::operator()(double nu) const {
  if (exact_ || !(nu >= nu_fit_)) return bands::TwoSidedT(level_, nu);
  const double u = std::isinf(nu) ? 0.0 : nu_fit_ / nu;
  const double x = 2.0 * u - 1.0;
  double b1 = 0, b2 = 0;
  for (int j = 23; j >= 1; --j) {
    const double b0 = 2.0 * x * b1 - b2 + coef_[j];
    b2 = b1;
    b1 = b0;
  }
  return x * b1 - b2 + coef_[0];
}

std::string Num(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.6g", v);
  return buf;
}

}  // namespace porofit::depth::detail

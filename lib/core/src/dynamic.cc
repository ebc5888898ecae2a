#include "porofit/core/dynamic.h"

#include <cmath>
#include <limits>

namespace porofit {

DynamicModuli ComputeDynamicModuli(const WaveData& w) {
  DynamicModuli m;
  if (!(w.vp > 0 && w.vs > 0 && w.rho > 0)) {
    const double nan = std::numeric_limits<double>::quiet_NaN();
    m.bulk = m.shear = m.poisson = m.sigma_bulk = m.sigma_shear = m.vp_vs = nan;
    return m;
  }
  const double vp2 = w.vp * w.vp, vs2 = w.vs * w.vs;
  m.shear = w.rho * vs2;
  m.bulk = w.rho * (vp2 - 4.0 / 3.0 * vs2);
  m.poisson = (vp2 - 2.0 * vs2) / (2.0 * (vp2 - vs2));
  m.vp_vs = w.vp / w.vs;
  const double dk_drho = m.bulk / w.rho;
  const double dk_dvp = 2.0 * w.rho * w.vp;
  const double dk_dvs = 8.0 / 3.0 * w.rho * w.vs;
  m.sigma_bulk = std::sqrt(std::pow(dk_drho * w.sigma_rho, 2) + std::pow(dk_dvp * w.sigma_vp, 2) +
                           std::pow(dk_dvs * w.sigma_vs, 2));
  m.sigma_shear = std::sqrt(std::pow(vs2 * w.sigma_rho, 2) + std::pow(2.0 * w.rho * w.vs * w.sigma_vs, 2));
  m.negative_bulk = m.vp_vs < kMinVpVsForPositiveBulk;
  m.negative_poisson = m.vp_vs <= kMinVpVsForPositivePoisson;
  return m;
}

}  // namespace porofit

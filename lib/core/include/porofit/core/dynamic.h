#pragma once
// Dynamic (ultrasonic) elastic moduli from wave speeds and density.
//
//   mu = rho Vs^2,  K = rho (Vp^2 - 4/3 Vs^2),  nu = (Vp^2 - 2Vs^2) / (2(Vp^2 - Vs^2))
//
// Uncertainty by first-order propagation with independent errors:
//   sigma_K^2  = (K/rho)^2 sigma_rho^2 + (2 rho Vp sigma_Vp)^2 + ((8/3) rho Vs sigma_Vs)^2
//   sigma_mu^2 = (Vs^2 sigma_rho)^2 + (2 rho Vs sigma_Vs)^2
// (computed: first-order propagation of independent errors). All inputs and outputs in SI: m/s, kg/m^3, Pa.
//
// Quality checks: K >= 0 needs Vp/Vs >= sqrt(4/3) = 1.1547; a positive
// Poisson ratio needs Vp/Vs > sqrt(2). Note that saturated ultrasonic moduli
// are unrelaxed and are not drained moduli: feed only dry (or humidity-
// controlled) data to crack-closure fits of K_dry.
#include <string>

namespace porofit {

struct WaveData {
  double vp = 0;         ///< m/s
  double vs = 0;         ///< m/s
  double rho = 0;        ///< kg/m^3
  double sigma_vp = 0;   ///< m/s, 1 standard deviation (0 = unknown/exact)
  double sigma_vs = 0;   ///< m/s
  double sigma_rho = 0;  ///< kg/m^3
};

struct DynamicModuli {
  double bulk = 0;           ///< K, Pa
  double shear = 0;          ///< mu, Pa
  double poisson = 0;        ///< nu, 1
  double sigma_bulk = 0;     ///< Pa
  double sigma_shear = 0;    ///< Pa
  double vp_vs = 0;          ///< Vp/Vs, 1
  bool negative_bulk = false;     ///< Vp/Vs < sqrt(4/3): K < 0, physically impossible
  bool negative_poisson = false;  ///< Vp/Vs <= sqrt(2): nu <= 0, unusual for rock
};

inline constexpr double kMinVpVsForPositiveBulk = 1.1547005383792515;  // sqrt(4/3)
inline constexpr double kMinVpVsForPositivePoisson = 1.4142135623730951;  // sqrt(2)

/// Computes K, mu, nu and their standard deviations. Requires vp, vs, rho > 0
/// (checked by the caller that reads the data; violated inputs give NaN).
DynamicModuli ComputeDynamicModuli(const WaveData& w);

}  // namespace porofit

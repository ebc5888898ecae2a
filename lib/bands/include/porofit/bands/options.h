#pragma once
// Options of the uncertainty layer. Every field has a default and a comment;
// Validate() names the first field that breaks its rule.
#include <cstdint>
#include <string>
#include <string_view>

namespace porofit::bands {

/// Which quantile multiplies the delta-method standard error of alpha (and of
/// the derived properties, which inherit the same two variance sources).
enum class DeltaQuantile {
  /// t with Welch–Satterthwaite effective degrees of freedom: the fit's part
  /// of the variance has n - p degrees of freedom when the covariance is scaled
  /// by s^2 (infinite otherwise), the K_s part is known (infinite), so
  /// nu_eff = nu_fit (1 + v_Ks/v_fit)^2. Default: chosen by the coverage study
  /// (docs/coverage.md).
  kWelchSatterthwaite,
  /// t(n - p) on the whole variance (the usual recipe; over-covers when K_s
  /// dominates, because its variance is known).
  kStudentT,
  /// z, the normal quantile (under-covers at lab sample sizes).
  kNormal,
};
std::string_view ToString(DeltaQuantile q);

/// Distribution of the Monte Carlo parameter draws.
enum class McDistribution {
  kNormal,    ///< theta ~ N(theta_hat, Cov)
  kStudentT,  ///< multivariate t with n - p degrees of freedom when the covariance is scaled (normal otherwise)
};
std::string_view ToString(McDistribution d);

enum class BootstrapKind {
  /// y* = f(theta_hat) + sigma_i e*_j: standardised residuals e_j = r_j /
  /// (sigma_j sqrt(1 - h_jj)), recentred, resampled with replacement and put
  /// back on each point's sigma (weights respected). Efron & Tibshirani, 1993,
  /// An Introduction to the Bootstrap, Chapman & Hall, ch. 9.
  kResidual,
  /// y* = f(theta_hat) + v_i r_i / sqrt(1 - h_ii), v_i = +-1 with probability
  /// 1/2 (Rademacher): each residual stays at its own point, so
  /// heteroscedastic noise is kept (Wu, 1986, Ann. Stat. 14 [from memory]).
  kWild,
};
std::string_view ToString(BootstrapKind k);

/// Upper bounds of the band counts (docs/study-file.md, "Limits"): 50 to 250
/// times the defaults, far more than percentile bands need, so that a typo
/// cannot ask for days of refits or gigabytes of draws.
inline constexpr int kMaxMonteCarloDraws = 1000000;
inline constexpr int kMaxBootstrapReplicates = 100000;
inline constexpr int kMaxBandThreads = 1024;

struct BandOptions {
  /// Two-sided confidence level of every band. In (0, 1).
  double confidence = 0.95;

  /// Methods to run. The delta method is cheap; Monte Carlo costs
  /// draws x grid model evaluations; the bootstrap refits the model
  /// `bootstrap_replicates` times.
  bool delta = true;
  bool monte_carlo = true;
  bool bootstrap = true;

  DeltaQuantile delta_quantile = DeltaQuantile::kWelchSatterthwaite;

  /// Monte Carlo draws of (theta, K_s). In [100, kMaxMonteCarloDraws].
  int monte_carlo_draws = 4000;
  McDistribution monte_carlo_distribution = McDistribution::kStudentT;

  /// Bootstrap replicates (refits). In [100, kMaxBootstrapReplicates].
  int bootstrap_replicates = 2000;
  BootstrapKind bootstrap_kind = BootstrapKind::kResidual;
  /// Convergence tolerances of the bootstrap refits (function, gradient and
  /// parameter tolerance of the solver). Looser than a fit's defaults: a
  /// refit warm-started at theta_hat then takes about 3 iterations instead of
  /// 11 (measured, docs/bands.md), while the estimates change far less than
  /// the percentile band's own Monte Carlo error. In (0, 1e-6].
  double refit_tolerance = 1e-12;

  /// Seed of every random stream. Replicate i of a method draws from its own
  /// stream derived from (seed, method, i), and results are stored by index,
  /// so the bands are identical for any thread count.
  std::uint64_t seed = 20261201;
  /// Worker threads for Monte Carlo and bootstrap. In [1, kMaxBandThreads].
  int threads = 1;

  /// Empty if valid, otherwise "bands.<field> = value violates rule" (or
  /// "... exceeds the limit of N").
  std::string Validate() const;
};

}  // namespace porofit::bands

#pragma once
// Uncertainty bands of K_dry(P) and the Biot coefficient alpha(P) = 1 - K_dry/K_s
// from one fit, by three methods (delta method, Monte Carlo and bootstrap as in Efron & Tibshirani 1993,
// An Introduction to the Bootstrap, Chapman & Hall [from memory]):
//
//   delta method  Var f(P) = g^T Cov g with the full covariance of the free
//                 parameters, augmented with K_s (independent of the fit):
//                   Var alpha = g^T Cov g / K_s^2 + (K/K_s^2)^2 Var K_s.
//                 Confidence, prediction and simultaneous (Working–Hotelling /
//                 Scheffé) bands.
//   Monte Carlo   theta ~ N(theta_hat, Cov) (or multivariate t) in the fit's
//                 coordinates (ln theta for log-fitted scales), K_s ~ N(K_s,
//                 sigma^2); percentile bands (may be asymmetric).
//   bootstrap     residual or wild bootstrap with refits through porofit::Fit,
//                 K_s drawn per replicate; percentile bands.
//
// Units: SI throughout (Pa for pressures and moduli; alpha and B are
// dimensionless). Numbers not computed are NaN.
//
// Correlation: K_s enters every alpha(P) with the same sign, so alpha errors
// are fully correlated across pressures through K_s (and across every sample
// that shares the same K_s). DeltaResult::grain_share gives the part of
// Var alpha owed to K_s at each P; a caller combining several pressures or
// samples must not treat their alpha errors as independent.
//
// Failure channels: invalid options or grid throw porofit::InputError; an
// unusable fit (not converged, no covariance) is a result with computed =
// false and a message, never an exception. Filtered Monte Carlo draws and
// failed bootstrap refits are counted, never dropped silently.
#include <cstddef>
#include <functional>
#include <limits>
#include <string>
#include <vector>

#include "porofit/bands/grid.h"
#include "porofit/bands/options.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/fitter.h"

namespace porofit::bands {

/// Everything the bands need. The pointers must outlive the call.
struct BandRequest {
  /// The request that produced `fit` (model, data, settings, fit options).
  /// Bootstrap refits reuse it with new y values, warm-started at theta_hat.
  const FitRequest* fit_request = nullptr;
  /// The fit, with covariance (delta method, Monte Carlo) and residual
  /// diagnostics (leverages for the bootstrap).
  const FitResult* fit = nullptr;
  /// The model whose value is the band's K, evaluated at the fit's parameters
  /// and covariance; nullptr: fit_request->model. A strain fit
  /// (porofit/models/strain_form.h) sets its K-model here: the fit, Monte
  /// Carlo draws and bootstrap refits stay in strain form, the bands are of K
  /// and alpha. It must have the same parameters as fit_request->model. The
  /// delta prediction bands need the noise of K and are then NaN (the data
  /// measure strain, not K).
  const ModelSpec* curve_model = nullptr;

  double k_s = std::numeric_limits<double>::quiet_NaN();  ///< grain bulk modulus, Pa, > 0
  double sigma_k_s = 0;                                    ///< its 1-sigma, Pa, >= 0
  /// Grain shear modulus, Pa, for the Hashin–Shtrikman limit on alpha; NaN: unknown (flag skipped).
  double mu_s = std::numeric_limits<double>::quiet_NaN();
  /// Porosity (fraction) for the alpha >= phi check and the derived properties; NaN: unknown.
  double porosity = std::numeric_limits<double>::quiet_NaN();
  /// Pore-fluid bulk modulus, Pa, for M, K_u and Skempton B; NaN: not computed.
  double fluid_modulus = std::numeric_limits<double>::quiet_NaN();

  PressureGrid grid;
  BandOptions options;
  /// Progress of the bootstrap, which can take minutes on one sample: called
  /// after each refit with (refits finished, replicates), finished counting
  /// failed refits too. With options.threads > 1 it is called from several
  /// threads at once and must be thread-safe. It never changes a result.
  /// Empty: not called.
  std::function<void(size_t done, size_t total)> bootstrap_progress;
};

/// A curve with its band at each grid point. For the delta method `estimate`
/// is the plug-in value; for Monte Carlo and bootstrap it is the median of the
/// draws (the plug-in values are BandResult::k / alpha).
struct Band {
  std::vector<double> estimate, lower, upper;
};

struct DeltaResult {
  bool computed = false;
  std::string message;  ///< why not computed, else ""
  DeltaQuantile quantile_rule = DeltaQuantile::kWelchSatterthwaite;

  std::vector<double> k_se;               ///< sqrt(g^T Cov g), Pa
  std::vector<double> alpha_se;           ///< total, fit and K_s parts
  std::vector<double> alpha_var_fit;      ///< g^T Cov g / K_s^2
  std::vector<double> alpha_var_grain;    ///< (K/K_s^2)^2 Var K_s
  /// alpha_var_grain / (alpha_var_fit + alpha_var_grain): the share of the
  /// alpha variance that is common to every pressure (and every sample sharing
  /// K_s). NaN where the total variance is 0.
  std::vector<double> grain_share;
  /// Effective degrees of freedom of the alpha variance at each point
  /// (Welch–Satterthwaite; +inf when the covariance is not scaled). For the
  /// other rules: n - p (t) or +inf (z).
  std::vector<double> alpha_dof;
  double k_dof = 0;                 ///< n - p when scaled, +inf otherwise
  double k_quantile = 0;            ///< multiplier of k_se (pointwise)
  std::vector<double> alpha_quantile;  ///< multiplier of alpha_se at each point

  Band k_confidence, alpha_confidence;
  /// Prediction of a new measurement at P: adds the noise variance sigma^2(P),
  /// interpolated from the data's sigma_i/K_i (relative, times K(P)) or
  /// constant for unweighted data, times s^2 when the covariance is scaled.
  Band k_prediction, alpha_prediction;
  std::vector<double> noise_sigma;  ///< sigma(P) used, Pa
  /// Whole-curve bands: sqrt(q F_{q, nu}) replaces t, q = p for K and p + 1
  /// for alpha (K_s adds a direction), nu = n - p when scaled, else
  /// chi-square (sqrt(chi2_q)). Conservative for alpha (nu ignores K_s's known variance).
  Band k_simultaneous, alpha_simultaneous;
  double k_simultaneous_quantile = 0, alpha_simultaneous_quantile = 0;
};

struct MonteCarloResult {
  bool computed = false;
  std::string message;
  McDistribution distribution = McDistribution::kStudentT;
  int draws = 0;     ///< draws made
  int accepted = 0;  ///< draws used for the bands
  /// Draws filtered as unphysical (never silently): K_s <= 0; a free parameter
  /// outside its fit bounds; K <= 0 or not finite at some grid point.
  int rejected_grain = 0, rejected_bounds = 0, rejected_curve = 0;
  int rejected() const { return rejected_grain + rejected_bounds + rejected_curve; }
  Band k, alpha;
};

struct BootstrapResult {
  bool computed = false;
  std::string message;
  BootstrapKind kind = BootstrapKind::kResidual;
  int replicates = 0;  ///< refits attempted
  int succeeded = 0;   ///< refits used for the bands
  /// Refits excluded: status other than converged, or K not finite / <= 0 on the grid.
  int failed_status = 0, failed_curve = 0;
  int failed() const { return failed_status + failed_curve; }
  Band k, alpha;
};

/// Physical checks at one grid point (flags only, nothing is clipped).
struct PointFlags {
  bool extrapolated = false;          ///< outside the data's pressure range
  bool model_undefined = false;       ///< K(P) not finite
  bool alpha_below_porosity = false;  ///< alpha < phi (Voigt bound)
  bool alpha_above_one = false;       ///< alpha > 1 (K <= 0)
  bool alpha_below_hs_limit = false;  ///< alpha below the HS limit (needs phi and mu_s)
  bool k_dry_not_below_k_s = false;   ///< K_dry >= K_s
  double hs_limit = std::numeric_limits<double>::quiet_NaN();

  bool any() const {
    return extrapolated || model_undefined || alpha_below_porosity || alpha_above_one || alpha_below_hs_limit ||
           k_dry_not_below_k_s;
  }
};

/// A property derived from K and K_s with its delta-method band (same
/// quantile rule as alpha).
struct DerivedBand {
  std::string name;  ///< "biot_modulus", "undrained_bulk_modulus", "skempton_b"
  std::string unit;  ///< "Pa" or "1"
  bool computed = false;
  std::string message;
  std::vector<double> se;
  Band confidence;
};

struct BandResult {
  bool computed = false;  ///< false: the fit was unusable (see message)
  std::string message;
  PressureGrid grid;
  double confidence = 0.95;
  std::vector<double> k;      ///< plug-in K(P), Pa
  std::vector<double> alpha;  ///< plug-in alpha(P)
  std::vector<PointFlags> flags;
  DeltaResult delta;
  MonteCarloResult monte_carlo;
  BootstrapResult bootstrap;
  DerivedBand biot_modulus, undrained_modulus, skempton;
  /// Statements every report must carry (K_s correlation, filtered draws, failed refits).
  std::vector<std::string> notes;
};

/// Runs every method that options enable and the physical checks. Throws
/// InputError for invalid options or inputs (k_s <= 0, sigma_k_s < 0, empty
/// grid, missing fit or request).
BandResult ComputeBands(const BandRequest& request);

/// The pieces, for callers that want one method (same validation).
DeltaResult ComputeDeltaBands(const BandRequest& request);
MonteCarloResult ComputeMonteCarloBands(const BandRequest& request);
BootstrapResult ComputeBootstrapBands(const BandRequest& request);
std::vector<PointFlags> CheckGrid(const BandRequest& request, const std::vector<double>& k);

/// K(P) and its gradient with respect to the free parameters, SI, at the
/// fit's estimates: value[i] = K(grid[i]), gradient row i = dK/dtheta_free.
struct CurveGradient {
  std::vector<double> value;
  std::vector<std::vector<double>> gradient;
};
CurveGradient EvaluateCurve(const FitResult& fit, const ModelSpec& model, const std::vector<double>& pressure);

/// Quantile of the two-sided level `confidence` for Student t with `dof`
/// degrees of freedom (+inf: normal).
double TwoSidedT(double confidence, double dof);
/// Welch–Satterthwaite effective degrees of freedom of v_fit + v_known where
/// v_fit has dof_fit degrees of freedom and v_known is known exactly.
double WelchSatterthwaiteDof(double v_fit, double dof_fit, double v_known);

}  // namespace porofit::bands

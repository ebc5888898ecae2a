#pragma once
// Alpha-versus-depth tables (method: docs/depth-method.md).
//
// A table maps every depth step of a well to the pressure at which a fitted
// K_dry(P) curve is evaluated, and gives K_dry and alpha = 1 - K_dry/K_s with
// their bands there, with the vertical stress, pore pressure and effective
// stresses that led to it. Everything here is SI: depths in m (TVD below the
// datum, increasing downward), stresses and moduli in Pa, densities in kg/m^3,
// gradients in Pa/m. Unit conversion (ft, psi, psi/ft, ppg, g/cc) happens only
// in the study reader and the writers.
//
// Nothing is defaulted silently: the overburden, the pore pressure, the
// horizontal-stress assumption, the effective-stress law and K_s all come
// from the caller, and every one is stated in DepthTable::assumptions.
//
// Failure channels: an inconsistent spec throws porofit::InputError (the
// study reader attaches locations before calling; messages here name the
// field). Numerical trouble at a step (fixed point not converged, K not
// finite) is a row flag, never an exception.
#include <cstdint>
#include <limits>
#include <memory>
#include <optional>
#include <string>
#include <vector>

#include "porofit/bands/options.h"
#include "porofit/depth/profile.h"
#include "porofit/fit/fit_result.h"
#include "porofit/models/model.h"

namespace porofit::depth {

/// Depth reference of the table. Offshore: sea surface (MSL) at depth
/// air_gap below a KB datum (0 for an MSL datum); seabed (mudline) at
/// water_depth below MSL; seawater of water_density above it. Onshore
/// (water_depth = 0): ground at air_gap below a KB datum (the KB height above
/// ground; 0 for a ground-level datum).
enum class DatumKind { kKellyBushing, kMeanSeaLevel, kGroundLevel };
std::string_view ToString(DatumKind k);  ///< "KB", "MSL", "GL"

struct Datum {
  DatumKind kind = DatumKind::kMeanSeaLevel;
  double air_gap = 0;        ///< m, KB above MSL (offshore) or above ground (onshore); 0 for MSL/GL datums
  double water_depth = 0;    ///< m, MSL to seabed; 0 onshore
  double water_density = std::numeric_limits<double>::quiet_NaN();  ///< kg/m^3, required when water_depth > 0

  /// Depth below datum of the sea surface (offshore) or ground (onshore), m.
  double SurfaceDepth() const;
  /// Depth below datum where rock starts (mudline offshore, ground onshore), m.
  double RockTop() const;
};

/// Vertical stress S_v(z) = water load + g * integral of rho_b dz below the rock top.
enum class OverburdenKind { kGradient, kLayers, kDensityProfile };
struct DensityLayer {
  double base = 0;     ///< m below datum, strictly increasing across layers
  double density = 0;  ///< kg/m^3, > 0
};
struct OverburdenSpec {
  OverburdenKind kind = OverburdenKind::kGradient;
  double gradient = 0;  ///< Pa/m of rock below the rock top (kGradient), > 0
  std::vector<DensityLayer> layers;  ///< kLayers: from the rock top down; the last base bounds the table
  DensityProfile profile;            ///< kDensityProfile: from porofit/depth/las.h BuildDensityProfile
  std::string source;                ///< stated in the header (file name and curve, or "constant gradient")
};

/// Pore pressure P_p(z).
enum class PorePressureKind { kHydrostatic, kTable, kProfile };
struct PorePressureSpec {
  PorePressureKind kind = PorePressureKind::kHydrostatic;
  double gradient = 0;  ///< kHydrostatic: Pa/m, > 0 (no default: 9.79 fresh water, 10.52 Gulf Coast normal...)
  /// kHydrostatic: depth below datum where P_p = 0 (the water table; for
  /// offshore wells normally the sea surface). NaN: Datum::SurfaceDepth().
  /// P_p = gradient * (z - zero_depth) below it, 0 above it.
  double zero_depth = std::numeric_limits<double>::quiet_NaN();
  /// kTable / kProfile: (depth m, P_p Pa) pairs, depth strictly ascending,
  /// linear between; a step in rock outside their range is an InputError
  /// (never extrapolated; steps in water outside it get P_p = NaN). kProfile
  /// is a log curve turned into pairs by the caller.
  std::vector<double> depth, pressure;
  std::string source;  ///< stated in the header and the pore_pressure_source flag
};

/// Which pressure K_dry is evaluated at.
enum class StressMeasure {
  kVerticalEffective,  ///< sigma'_v = S_v - n P_p
  kMeanEffective,      ///< sigma'_m = (sigma'_v + sigma'_H + sigma'_h)/3
};
enum class EffectiveStressLaw {
  kTerzaghi,  ///< n = 1
  kBiot,      ///< n = alpha(P), solved by fixed-point iteration in alpha
};
enum class HorizontalStressKind {
  kNone,      ///< only for kVerticalEffective (S_h not reported)
  kRatio,     ///< sigma'_h = ratio * sigma'_v, sigma'_H = ratio_max * sigma'_v
  kUniaxial,  ///< sigma'_h = sigma'_H = nu/(1 - nu) sigma'_v (uniaxial strain; Eaton 1969 with n = 1)
};
struct StressSpec {
  StressMeasure measure = StressMeasure::kVerticalEffective;
  EffectiveStressLaw law = EffectiveStressLaw::kTerzaghi;
  HorizontalStressKind horizontal = HorizontalStressKind::kNone;
  double ratio = std::numeric_limits<double>::quiet_NaN();      ///< k = sigma'_h/sigma'_v, > 0
  double ratio_max = std::numeric_limits<double>::quiet_NaN();  ///< sigma'_H/sigma'_v; NaN: equal to ratio (stated)
  double poisson = std::numeric_limits<double>::quiet_NaN();    ///< nu in (0, 0.5) for kUniaxial
  double tolerance = 1e-10;  ///< fixed point: |alpha_k+1 - alpha_k| below this
  int max_iterations = 100;  ///< fixed point
};

/// A fitted K_dry(P) curve with what the alpha band needs. `model` and `fit`
/// must outlive the table computation.
struct FittedCurve {
  std::string sample_id;
  std::string model_id;
  const ModelSpec* model = nullptr;
  const FitResult* fit = nullptr;  ///< converged, with covariance
  double k_s = 0;        ///< Pa, > 0
  double sigma_k_s = 0;  ///< Pa, >= 0
  double porosity = std::numeric_limits<double>::quiet_NaN();  ///< for the alpha >= phi flag
  double lab_min = 0, lab_max = 0;  ///< Pa, the sample's data pressure range
};

/// Which curve applies where: by depth interval [top, base) or by the value
/// of a facies curve. Steps that no rule covers get rows with NaN K and alpha
/// and the flag kUnmapped.
struct IntervalRule {
  double top = 0, base = 0;  ///< m below datum, top < base
  size_t curve = 0;          ///< index into DepthTableSpec::curves
};
struct FaciesRule {
  int code = 0;      ///< facies value (as in the facies curve)
  size_t curve = 0;  ///< index into DepthTableSpec::curves
};
struct FaciesCurve {
  std::vector<double> depth;  ///< m below datum, ascending
  std::vector<int> code;      ///< facies code at each depth; a step takes the code of the nearest sample at or above it
                              ///< (steps above the first sample or more than one sampling interval below the last: unmapped)
  std::string source;
};

/// A depletion scenario: P_p lowered by `drop` (Pa, > 0) at every step.
struct DepletionScenario {
  std::string name;
  double drop = 0;
};

struct DepthTableSpec {
  std::string name;
  Datum datum;
  double top = 0, base = 0, step = 0;  ///< m below datum; rows at top, top+step, ..., <= base (+1e-9 m)
  OverburdenSpec overburden;
  PorePressureSpec pore_pressure;
  StressSpec stress;
  std::vector<FittedCurve> curves;
  std::vector<IntervalRule> intervals;   ///< used when facies is empty
  std::optional<FaciesCurve> facies;
  std::vector<FaciesRule> facies_rules;
  double band_level = 0.80;  ///< two-sided level of the K and alpha bands, in (0, 1)
  /// Quantile rule of the alpha band (extension; same meaning and default as
  /// bands::BandOptions::delta_quantile, so a table row at a lab pressure
  /// reproduces the sample's delta-method alpha confidence band). The K band
  /// uses t(n - p) (z for kNormal or an unscaled covariance), as lib/bands does.
  bands::DeltaQuantile band_quantile = bands::DeltaQuantile::kWelchSatterthwaite;
  std::vector<DepletionScenario> depletion;
  /// Warnings about the inputs, "file:line:col: warning: message" (LAS
  /// departures that change no number, implausible densities counted). Not
  /// used by the engine; written with the table by every writer.
  std::vector<std::string> warnings;
};

/// Row flags (bits).
enum DepthFlag : std::uint32_t {
  kBelowLabRange = 1u << 0,       ///< evaluation pressure below the sample's lab range
  kAboveLabRange = 1u << 1,       ///< above it
  kLogGap = 1u << 2,              ///< the S_v integral crosses bridged or screened log samples
  kLogFill = 1u << 3,             ///< the S_v integral crosses the user's fill trend
  kAlphaOutsideBounds = 1u << 4,  ///< alpha < phi (alpha < 0 when phi is unknown) or alpha > 1 (flagged, never clipped)
  kFixedPointNotConverged = 1u << 5,
  kUnmapped = 1u << 6,            ///< no interval or facies rule covers the step
  kNegativeEffectiveStress = 1u << 7,  ///< evaluation pressure <= 0 (K evaluated at it only if the model allows)
  kInWater = 1u << 8,             ///< step above the rock top (no K)
  kModelUndefined = 1u << 9,      ///< K(P) not finite
  kNegativePorePressure = 1u << 10,  ///< a depletion drop larger than P_p (depleted P_p < 0; values still computed, not clipped)
  kLogDensityRange = 1u << 11,    ///< the S_v integral crosses log densities outside the plausible range (screened or kept)
};
/// "below-lab-range;log-gap;..." (";"-joined, "" for none), in bit order.
std::string FlagsToString(std::uint32_t flags);

/// Values after one depletion scenario at one step.
struct DepletionValues {
  double pore_pressure = 0;       ///< Pa, P_p - drop
  double evaluation_pressure = 0; ///< Pa
  double alpha = 0;               ///< plug-in
  double k_dry = 0;               ///< Pa
  double vertical_effective = 0;  ///< Pa, S_v - n P_p after depletion
  std::uint32_t flags = 0;
};

struct DepthRow {
  double depth = 0;            ///< m below datum
  double vertical_stress = 0;  ///< S_v, Pa
  double pore_pressure = 0;    ///< P_p, Pa
  double horizontal_stress = std::numeric_limits<double>::quiet_NaN();      ///< S_h total, Pa (NaN for kNone)
  double horizontal_stress_max = std::numeric_limits<double>::quiet_NaN();  ///< S_H total, Pa
  double evaluation_pressure = 0;   ///< the pressure K is evaluated at, Pa (per StressSpec)
  double biot_vertical_effective = std::numeric_limits<double>::quiet_NaN();  ///< S_v - alpha P_p, Pa
  int curve = -1;                    ///< index into DepthTableSpec::curves, -1 unmapped
  double k_dry = std::numeric_limits<double>::quiet_NaN();  ///< Pa, plug-in
  double k_dry_lower = std::numeric_limits<double>::quiet_NaN(), k_dry_upper = std::numeric_limits<double>::quiet_NaN();
  double alpha = std::numeric_limits<double>::quiet_NaN();
  double alpha_lower = std::numeric_limits<double>::quiet_NaN(), alpha_upper = std::numeric_limits<double>::quiet_NaN();
  int iterations = 0;  ///< fixed-point iterations (0 for Terzaghi)
  std::uint32_t flags = 0;
  std::vector<DepletionValues> depletion;  ///< parallel to DepthTableSpec::depletion
};

struct DepthTable {
  DepthTableSpec spec;
  std::vector<DepthRow> rows;
  /// Every assumption in words, for the header lines of the CSV and the JSON:
  /// datum, overburden source, pore-pressure source, measure and law (with
  /// definitions), horizontal-stress assumption, band level and method (delta
  /// method, K_s variance included, pressure treated as exact), the mapping.
  std::vector<std::string> assumptions;
  int fixed_point_failures = 0;  ///< rows with kFixedPointNotConverged
  /// Extension: depletion values (over all rows and scenarios) with
  /// kFixedPointNotConverged; they are not counted in fixed_point_failures.
  int depletion_fixed_point_failures = 0;
};

/// Builds the table. Throws InputError for an inconsistent spec (step <= 0,
/// base < top, a law that needs a curve without one, missing ratio/poisson,
/// layers or P_p table not covering [top, base], curves without covariance).
DepthTable BuildDepthTable(const DepthTableSpec& spec);

/// One Biot fixed point alpha = 1 - K(total - alpha * pore)/K_s for a curve.
/// Every StressSpec has this form: vertical, total = S_v and pore = P_p; mean
/// with a ratio, c = (1 + ratio + ratio_max)/3 and total = c S_v, pore = c P_p;
/// uniaxial, the same with ratio = ratio_max = nu/(1 - nu).
/// Exposed for tests (compared with a direct root solve).
struct FixedPointResult {
  double alpha = std::numeric_limits<double>::quiet_NaN();
  double pressure = std::numeric_limits<double>::quiet_NaN();  ///< total - alpha * pore
  int iterations = 0;
  bool converged = false;
};
FixedPointResult SolveBiotFixedPoint(const FittedCurve& curve, double total, double pore, double tolerance,
                                     int max_iterations);

// Extensions: the small stress relations the table uses, exposed for tests
// and for callers that state them.

/// nu/(1 - nu): sigma'_h/sigma'_v under uniaxial strain (Eaton 1969, JPT 21,
/// with n = 1; poroelastic form S_h - alpha P_p = nu/(1 - nu)(S_v - alpha P_p)
/// as in Zoback 2007, Reservoir Geomechanics). poisson in (0, 0.5).
double UniaxialStrainRatio(double poisson);

/// Total horizontal stress from an effective-stress ratio:
/// S_h = ratio (S_v - n P_p) + n P_p (Pa). With ratio = nu/(1 - nu) and
/// n = alpha, dS_h/d alpha = P_p (1 - 2 nu)/(1 - nu).
double TotalHorizontalStress(double vertical_stress, double pore_pressure, double n, double ratio);

/// The factor c with evaluation pressure = c (S_v - n P_p): 1 for
/// kVerticalEffective; (1 + ratio + ratio_max)/3 for the mean with a ratio
/// (ratio_max NaN: ratio); (1 + nu)/(3 (1 - nu)) for the mean under uniaxial
/// strain. The spec is not validated here (BuildDepthTable does).
double EvaluationFactor(const StressSpec& stress);

}  // namespace porofit::depth

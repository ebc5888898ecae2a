#pragma once
// One core plug's measurements, as read from a study file. SI units throughout.
#include <limits>
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/dynamic.h"
#include "porofit/core/error.h"

namespace porofit {

/// How K was measured. Static and dynamic data are never mixed in one fit.
enum class MeasurementKind {
  kStatic,   ///< drained static test: tangent bulk modulus given directly
  kDynamic,  ///< ultrasonic Vp, Vs and density; K computed per point
};

/// What a static sample's response column is. A sample has one response.
enum class Response {
  kModulus,  ///< tangent bulk modulus K per step (column K)
  kStrain,   ///< volumetric strain eps_v per step (column eps_v), compression positive
};

/// Pressure path of the data set. Loading and unloading are never pooled.
enum class Branch { kLoading, kUnloading };

/// Plug axis relative to bedding.
enum class Orientation {
  kUnknown,
  kVertical,    ///< axis normal to bedding
  kHorizontal,  ///< axis parallel to bedding
  kInclined,    ///< neither (e.g. 45 degrees)
};

std::string_view ToString(MeasurementKind k);
std::string_view ToString(Branch b);
std::string_view ToString(Orientation o);
std::string_view ToString(Response r);

/// One pressure step.
struct DataPoint {
  double confining = 0;    ///< P_c, Pa
  double pore = 0;         ///< P_p, Pa
  double pressure = 0;     ///< differential pressure P = P_c - n P_p, Pa
  double modulus = 0;      ///< K_dry, Pa (static: as given; dynamic: computed); NaN for a strain sample
  double sigma = 0;        ///< 1-sigma uncertainty of the response (`modulus` in Pa, or `strain`); 0 = not given
  /// Volumetric strain eps_v (plain, dimensionless; compression positive:
  /// eps_v = -dV/V from the state at P = 0) for Response::kStrain; NaN otherwise.
  double strain = std::numeric_limits<double>::quiet_NaN();
  std::optional<WaveData> waves;         ///< dynamic only: the raw velocities
  std::optional<DynamicModuli> dynamic;  ///< dynamic only: derived moduli and QC
  SourceLocation where;    ///< where this point was written (row of a CSV or YAML item)
};

/// Longest sample id accepted, in characters (Unicode code points). Ids name
/// rows in every output and, made safe, the report's figure files; 64 holds
/// any well, depth, plug and branch code written out in full.
inline constexpr size_t kMaxSampleIdLength = 64;

/// Why `id` is not a valid sample id, or "" if it is: an id is 1 to
/// kMaxSampleIdLength characters of valid UTF-8 with no control characters
/// (U+0000-U+001F, U+007F-U+009F) and no leading or trailing blank.
std::string SampleIdProblem(std::string_view id);

/// Throws InputError at `at` ("'id' = '...' is 70 characters long, over the
/// limit of 64") unless SampleIdProblem(id) is "".
void CheckSampleId(std::string_view id, const SourceLocation& at);

/// A core plug tested along one branch of one cycle.
struct Sample {
  std::string id;  ///< valid by SampleIdProblem() when loaded from a study
  /// The physical plug (study key `plug`); "" = not given. Samples with the
  /// same plug and measurement kind but different (branch, cycle) form a
  /// branch set, tested for hysteresis (porofit/run/branches.h); each stays
  /// its own fit. The loader rejects two samples of one plug with the same
  /// kind, branch and cycle.
  std::string plug;
  std::string lithology;          ///< free text, e.g. "clean sandstone"
  double porosity = 0;            ///< fraction, [0, 1)
  double bulk_density = 0;        ///< kg/m^3
  Orientation orientation = Orientation::kUnknown;
  MeasurementKind kind = MeasurementKind::kStatic;
  Response response = Response::kModulus;  ///< static samples only; dynamic samples are kModulus
  Branch branch = Branch::kLoading;
  int cycle = 1;                  ///< 1 = first loading cycle
  double effective_pressure_coefficient = 1.0;  ///< n in P = P_c - n P_p
  /// True if `sigma` values are absolute 1-sigma errors: the covariance is then
  /// not rescaled by the residual variance (chi^2_nu is still reported).
  bool sigma_absolute = false;
  std::vector<DataPoint> points;
  SourceLocation where;
};

}  // namespace porofit

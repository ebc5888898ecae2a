#pragma once
// One `depth_tables:` entry of a study file (docs/study-file.md, "Depth
// tables"), as loaded: the table engine's spec (SI) without the fit pointers,
// which only exist after the run (lib/run/src/depth_run.cc fills them), and
// what the writers need to present it (output units, the P10/P90 convention).
#include <cstddef>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/depth/table.h"

namespace porofit {

/// Units the table's CSV is written in (results.json is always SI-based:
/// m, MPa, GPa, kg/m3).
enum class DepthUnits {
  kField,  ///< ft, psi, psi/ft, ppg (pore-pressure equivalent mud weight), g/cc, moduli in Mpsi
  kSi,     ///< m, MPa, kPa/m, g/cc, moduli in GPa
};
std::string_view ToString(DepthUnits u);  ///< "field", "si"

/// How the band limits are named P_low / P_high (industry uses both).
enum class BandConvention {
  kNonExceedance,  ///< P10 = the value with 10 % probability of being lower (the low value)
  kExceedance,     ///< P10 = the value with 10 % probability of being exceeded (the high value)
};
std::string_view ToString(BandConvention c);  ///< "non-exceedance", "exceedance"

/// Which fit of the study a table curve is: StudySample index and index into
/// its `models` list (the fit of the run's SampleRun::fits at that index).
struct DepthCurveChoice {
  size_t sample = 0;
  size_t model = 0;
  SourceLocation where;  ///< of the interval / facies code that named it first
};

struct DepthTableChoice {
  /// Everything SI. spec.curves[i] has sample_id, model_id, K_s, sigma_K_s,
  /// porosity and the lab range filled; `model` and `fit` are null until the run.
  depth::DepthTableSpec spec;
  std::vector<DepthCurveChoice> curves;  ///< parallel to spec.curves
  DepthUnits units = DepthUnits::kSi;
  BandConvention convention = BandConvention::kNonExceedance;
  /// Statements of the loader for the header (files read, with their roles).
  std::vector<std::string> notes;
  SourceLocation where;  ///< of the entry
};

}  // namespace porofit

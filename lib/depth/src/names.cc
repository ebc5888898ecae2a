// Names and small accessors of the depth layer's value types.
#include <cmath>

#include "porofit/depth/profile.h"
#include "porofit/depth/table.h"

namespace porofit::depth {

std::string_view ToString(DensitySource s) {
  switch (s) {
    case DensitySource::kMeasured: return "measured";
    case DensitySource::kBridged: return "bridged";
    case DensitySource::kFilled: return "filled";
    case DensitySource::kBadHole: return "bad-hole";
    case DensitySource::kOutOfRange: return "out-of-range";
    case DensitySource::kOutOfRangeKept: return "out-of-range-kept";
  }
  return "unknown";
}

std::string_view ToString(DatumKind k) {
  switch (k) {
    case DatumKind::kKellyBushing: return "KB";
    case DatumKind::kMeanSeaLevel: return "MSL";
    case DatumKind::kGroundLevel: return "GL";
  }
  return "unknown";
}

double Datum::SurfaceDepth() const { return kind == DatumKind::kKellyBushing ? air_gap : 0.0; }

double Datum::RockTop() const { return SurfaceDepth() + water_depth; }

std::string FlagsToString(std::uint32_t flags) {
  static constexpr const char* kNames[] = {
      "below-lab-range", "above-lab-range", "log-gap", "log-fill", "alpha-outside-bounds",
      "fixed-point-not-converged", "unmapped", "non-positive-effective-stress", "in-water", "model-undefined",
      "negative-pore-pressure", "log-density-range"};
  std::string out;
  for (std::uint32_t bit = 0; bit < sizeof(kNames) / sizeof(kNames[0]); ++bit) {
    if ((flags & (1u << bit)) == 0) continue;
    if (!out.empty()) out += ';';
    out += kNames[bit];
  }
  return out;
}

}  // namespace porofit::depth

#pragma once
// Density profiles against depth and their overburden integral (common
// practice; docs/depth-method.md). Shared by the density-log reader (porofit/depth/las.h)
// and the depth-table engine (porofit/depth/table.h).
//
// Depths are metres of true vertical depth (TVD) below the table's datum
// (porofit/depth/table.h, Datum), increasing downward. Densities are kg/m^3.
// Stresses are Pa. g = 9.80665 m/s^2 (standard gravity).
#include <cstdint>
#include <string>
#include <vector>

namespace porofit::depth {

inline constexpr double kGravity = 9.80665;  ///< m/s^2, standard gravity

/// Where a profile sample's density came from. Anything but kMeasured is
/// flagged in every table row whose overburden integral crosses it.
enum class DensitySource : std::uint8_t {
  kMeasured = 0,  ///< a valid log sample
  kBridged = 1,   ///< inside a gap (NULL run or screened bad hole), linearly bridged between the valid neighbours
  kFilled = 2,    ///< above the log top (or below the rock top down to it), from the user's trend
  kBadHole = 3,   ///< a log sample rejected by the bad-hole screen, then bridged
};
std::string_view ToString(DensitySource s);

/// A density profile from the rock top (mudline or ground) downward. Between
/// samples the density is linear in depth, so the trapezoid rule on the samples
/// is the exact integral of the profile.
struct DensityProfile {
  std::vector<double> depth;    ///< m TVD below datum, strictly ascending
  std::vector<double> density;  ///< kg/m^3, finite, > 0
  std::vector<DensitySource> source;  ///< parallel to depth
  /// Human-readable statements about how the profile was built (gaps bridged
  /// with their depth ranges, fill trend used, samples screened). Copied into
  /// the table header.
  std::vector<std::string> notes;
};

/// Overburden load of the profile between its first depth and each depth of
/// `at` (m, any order): g * integral of rho dz, Pa, by the trapezoid rule on
/// the profile's samples (exact for a piecewise-linear profile). Depths above
/// the first sample give 0; depths below the last sample throw
/// porofit::InputError (the caller must not extrapolate a log silently).
std::vector<double> CumulativeLoad(const DensityProfile& profile, const std::vector<double>& at);

/// The worst DensitySource met between the profile's top and depth z
/// (priority kBadHole > kBridged > kFilled > kMeasured), for row flags.
/// Precomputed per sample so a table of N rows costs O(N + M).
class SourceIndex {
 public:
  explicit SourceIndex(const DensityProfile& profile);
  /// Sources met from the top down to z: bit i set if DensitySource(i) occurs.
  std::uint8_t SourcesAbove(double z) const;

 private:
  std::vector<double> depth_;
  std::vector<std::uint8_t> cumulative_;
};

}  // namespace porofit::depth

#pragma once
// Pressure grids on which K_dry(P), alpha(P) and their bands are evaluated.
//
// All pressures are SI (Pa), like the rest of porofit's data types. Every grid
// point outside the data's pressure range is flagged as an extrapolation: a
// band there rests on the model's form, not on measurements.
#include <limits>
#include <optional>
#include <span>
#include <string>
#include <vector>

namespace porofit::bands {

enum class GridSpacing {
  kLinear,    ///< `count` points equally spaced from `from` to `to`
  kLog,       ///< `count` points equally spaced in ln P (needs from > 0)
  kExplicit,  ///< exactly the pressures listed in `pressures` (sorted on use)
};

/// Most grid points a spec may ask for (count, or explicit pressures): far
/// more than a figure or table resolves, small enough that every band method
/// stays in memory (docs/study-file.md, "Limits").
inline constexpr int kMaxGridPoints = 100000;

/// How to build a grid. Defaults: 200 linearly spaced points spanning the
/// data's pressures widened by `margin` of their span on each side (the lower
/// end stops at 0 for linear spacing; log spacing widens by the factor
/// (P_max/P_min)^margin instead).
struct GridSpec {
  GridSpacing spacing = GridSpacing::kLinear;
  std::optional<double> from;  ///< Pa; default from the data (see above)
  std::optional<double> to;    ///< Pa; default from the data
  int count = 200;             ///< in [2, kMaxGridPoints] for linear / log spacing
  double margin = 0.1;         ///< >= 0; fraction of the data span added beyond each end by default
  std::vector<double> pressures;  ///< Pa, kExplicit only; finite, >= 0, 1 to kMaxGridPoints

  /// Empty if valid, otherwise "grid.<field> = value violates rule" (or
  /// "... exceeds the limit of N").
  std::string Validate() const;
};

struct PressureGrid {
  std::vector<double> pressure;    ///< Pa, ascending
  std::vector<bool> extrapolated;  ///< pressure[i] outside [data_min, data_max]
  double data_min = std::numeric_limits<double>::quiet_NaN();  ///< Pa, smallest data pressure
  double data_max = std::numeric_limits<double>::quiet_NaN();  ///< Pa, largest data pressure

  size_t size() const { return pressure.size(); }
};

/// Builds the grid for data measured at `data_pressure` (Pa, any order, at
/// least one finite value). Throws porofit::InputError (no source location:
/// the caller that read the spec adds one) if the spec is invalid, the data
/// pressures are empty or a log grid would need P <= 0.
PressureGrid MakeGrid(const GridSpec& spec, std::span<const double> data_pressure);

/// A grid of explicit pressures (Pa) flagged against the data range
/// [data_min, data_max]; the pressures are sorted.
PressureGrid GridAt(std::vector<double> pressure, double data_min, double data_max);

}  // namespace porofit::bands

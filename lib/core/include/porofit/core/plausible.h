#pragma once
// Plausible physical ranges of measured quantities in rock tests, and the
// check that turns a value outside them into an input error naming the likely
// unit slip ("K = 3.2e6 GPa is far above any rock modulus (0.01-200 GPa): is
// the column in psi?").
//
// One table (RangeOf) holds every range with its basis; docs/study-file.md
// ("Plausible ranges") lists the same table. The loader calls
// RequirePlausible / RequirePlausibleSigma at every point where it converts a
// measured value to SI, after the hard rules (> 0, in [0, 1), ...) have passed.
//
// The ranges are deliberately wide: they catch unit slips (factors of 1000,
// or 6.9 for psi/kPa, 145 for psi/MPa), not unusual rock. A value within a
// range is not thereby correct.
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"

namespace porofit::units {

/// What a measured value is; each has one plausible range.
enum class Measured {
  kPressure,      ///< confining, pore or differential pressure of a rock test (Pa)
  kModulus,       ///< a rock or mineral elastic modulus or stiffness (Pa)
  kFluidModulus,  ///< bulk modulus of a pore fluid (Pa)
  kVelocity,      ///< P- or S-wave speed (m/s)
  kDensity,       ///< bulk, grain or fluid density (kg/m^3)
  kPorosity,      ///< porosity (fraction)
  kStrain,        ///< volumetric strain (plain strain, compression positive)
};

/// A unit a value might have been written in by mistake: its name and SI factor.
struct SlipUnit {
  std::string_view name;
  double si_factor;
};

struct PlausibleRange {
  std::string_view what;          ///< "rock modulus", used in messages
  double lower_si;                ///< values > 0 below this are implausible (0: no lower limit)
  double upper_si;                ///< |values| above this are implausible
  double typical_si;              ///< a typical value; the slip nearest to it (log scale) is named first
  std::string_view show_unit;     ///< unit the range is shown in ("GPa")
  double show_factor;             ///< SI per show_unit
  std::vector<SlipUnit> slips;    ///< units tried when a value is outside the range
  std::string_view basis;         ///< source of the range (docs/study-file.md repeats it)
};

/// The range of `m` (static table).
const PlausibleRange& RangeOf(Measured m);

/// True if si_value lies inside RangeOf(m): |v| <= upper and (v <= 0 or v >= lower).
/// Zero and negative values are left to the hard rules of each field.
bool IsPlausible(Measured m, double si_value);

/// Units of RangeOf(m).slips in which `written` would be plausible, best first
/// (nearest to the typical value on a log scale), at most two, leaving out the
/// unit it was converted with (written_factor: SI per written unit).
std::vector<std::string> LikelyUnits(Measured m, double written, double written_factor);

/// ": is the column in psi?" (column) or ": is it in psi?" (a single value);
/// ": check the value and its unit" when no slip explains it.
std::string SlipHint(Measured m, double written, double written_factor, bool column);

/// The message for an implausible value, or "" when it is plausible:
/// "<label> = <written> <unit> is far above any <what> (<lo>-<hi> <unit>)<hint>".
std::string ImplausibleMessage(Measured m, std::string_view label, double written, std::string_view written_unit,
                               double si_value, bool column);

/// Throws InputError(at, ImplausibleMessage(...)) when the value is implausible.
void RequirePlausible(Measured m, std::string_view label, double written, std::string_view written_unit,
                      double si_value, bool column, const SourceLocation& at);

/// Checks a 1-sigma uncertainty. Relative (written_unit "%"): at most 100 % of
/// the value. Absolute: at most the upper end of its quantity's range and,
/// except for strain (whose value can be 0), at most |value_si| (no lower
/// limit: a sigma is small by nature). A larger sigma names the unit in which
/// it would be plausible.
void RequirePlausibleSigma(Measured m, std::string_view label, double written, std::string_view written_unit,
                           double sigma_si, double value_si, bool column, const SourceLocation& at);

}  // namespace porofit::units

#pragma once
// Units at the edges, SI inside.
//
// Every value stored in porofit's data types is in SI base units: pressure and
// moduli in Pa, velocity in m/s, density in kg/m^3, compressibility in 1/Pa.
// Conversions happen only where text is read or written, through the tables
// here. Unit spellings are matched case-sensitively as listed (plus a few
// common aliases such as "g/cm3" for "g/cc").
//
// Conversion factors (NIST SP 811, Thompson & Taylor 2008, Guide for the Use
// of the International System of Units, Appendix B [from memory]): 1 psi = 6894.757293168 Pa (exact by the
// definition of the pound-force and inch); 1 bar = 1e5 Pa; 1 ft = 0.3048 m
// (international foot); 1 lb = 0.45359237 kg (international pound); 1 US gal =
// 3.785411784e-3 m^3 (231 cubic inches), so 1 ppg (lb/US gal) =
// 119.826427... kg/m^3. Density-equivalent gradients ("g/cc", "ppg" as a
// pressure gradient) are the hydrostatic gradient rho * g of that density with
// standard gravity g = 9.80665 m/s^2 (kStandardGravity): 1 g/cc -> 9.80665
// kPa/m = 0.43353 psi/ft, 1 ppg -> 0.051948 psi/ft, and 1 psi/ft = 22.6206
// kPa/m, the gradient of 2.3067 g/cc (computed with g = 9.80665 m/s^2).
#include <optional>
#include <string>
#include <string_view>
#include <vector>

namespace porofit::units {

enum class Quantity {
  kPressure,       ///< stress, pressure: Pa
  kModulus,        ///< elastic modulus: Pa
  kVelocity,       ///< wave speed: m/s
  kDensity,        ///< mass density: kg/m^3
  kDimensionless,  ///< fractions, ratios: 1
  kLength,         ///< depth, length: m
  kPressureGradient,  ///< stress or pressure per depth: Pa/m
};

inline constexpr double kPsi = 6894.757293168361;  // Pa per psi
inline constexpr double kFoot = 0.3048;            // m per ft
inline constexpr double kPound = 0.45359237;           // kg per lb
inline constexpr double kUsGallon = 3.785411784e-3;     // m^3 per US gal
inline constexpr double kPpg = kPound / kUsGallon;      // kg/m^3 per lb/US gal
inline constexpr double kStandardGravity = 9.80665;     // m/s^2
inline constexpr double kMPa = 1e6;
inline constexpr double kGPa = 1e9;

/// Name of the SI unit of a quantity ("Pa", "m/s", ...).
std::string_view SiUnit(Quantity q);
/// Human name of the quantity ("pressure", ...).
std::string_view QuantityName(Quantity q);

/// Factor f such that value_SI = f * value_in_unit, or nullopt if `unit` is not
/// a unit of `q`. Pressure and modulus accept Pa, kPa, MPa, GPa, psi, ksi,
/// Mpsi, bar, kbar; velocity m/s, km/s, ft/s; density kg/m3 (kg/m³), g/cc
/// (g/cm3), ppg; dimensionless "1", "fraction", "%" (0.01); length m, km,
/// ft; pressure gradient Pa/m, kPa/m, MPa/m, MPa/km, psi/ft, and the
/// density-equivalent gradients g/cc and ppg (density times g).
std::optional<double> ToSiFactor(Quantity q, std::string_view unit);

/// Units accepted for `q`, in the canonical spelling, for error messages.
std::vector<std::string> AcceptedUnits(Quantity q);

/// Comma-separated list of AcceptedUnits(q).
std::string AcceptedUnitsList(Quantity q);

}  // namespace porofit::units

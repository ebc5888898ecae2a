#include "porofit/core/units.h"

#include <utility>

namespace porofit::units {
namespace {

struct Entry {
  std::string_view name;
  double factor;
  bool canonical;  // listed in messages
};

const std::vector<Entry>& Table(Quantity q) {
  static const std::vector<Entry> pressure = {
      {"Pa", 1.0, true},         {"kPa", 1e3, true},           {"MPa", 1e6, true},
      {"GPa", 1e9, true},        {"psi", kPsi, true},          {"ksi", 1e3 * kPsi, true},
      {"Mpsi", 1e6 * kPsi, true}, {"bar", 1e5, true},          {"kbar", 1e8, true}};
  static const std::vector<Entry> velocity = {
      {"m/s", 1.0, true}, {"km/s", 1e3, true}, {"ft/s", kFoot, true}};
  static const std::vector<Entry> density = {
      {"kg/m3", 1.0, true},  {"kg/m³", 1.0, false}, {"kg/m^3", 1.0, false},
      {"g/cc", 1e3, true},   {"g/cm3", 1e3, false}, {"g/cm³", 1e3, false},
      {"ppg", kPpg, true}};
  static const std::vector<Entry> length = {{"m", 1.0, true}, {"km", 1e3, true}, {"ft", kFoot, true}};
  // Density-equivalent gradients: rho * g (hydrostatic gradient of a fluid of that density).
  static const std::vector<Entry> gradient = {
      {"Pa/m", 1.0, true},          {"kPa/m", 1e3, true},
      {"MPa/m", 1e6, true},         {"MPa/km", 1e3, true},
      {"psi/ft", kPsi / kFoot, true}, {"g/cc", 1e3 * kStandardGravity, true},
      {"g/cm3", 1e3 * kStandardGravity, false}, {"ppg", kPpg * kStandardGravity, true}};
  static const std::vector<Entry> dimensionless = {
      {"1", 1.0, true}, {"fraction", 1.0, true}, {"%", 0.01, true}};
  switch (q) {
    case Quantity::kPressure:
    case Quantity::kModulus: return pressure;
    case Quantity::kVelocity: return velocity;
    case Quantity::kDensity: return density;
    case Quantity::kDimensionless: return dimensionless;
    case Quantity::kLength: return length;
    case Quantity::kPressureGradient: return gradient;
  }
  return dimensionless;
}

}  // namespace

std::string_view SiUnit(Quantity q) {
  switch (q) {
    case Quantity::kPressure:
    case Quantity::kModulus: return "Pa";
    case Quantity::kVelocity: return "m/s";
    case Quantity::kDensity: return "kg/m3";
    case Quantity::kDimensionless: return "1";
    case Quantity::kLength: return "m";
    case Quantity::kPressureGradient: return "Pa/m";
  }
  return "";
}

std::string_view QuantityName(Quantity q) {
  switch (q) {
    case Quantity::kPressure: return "pressure";
    case Quantity::kModulus: return "modulus";
    case Quantity::kVelocity: return "velocity";
    case Quantity::kDensity: return "density";
    case Quantity::kDimensionless: return "dimensionless";
    case Quantity::kLength: return "length";
    case Quantity::kPressureGradient: return "pressure gradient";
  }
  return "";
}

std::optional<double> ToSiFactor(Quantity q, std::string_view unit) {
  for (const auto& e : Table(q))
    if (e.name == unit) return e.factor;
  return std::nullopt;
}

std::vector<std::string> AcceptedUnits(Quantity q) {
  std::vector<std::string> out;
  for (const auto& e : Table(q))
    if (e.canonical) out.emplace_back(e.name);
  return out;
}

std::string AcceptedUnitsList(Quantity q) {
  std::string s;
  for (const auto& u : AcceptedUnits(q)) s += (s.empty() ? "" : ", ") + u;
  return s;
}

}  // namespace porofit::units

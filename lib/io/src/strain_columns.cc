#include "strain_columns.h"

#include <algorithm>
#include <array>
#include <numeric>
#include <sstream>
#include <utility>

#include "porofit/core/error.h"

namespace porofit::io::detail {
namespace {

struct StrainUnit {
  const char* name;
  double factor;
};
constexpr std::array<StrainUnit, 8> kUnits = {{{"1", 1.0},
                                               {"fraction", 1.0},
                                               {"%", 1e-2},
                                               {"millistrain", 1e-3},
                                               {"mstrain", 1e-3},
                                               {"microstrain", 1e-6},
                                               {"ustrain", 1e-6},
                                               {"\xC2\xB5strain", 1e-6}}};

std::string Format(double v) {
  std::ostringstream os;
  os.precision(6);
  os << v;
  return os.str();
}

}  // namespace

std::optional<double> StrainUnitFactor(const std::string& unit) {
  for (const StrainUnit& u : kUnits)
    if (unit == u.name) return u.factor;
  return std::nullopt;
}

std::string StrainUnitsList() {
  std::string s;
  for (const StrainUnit& u : kUnits) s += (s.empty() ? "" : ", ") + std::string(u.name);
  return s;
}

double StrainUnitFactorOrThrow(const std::string& unit, const std::string& what, const SourceLocation& at) {
  if (auto f = StrainUnitFactor(unit)) return *f;
  std::vector<std::string> names;
  for (const StrainUnit& u : kUnits) names.emplace_back(u.name);
  std::string msg = "unknown strain unit '" + unit + "' for " + what + "; accepted: " + StrainUnitsList();
  const std::string near = NearestWord(unit, names);
  if (!near.empty()) msg += "; did you mean '" + near + "'?";
  throw InputError(at, msg);
}

std::vector<std::pair<SourceLocation, std::string>> CheckStrainSeries(const std::vector<DataPoint>& points,
                                                                       const std::string& what,
                                                                       const SourceLocation& data_at) {
  std::vector<std::pair<SourceLocation, std::string>> out;
  if (points.empty()) return out;
  const bool any_positive =
      std::any_of(points.begin(), points.end(), [](const DataPoint& p) { return p.strain > 0; });
  if (!any_positive)
    throw InputError(data_at, "every eps_v of " + what +
                                  " is <= 0; volumetric strain is compression-positive (it grows from 0 as the "
                                  "pressure rises): check the sign convention");
  // Stable order of pressure, so repeated pressures keep their file order.
  std::vector<size_t> order(points.size());
  std::iota(order.begin(), order.end(), size_t{0});
  std::stable_sort(order.begin(), order.end(),
                   [&](size_t a, size_t b) { return points[a].pressure < points[b].pressure; });
  for (size_t k = 1; k < order.size(); ++k) {
    const DataPoint& lo = points[order[k - 1]];
    const DataPoint& hi = points[order[k]];
    if (hi.pressure > lo.pressure && hi.strain < lo.strain)
      out.emplace_back(hi.where, what + ": eps_v = " + Format(hi.strain) + " at P = " + Format(hi.pressure / 1e6) +
                                     " MPa is below eps_v = " + Format(lo.strain) + " at P = " +
                                     Format(lo.pressure / 1e6) +
                                     " MPa; compression-positive strain should grow with pressure");
  }
  return out;
}

}  // namespace porofit::io::detail

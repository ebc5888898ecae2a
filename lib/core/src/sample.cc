#include "porofit/core/sample.h"

namespace porofit {

std::string_view ToString(MeasurementKind k) {
  return k == MeasurementKind::kStatic ? "static" : "dynamic";
}
std::string_view ToString(Branch b) { return b == Branch::kLoading ? "loading" : "unloading"; }
std::string_view ToString(Orientation o) {
  switch (o) {
    case Orientation::kVertical: return "vertical";
    case Orientation::kHorizontal: return "horizontal";
    case Orientation::kInclined: return "inclined";
    case Orientation::kUnknown: break;
  }
  return "unknown";
}
std::string_view ToString(Response r) { return r == Response::kStrain ? "strain" : "modulus"; }

}  // namespace porofit

#pragma once
// Parameter sets for catalogue-wide tests: for each built-in model, a few
// realistic parameter vectors (working units: P in MPa, K in GPa), chosen to
// span stiff/soft rock and short/long closure scales. Invented for testing.
#include <map>
#include <string>
#include <vector>

#include "porofit/models/model.h"
#include "porofit/models/registry.h"

namespace porofit::testing {

inline const std::vector<std::vector<double>>& ParameterSets(const std::string& id) {
  static const std::map<std::string, std::vector<std::vector<double>>> sets = {
      {"linear", {{8, 0.2}, {15, 0.05}, {10, -0.04}}},
      {"exp-modulus", {{20, 8, 10}, {30, 10, 3}, {12, 6, 40}}},
      {"exp-compliance", {{0.05, 0.2, 10}, {0.03, 0.08, 5}, {0.1, 0.3, 30}}},
      {"linear-exp", {{18, 0.03, 10, 0.1}, {25, 0.01, 15, 0.3}, {12, 0.05, 4, 0.02}}},
      {"power-ref", {{12, 0.2, 20}, {5, 0.45, 10}, {25, 0.08, 30}}},
      {"power-offset", {{8, 0.3, 5}, {15, 0.15, 20}, {4, 0.5, 1}}},
      {"grain-contact", {{3}, {1.2}, {6}}},
  };
  static const std::vector<std::vector<double>> none;
  auto it = sets.find(id);
  return it == sets.end() ? none : it->second;
}

/// Data pressures at which derivatives are probed (MPa); all > 0 so that
/// every model, including power-ref, is defined.
inline const std::vector<double>& ProbePressures() {
  static const std::vector<double> p = {0.3, 1.5, 5, 12, 30, 75};
  return p;
}

}  // namespace porofit::testing

#include "porofit/models/model.h"

#include <cmath>

namespace porofit {

int ModelSpec::ParameterIndex(std::string_view wanted) const {
  for (size_t i = 0; i < parameters.size(); ++i)
    if (parameters[i].name == wanted) return static_cast<int>(i);
  return -1;
}

double ModelSpec::ClosurePressure(const double* theta) const {
  if (closure_pressure) return closure_pressure(theta);
  if (closure_parameter >= 0 && static_cast<size_t>(closure_parameter) < parameters.size())
    return theta[closure_parameter];
  return std::nan("");
}

}  // namespace porofit

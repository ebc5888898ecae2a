#include "porofit/models/strain_form.h"

#include <cmath>

#include "porofit/core/error.h"
#include "start_util.h"

namespace porofit {

bool HasStrainForm(const ModelSpec& k_model) {
  return static_cast<bool>(k_model.strain) && static_cast<bool>(k_model.strain_and_gradient);
}

ModelSpec StrainForm(const ModelSpec& k) {
  POROFIT_CHECK(HasStrainForm(k), "model '" + k.id + "' has no strain form");
  ModelSpec s;
  s.id = k.id;
  s.name = k.name + ", strain form";
  s.formula = "eps_v = integral_0^P dP'/K(P'),  " + k.formula;
  s.reference = k.reference;
  s.notes = k.notes + " Fitted to volumetric strain (" + k.strain_method +
            "); eps_v(0) = 0, no seating offset.";
  s.x_symbol = k.x_symbol;
  s.x_unit = k.x_unit;
  s.x_si_factor = k.x_si_factor;
  s.y_symbol = "eps_v";
  s.y_unit = kStrainWorkingUnit;
  // K-model strain is x_unit / y_unit (MPa/GPa = 1e-3 for the catalogue).
  s.y_si_factor = k.x_si_factor / k.y_si_factor;
  s.parameters = k.parameters;
  s.value = k.strain;
  s.value_and_gradient = k.strain_and_gradient;
  s.slope = [kv = k.value](const double* theta, double x) { return 1.0 / kv(theta, x); };
  s.closure_parameter = k.closure_parameter;
  s.closure_pressure = k.closure_pressure;
  // Every catalogue strain is defined at P = 0 (eps = 0), power-ref included.
  s.requires_positive_x = false;
  s.start = [k_start = k.start](std::span<const double> x, std::span<const double> y) {
    detail::Points p = detail::PreparePoints(x, y, false, false);
    std::vector<double> px, py;
    if (!p.empty() && p.x.front() > 0) {
      px.push_back(0.0);  // the reference state: eps(0) = 0
      py.push_back(0.0);
    }
    px.insert(px.end(), p.x.begin(), p.x.end());
    py.insert(py.end(), p.y.begin(), p.y.end());
    // Chord moduli between consecutive steps, in the K-model's working units
    // (MPa per millistrain = GPa); a chord whose strain does not grow (noise,
    // a reversal) says nothing about K and is left out.
    std::vector<double> mid, chord;
    for (size_t i = 0; i + 1 < px.size(); ++i) {
      const double dp = px[i + 1] - px[i], de = py[i + 1] - py[i];
      if (dp > 0 && de > 0 && std::isfinite(dp / de)) {
        mid.push_back(0.5 * (px[i] + px[i + 1]));
        chord.push_back(dp / de);
      }
    }
    return k_start(mid, chord);
  };
  return s;
}

}  // namespace porofit

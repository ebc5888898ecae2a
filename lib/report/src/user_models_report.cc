#include "user_models_report.h"

#include <cmath>

#include "porofit/core/error.h"

namespace porofit::detail {

nlohmann::ordered_json UserModelsJson(const Study& study) {
  using Json = nlohmann::ordered_json;
  Json out = Json::array();
  auto bound = [](double v) { return std::isfinite(v) ? Json(v) : Json(nullptr); };
  for (const ModelSpec& m : study.user_models) {
    Json j;
    j["id"] = m.id;
    j["name"] = m.name;
    j["formula"] = m.formula;
    j["reference"] = m.reference;
    j["closure_parameter"] =
        m.closure_parameter >= 0 ? Json(m.parameters[static_cast<size_t>(m.closure_parameter)].name) : Json(nullptr);
    Json params = Json::array();
    for (const ParameterSpec& p : m.parameters)
      params.push_back({{"name", p.name},
                        {"unit", p.unit},
                        {"si_factor", p.si_factor},
                        {"lower", bound(p.lower)},
                        {"upper", bound(p.upper)},
                        {"transform", p.transform == ParameterTransform::kLog ? "log" : "none"},
                        {"meaning", p.meaning}});
    j["parameters"] = params;
    out.push_back(j);
  }
  return out;
}

void WriteUserModelsSummary(const Study& study, std::ostream& out) {
  if (study.user_models.empty()) return;
  out << "User models (formulas of this study):\n";
  for (const ModelSpec& m : study.user_models) {
    out << "  " << m.id << ": " << m.formula << "\n    parameters:";
    for (size_t k = 0; k < m.parameters.size(); ++k) {
      const ParameterSpec& p = m.parameters[k];
      out << (k ? ", " : " ") << p.name << " [" << p.unit << "]";
    }
    out << "\n";
  }
}

}  // namespace porofit::detail

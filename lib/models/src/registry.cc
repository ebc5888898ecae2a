#include "porofit/models/registry.h"

#include <cmath>
#include <set>

#include "builtin.h"
#include "porofit/core/error.h"

namespace porofit {
namespace {

// Programmer-error checks on a spec: anything the fit engine or the catalogue
// listing relies on must be present and self-consistent.
void CheckComplete(const ModelSpec& s) {
  const std::string who = "model '" + s.id + "': ";
  POROFIT_CHECK(!s.id.empty(), "model id is empty");
  POROFIT_CHECK(!s.name.empty(), who + "name is empty");
  POROFIT_CHECK(!s.formula.empty(), who + "formula is empty");
  POROFIT_CHECK(!s.reference.empty(), who + "reference is empty");
  POROFIT_CHECK(!s.parameters.empty(), who + "has no parameters");
  POROFIT_CHECK(s.value && s.value_and_gradient && s.slope, who + "value/gradient/slope not set");
  POROFIT_CHECK(static_cast<bool>(s.start), who + "start heuristic not set");
  POROFIT_CHECK(s.x_si_factor > 0 && s.y_si_factor > 0, who + "x/y si factors must be positive");
  POROFIT_CHECK(s.closure_parameter >= -1 &&
                    s.closure_parameter < static_cast<int>(s.parameters.size()),
                who + "closure_parameter out of range");
  std::set<std::string> names;
  for (const ParameterSpec& p : s.parameters) {
    POROFIT_CHECK(!p.name.empty(), who + "parameter with empty name");
    POROFIT_CHECK(names.insert(p.name).second, who + "duplicate parameter name " + p.name);
    POROFIT_CHECK(!p.unit.empty(), who + "parameter " + p.name + " has no unit");
    POROFIT_CHECK(std::isfinite(p.si_factor) && p.si_factor > 0,
                  who + "parameter " + p.name + " si_factor must be positive");
    POROFIT_CHECK(p.lower < p.upper, who + "parameter " + p.name + " needs lower < upper");
    POROFIT_CHECK(p.transform != ParameterTransform::kLog || p.lower >= 0,
                  who + "parameter " + p.name + " is kLog but lower < 0");
    POROFIT_CHECK(!p.meaning.empty(), who + "parameter " + p.name + " has no meaning");
  }
}

}  // namespace

const ModelRegistry& ModelRegistry::Builtin() {
  static const ModelRegistry registry = [] {
    ModelRegistry r;
    r.Add(detail::MakeLinearModel());
    r.Add(detail::MakeExpModulusModel());
    r.Add(detail::MakeExpComplianceModel());
    r.Add(detail::MakeLinearExpModel());
    r.Add(detail::MakePowerRefModel());
    r.Add(detail::MakePowerOffsetModel());
    r.Add(detail::MakeGrainContactModel());
    return r;
  }();
  return registry;
}

void ModelRegistry::Add(ModelSpec spec) {
  CheckComplete(spec);
  POROFIT_CHECK(Find(spec.id) == nullptr, "duplicate model id '" + spec.id + "'");
  models_.push_back(std::move(spec));
}

const ModelSpec* ModelRegistry::Find(std::string_view id) const {
  for (const ModelSpec& m : models_)
    if (m.id == id) return &m;
  return nullptr;
}

std::vector<std::string> ModelRegistry::ids() const {
  std::vector<std::string> out;
  out.reserve(models_.size());
  for (const ModelSpec& m : models_) out.push_back(m.id);
  return out;
}

}  // namespace porofit

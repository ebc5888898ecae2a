// The catalogue of one study: built-ins plus the study's own formula models.
#include "porofit/run/run.h"

namespace porofit {

ModelRegistry StudyRegistry(const Study& study, const ModelRegistry* base) {
  ModelRegistry registry = base != nullptr ? *base : ModelRegistry::Builtin();
  for (const ModelSpec& m : study.user_models)
    if (registry.Find(m.id) == nullptr) registry.Add(m);
  return registry;
}

}  // namespace porofit

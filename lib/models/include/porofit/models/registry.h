#pragma once
// The model catalogue: every built-in crack-closure model, looked up by id.
#include <string>
#include <string_view>
#include <vector>

#include "porofit/models/model.h"

namespace porofit {

class ModelRegistry {
 public:
  /// The built-in catalogue (references in each model's spec and README.md), in a fixed order:
  /// linear, exp-modulus, exp-compliance, linear-exp, power-ref,
  /// power-offset, grain-contact.
  static const ModelRegistry& Builtin();

  /// Adds a model. Aborts (programmer error) if the id is already taken or
  /// the spec is incomplete.
  void Add(ModelSpec spec);
  /// The model with this id, or nullptr.
  const ModelSpec* Find(std::string_view id) const;
  const std::vector<ModelSpec>& models() const { return models_; }
  std::vector<std::string> ids() const;

 private:
  std::vector<ModelSpec> models_;
};

}  // namespace porofit

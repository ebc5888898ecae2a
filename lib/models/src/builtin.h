#pragma once
// Factories for the built-in catalogue, one per source file. Each returns a
// complete ModelSpec; registry.cc adds them in catalogue order.
#include "porofit/core/error.h"
#include "porofit/models/model.h"

namespace porofit::detail {

ModelSpec MakeLinearModel();         // M0  linear.cc
ModelSpec MakeExpModulusModel();     // M1  exp_modulus.cc
ModelSpec MakeExpComplianceModel();  // M2  exp_compliance.cc
ModelSpec MakeLinearExpModel();      // M3  linear_exp.cc
ModelSpec MakePowerRefModel();       // M5  power_ref.cc
ModelSpec MakePowerOffsetModel();    // M6  power_offset.cc
ModelSpec MakeGrainContactModel();   // M7  grain_contact.cc

/// AttachAutodiff plus a check that the functor and the parameter table agree
/// in size (a mismatch would read past theta).
template <class F>
void AttachFunctor(ModelSpec& spec) {
  POROFIT_CHECK(spec.parameters.size() == static_cast<size_t>(F::kNumParameters),
                "model '" + spec.id + "': parameter table and functor disagree in size");
  AttachAutodiff<F>(spec);
}

}  // namespace porofit::detail

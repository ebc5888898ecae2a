#pragma once
// Strain samples in results.json (private hook of the JSON writer).
#include <nlohmann/json.hpp>

#include "porofit/run/run.h"

namespace porofit::detail {

/// For a strain sample (IsStrainSample), rewrites sample i's JSON `js` (as
/// built by the JSON writer) so that every number carries its real unit: data
/// points gain eps_v (K_GPa null), each fit gains a "strain" object (response,
/// units, residuals in strain, rmse_strain, moduli rows) and its K-named
/// residual and rmse fields become null. Does nothing for other samples.
void AddStrainJson(const StudySample& sample, const SampleRun& run, nlohmann::ordered_json& js);

}  // namespace porofit::detail

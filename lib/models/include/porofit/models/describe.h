#pragma once
// Plain-text descriptions of the model catalogue, for a `models` command and
// for report headers. Output is wrapped to about 100 columns and uses ASCII.
#include <string>

#include "porofit/models/model.h"
#include "porofit/models/registry.h"

namespace porofit {

/// One model: id and name, formula, working units, one line per parameter
/// (name, unit, bounds, transform, fixed-by-default, meaning), closure scale,
/// strain form, reference and notes. Ends with a newline.
std::string DescribeModel(const ModelSpec& spec);

/// Every model of the registry in catalogue order, each as DescribeModel,
/// under a short header on units. Ends with a newline.
std::string DescribeCatalogue(const ModelRegistry& registry);

}  // namespace porofit

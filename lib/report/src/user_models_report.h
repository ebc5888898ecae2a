#pragma once
// How the reports show a study's models of its own (`user_models:`).
#include <nlohmann/json.hpp>

#include <ostream>

#include "porofit/io/study.h"

namespace porofit::detail {

/// results.json "user_models": one object per user model, in file order: id,
/// name, formula, reference, closure parameter, and each parameter's name,
/// working unit, si_factor, bounds (null when unbounded), transform and meaning.
nlohmann::ordered_json UserModelsJson(const Study& study);

/// summary.txt: "User models:" and one "  <id>: <formula>" line per model,
/// with its parameters and units; nothing when the study has none.
void WriteUserModelsSummary(const Study& study, std::ostream& out);

}  // namespace porofit::detail

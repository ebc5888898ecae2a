#pragma once
// Branch (hysteresis) test output shared by the JSON writer and the summary
// (private; the CSV writers are declared in porofit/report/report.h).
#include <ostream>

#include <nlohmann/json.hpp>

#include "porofit/run/run.h"

namespace porofit::detail {

/// The "branches" section of results.json: one entry per branch set.
nlohmann::ordered_json BranchesJson(const StudyRun& run);

/// Summary lines: per plug, the decision per model and the largest
/// hysteresis. Writes nothing when the study has no branch set.
void WriteBranchSummary(const StudyRun& run, std::ostream& out);

}  // namespace porofit::detail

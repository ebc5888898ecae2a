#pragma once
// Model-comparison parts of results.json and the terminal summary (private).
#include <ostream>

#include <nlohmann/json.hpp>

#include "porofit/run/run.h"

namespace porofit::detail {

/// results.json samples[i].comparison.
nlohmann::ordered_json SampleComparisonJson(const compare::SampleComparison& c);
/// results.json comparison_summary (with the study's comparison options).
nlohmann::ordered_json ComparisonSummaryJson(const StudyRun& run);

/// Two or three summary lines of one sample: ranking with weights, F-test
/// decisions, and cross-validation scores when computed.
void WriteSampleComparisonLines(const compare::SampleComparison& c, std::ostream& out);
/// The across-sample table per group.
void WriteComparisonGroupTable(const StudyRun& run, std::ostream& out);

}  // namespace porofit::detail

#pragma once
// Study-file pieces of the branch (hysteresis) tests: the `plug` key's rule
// and the `branch_tests` mapping (private to the io layer).
#include <string>
#include <vector>

#include "porofit/io/study.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// Reads the `branch_tests` mapping ({level, grid_points}). Throws InputError.
BranchTestSettings ReadBranchTestSettings(const Field& f, const std::string& file);

/// Throws InputError at `at` (the sample's `plug` value) if a sample in
/// `prior` already has the same plug, measurement kind, branch and cycle as
/// `s`: the branch set would be ambiguous.
void CheckPlugIsUnambiguous(const std::vector<StudySample>& prior, const Sample& s, const SourceLocation& at);

/// A warning (without location) when `s` describes its plug differently from
/// the first earlier sample of that plug: lithology, porosity, bulk density
/// or orientation differ (a plug is one piece of rock). "" when consistent.
std::string PlugConsistencyWarning(const std::vector<StudySample>& prior, const Sample& s);

}  // namespace porofit::io::detail

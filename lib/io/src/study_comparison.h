#pragma once
// The study file's top-level `comparison:` mapping (private to the io layer).
#include <string>

#include "porofit/compare/comparison.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// Reads `comparison:` into `out` (defaults kept for absent keys). Throws
/// InputError at the offending key or value.
void ReadComparison(const Field& f, const std::string& file, compare::ComparisonOptions& out);

}  // namespace porofit::io::detail

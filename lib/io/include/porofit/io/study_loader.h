#pragma once
// Loading study files (YAML, schema in docs/study-file.md).
//
// The loader is strict: every key must be known, every value is checked
// against its rule, and the first problem stops loading with a
// porofit::InputError located at file:line:col of the offending text (CSV
// data: file:line, or file:line:col for a bad cell). Values are converted to
// SI on the way in (porofit::units); dynamic samples get K and its propagated
// uncertainty per point (porofit::ComputeDynamicModuli). Data points keep
// file order and their source location. Input files are only read.
#include <string>
#include <string_view>

#include "porofit/io/study.h"
#include "porofit/models/registry.h"

namespace porofit {

/// Loads the study file at `path`, validating model ids and parameter names
/// against ModelRegistry::Builtin(). Data files named in the study are
/// resolved relative to the study file's folder. Throws InputError.
Study LoadStudy(const std::string& path);

/// Same, against a given model catalogue.
Study LoadStudy(const std::string& path, const ModelRegistry& registry);

/// Parses study text as if it had been read from `path` (used for locations
/// and to resolve data files). Throws InputError.
Study ParseStudy(std::string_view yaml_text, const std::string& path, const ModelRegistry& registry);

}  // namespace porofit

#pragma once
// `user_models:` of a study file: models of the user's own, written as
// formulas (porofit::MakeFormulaModel) with declared parameters.
#include <yaml-cpp/yaml.h>

#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/models/model.h"
#include "porofit/models/registry.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// Reads the `user_models` list (schema in docs/study-file.md, "Models of your
/// own") into complete ModelSpecs, in file order. An id that `known` already
/// has, or that repeats, is an error. A formula error is located at the
/// offending character of the study file (`raw_text` is the file's text, used
/// to find characters of quoted, multi-line and block scalars). Throws
/// InputError.
std::vector<ModelSpec> ReadUserModels(const Field& f, const std::string& file, std::string_view raw_text,
                                      const ModelRegistry& known);

/// The file:line:col of character `index` (0-based; index == text size: just
/// past the last character) of the scalar `node`, whose text as parsed is
/// `text`. Exact for plain, single- and double-quoted scalars on one line and
/// for block scalars (| and >) and multi-line plain scalars, as long as the
/// characters up to `index` are in the file as written (no escapes other than
/// the ones YAML quoting defines).
SourceLocation ScalarCharLocation(const YAML::Node& node, const std::string& text, size_t index,
                                  std::string_view raw_text, const std::string& file);

}  // namespace porofit::io::detail

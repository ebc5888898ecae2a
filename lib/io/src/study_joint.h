#pragma once
// The `joint_fits:` section of a study file (lib/io/src/study_joint.cc).
#include <yaml-cpp/yaml.h>

#include <functional>
#include <string>
#include <vector>

#include "porofit/io/study.h"
#include "porofit/models/registry.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// Reads a model choice (id and `parameters:`) from `node` as a `models:`
/// entry; the loader passes its own reader so the unit rules are the same.
using ModelChoiceReader = std::function<ModelChoice(const YAML::Node& node, const std::string& path)>;

/// Reads and checks every entry against the loaded samples. Throws InputError
/// with the location of the offending value.
std::vector<JointFitChoice> ReadJointFits(const Field& f, const std::string& file,
                                          const std::vector<StudySample>& samples, const ModelRegistry& registry,
                                          const ModelChoiceReader& read_choice);

}  // namespace porofit::io::detail

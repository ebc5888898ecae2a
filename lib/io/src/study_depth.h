#pragma once
// The `depth_tables:` section of a study file (lib/io/src/study_depth.cc;
// docs/study-file.md, "Depth tables").
#include <string>
#include <vector>

#include "porofit/io/study.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// Reads and checks every entry against the loaded samples. LAS files are
/// read here (paths relative to the study file) and appended to `inputs`
/// with role "data". Throws InputError with the location of the offending
/// value (a LAS file's own errors pass through with that file's lines).
std::vector<DepthTableChoice> ReadDepthTables(const Field& f, const std::string& file,
                                              const std::vector<StudySample>& samples,
                                              std::vector<InputFile>& inputs);

}  // namespace porofit::io::detail

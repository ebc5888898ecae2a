#pragma once
// The compact batch form of a study (private to the io layer): a
// `sample_table:` mapping naming one CSV row per sample and one long data CSV
// keyed by a sample-id column. Layout and rules: docs/study-file.md, "Many
// samples: sample_table".
#include <map>
#include <optional>
#include <string>
#include <vector>

#include "porofit/io/study.h"
#include "porofit/models/registry.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// What the study file's `defaults:` and `grain_moduli:` give every batch
/// sample (the loader's own state, lent for the call).
struct BatchDefaults {
  const std::vector<ModelChoice>* models = nullptr;  ///< defaults.models (may be empty)
  FitOptions options;                                ///< defaults.fit
  std::optional<bool> scale_covariance;              ///< defaults.fit.scale_covariance, if written
  SourceLocation scale_covariance_at;
  BandSettings bands;                                ///< defaults.bands
  const std::map<std::string, GrainModulusChoice>* groups = nullptr;  ///< grain_moduli
  /// The study gives some sample a grain modulus: every batch sample must
  /// then state one (a group name or `none`) in a grain_modulus column.
  bool any_grain = false;
};

/// Reads the `sample_table` mapping and appends one StudySample per row of
/// its sample CSV to `study.samples` (and the two CSV files to study.inputs).
/// Throws InputError located at the YAML key, or file:line(:col) of the CSV
/// cell at fault.
void ReadSampleTable(const Field& table, const std::string& study_file, const ModelRegistry& registry,
                     const BatchDefaults& defaults, Study& study);

}  // namespace porofit::io::detail

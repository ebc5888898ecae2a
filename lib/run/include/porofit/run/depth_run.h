#pragma once
// Alpha-versus-depth tables of a run (Study::depth_tables), computed after
// the per-sample fits from the fits the tables name (lib/run/src/depth_run.cc).
#include <string>
#include <vector>

#include "porofit/depth/table.h"
#include "porofit/io/study.h"
#include "porofit/models/registry.h"

namespace porofit {

struct SampleRun;

/// One computed table. computed = false when a fit the table names is not
/// usable at run time (not converged, or no covariance) or the engine rejects
/// the spec: then `message` says which fit and why, and `table.rows` is empty
/// (the table is not written partially; the CSV carries the message).
struct DepthTableRun {
  bool computed = false;
  std::string message;
  depth::DepthTable table;  ///< table.spec is the choice's spec with the fit pointers set
};

/// Computes the table of `choice` from `samples` (parallel to study.samples;
/// only the fits of the samples the table names are read). The FittedCurve
/// pointers point into `samples` and `registry`; they are cleared in the
/// returned table.spec (the table does not outlive them otherwise).
/// Never throws for a failing fit or a rejected spec.
DepthTableRun RunDepthTable(const Study& study, const DepthTableChoice& choice, const std::vector<SampleRun>& samples,
                            const ModelRegistry& registry);

/// True if sample `index` is named by any depth table of the study (its fits
/// must then be kept by a streaming run until the tables are computed).
bool UsedByDepthTables(const Study& study, size_t index);

}  // namespace porofit

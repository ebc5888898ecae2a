#pragma once
// Running a loaded study: every sample x model fit, in a fixed order.
//
// RunStudy() takes a Study (from porofit::LoadStudy) and fits every model
// choice of every sample. The result is a plain value type holding the study,
// one FitResult per (sample, model) in file order, and the run's metadata, so
// that the report layer can render it without re-running anything.
//
// Determinism: each fit is independent and seeded (FitOptions::seed), and the
// results are placed by index, so the output is identical for any thread count.
// Failure: a fit that fails is a FitResult status (with message), never an
// exception; RunStudy() itself throws only std::bad_alloc-like system errors.
#include <string>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/fitter.h"
#include "porofit/io/study.h"
#include "porofit/models/registry.h"

namespace porofit {

struct RunOptions {
  /// Worker threads over samples. 1 runs everything on the calling thread.
  /// Must be >= 1 (Validate()).
  int threads = 1;
  /// The command line that started the run, recorded verbatim in provenance.
  std::string command_line;
  /// UTC start time, ISO-8601 "YYYY-MM-DDThh:mm:ssZ". Empty: the current time
  /// is taken when RunStudy() starts. Tests pass a fixed value so that outputs
  /// can be compared byte for byte.
  std::string timestamp_utc;
  /// Catalogue the model ids are looked up in. nullptr: ModelRegistry::Builtin().
  const ModelRegistry* registry = nullptr;

  /// Empty if valid, otherwise "field = value violates rule".
  std::string Validate() const;
};

/// Facts about the run itself, for provenance.
struct RunMetadata {
  std::string started_utc;   ///< ISO-8601, UTC
  std::string tool_version;  ///< porofit::kVersion
  std::string build_type;    ///< CMAKE_BUILD_TYPE of the library ("Release", ...)
  std::string command_line;
  int threads = 1;
  double wall_seconds = 0;   ///< elapsed time of all fits, s (not part of any comparison)
};

/// alpha_h and alpha_v at one pressure of a sample's VTI stiffness table,
/// with the 1-sigma owed to K_s (the stiffnesses are taken as exact).
struct VtiAlphaPoint {
  double pressure = 0;  ///< Pa
  double alpha_h = 0, alpha_v = 0;
  double sigma_h = 0, sigma_v = 0;  ///< from sigma_K_s only: (1 - alpha) sigma_K_s / K_s
  bool extrapolated = false;        ///< outside the sample's K data pressure range
};

/// The fits of one sample, in the order of StudySample::models, and their
/// alpha bands.
struct SampleRun {
  std::vector<FitResult> fits;
  /// Parallel to `fits` when the sample has a grain modulus, else empty. An
  /// entry with computed = false says why (fit not converged, no covariance,
  /// grid problem); the band layer's notes are in BandResult::notes.
  std::vector<bands::BandResult> bands;
  std::vector<VtiAlphaPoint> vti;  ///< one per StudySample::vti row
};

struct StudyRun {
  Study study;
  std::vector<SampleRun> samples;  ///< parallel to study.samples
  RunMetadata metadata;
};

/// True if every data point of `s` has a sigma (> 0): the fit is weighted by
/// 1/sigma_i^2. Otherwise (no sigma at all) it is unweighted.
bool IsWeighted(const Sample& s);

/// Builds the fit request for one sample and model choice: x = P (differential
/// pressure, Pa), y = K (Pa), sigma = DataPoint::sigma when every point has
/// one (> 0), otherwise unweighted. `model` may be nullptr (unknown id): the
/// caller then reports kInvalidRequest.
FitRequest MakeFitRequest(const StudySample& sample, const ModelChoice& choice, const ModelSpec* model);

/// Fits one model choice to one sample; never throws for a failing fit.
FitResult RunOne(const StudySample& sample, const ModelChoice& choice, const ModelRegistry& registry);

/// Computes the alpha bands of one fit (the sample must have a grain modulus).
/// Never throws for bad data: problems become computed = false with a message.
/// With a fluid modulus, the K_f variance is added to the delta-method bands
/// of M, K_u and B (first order, same quantile; see docs/outputs.md).
bands::BandResult RunBands(const StudySample& sample, const ModelChoice& choice, const FitResult& fit,
                           const ModelRegistry& registry);

/// Runs the whole study. Requires options.Validate().empty() (checked: a bad
/// option is a programmer error and aborts).
StudyRun RunStudy(const Study& study, const RunOptions& options);

/// Current UTC time as "YYYY-MM-DDThh:mm:ssZ".
std::string UtcTimestampNow();

}  // namespace porofit

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
#include <cstddef>
#include <functional>
#include <limits>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/compare/joint_vs_separate.h"
#include "porofit/compare/summary.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/fitter.h"
#include "porofit/fit/joint.h"
#include "porofit/io/study.h"
#include "porofit/models/registry.h"
#include "porofit/run/branches.h"
#include "porofit/run/depth_run.h"

namespace porofit {

/// Most worker threads a run accepts (`--threads`): more than any machine
/// porofit runs on has cores; each thread holds a fit's working memory.
inline constexpr int kMaxRunThreads = 1024;

struct RunOptions {
  /// Worker threads over samples. 1 runs everything on the calling thread.
  /// In [1, kMaxRunThreads] (Validate()).
  int threads = 1;
  /// The command line that started the run, recorded verbatim in provenance.
  std::string command_line;
  /// UTC start time, ISO-8601 "YYYY-MM-DDThh:mm:ssZ". Empty: the current time
  /// is taken when RunStudy() starts. Tests pass a fixed value so that outputs
  /// can be compared byte for byte.
  std::string timestamp_utc;
  /// Catalogue the model ids are looked up in. nullptr: ModelRegistry::Builtin().
  /// Either way the study's user models are added (StudyRegistry()).
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

/// alpha_h and alpha_v at one pressure of a sample's VTI stiffness, either
/// from a table row as given (source "table"; the stiffnesses are taken as
/// exact, so the 1-sigma is owed to K_s only) or from the fitted stiffness
/// curves of `vti_stiffness.fit` at that row's pressure (source "fitted"; the
/// 1-sigma adds, to first order, the variance of each fitted curve,
/// g^T Cov g, the four fits taken as independent):
///   Var alpha_h = (Var C11 + Var C12 + Var C13)/(3 K_s)^2 + ((1 - alpha_h) sigma_K_s/K_s)^2,
///   Var alpha_v = (4 Var C13 + Var C33)/(3 K_s)^2 + ((1 - alpha_v) sigma_K_s/K_s)^2.
struct VtiAlphaPoint {
  double pressure = 0;  ///< Pa
  double c11 = 0, c12 = 0, c13 = 0, c33 = 0;  ///< stiffnesses used (given or fitted), Pa
  double alpha_h = 0, alpha_v = 0;
  double sigma_h = 0, sigma_v = 0;  ///< total 1-sigma (see above)
  double sigma_h_fit = 0, sigma_v_fit = 0;  ///< the part owed to the stiffness fits (0 for "table")
  bool extrapolated = false;        ///< outside the sample's K data pressure range
  std::string source = "table";     ///< "table", "fitted" (at a table pressure) or "fitted-grid" (band grid)
};

/// One stiffness fit of `vti_stiffness.fit` (x = P, y = C_ij, unweighted).
struct VtiStiffnessFit {
  std::string component;  ///< "C11", "C12", "C13" or "C33"
  FitResult fit;          ///< status and message say why, if it failed
};

/// One row of a strain sample's moduli table (moduli.csv), SI. Sources:
///  - "fitted": the fitted curve at a pressure of the sample's band grid:
///    eps_v(P; theta_hat), the tangent K_t = K(P; theta_hat) = dP/d eps from the
///    fitted derivative (never from differencing data) with its delta-method
///    band g^T Cov g (t_{n-p} quantile when the covariance is scaled, else
///    normal), and the secant K_sec = P / eps_v(P; theta_hat);
///  - "fitted-chord": Delta P / Delta eps of the fitted curve between
///    consecutive distinct data pressures;
///  - "data-chord": Delta P / Delta eps of the data between consecutive
///    distinct pressures (repeats averaged), model_id "" (no model involved).
/// Numbers that do not apply to a row are NaN.
struct StrainModulusPoint {
  std::string model_id;  ///< "" for "data-chord"
  std::string source;    ///< "fitted", "fitted-chord" or "data-chord"
  double pressure = 0;   ///< Pa: grid pressure, or chord midpoint
  double pressure_from = std::numeric_limits<double>::quiet_NaN();  ///< chord start, Pa
  double pressure_to = std::numeric_limits<double>::quiet_NaN();    ///< chord end, Pa
  double strain = std::numeric_limits<double>::quiet_NaN();         ///< fitted eps_v at `pressure` (plain strain)
  double tangent = std::numeric_limits<double>::quiet_NaN();        ///< K_t, Pa
  double tangent_se = std::numeric_limits<double>::quiet_NaN();     ///< 1-sigma of K_t, Pa
  double tangent_lower = std::numeric_limits<double>::quiet_NaN();  ///< confidence band of K_t, Pa
  double tangent_upper = std::numeric_limits<double>::quiet_NaN();
  double confidence = 0;  ///< level of the band (StudySample::bands.options.confidence)
  double secant = std::numeric_limits<double>::quiet_NaN();  ///< P / eps_v, Pa (NaN at P = 0)
  double chord = std::numeric_limits<double>::quiet_NaN();   ///< Delta P / Delta eps, Pa
  bool extrapolated = false;  ///< grid pressure outside the data range
};

/// The fits of one sample, in the order of StudySample::models, and their
/// alpha bands.
struct SampleRun {
  std::vector<FitResult> fits;
  /// Parallel to `fits` when the sample has a grain modulus, else empty. An
  /// entry with computed = false says why (fit not converged, no covariance,
  /// grid problem); the band layer's notes are in BandResult::notes.
  std::vector<bands::BandResult> bands;
  /// One "table" point per StudySample::vti row, then (with
  /// vti_stiffness.fit and all four stiffness fits usable) one "fitted" point
  /// per row, in the same order, then one "fitted-grid" point per pressure of
  /// the sample's band grid (StudySample::bands.grid over its K data).
  std::vector<VtiAlphaPoint> vti;
  /// The four stiffness fits (C11, C12, C13, C33) when vti_stiffness.fit is
  /// given, else empty.
  std::vector<VtiStiffnessFit> vti_fits;
  /// Strain samples only (Sample::response == kStrain), else empty: the
  /// sample's data chords, then for each usable fit its "fitted" and
  /// "fitted-chord" rows (see StrainModulusPoint). The fits in `fits` are
  /// strain-form fits of each K-model: same id and parameters, residuals in
  /// plain strain.
  std::vector<StrainModulusPoint> strain_moduli;
  /// Model comparison of `fits` (Study::comparison; lib/run/src/compare_run.cc).
  compare::SampleComparison comparison;
};

/// One entry of Study::joint_fits, run by RunJoint() (lib/run/src/joint_run.cc).
struct JointRun {
  /// The joint fit; its data sets are the members in JointFitChoice::samples
  /// order (labels = sample ids). Options: the first member's FitOptions, with
  /// plain least squares (a robust loss there is dropped and noted).
  JointFitResult fit;
  /// Joint against the separate fits of the same model to each member.
  compare::JointVsSeparate comparison;
  /// Alpha bands per member (parallel to JointFitChoice::samples) from the
  /// member's view of the joint fit (delta method and Monte Carlo carry the
  /// shared parameters' variance; bootstrap is not available for joint fits);
  /// computed = false with a message for a member without grain modulus.
  std::vector<bands::BandResult> bands;
  /// Statements every report of this joint fit must carry (correlation through
  /// the shared parameters, mixed branches, dropped loss or bootstrap).
  std::vector<std::string> notes;
};

struct StudyRun {
  Study study;
  std::vector<SampleRun> samples;  ///< parallel to study.samples
  /// Joint vs separate tests and hysteresis of every branch set (plugs with
  /// two or more samples of one kind; porofit/run/branches.h).
  std::vector<BranchSetRun> branches;
  std::vector<JointRun> joint_fits;  ///< parallel to study.joint_fits
  std::vector<DepthTableRun> depth_tables;  ///< parallel to study.depth_tables (porofit/run/depth_run.h)
  RunMetadata metadata;
  /// Model comparison across samples, grouped by Study::comparison.group_by.
  compare::ComparisonSummary comparison_summary;
  /// The catalogue the run used: built-ins (or RunOptions::registry) plus the
  /// study's user models. Set by RunStudy(); the report layer and every later
  /// table look model ids up here. May be null in a hand-made StudyRun.
  std::shared_ptr<const ModelRegistry> registry;
};

/// The catalogue a study runs against: `base` (nullptr: ModelRegistry::Builtin())
/// plus every model of study.user_models whose id `base` does not already hold,
/// in file order.
ModelRegistry StudyRegistry(const Study& study, const ModelRegistry* base = nullptr);

/// True if every data point of `s` has a sigma (> 0): the fit is weighted by
/// 1/sigma_i^2. Otherwise (no sigma at all) it is unweighted.
bool IsWeighted(const Sample& s);

/// Builds the fit request for one sample and model choice: x = P (differential
/// pressure, Pa), y = K (Pa) — or, for a strain sample, y = eps_v (plain
/// strain; `model` must then be the strain form, StrainForm()) — sigma =
/// DataPoint::sigma when every point has one (> 0), otherwise unweighted. `model` may be nullptr (unknown id): the
/// caller then reports kInvalidRequest.
FitRequest MakeFitRequest(const StudySample& sample, const ModelChoice& choice, const ModelSpec* model);

/// True for a static sample whose response is volumetric strain.
bool IsStrainSample(const StudySample& sample);

/// Fits one model choice to a strain sample in strain form (StrainForm of the
/// catalogue model; lib/run/src/strain_run.cc). Never throws for a failing fit;
/// a model without a strain form is kInvalidRequest.
FitResult RunOneStrain(const StudySample& sample, const ModelChoice& choice, const ModelSpec& k_model);

/// The moduli table of a strain sample (SampleRun::strain_moduli) from its
/// fits (parallel to sample.models). Empty for a sample that is not a strain sample.
std::vector<StrainModulusPoint> RunStrainModuli(const StudySample& sample, const std::vector<FitResult>& fits,
                                                const ModelRegistry& registry);

/// Fits one model choice to one sample; never throws for a failing fit.
FitResult RunOne(const StudySample& sample, const ModelChoice& choice, const ModelRegistry& registry);

/// Progress inside one sample while it runs, for the long steps (today the
/// bootstrap refits): `stage` names the step ("bootstrap exp-modulus"), and
/// done of total counts its units. Called on the thread computing the sample,
/// so it must be thread-safe when samples run in parallel. It never changes a
/// result. An empty function is not called.
using SampleProgress = std::function<void(std::string_view stage, size_t done, size_t total)>;

/// Computes the alpha bands of one fit (the sample must have a grain modulus).
/// Never throws for bad data: problems become computed = false with a message.
/// With a fluid modulus, the K_f variance is added to the delta-method bands
/// of M, K_u and B (first order, same quantile; see docs/outputs.md).
/// `progress` hears the bootstrap refits as stage "bootstrap <model id>".
bands::BandResult RunBands(const StudySample& sample, const ModelChoice& choice, const FitResult& fit,
                           const ModelRegistry& registry, const SampleProgress& progress = {});

/// The alpha_h, alpha_v points of a sample's VTI table (see SampleRun::vti),
/// and in `fits` its stiffness fits. Never throws for a failing fit: a fit
/// that is not usable leaves the "fitted" points out and says why in its
/// FitResult. Needs a grain modulus (otherwise returns nothing).
std::vector<VtiAlphaPoint> RunVti(const StudySample& sample, const ModelRegistry& registry,
                                  std::vector<VtiStiffnessFit>& fits);

/// Runs one joint fit of `study` (after its per-sample fits; independent of
/// them), its comparison with the separate fits and its members' alpha bands.
/// Never throws for a failing fit.
JointRun RunJoint(const Study& study, const JointFitChoice& choice, const ModelRegistry& registry);
/// Everything RunStudy() computes for one sample: its fits, alpha bands and
/// VTI points. Never throws for a failing fit. The streaming runner
/// (porofit/run/stream.h) and RunStudy() both call it.
SampleRun RunSample(const StudySample& sample, const ModelRegistry& registry,
                    const compare::ComparisonOptions& comparison = {}, const SampleProgress& progress = {});

/// Runs the whole study. Requires options.Validate().empty() (checked: a bad
/// option is a programmer error and aborts).
StudyRun RunStudy(const Study& study, const RunOptions& options);

/// A sample's fields for grouping: id, lithology, orientation, measurement,
/// branch, cycle (compare::StandardSampleFields()).
compare::SampleFieldMap SampleFieldValues(const Sample& s);
/// Compares the fits of one sample (in the order of sample.models); the
/// cross-validation refits use MakeFitRequest(). Never throws for bad fits.
compare::SampleComparison RunComparison(const StudySample& sample, const std::vector<FitResult>& fits,
                                        const compare::ComparisonOptions& options, const ModelRegistry& registry);
/// The across-sample summary of run.samples[i].comparison, in sample order.
compare::ComparisonSummary SummarizeComparisons(const StudyRun& run);

/// Current UTC time as "YYYY-MM-DDThh:mm:ssZ".
std::string UtcTimestampNow();

}  // namespace porofit

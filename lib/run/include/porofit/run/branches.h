#pragma once
// Branch (hysteresis) tests: loading against unloading and first against
// later cycles of one plug (common practice: fit each branch and cycle
// separately, test joint against separate fits, never pool them silently).
//
// A branch set is the samples of one plug (Sample::plug) with one measurement
// kind (static and dynamic are never mixed) and different (branch, cycle).
// For every model fitted to the members, the separate fits are the per-sample
// fits the run already made (m members, p_i free parameters each). The joint
// fit is ONE parameter set fitted to the concatenated data of all members,
// each point with its own weight; it exists only inside this test, labelled
// "pooled, for the test only", and is never a sample result.
//
//   F = [(RSS_joint - RSS_sep)/(p_sep - p_joint)] / [RSS_sep/(N - p_sep)],
//   RSS_sep = sum_i SSR_i, p_sep = sum_i p_i, N = sum_i n_i,
//
// with compare::NestedFTest (joint is the restricted model: all members share
// one parameter set). AICc of both on the pooled data (compare::AiccCorrection):
//  - sigma relative (FitOptions::scale_covariance true): one common noise
//    variance is estimated and counted in k, AIC = N ln(RSS/N) + 2k with
//    k_joint = p_joint + 1, k_sep = p_sep + 1;
//  - sigma absolute: AIC = RSS (= chi^2) + 2k, k_joint = p_joint, k_sep = p_sep.
// The F test assumes one noise level shared by the members (relative weights
// are taken as comparable across members).
//
// Hysteresis: dK(P) = K_b(P) - K_a(P) from the two fitted curves on a linear
// grid over the overlap of the two data pressure ranges, with a delta-method
// 1-sigma from each fit's covariance (the two fits are independent, so the
// variances add): Var dK = g_a^T Cov_a g_a + g_b^T Cov_b g_b.
//
// Nothing here throws for bad data or failed fits: a test that cannot be made
// says why in `reason`.
#include <cstddef>
#include <limits>
#include <string>
#include <vector>

#include "porofit/compare/criteria.h"
#include "porofit/fit/fit_result.h"
#include "porofit/io/study.h"
#include "porofit/models/registry.h"

namespace porofit {

struct SampleRun;  // porofit/run/run.h

/// The samples of one plug and measurement kind, along different (branch, cycle).
struct BranchSet {
  std::string plug;
  MeasurementKind kind = MeasurementKind::kStatic;
  /// Indices into Study::samples, ordered by cycle, loading before unloading.
  std::vector<size_t> members;
};

/// Every branch set of the study with at least two members, in order of the
/// first sample of each (plug, kind). Samples without a plug, and plugs with
/// one sample of a kind, form no set.
std::vector<BranchSet> FindBranchSets(const Study& study);

/// "loading, cycle 1".
std::string BranchLabel(const Sample& s);

/// Joint (pooled) against separate fits of some members of a branch set, for one model.
struct BranchTest {
  std::string model_id;
  /// "set" (every member of the set) or "pair" (two members; only in sets of
  /// three or more, for the pairs listed in BranchSetRun::hysteresis).
  std::string scope = "set";
  std::vector<size_t> members;  ///< indices into Study::samples
  bool tested = false;          ///< F test computed
  std::string reason;           ///< why not tested ("" when tested)
  int n = 0;                    ///< pooled points N
  int p_joint = 0, p_separate = 0;
  double rss_joint = std::numeric_limits<double>::quiet_NaN();     ///< weighted SSR of the joint fit
  double rss_separate = std::numeric_limits<double>::quiet_NaN();  ///< sum of the members' weighted SSR
  compare::FTestResult f_test;  ///< joint (restricted) vs separate
  /// true: AIC = N ln(RSS/N) + 2k with one common noise variance counted in k
  /// (sigma relative); false: AIC = RSS + 2k (sigma absolute).
  bool noise_estimated = true;
  int k_joint = 0, k_separate = 0;
  double aicc_joint = std::numeric_limits<double>::quiet_NaN();
  double aicc_separate = std::numeric_limits<double>::quiet_NaN();
  /// "branches differ" (F > critical at BranchTestSettings::level), "no
  /// evidence of difference", or "" when not tested.
  std::string decision;
  /// The pooled fit, for the test only (never a sample result). Status
  /// kInvalidRequest with message "fit was not run" when a check failed first.
  FitResult joint;
};

/// K_b(P) - K_a(P) of one model between two members of a branch set.
struct Hysteresis {
  std::string model_id;
  size_t a = 0, b = 0;  ///< indices into Study::samples: reference a, compared b
  /// "unloading - loading, cycle 1", "cycle 2 - cycle 1, loading", or for a
  /// two-member set of other branches "<b> - <a>" with BranchLabel()s.
  std::string pair;
  /// a is the loading and b the unloading of one cycle: b is expected to be
  /// stiffer (common practice: crack closure hysteresis), and the sign is checked.
  bool loading_unloading = false;
  bool computed = false;
  std::string reason;  ///< why not computed (no overlap, unusable fit, ...)
  std::vector<double> pressure;  ///< Pa, linear over the overlap of the two data ranges
  std::vector<double> k_a, k_b, dk;  ///< Pa
  /// 1-sigma of dk, Pa (delta method, variances added); NaN where a fit has no covariance.
  std::vector<double> sigma_dk;
  double max_relative = std::numeric_limits<double>::quiet_NaN();  ///< dK/K_a where |dK/K_a| is largest (signed)
  double max_relative_pressure = std::numeric_limits<double>::quiet_NaN();  ///< Pa
  /// loading_unloading and the unloading curve is softer than loading beyond
  /// 2 sigma (beyond 0 when sigma is not available) at some grid point.
  bool unexpected_sign = false;
  int softer_points = 0;  ///< grid points counted in unexpected_sign
  std::string note;       ///< text of the sign flag or of a missing covariance
};

struct BranchSetRun {
  BranchSet set;
  /// Per model (in order of first appearance among the members' model lists):
  /// the "set" test, then, in sets of three or more, one "pair" test per pair
  /// of `hysteresis` (same order).
  std::vector<BranchTest> tests;
  /// Per model, per compared pair: loading/unloading of each cycle, then each
  /// later cycle of a branch against that branch's first cycle.
  std::vector<Hysteresis> hysteresis;
};

/// The pooled fit: one parameter set of `model` with `choice`'s settings and
/// the first member's fit options, on the concatenated data of `members` (in
/// that order, each point with its own sigma, MakeFitRequest per member).
/// Never throws for a failing fit.
FitResult FitPooled(const Study& study, const std::vector<size_t>& members, const ModelChoice& choice,
                    const ModelSpec& model);

/// Joint vs separate test of `members` for model `model_id`, with the
/// separate fits taken from `fits` (parallel to study.samples).
BranchTest TestBranches(const Study& study, const std::vector<SampleRun>& fits, const std::vector<size_t>& members,
                        const std::string& model_id, const ModelRegistry& registry);

/// dK(P) = K_b - K_a of model `model_id` from the fits in `fits`, on
/// `grid_points` pressures across the overlap of the two data ranges.
Hysteresis CompareBranches(const Study& study, const std::vector<SampleRun>& fits, size_t a, size_t b,
                           const std::string& model_id, const ModelRegistry& registry, int grid_points);

/// All tests of one set (see BranchSetRun).
BranchSetRun RunBranchSet(const Study& study, const std::vector<SampleRun>& fits, const BranchSet& set,
                          const ModelRegistry& registry);

/// RunBranchSet for every FindBranchSets(study).
std::vector<BranchSetRun> RunBranches(const Study& study, const std::vector<SampleRun>& fits,
                                      const ModelRegistry& registry);

}  // namespace porofit

#pragma once
// Model comparison of one sample (Burnham & Anderson 2002, Model Selection and
// Multimodel Inference, 2nd ed., Springer [from memory]): the
// information criteria of every model fitted to the sample, their
// differences, Akaike weights and ranks; nested F tests for the regular
// nestings of the catalogue only (DeclaredNestings() below, computed from the model
// formulas), with a reason
// for every pair of models that is not tested; and optional cross-validation
// (leave-one-out, leave-highest-pressure-out) by refitting through
// porofit::Fit.
//
// Inputs are a sample's FitRequest (as the run built it: data, weights,
// study settings, options) and FitResult per model choice. Nothing here
// throws for bad fits: an unusable fit is excluded with its reason, a test
// that cannot be made says why. Deterministic: refits are seeded through
// FitOptions::seed and start from the full fit's estimate.
#include <cstddef>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/compare/criteria.h"
#include "porofit/fit/fit_result.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/model.h"

namespace porofit::compare {

/// The score that ranks models (lower is better). AICc is the default: it is
/// required at laboratory sample sizes (Hurvich & Tsai, 1989).
enum class Criterion { kAicc, kAic, kBic };
std::string_view ToString(Criterion c);  ///< "aicc", "aic", "bic"

struct CrossValidationOptions {
  /// Leave-one-out: n refits per model. Off by default: it multiplies the fit
  /// work of a study by about n (10-20 at lab sizes), and the ranking by
  /// AICc does not need it.
  bool leave_one_out = false;
  /// Leave-highest-pressure-out: one refit per model without the
  /// `holdout_points` highest-pressure points, which are then predicted (an
  /// extrapolation test). On by default: it costs one refit per model, and
  /// extrapolation above the tested pressure is the common use of a fit.
  bool high_pressure_holdout = true;
  /// Number of highest-pressure points held out (h >= 1).
  int holdout_points = 1;
};

struct ComparisonOptions {
  Criterion criterion = Criterion::kAicc;
  /// Confidence level of the nested F tests, in (0, 1).
  double f_test_level = 0.95;
  CrossValidationOptions cross_validation;
  /// Sample fields that group samples in the across-sample summary (see
  /// StandardSampleFields()); empty = one group of all samples.
  std::vector<std::string> group_by = {"lithology"};

  /// Empty if valid, otherwise "field = value violates rule".
  std::string Validate() const;
};

/// Names of the sample fields every sample has: id, lithology, orientation,
/// measurement, branch, cycle. (Other fields may be added to a sample's field
/// map by whoever builds it; the accumulator accepts any name.)
const std::vector<std::string>& StandardSampleFields();

/// One model of the sample to compare. `request` must be the request that
/// produced `fit` (its model is the ModelSpec, nullptr when the id is not in
/// the catalogue).
struct ComparedFit {
  std::string model_id;
  const FitResult* fit = nullptr;
  const FitRequest* request = nullptr;
};

/// Cross-validation score of one model and scheme.
struct CrossValidationScore {
  bool computed = false;
  std::string reason;         ///< why not computed ("" if computed)
  int folds = 0;              ///< refits attempted (n for LOO, 1 for holdout)
  int refits_failed = 0;      ///< refits that did not converge (their points are not scored)
  int points_predicted = 0;   ///< held-out points scored
  double rmse = std::numeric_limits<double>::quiet_NaN();  ///< sqrt(mean e^2), e = observed - predicted, Pa
  double mean_error = std::numeric_limits<double>::quiet_NaN();  ///< mean e (bias; > 0: the model under-predicts), Pa
  /// sqrt(mean (e_i/sigma_i)^2) with the sample's declared sigma_i (not
  /// rescaled, so the same for every model); NaN when the sample is unweighted.
  double rms_standardized = std::numeric_limits<double>::quiet_NaN();
  int rank = 0;               ///< 1 = best among models with every refit converged; 0 = not ranked
};

/// Scores of one model of the sample.
struct ModelScore {
  std::string model_id;
  bool included = false;        ///< usable fit with a finite ranking score
  std::string excluded_reason;  ///< why not (empty when included)
  int n = 0;                    ///< data points
  int k = 0;                    ///< estimated quantities in the criteria (free parameters, + 1 if the noise level is estimated)
  static constexpr double kNotComputed = std::numeric_limits<double>::quiet_NaN();
  double aic = kNotComputed, aicc = kNotComputed, bic = kNotComputed;  ///< NaN when not computed
  bool aicc_defined = false;    ///< n > k + 1
  /// Differences to the best included model and Akaike weights (AIC, AICc,
  /// BIC), over the included models with that score defined; NaN otherwise.
  double delta_aic = kNotComputed, delta_aicc = kNotComputed, delta_bic = kNotComputed;
  double weight_aic = kNotComputed, weight_aicc = kNotComputed, weight_bic = kNotComputed;
  int rank = 0;                 ///< by the criterion, 1 = best; 0 = not ranked
  CrossValidationScore leave_one_out, holdout;
};

enum class NestingKind {
  kRegular,     ///< restriction is an interior point: F test valid
  kBoundary,    ///< restriction on a bound or a limit: F test invalid
  kNotNested,   ///< neither model contains the other
  kUndeclared,  ///< no nesting declared for the pair
};
std::string_view ToString(NestingKind k);  ///< "regular", "boundary-or-limit", "not-nested", "not-declared"

/// One declared relation between two catalogue models (computed from their formulas).
struct Nesting {
  std::string restricted;    ///< model id of the smaller model
  std::string fuller;        ///< model id of the larger one
  NestingKind kind = NestingKind::kRegular;
  std::string restriction;   ///< e.g. "B = 0"
  std::string parameter;     ///< the fuller model's restricted parameter (regular only)
  double value = 0;          ///< its value under the restriction, working units
  std::vector<std::string> held_fixed;  ///< fuller-model parameters that must be fixed for the nesting
  std::string note;          ///< why the F test is not valid (boundary, not nested)
};
/// The catalogue's declared relations: exp-modulus in linear-exp (B = 0) and
/// grain-contact in power-ref (n = 1/3, P_ref fixed) regular; linear in
/// exp-modulus (P_close -> inf), power-ref in power-offset (P_r -> 0) and
/// linear in linear-exp (C = 0 on its bound, D then unidentified) boundary
/// or limit; exp-modulus and exp-compliance not nested.
const std::vector<Nesting>& DeclaredNestings();

/// A pair of the sample's models and the outcome of its F test.
struct NestedTest {
  std::string restricted, fuller;  ///< model ids (for undeclared pairs: in model order)
  NestingKind kind = NestingKind::kUndeclared;
  std::string restriction;         ///< as declared ("" if none)
  bool tested = false;
  std::string reason;              ///< why not tested ("" if tested)
  FTestResult f;                   ///< valid when tested
  /// "fuller model needed" (F > critical) or "restricted model adequate";
  /// "" when not tested.
  std::string decision;
};

struct SampleComparison {
  bool computed = false;        ///< false: not run (no models)
  Criterion criterion = Criterion::kAicc;
  std::vector<ModelScore> models;  ///< in the order of the sample's model choices
  std::vector<NestedTest> tests;   ///< one per unordered pair, in model order
  std::string best;                ///< model id ranked first ("" if none)
  /// Sample-level notes (AICc undefined for a model, fewer than two usable
  /// fits, cross-validation skipped), in a fixed order.
  std::vector<std::string> notes;
  CrossValidationOptions cross_validation;  ///< what was asked
  double f_test_level = 0.95;
};

/// Compares the fits of one sample. Cross-validation refits use each
/// request with the held-out points removed, the full fit's estimate as the
/// first extra start, covariance and residual diagnostics off.
SampleComparison CompareSample(std::span<const ComparedFit> fits, const ComparisonOptions& options);

/// The criterion value of a score (NaN if undefined).
double CriterionValue(const ModelScore& s, Criterion c);

}  // namespace porofit::compare

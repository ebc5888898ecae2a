#include "porofit/compare/comparison.h"

#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <numeric>

#include "porofit/core/error.h"
#include "porofit/models/registry.h"

namespace porofit::compare {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}  // namespace

std::string_view ToString(Criterion c) {
  switch (c) {
    case Criterion::kAicc: return "aicc";
    case Criterion::kAic: return "aic";
    case Criterion::kBic: return "bic";
  }
  return "?";
}

std::string_view ToString(NestingKind k) {
  switch (k) {
    case NestingKind::kRegular: return "regular";
    case NestingKind::kBoundary: return "boundary-or-limit";
    case NestingKind::kNotNested: return "not-nested";
    case NestingKind::kUndeclared: return "not-declared";
  }
  return "?";
}

std::string ComparisonOptions::Validate() const {
  if (!(f_test_level > 0 && f_test_level < 1))
    return "f_test_level = " + FormatNumber(f_test_level) + " violates 0 < f_test_level < 1";
  if (cross_validation.holdout_points < 1)
    return "holdout_points = " + std::to_string(cross_validation.holdout_points) + " violates holdout_points >= 1";
  for (size_t i = 0; i < group_by.size(); ++i)
    for (size_t j = 0; j < i; ++j)
      if (group_by[i] == group_by[j]) return "group_by lists '" + group_by[i] + "' twice";
  return {};
}

const std::vector<std::string>& StandardSampleFields() {
  static const std::vector<std::string> kFields{"id", "lithology", "orientation", "measurement", "branch", "cycle"};
  return kFields;
}

const std::vector<Nesting>& DeclaredNestings() {
  static const std::vector<Nesting> kNestings = [] {
    std::vector<Nesting> v;
    v.push_back({"exp-modulus", "linear-exp", NestingKind::kRegular, "B = 0", "B", 0.0, {},
                 "A = K_inf, C = K_inf - K_0, D = 1/P_close (computed from the two formulas)"});
    v.push_back({"grain-contact", "power-ref", NestingKind::kRegular, "n = 1/3", "n", 1.0 / 3.0, {"P_ref"},
                 "a = K_ref / P_ref^(1/3), with P_ref fixed (computed from the two formulas)"});
    v.push_back({"linear", "exp-modulus", NestingKind::kBoundary, "P_close -> infinity", "", 0.0, {},
                 "limit nesting (P_close -> infinity): the F test is invalid; compare with AICc"});
    v.push_back({"power-ref", "power-offset", NestingKind::kBoundary, "P_r -> 0", "", 0.0, {},
                 "limit nesting (P_r -> 0 with K_0 P_r^-n fixed): the F test is invalid; compare with AICc"});
    v.push_back({"linear", "linear-exp", NestingKind::kBoundary, "C = 0", "", 0.0, {},
                 "boundary nesting (C = 0 is C's lower bound, and D is then unidentified): the F test is "
                 "invalid; compare with AICc"});
    v.push_back({"exp-modulus", "exp-compliance", NestingKind::kNotNested, "", "", 0.0, {},
                 "not nested (neither formula reduces to the other): compare with AICc"});
    return v;
  }();
  return kNestings;
}

double CriterionValue(const ModelScore& s, Criterion c) {
  switch (c) {
    case Criterion::kAicc: return s.aicc;
    case Criterion::kAic: return s.aic;
    case Criterion::kBic: return s.bic;
  }
  return kNaN;
}

namespace {

std::string Str(int v) { return std::to_string(v); }

const ParameterResult* FindParameter(const FitResult& r, const std::string& name) {
  for (const ParameterResult& p : r.parameters)
    if (p.name == name) return &p;
  return nullptr;
}

// A model of the built-in catalogue, with the catalogue's parameters (a user
// model that reuses an id is not one).
bool IsCatalogueModel(const ModelSpec* spec) {
  if (spec == nullptr) return false;
  const ModelSpec* b = ModelRegistry::Builtin().Find(spec->id);
  if (b == nullptr || b->parameters.size() != spec->parameters.size()) return false;
  for (size_t j = 0; j < b->parameters.size(); ++j)
    if (b->parameters[j].name != spec->parameters[j].name) return false;
  return true;
}

// Why two requests do not describe the same data and weights ("" if they do).
std::string DataDifference(const FitRequest& a, const FitRequest& b) {
  if (a.data.x.size() != b.data.x.size())
    return "fitted to a different number of points (" + Str(static_cast<int>(b.data.x.size())) + " vs " +
           Str(static_cast<int>(a.data.x.size())) + ")";
  if (a.data.x != b.data.x || a.data.y != b.data.y) return "fitted to different data";
  if (a.data.sigma != b.data.sigma) return "fitted with different weights";
  if (a.options.scale_covariance != b.options.scale_covariance)
    return "different noise model (scale_covariance differs): scores not comparable";
  if (a.model && b.model && a.model->y_si_factor != b.model->y_si_factor)
    return "different working unit of K: scores not comparable";
  return {};
}

std::string BoundText(double lo, double hi, const ParameterResult& p) {
  const double f = p.si_factor;
  auto n = [&](double v) { return std::isinf(v) ? std::string(v < 0 ? "-inf" : "inf") : FormatNumber(v / f); };
  return "[" + n(lo) + ", " + n(hi) + "] " + p.unit;
}

// ---------------------------------------------------------------- cross-validation

struct Fold {
  std::vector<size_t> held_out;
};

CrossValidationScore CrossValidate(const ComparedFit& m, const std::vector<Fold>& folds, bool weighted) {
  CrossValidationScore s;
  const FitRequest& req = *m.request;
  const ModelSpec& spec = *req.model;
  const FitResult& full = *m.fit;
  // The full fit's estimate (working units) starts every refit; parameters
  // held fixed in the full fit stay at their full-fit value, so each refit
  // is the same model (a fixed_by_default parameter would otherwise move
  // with the heuristic on the reduced data).
  std::vector<double> start(spec.num_parameters());
  for (size_t j = 0; j < start.size() && j < full.parameters.size(); ++j)
    start[j] = full.parameters[j].estimate / full.parameters[j].si_factor;
  FitRequest base = req;
  base.options.covariance = false;
  base.options.residual_diagnostics = false;
  base.extra_starts.insert(base.extra_starts.begin(), start);
  for (size_t j = 0; j < full.parameters.size(); ++j) {
    const ParameterResult& p = full.parameters[j];
    if (p.fixed && !base.settings[p.name].fixed) base.settings[p.name].fixed = p.estimate;
  }
  double se = 0, sz = 0, sum_e = 0;
  for (const Fold& fold : folds) {
    ++s.folds;
    FitRequest r = base;
    r.data.x.clear();
    r.data.y.clear();
    r.data.sigma.clear();
    std::vector<bool> out(req.data.x.size(), false);
    for (size_t i : fold.held_out) out[i] = true;
    for (size_t i = 0; i < req.data.x.size(); ++i) {
      if (out[i]) continue;
      r.data.x.push_back(req.data.x[i]);
      r.data.y.push_back(req.data.y[i]);
      if (!req.data.sigma.empty()) r.data.sigma.push_back(req.data.sigma[i]);
    }
    FitResult refit;
    try {  // Fit() does not throw for a failing fit; a defect must not stop the comparison
      refit = Fit(r);
    } catch (const std::exception&) {
      refit.status = FitStatus::kNumericalFailure;
    }
    if (refit.status != FitStatus::kConverged || refit.parameters.size() != spec.num_parameters()) {
      ++s.refits_failed;
      continue;
    }
    std::vector<double> theta(spec.num_parameters());
    for (size_t j = 0; j < theta.size(); ++j)
      theta[j] = refit.parameters[j].estimate / refit.parameters[j].si_factor;
    for (size_t i : fold.held_out) {
      const double pred = spec.value(theta.data(), req.data.x[i] / spec.x_si_factor) * spec.y_si_factor;
      const double e = req.data.y[i] - pred;
      if (!std::isfinite(e)) {
        ++s.refits_failed;  // the refitted model is undefined at the held-out pressure
        continue;
      }
      ++s.points_predicted;
      se += e * e;
      sum_e += e;
      if (weighted) sz += (e / req.data.sigma[i]) * (e / req.data.sigma[i]);
    }
  }
  if (s.points_predicted == 0) {
    s.reason = "every refit failed (" + Str(s.refits_failed) + " of " + Str(s.folds) + ")";
    s.rmse = s.mean_error = s.rms_standardized = kNaN;
    return s;
  }
  const double np = s.points_predicted;
  s.computed = true;
  s.rmse = std::sqrt(se / np);
  s.mean_error = sum_e / np;
  s.rms_standardized = weighted ? std::sqrt(sz / np) : kNaN;
  return s;
}

void RankCrossValidation(std::vector<ModelScore>& models, CrossValidationScore ModelScore::*which, bool weighted) {
  std::vector<size_t> order;
  for (size_t i = 0; i < models.size(); ++i) {
    const CrossValidationScore& c = models[i].*which;
    const double v = weighted ? c.rms_standardized : c.rmse;
    if (c.computed && c.refits_failed == 0 && std::isfinite(v)) order.push_back(i);
  }
  auto value = [&](size_t i) {
    const CrossValidationScore& c = models[i].*which;
    return weighted ? c.rms_standardized : c.rmse;
  };
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) { return value(a) < value(b); });
  for (size_t r = 0; r < order.size(); ++r) (models[order[r]].*which).rank = static_cast<int>(r + 1);
}

// ---------------------------------------------------------------- nested tests

// Why a declared regular nesting cannot be tested on these two fits ("" if it can).
std::string RegularNestingProblem(const Nesting& nest, const FitResult& small, const FitResult& big,
                                  const FitRequest& big_request) {
  if (big_request.options.loss != RobustLoss::kNone)
    return "robust loss (" + std::string(ToString(big_request.options.loss)) +
           "): the extra-sum-of-squares F test assumes plain least squares; compare with AICc";
  const ParameterResult* rp = FindParameter(big, nest.parameter);
  if (rp == nullptr) return "parameter " + nest.parameter + " missing from the fit of " + nest.fuller;
  const double v = nest.value * rp->si_factor;
  if (rp->fixed)
    return nest.parameter + " of " + nest.fuller + " is fixed by the study (" + nest.parameter + " = " +
           FormatNumber(rp->estimate / rp->si_factor) + " " + rp->unit + "): the nesting " + nest.restriction +
           " no longer holds";
  if (!(rp->lower <= v && v <= rp->upper))
    return "the bounds on " + nest.parameter + " of " + nest.fuller + " (" + BoundText(rp->lower, rp->upper, *rp) +
           ") exclude " + nest.restriction + ": the nesting no longer holds";
  for (const std::string& name : nest.held_fixed) {
    const ParameterResult* p = FindParameter(big, name);
    if (p != nullptr && !p->fixed)
      return name + " of " + nest.fuller + " is free: " + nest.restricted + " lies inside " + nest.fuller +
             " only with " + name + " fixed";
  }
  for (const ParameterResult& p : big.parameters) {
    if (!p.fixed || p.name == nest.parameter) continue;
    if (std::find(nest.held_fixed.begin(), nest.held_fixed.end(), p.name) != nest.held_fixed.end()) continue;
    return p.name + " of " + nest.fuller + " is fixed by the study: " + nest.restricted +
           " is no longer inside it";
  }
  if (rp->at_lower || rp->at_upper) {
    const bool on_restriction = std::abs(rp->estimate - v) <= 1e-6 * std::max(1.0, std::abs(v));
    return nest.parameter + " of " + nest.fuller + " is at its " + (rp->at_lower ? "lower" : "upper") +
           " bound " + FormatNumber((rp->at_lower ? rp->lower : rp->upper) / rp->si_factor) + " " + rp->unit +
           (on_restriction ? ": the restriction " + nest.restriction +
                                 " lies on the boundary of the fuller model's parameter space (the fuller fit "
                                 "reduces to " + nest.restricted + "), so the F test does not apply"
                           : ": the fuller fit is on the edge of its parameter space, so the F test does not apply");
  }
  for (const FitResult* r : {&big, &small}) {
    for (const ParameterResult& p : r->parameters) {
      if (p.fixed || (r == &big && p.name == nest.parameter)) continue;
      if (p.at_lower || p.at_upper)
        return p.name + " of " + r->model_id + " is at its " + (p.at_lower ? "lower" : "upper") + " bound " +
               FormatNumber((p.at_lower ? p.lower : p.upper) / p.si_factor) + " " + p.unit +
               ": a fit on the edge of its parameter space is not a regular nesting";
    }
  }
  return {};
}

}  // namespace

SampleComparison CompareSample(std::span<const ComparedFit> fits, const ComparisonOptions& options) {
  SampleComparison out;
  out.criterion = options.criterion;
  out.cross_validation = options.cross_validation;
  out.f_test_level = options.f_test_level;
  if (fits.empty()) {
    out.notes.push_back("no models: nothing to compare");
    return out;
  }
  out.computed = true;

  // Usable fits and the data the first of them saw: every other fit must
  // have seen the same data and weights for its scores to be comparable.
  const FitRequest* reference = nullptr;
  std::vector<bool> usable(fits.size(), false);
  for (size_t i = 0; i < fits.size(); ++i) {
    const ComparedFit& m = fits[i];
    ModelScore s;
    s.model_id = m.model_id;
    s.aic = s.aicc = s.bic = kNaN;
    if (m.fit == nullptr || m.request == nullptr) {
      s.excluded_reason = "no fit";
    } else if (m.request->model == nullptr) {
      s.excluded_reason = "model '" + m.model_id + "' is not in the catalogue";
    } else if (m.fit->status != FitStatus::kConverged) {
      s.excluded_reason = "fit " + std::string(ToString(m.fit->status)) + ": " + m.fit->message;
    } else {
      const FitResult& r = *m.fit;
      s.n = r.n;
      s.k = r.p + (m.request->options.scale_covariance ? 1 : 0);
      s.aic = r.aic;
      s.aicc = r.aicc;
      s.bic = r.bic;
      s.aicc_defined = std::isfinite(r.aicc);
      const std::string diff = reference ? DataDifference(*reference, *m.request) : std::string();
      if (!diff.empty()) {
        s.excluded_reason = diff;
      } else {
        if (reference == nullptr) reference = m.request;
        usable[i] = true;
        if (!std::isfinite(CriterionValue(s, options.criterion))) {
          s.excluded_reason = std::string(options.criterion == Criterion::kAicc ? "AICc undefined"
                                          : options.criterion == Criterion::kAic ? "AIC not finite"
                                                                                 : "BIC not finite") +
                              " (n = " + Str(s.n) + ", k = " + Str(s.k) + ", needs n > k + 1)";
        } else {
          s.included = true;
        }
      }
    }
    out.models.push_back(std::move(s));
  }

  // Differences and weights, per score, over the usable fits with that score defined.
  auto fill = [&](double ModelScore::*score, double ModelScore::*delta, double ModelScore::*weight) {
    std::vector<double> v(out.models.size(), kNaN);
    for (size_t i = 0; i < v.size(); ++i)
      if (usable[i]) v[i] = out.models[i].*score;
    const std::vector<double> d = ScoreDifferences(v), w = AkaikeWeights(v);
    for (size_t i = 0; i < v.size(); ++i) {
      out.models[i].*delta = d[i];
      out.models[i].*weight = w[i];
    }
  };
  fill(&ModelScore::aic, &ModelScore::delta_aic, &ModelScore::weight_aic);
  fill(&ModelScore::aicc, &ModelScore::delta_aicc, &ModelScore::weight_aicc);
  fill(&ModelScore::bic, &ModelScore::delta_bic, &ModelScore::weight_bic);

  std::vector<size_t> order;
  for (size_t i = 0; i < out.models.size(); ++i)
    if (out.models[i].included) order.push_back(i);
  std::stable_sort(order.begin(), order.end(), [&](size_t a, size_t b) {
    return CriterionValue(out.models[a], options.criterion) < CriterionValue(out.models[b], options.criterion);
  });
  for (size_t r = 0; r < order.size(); ++r) out.models[order[r]].rank = static_cast<int>(r + 1);
  if (!order.empty()) out.best = out.models[order[0]].model_id;

  for (size_t i = 0; i < out.models.size(); ++i) {
    const ModelScore& s = out.models[i];
    if (usable[i] && !s.aicc_defined)
      out.notes.push_back("AICc undefined for " + s.model_id + " (n = " + Str(s.n) + " <= k + 1 = " + Str(s.k + 1) +
                          "): left out of the AICc weights" +
                          (options.criterion == Criterion::kAicc ? " and the ranking" : ""));
  }
  if (order.empty()) out.notes.push_back("no usable fit: nothing to compare");
  else if (order.size() == 1) out.notes.push_back("one usable fit: nothing to compare it with");
  if (reference != nullptr && reference->options.loss != RobustLoss::kNone)
    out.notes.push_back("robust loss: AIC, AICc and BIC use the plain weighted SSR of the robust fits "
                        "(an approximation to their likelihood)");

  // Cross-validation of every usable fit.
  const CrossValidationOptions& cv = options.cross_validation;
  for (size_t i = 0; i < fits.size(); ++i) {
    ModelScore& s = out.models[i];
    for (CrossValidationScore* c : {&s.leave_one_out, &s.holdout})
      c->rmse = c->mean_error = c->rms_standardized = kNaN;
    const char* none = usable[i] ? nullptr : "fit not usable";
    if (!cv.leave_one_out) s.leave_one_out.reason = "not requested";
    if (!cv.high_pressure_holdout) s.holdout.reason = "not requested";
    if (!cv.leave_one_out && !cv.high_pressure_holdout) continue;
    if (none != nullptr) {
      if (cv.leave_one_out) s.leave_one_out.reason = none;
      if (cv.high_pressure_holdout) s.holdout.reason = none;
      continue;
    }
    const FitRequest& req = *fits[i].request;
    const size_t n = req.data.x.size();
    const bool weighted = !req.data.sigma.empty();
    const int p = fits[i].fit->p;
    if (cv.leave_one_out) {
      if (static_cast<int>(n) - 1 < p) {
        s.leave_one_out.reason = "too few points: " + Str(static_cast<int>(n) - 1) + " left for " + Str(p) +
                                 " free parameters";
      } else {
        std::vector<Fold> folds(n);
        for (size_t j = 0; j < n; ++j) folds[j].held_out = {j};
        s.leave_one_out = CrossValidate(fits[i], folds, weighted);
      }
    }
    if (cv.high_pressure_holdout) {
      const size_t h = static_cast<size_t>(cv.holdout_points);
      if (h >= n || static_cast<int>(n - h) < p) {
        s.holdout.reason = "too few points: " + Str(static_cast<int>(n) - static_cast<int>(h)) + " left for " +
                           Str(p) + " free parameters";
      } else {
        std::vector<size_t> idx(n);
        std::iota(idx.begin(), idx.end(), size_t{0});
        std::stable_sort(idx.begin(), idx.end(), [&](size_t a, size_t b) { return req.data.x[a] > req.data.x[b]; });
        Fold f;
        f.held_out.assign(idx.begin(), idx.begin() + static_cast<std::ptrdiff_t>(h));
        s.holdout = CrossValidate(fits[i], {f}, weighted);
      }
    }
  }
  const bool weighted = reference != nullptr && !reference->data.sigma.empty();
  RankCrossValidation(out.models, &ModelScore::leave_one_out, weighted);
  RankCrossValidation(out.models, &ModelScore::holdout, weighted);

  // Every unordered pair of models: an F test for a regular nesting, or why not.
  const std::vector<Nesting>& declared = DeclaredNestings();
  for (size_t i = 0; i < fits.size(); ++i) {
    for (size_t j = i + 1; j < fits.size(); ++j) {
      NestedTest t;
      t.restricted = fits[i].model_id;
      t.fuller = fits[j].model_id;
      t.f.f = t.f.p_value = t.f.critical = kNaN;
      t.f.level = options.f_test_level;
      size_t small = i, big = j;
      const Nesting* nest = nullptr;
      for (const Nesting& d : declared) {
        if (d.restricted == fits[i].model_id && d.fuller == fits[j].model_id) nest = &d;
        if (d.restricted == fits[j].model_id && d.fuller == fits[i].model_id) {
          nest = &d;
          std::swap(small, big);
        }
      }
      const ModelSpec* spec_i = fits[i].request ? fits[i].request->model : nullptr;
      const ModelSpec* spec_j = fits[j].request ? fits[j].request->model : nullptr;
      if (fits[i].model_id == fits[j].model_id) {
        t.reason = "the same model twice (different settings): not a nesting; compare with AICc";
      } else if (!IsCatalogueModel(spec_i) || !IsCatalogueModel(spec_j)) {
        const std::string& user = !IsCatalogueModel(spec_i) ? fits[i].model_id : fits[j].model_id;
        t.reason = "'" + user + "' is not a catalogue model: no nesting is declared for user models; compare with AICc";
      } else if (nest == nullptr) {
        t.reason = "no nesting declared between these models; compare with AICc";
      } else {
        t.restricted = nest->restricted;
        t.fuller = nest->fuller;
        t.kind = nest->kind;
        t.restriction = nest->restriction;
        if (nest->kind != NestingKind::kRegular) {
          t.reason = nest->note;
        } else if (!usable[small] || !usable[big]) {
          const size_t bad = !usable[small] ? small : big;
          t.reason = "fit of " + fits[bad].model_id + " not usable: " + out.models[bad].excluded_reason;
        } else {
          const FitResult& rs = *fits[small].fit;
          const FitResult& rb = *fits[big].fit;
          t.reason = RegularNestingProblem(*nest, rs, rb, *fits[big].request);
          if (t.reason.empty()) {
            t.f = NestedFTest(rs.ssr, rs.p, rb.ssr, rb.p, rb.n, options.f_test_level);
            if (t.f.computed) {
              t.tested = true;
              t.decision = t.f.reject ? "fuller model needed" : "restricted model adequate";
            } else {
              t.reason = t.f.reason;
            }
          }
        }
      }
      out.tests.push_back(std::move(t));
    }
  }
  return out;
}

}  // namespace porofit::compare

// Joint fits across samples (Study::joint_fits): the fit, its comparison with
// the separate fits, and each member's alpha bands from its view.
#include <exception>

#include "porofit/run/run.h"

namespace porofit {
namespace {

std::string JoinWords(const std::vector<std::string>& words) {
  std::string s;
  for (const auto& w : words) s += (s.empty() ? "" : ", ") + w;
  return s;
}

}  // namespace

JointRun RunJoint(const Study& study, const JointFitChoice& choice, const ModelRegistry& registry) {
  JointRun out;
  const ModelSpec* model = registry.Find(choice.model_id);
  JointFitRequest req;
  req.model = model;
  req.shared = choice.shared;
  req.settings = choice.settings;
  if (!choice.samples.empty()) req.options = study.samples[choice.samples.front()].options;
  bool dropped_loss = false;
  for (size_t i : choice.samples) dropped_loss = dropped_loss || study.samples[i].options.loss != RobustLoss::kNone;
  req.options.loss = RobustLoss::kNone;
  const ModelChoice as_choice{choice.model_id, choice.settings, choice.where};
  for (size_t i : choice.samples) {
    req.datasets.push_back(MakeFitRequest(study.samples[i], as_choice, model).data);
    req.labels.push_back(study.samples[i].sample.id);
  }
  if (model == nullptr) {
    out.fit.model_id = choice.model_id;
    out.fit.status = FitStatus::kInvalidRequest;
    out.fit.message = "model '" + choice.model_id + "' is not in the catalogue";
    return out;
  }
  try {  // FitJoint() does not throw for a failing fit; a defect must not take the study down
    out.fit = FitJoint(req);
    out.comparison = compare::CompareJointWithSeparate(req, out.fit);
  } catch (const std::exception& e) {
    out.fit = JointFitResult{};
    out.fit.model_id = choice.model_id;
    out.fit.status = FitStatus::kNumericalFailure;
    out.fit.message = std::string("internal error during joint fit: ") + e.what();
  }

  out.notes.push_back("joint fit '" + choice.name + "': the estimates (and alpha) of its " +
                      std::to_string(choice.samples.size()) + " samples are correlated through the shared " +
                      "parameter(s) " + JoinWords(choice.shared) + "; do not combine them as independent");
  if (choice.mixed_branches)
    out.notes.push_back("joint fit '" + choice.name + "' pools loading and unloading branches "
                        "(allow_mixed_branches: true)");
  if (dropped_loss)
    out.notes.push_back("joint fit '" + choice.name + "' uses plain least squares: the members' robust loss "
                        "does not apply to joint fits");

  bool dropped_bootstrap = false;
  for (size_t k = 0; k < choice.samples.size(); ++k) {
    const StudySample& member = study.samples[choice.samples[k]];
    if (!member.grain.given) {
      bands::BandResult none;
      none.computed = false;
      none.message = "no grain modulus";
      out.bands.push_back(std::move(none));
      continue;
    }
    if (k >= out.fit.datasets.size()) {
      bands::BandResult none;
      none.computed = false;
      none.message = "joint fit status " + std::string(ToString(out.fit.status)) + ": no bands";
      out.bands.push_back(std::move(none));
      continue;
    }
    // The band layer sees the member's view (its covariance sub-block carries
    // the shared parameters' variance; dof = the joint dof). Bootstrap would
    // refit the member alone, which is not the joint fit: it is left out.
    StudySample as_member = member;
    as_member.options = req.options;
    dropped_bootstrap = dropped_bootstrap || as_member.bands.options.bootstrap;
    as_member.bands.options.bootstrap = false;
    bands::BandResult b = RunBands(as_member, as_choice, out.fit.datasets[k], registry);
    b.notes.push_back("from joint fit '" + choice.name + "': correlated with the other members through " +
                      JoinWords(choice.shared));
    out.bands.push_back(std::move(b));
  }
  if (dropped_bootstrap)
    out.notes.push_back("joint fit '" + choice.name + "': bootstrap bands are not available for joint fits "
                        "(delta method and Monte Carlo only)");
  return out;
}

}  // namespace porofit

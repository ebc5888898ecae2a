// Model comparison inside a run: per sample from its fits, across samples
// through the streaming accumulator (lib/compare).
#include <exception>

#include "porofit/run/run.h"

namespace porofit {

compare::SampleFieldMap SampleFieldValues(const Sample& s) {
  return {{"id", s.id},
          {"lithology", s.lithology},
          {"orientation", std::string(ToString(s.orientation))},
          {"measurement", std::string(ToString(s.kind))},
          {"branch", std::string(ToString(s.branch))},
          {"cycle", std::to_string(s.cycle)}};
}

compare::SampleComparison RunComparison(const StudySample& sample, const std::vector<FitResult>& fits,
                                        const compare::ComparisonOptions& options, const ModelRegistry& registry) {
  // The same requests the fits were made from, so refits see the same data,
  // weights, settings and options.
  std::vector<FitRequest> requests;
  requests.reserve(sample.models.size());
  for (const ModelChoice& c : sample.models) requests.push_back(MakeFitRequest(sample, c, registry.Find(c.model_id)));
  std::vector<compare::ComparedFit> view;
  for (size_t k = 0; k < fits.size() && k < requests.size(); ++k)
    view.push_back({sample.models[k].model_id, &fits[k], &requests[k]});
  try {  // CompareSample does not throw for bad fits; a defect must not take the study down
    return compare::CompareSample(view, options);
  } catch (const std::exception& e) {
    compare::SampleComparison c;
    c.notes.push_back(std::string("internal error during comparison: ") + e.what());
    return c;
  }
}

compare::ComparisonSummary SummarizeComparisons(const StudyRun& run) {
  compare::GroupAccumulator acc(run.study.comparison.group_by, run.study.comparison.criterion);
  for (size_t i = 0; i < run.samples.size() && i < run.study.samples.size(); ++i)
    acc.Add(i, SampleFieldValues(run.study.samples[i].sample), run.samples[i].comparison);
  return acc.Finish();
}

}  // namespace porofit

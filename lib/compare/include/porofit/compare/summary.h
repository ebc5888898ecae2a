#pragma once
// Model comparison across samples (common practice: summed AICc, win counts,
// median weights), as an accumulator that works while samples stream in:
//
//   GroupAccumulator acc(options.group_by, options.criterion);
//   for each sample i (any order, any thread, one call per i):
//     acc.Add(i, fields_of_sample_i, comparison_of_sample_i);
//   ComparisonSummary s = acc.Finish();
//
// Add() keeps only a few numbers per sample and model; Finish() orders them
// by sample index before summing, so the result depends on the sample order
// only, never on the order of the Add() calls or the thread count. Add() is
// not thread-safe: callers serialise it (or merge accumulators with Merge()).
#include <cstddef>
#include <map>
#include <string>
#include <vector>

#include "porofit/compare/comparison.h"

namespace porofit::compare {

/// A sample's fields by name (id, lithology, orientation, measurement,
/// branch, cycle, and any free-form field), as text.
using SampleFieldMap = std::map<std::string, std::string>;

/// Summary of one model within one group.
struct GroupModelSummary {
  std::string model_id;
  int samples_with_model = 0;  ///< samples of the group that asked for the model
  int samples_usable = 0;      ///< ... whose fit was included (criterion score defined)
  int wins = 0;                ///< samples where it ranked first by the criterion
  /// Sum of the criterion over the group's complete samples (every model of
  /// the group included); NaN when the group has none.
  double summed_score = 0;
  double median_weight = 0;    ///< median Akaike weight (criterion-based) over samples_usable; NaN if none
  double mean_delta = 0;       ///< mean criterion difference to the sample's best, over samples_usable; NaN if none
};

struct GroupSummary {
  std::vector<std::string> key;  ///< values of the group_by fields ("(none)" where a sample lacks the field)
  std::string label;             ///< key joined with " / " ("all samples" for no grouping)
  int samples = 0;               ///< samples in the group
  int samples_compared = 0;      ///< samples with at least one included model
  int complete_samples = 0;      ///< samples where every model of the group was included
  std::vector<GroupModelSummary> models;  ///< in order of first appearance in the group
};

struct ComparisonSummary {
  Criterion criterion = Criterion::kAicc;
  std::vector<std::string> group_by;
  std::vector<GroupSummary> groups;  ///< in order of their first sample
  int samples = 0;
};

class GroupAccumulator {
 public:
  GroupAccumulator(std::vector<std::string> group_by, Criterion criterion);

  /// Records sample `index` (its position in the study). Each index at most
  /// once (programmer error otherwise: aborts).
  void Add(std::size_t index, const SampleFieldMap& fields, const SampleComparison& comparison);
  /// Adds every sample of `other` (same group_by and criterion).
  void Merge(const GroupAccumulator& other);
  ComparisonSummary Finish() const;

 private:
  struct ModelEntry {
    std::string id;
    bool included = false;
    bool best = false;
    double score = 0, weight = 0, delta = 0;
  };
  struct Entry {
    std::size_t index = 0;
    std::vector<std::string> key;
    std::vector<ModelEntry> models;
  };
  std::vector<std::string> group_by_;
  Criterion criterion_;
  std::vector<Entry> entries_;
};

}  // namespace porofit::compare

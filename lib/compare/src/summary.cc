#include "porofit/compare/summary.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>

#include "porofit/core/error.h"

namespace porofit::compare {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

double Median(std::vector<double> v) {
  if (v.empty()) return kNaN;
  std::sort(v.begin(), v.end());
  const size_t m = v.size() / 2;
  return v.size() % 2 == 1 ? v[m] : 0.5 * (v[m - 1] + v[m]);
}
}  // namespace

GroupAccumulator::GroupAccumulator(std::vector<std::string> group_by, Criterion criterion)
    : group_by_(std::move(group_by)), criterion_(criterion) {}

void GroupAccumulator::Add(std::size_t index, const SampleFieldMap& fields, const SampleComparison& comparison) {
  Entry e;
  e.index = index;
  for (const std::string& f : group_by_) {
    auto it = fields.find(f);
    e.key.push_back(it == fields.end() || it->second.empty() ? std::string("(none)") : it->second);
  }
  for (const ModelScore& s : comparison.models) {
    ModelEntry m;
    m.id = s.model_id;
    m.included = s.included;
    m.best = s.rank == 1;
    m.score = CriterionValue(s, criterion_);
    m.weight = criterion_ == Criterion::kAicc ? s.weight_aicc
               : criterion_ == Criterion::kAic ? s.weight_aic
                                               : s.weight_bic;
    m.delta = criterion_ == Criterion::kAicc ? s.delta_aicc
              : criterion_ == Criterion::kAic ? s.delta_aic
                                              : s.delta_bic;
    e.models.push_back(std::move(m));
  }
  entries_.push_back(std::move(e));
}

void GroupAccumulator::Merge(const GroupAccumulator& other) {
  POROFIT_CHECK(other.group_by_ == group_by_ && other.criterion_ == criterion_,
                "GroupAccumulator::Merge: different group_by or criterion");
  entries_.insert(entries_.end(), other.entries_.begin(), other.entries_.end());
}

ComparisonSummary GroupAccumulator::Finish() const {
  ComparisonSummary out;
  out.criterion = criterion_;
  out.group_by = group_by_;
  std::vector<const Entry*> sorted;
  sorted.reserve(entries_.size());
  for (const Entry& e : entries_) sorted.push_back(&e);
  std::sort(sorted.begin(), sorted.end(), [](const Entry* a, const Entry* b) { return a->index < b->index; });
  for (size_t i = 1; i < sorted.size(); ++i)
    POROFIT_CHECK(sorted[i]->index != sorted[i - 1]->index,
                  "GroupAccumulator: sample " + std::to_string(sorted[i]->index) + " added twice");
  out.samples = static_cast<int>(sorted.size());

  // Groups in order of their first sample; members in sample order.
  std::vector<std::vector<const Entry*>> members;
  std::map<std::vector<std::string>, size_t> group_of;
  for (const Entry* e : sorted) {
    const auto [it, added] = group_of.emplace(e->key, out.groups.size());
    const size_t g = it->second;
    if (added) {
      GroupSummary gs;
      gs.key = e->key;
      for (const std::string& k : e->key) gs.label += (gs.label.empty() ? "" : " / ") + k;
      if (group_by_.empty()) gs.label = "all samples";
      out.groups.push_back(std::move(gs));
      members.emplace_back();
    }
    members[g].push_back(e);
  }

  for (size_t g = 0; g < out.groups.size(); ++g) {
    GroupSummary& gs = out.groups[g];
    gs.samples = static_cast<int>(members[g].size());
    std::vector<std::string> ids;  // models of the group, by first appearance
    for (const Entry* e : members[g])
      for (const ModelEntry& m : e->models)
        if (std::find(ids.begin(), ids.end(), m.id) == ids.end()) ids.push_back(m.id);
    std::vector<std::vector<double>> weights(ids.size()), deltas(ids.size());
    std::vector<double> sums(ids.size(), 0.0);
    gs.models.resize(ids.size());
    for (size_t k = 0; k < ids.size(); ++k) gs.models[k].model_id = ids[k];
    for (const Entry* e : members[g]) {
      auto find = [&](const std::string& id) -> const ModelEntry* {
        for (const ModelEntry& m : e->models)
          if (m.id == id) return &m;
        return nullptr;
      };
      bool complete = true, any = false;
      for (size_t k = 0; k < ids.size(); ++k) {
        const ModelEntry* m = find(ids[k]);
        if (m == nullptr || !m->included) complete = false;
        if (m == nullptr) continue;
        GroupModelSummary& ms = gs.models[k];
        ++ms.samples_with_model;
        if (!m->included) continue;
        any = true;
        ++ms.samples_usable;
        if (m->best) ++ms.wins;
        weights[k].push_back(m->weight);
        deltas[k].push_back(m->delta);
      }
      if (any) ++gs.samples_compared;
      if (complete) {
        ++gs.complete_samples;
        for (size_t k = 0; k < ids.size(); ++k) sums[k] += find(ids[k])->score;  // in sample order
      }
    }
    for (size_t k = 0; k < ids.size(); ++k) {
      GroupModelSummary& ms = gs.models[k];
      ms.summed_score = gs.complete_samples > 0 ? sums[k] : kNaN;
      ms.median_weight = Median(weights[k]);
      double s = 0;
      for (double d : deltas[k]) s += d;
      ms.mean_delta = deltas[k].empty() ? kNaN : s / static_cast<double>(deltas[k].size());
    }
  }
  return out;
}

}  // namespace porofit::compare

// Depth tables after the sample fits (porofit/run/depth_run.h).
#include "porofit/run/depth_run.h"

#include "porofit/run/run.h"

namespace porofit {

bool UsedByDepthTables(const Study& study, size_t index) {
  for (const DepthTableChoice& t : study.depth_tables)
    for (const DepthCurveChoice& c : t.curves)
      if (c.sample == index) return true;
  return false;
}

DepthTableRun RunDepthTable(const Study& study, const DepthTableChoice& choice, const std::vector<SampleRun>& samples,
                            const ModelRegistry& registry) {
  DepthTableRun out;
  depth::DepthTableSpec spec = choice.spec;
  out.table.spec = choice.spec;
  // A fit that failed at run time cannot be mapped to depth: the whole table
  // is withheld with the reason (a table with silently missing intervals
  // would read as complete).
  for (size_t i = 0; i < choice.curves.size() && i < spec.curves.size(); ++i) {
    const DepthCurveChoice& c = choice.curves[i];
    depth::FittedCurve& fc = spec.curves[i];
    const std::string which = "sample '" + fc.sample_id + "' model '" + fc.model_id + "'";
    if (c.sample >= samples.size() || c.model >= samples[c.sample].fits.size() || c.sample >= study.samples.size()) {
      out.message = "not computed: the fit of " + which + " is not available";
      return out;
    }
    const FitResult& fit = samples[c.sample].fits[c.model];
    if (fit.status != FitStatus::kConverged) {
      out.message = "not computed: the fit of " + which + " did not converge (status " +
                    std::string(ToString(fit.status)) + (fit.message.empty() ? "" : ": " + fit.message) + ")";
      return out;
    }
    if (!fit.covariance_ok) {
      out.message = "not computed: the fit of " + which + " has no covariance, so K and alpha would have no band";
      return out;
    }
    fc.model = registry.Find(fc.model_id);
    if (fc.model == nullptr) {
      out.message = "not computed: model '" + fc.model_id + "' is not in the run's catalogue";
      return out;
    }
    fc.fit = &fit;
  }
  try {
    out.table = depth::BuildDepthTable(spec);
    out.computed = true;
  } catch (const InputError& e) {
    out.message = "not computed: " + e.message();
    out.table = depth::DepthTable{};
    out.table.spec = choice.spec;
  }
  for (depth::FittedCurve& fc : out.table.spec.curves) {  // do not outlive the run's fits
    fc.model = nullptr;
    fc.fit = nullptr;
  }
  return out;
}

}  // namespace porofit

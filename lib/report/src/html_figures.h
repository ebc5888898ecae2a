#pragma once
// The figures of one sample section (private to the HTML report). The data
// series are assembled here; drawing goes through porofit::plot.
#include <string>
#include <vector>

#include "porofit/depth/table.h"
#include "porofit/models/registry.h"
#include "porofit/run/run.h"

namespace porofit::detail {

struct SampleFigure {
  std::string name;     ///< "k-fit", "residuals", "std-residuals", "alpha"
  std::string svg;      ///< standalone SVG document; its root carries data-figure="<key>"
  std::string caption;  ///< HTML (escaped): what is drawn, band level and method
};

/// The figures of sample `ss` with results `sr`; `key_prefix` is the sample's
/// slug (figure keys are "<slug>_<name>"). The alpha figure only when the
/// sample has a grain modulus; residual figures only when some fit produced
/// residuals. Fits that did not converge get no curve.
std::vector<SampleFigure> DrawSampleFigures(const StudySample& ss, const SampleRun& sr, const ModelRegistry& registry,
                                            const std::string& key_prefix);

/// The depth-table figures: "stress" (S_v, P_p and the evaluation pressure
/// against depth), "alpha" and "k" (with bands); depth increasing downward,
/// flagged rows marked. Keys are "<key_prefix>_<name>".
std::vector<SampleFigure> DrawDepthFigures(const depth::DepthTable& table, bool field_units,
                                           const std::string& key_prefix);

/// The slug of a depth table name (as HtmlReport::Slug does for samples).
std::string DepthSlug(const std::string& name);

/// The inline form of a standalone SVG document (XML declaration dropped).
std::string InlineSvg(const std::string& svg);

}  // namespace porofit::detail

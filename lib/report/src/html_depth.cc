// A depth table as a section of the HTML report (porofit/report/html.h):
// assumptions, profiles against depth, and the rows with their flags.
#include <sstream>

#include "html_figures.h"
#include "html_util.h"
#include "porofit/core/units.h"
#include "porofit/report/html.h"

namespace porofit {

std::string RenderDepthInputWarnings(const std::vector<std::string>& warnings) {
  if (warnings.empty()) return {};
  std::ostringstream o;
  o << "<div class=\"warning\" role=\"alert\"><strong>" << warnings.size()
    << " input warning(s)</strong> (departures of the input files; read them before using the table):\n<ul>\n";
  for (const std::string& w : warnings) o << "<li>" << detail::Esc(w) << "</li>\n";
  o << "</ul></div>\n";
  return o.str();
}

std::string RenderDepthTableSection(const depth::DepthTable& table, bool field_units,
                                    std::vector<HtmlFigure>* figures) {
  using detail::Esc;
  using detail::HtmlNum;
  const depth::DepthTableSpec& spec = table.spec;
  const double z_unit = field_units ? units::kFoot : 1.0;
  const double p_unit = field_units ? units::kPsi : units::kMPa;
  const char* z_name = field_units ? "ft" : "m";
  const char* p_name = field_units ? "psi" : "MPa";
  const char* p_format = field_units ? "%.0f" : "%.2f";
  const std::string slug = detail::DepthSlug(spec.name);

  std::ostringstream o;
  o << "<section class=\"depth\" id=\"depth-" << slug << "\">\n<h2>Depth table " << Esc(spec.name) << "</h2>\n";
  o << "<p>" << table.rows.size() << " steps from " << HtmlNum("%.1f", spec.top / z_unit) << " to "
    << HtmlNum("%.1f", spec.base / z_unit) << " " << z_name << " (step " << HtmlNum("%.2f", spec.step / z_unit) << " "
    << z_name << ") below the " << Esc(std::string(depth::ToString(spec.datum.kind)))
    << " datum; bands at " << detail::LevelText(spec.band_level) << ".</p>\n";
  o << RenderDepthInputWarnings(spec.warnings);
  if (!table.assumptions.empty()) {
    o << "<h3>Assumptions</h3>\n<ul class=\"assumptions\">\n";
    for (const std::string& a : table.assumptions) o << "<li>" << Esc(a) << "</li>\n";
    o << "</ul>\n";
  }
  if (table.fixed_point_failures > 0) {
    o << "<div class=\"warning\" role=\"alert\"><strong>" << table.fixed_point_failures
      << " steps: the Biot fixed point did not converge</strong> (flag fixed-point-not-converged).</div>\n";
  }
  size_t flagged = 0;
  for (const depth::DepthRow& r : table.rows) flagged += r.flags != 0 ? 1 : 0;

  const std::vector<detail::SampleFigure> figs = detail::DrawDepthFigures(table, field_units, "depth-" + slug);
  if (!figs.empty()) {
    o << "<div class=\"figures\">\n";
    for (const detail::SampleFigure& f : figs) {
      const std::string key = "depth-" + slug + "_" + f.name;
      o << "<figure id=\"fig-" << key << "\">\n" << detail::InlineSvg(f.svg) << "\n<figcaption>" << f.caption
        << " <span class=\"note\">(file <code>figures/" << key << ".svg</code>)</span></figcaption>\n</figure>\n";
      if (figures != nullptr) figures->push_back({key, "figures/" + key + ".svg", f.svg});
    }
    o << "</div>\n";
  }

  o << "<h3>Rows</h3>\n";
  if (flagged > 0) o << "<p class=\"note\">" << flagged << " of " << table.rows.size() << " rows carry flags (highlighted).</p>\n";
  o << "<table class=\"depth-rows\">\n<tr><th>depth (" << z_name << ")</th><th>S_v (" << p_name << ")</th><th>P_p ("
    << p_name << ")</th><th>evaluation P (" << p_name << ")</th><th>curve</th><th>K_dry (GPa)</th><th>K_dry band</th>"
       "<th>alpha</th><th>alpha band</th><th>flags</th></tr>\n";
  for (const depth::DepthRow& r : table.rows) {
    std::string curve = "&ndash;";
    if (r.curve >= 0 && static_cast<size_t>(r.curve) < spec.curves.size()) {
      const depth::FittedCurve& c = spec.curves[static_cast<size_t>(r.curve)];
      curve = Esc(c.sample_id + " / " + c.model_id);
    }
    o << "<tr" << (r.flags != 0 ? " class=\"flagged\"" : "") << "><td class=\"num\">" << HtmlNum("%.1f", r.depth / z_unit)
      << "</td><td class=\"num\">" << HtmlNum(p_format, r.vertical_stress / p_unit) << "</td><td class=\"num\">"
      << HtmlNum(p_format, r.pore_pressure / p_unit) << "</td><td class=\"num\">"
      << HtmlNum(p_format, r.evaluation_pressure / p_unit) << "</td><td>" << curve << "</td><td class=\"num\">"
      << HtmlNum("%.3f", r.k_dry / units::kGPa) << "</td><td class=\"num\">[" << HtmlNum("%.3f", r.k_dry_lower / units::kGPa)
      << ", " << HtmlNum("%.3f", r.k_dry_upper / units::kGPa) << "]</td><td class=\"num\">" << HtmlNum("%.4f", r.alpha)
      << "</td><td class=\"num\">[" << HtmlNum("%.4f", r.alpha_lower) << ", " << HtmlNum("%.4f", r.alpha_upper)
      << "]</td><td class=\"mono\">" << (r.flags != 0 ? Esc(depth::FlagsToString(r.flags)) : std::string("&ndash;"))
      << "</td></tr>\n";
  }
  o << "</table>\n<p class=\"note\">Flags: below-lab-range / above-lab-range = K evaluated outside the plug's tested "
       "pressures (extrapolation); alpha-outside-bounds = alpha outside [phi, 1], shown as computed, never clipped; "
       "log-gap / log-fill = the overburden integral crosses bridged or filled log samples; log-density-range = it "
       "crosses log densities outside the plausible range (screened or kept, as the study says); unmapped = no curve "
       "assigned; in-water = above the rock top.</p>\n</section>\n";
  return o.str();
}

}  // namespace porofit

// One sample's section of the HTML report (porofit/report/html.h): failure
// boxes, figures with captions, parameter and correlation tables, the model
// comparison and the flags in words.
#include <cmath>
#include <sstream>

#include "format.h"
#include "html_figures.h"
#include "html_util.h"
#include "porofit/core/units.h"
#include "porofit/report/html.h"

namespace porofit {
namespace {

using detail::Esc;
using detail::HtmlNum;
using detail::Sig;

bool HasEstimates(const FitResult& r) {
  return r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
}

std::string StatusText(FitStatus s) { return std::string(ToString(s)); }

// Words for the short fit flags of detail::FitFlags.
std::string FitFlagWords(const std::string& flag) {
  if (flag == "rank-deficient") return "the Jacobian is rank deficient: some parameters are not identified by the data";
  if (flag == "high-correlation") return "two parameters are highly correlated: their individual errors are large";
  if (flag == "closure-outside-data") return "the closure pressure lies outside the tested pressure range";
  if (flag == "at-bound") return "a parameter stopped on a bound: its standard error does not describe it";
  if (flag == "no-covariance") return "no usable covariance: no standard errors or bands";
  if (flag == "robust-loss") return "fitted with a robust loss: outlying points are down-weighted";
  return flag;
}

// Words for the grid-point flags of detail::PointFlagNames.
std::string PointFlagWords(const std::string& flag) {
  if (flag == "extrapolated") return "outside the tested pressure range (extrapolation)";
  if (flag == "model-undefined") return "model not defined (K not finite)";
  if (flag == "alpha-below-porosity") return "alpha below porosity (outside [phi, 1])";
  if (flag == "alpha-above-one") return "alpha above 1 (outside [phi, 1])";
  if (flag == "alpha-below-hs-limit") return "alpha below the Hashin-Shtrikman limit";
  if (flag == "k-dry-not-below-k-s") return "K_dry not below K_s";
  return flag;
}

// Contiguous runs of grid points carrying `flag`, as "a-b MPa" ranges.
std::string FlagRanges(const bands::BandResult& b, const std::string& flag) {
  std::vector<std::string> parts;
  size_t j = 0;
  const size_t n = std::min(b.flags.size(), b.grid.pressure.size());
  while (j < n) {
    auto has = [&](size_t k) {
      for (const std::string& f : detail::PointFlagNames(b.flags[k]))
        if (f == flag) return true;
      return false;
    };
    if (!has(j)) {
      ++j;
      continue;
    }
    size_t e = j;
    while (e + 1 < n && has(e + 1)) ++e;
    const double a = b.grid.pressure[j] / units::kMPa, z = b.grid.pressure[e] / units::kMPa;
    parts.push_back(j == e ? Sig(a, 3) + " MPa" : Sig(a, 3) + "&ndash;" + Sig(z, 3) + " MPa");
    j = e + 1;
  }
  return detail::Join(parts, ", ");
}

void ParameterTable(const StudySample& ss, const SampleRun& sr, std::ostream& o) {
  o << "<h3>Parameters</h3>\n<table class=\"parameters\">\n<tr><th>model</th><th>status</th><th>parameter</th>"
       "<th>unit</th><th>estimate</th><th>standard error</th><th>rel. SE</th><th>bounds</th><th>note</th></tr>\n";
  for (const FitResult& r : sr.fits) {
    const bool has = HasEstimates(r);
    const bool failed = r.status != FitStatus::kConverged;
    const size_t rows = has && !r.parameters.empty() ? r.parameters.size() : 1;
    const std::string span = rows > 1 ? " rowspan=\"" + std::to_string(rows) + "\"" : "";
    if (!has || r.parameters.empty()) {
      o << "<tr class=\"failed\"><td>" << Esc(r.model_id) << "</td><td>" << Esc(StatusText(r.status))
        << "</td><td colspan=\"7\">no estimates: " << Esc(r.message) << "</td></tr>\n";
      continue;
    }
    for (size_t k = 0; k < r.parameters.size(); ++k) {
      const ParameterResult& p = r.parameters[k];
      const double f = p.si_factor != 0 ? p.si_factor : 1;
      o << "<tr" << (failed ? " class=\"failed\"" : "") << ">";
      if (k == 0) o << "<td" << span << ">" << Esc(r.model_id) << "</td><td" << span << ">" << Esc(StatusText(r.status)) << "</td>";
      std::string note;
      if (p.fixed) note = "fixed";
      else if (p.at_lower) note = "at lower bound";
      else if (p.at_upper) note = "at upper bound";
      o << "<td>" << Esc(p.name) << "</td><td>" << Esc(p.unit) << "</td><td class=\"num\">" << Sig(p.estimate / f, 5)
        << "</td><td class=\"num\">" << (p.fixed ? std::string("fixed") : Sig(p.std_error / f, 3))
        << "</td><td class=\"num\">"
        << (p.fixed ? std::string("&ndash;") : HtmlNum("%.1f&nbsp;%%", detail::RelativeErrorPercent(p.estimate, p.std_error)))
        << "</td><td class=\"num\">[" << Sig(p.lower / f, 3) << ", " << Sig(p.upper / f, 3) << "]</td><td>" << note
        << "</td></tr>\n";
    }
  }
  o << "</table>\n";
  (void)ss;
}

void CorrelationTables(const SampleRun& sr, std::ostream& o) {
  bool any = false;
  for (const FitResult& r : sr.fits) any = any || (HasEstimates(r) && r.free_index.size() >= 2);
  if (!any) return;
  o << "<h3>Parameter correlations</h3>\n<div class=\"figures\">\n";
  for (const FitResult& r : sr.fits) {
    if (!HasEstimates(r) || r.free_index.size() < 2) continue;
    const auto p = static_cast<Eigen::Index>(r.free_index.size());
    const bool ok = r.covariance_ok && r.correlation.rows() == p && r.correlation.cols() == p;
    o << "<div><table class=\"correlation\"><caption>" << Esc(r.model_id) << " (free parameters)</caption>\n<tr><th></th>";
    auto name = [&](Eigen::Index i) {
      const int m = r.free_index[static_cast<size_t>(i)];
      return m >= 0 && static_cast<size_t>(m) < r.parameters.size() ? Esc(r.parameters[static_cast<size_t>(m)].name)
                                                                      : std::string("?");
    };
    for (Eigen::Index j = 0; j < p; ++j) o << "<th>" << name(j) << "</th>";
    o << "</tr>\n";
    for (Eigen::Index i = 0; i < p; ++i) {
      o << "<tr><th>" << name(i) << "</th>";
      for (Eigen::Index j = 0; j < p; ++j) {
        const double c = ok ? r.correlation(i, j) : std::nan("");
        const bool high = i != j && std::isfinite(c) && std::fabs(c) > 0.95;
        o << "<td class=\"num\"" << (high ? " style=\"font-weight:bold\"" : "") << ">" << HtmlNum("%.3f", c) << "</td>";
      }
      o << "</tr>\n";
    }
    o << "</table>";
    if (!ok) o << "<p class=\"note\">no usable covariance</p>";
    o << "</div>\n";
  }
  o << "</div>\n";
}

void ComparisonTable(const SampleRun& sr, std::ostream& o) {
  const compare::SampleComparison& c = sr.comparison;
  if (!c.computed) return;
  const std::string crit(compare::ToString(c.criterion));
  o << "<h3>Model comparison</h3>\n<table class=\"comparison\">\n<tr><th>model</th><th>rank</th><th>k</th>"
       "<th>AICc</th><th>&Delta;AICc</th><th>Akaike weight (AICc)</th><th>BIC</th><th>holdout RMSE (GPa)</th>"
       "<th>excluded because</th></tr>\n";
  for (const compare::ModelScore& m : c.models) {
    o << "<tr" << (m.included ? "" : " class=\"failed\"") << "><td>" << Esc(m.model_id) << "</td><td class=\"num\">"
      << (m.rank > 0 ? std::to_string(m.rank) : std::string("&ndash;")) << "</td><td class=\"num\">" << m.k
      << "</td><td class=\"num\">" << HtmlNum("%.2f", m.aicc) << "</td><td class=\"num\">"
      << HtmlNum("%.2f", m.delta_aicc) << "</td><td class=\"num\">" << HtmlNum("%.3f", m.weight_aicc)
      << "</td><td class=\"num\">" << HtmlNum("%.2f", m.bic) << "</td><td class=\"num\">"
      << (m.holdout.computed ? HtmlNum("%.4g", m.holdout.rmse / units::kGPa) : std::string("&ndash;"))
      << "</td><td>" << Esc(m.excluded_reason) << "</td></tr>\n";
  }
  o << "</table>\n";
  if (!c.best.empty()) o << "<p>Ranked first by " << Esc(crit) << ": <strong>" << Esc(c.best) << "</strong>.</p>\n";
  for (const std::string& n : c.notes) o << "<p class=\"note\">" << Esc(n) << "</p>\n";
  bool tests = false;
  for (const compare::NestedTest& t : c.tests) tests = tests || t.tested;
  if (tests) {
    o << "<table class=\"nested\"><tr><th>restricted</th><th>fuller</th><th>restriction</th><th>F</th><th>p</th>"
         "<th>decision</th></tr>\n";
    for (const compare::NestedTest& t : c.tests) {
      if (!t.tested) continue;
      o << "<tr><td>" << Esc(t.restricted) << "</td><td>" << Esc(t.fuller) << "</td><td>" << Esc(t.restriction)
        << "</td><td class=\"num\">" << HtmlNum("%.3g", t.f.f) << "</td><td class=\"num\">"
        << HtmlNum("%.3g", t.f.p_value) << "</td><td>" << Esc(t.decision) << "</td></tr>\n";
    }
    o << "</table>\n";
  }
}

// Flags and notes in words: fit flags and warnings, alpha grid flags as
// pressure ranges, band notes.
void FlagList(const StudySample& ss, const SampleRun& sr, std::ostream& o) {
  std::vector<std::string> items;
  for (size_t k = 0; k < sr.fits.size(); ++k) {
    const FitResult& r = sr.fits[k];
    for (const std::string& f : detail::FitFlags(r, ss.options))
      items.push_back("<strong>" + Esc(r.model_id) + "</strong>: " + Esc(FitFlagWords(f)) + " <span class=\"mono\">[" +
                      Esc(f) + "]</span>");
    for (const std::string& w : r.warnings) items.push_back("<strong>" + Esc(r.model_id) + "</strong>: " + Esc(w));
    if (k < sr.bands.size() && sr.bands[k].computed) {
      const bands::BandResult& b = sr.bands[k];
      for (const char* flag : {"extrapolated", "model-undefined", "alpha-below-porosity", "alpha-above-one",
                               "alpha-below-hs-limit", "k-dry-not-below-k-s"}) {
        const std::string ranges = FlagRanges(b, flag);
        if (!ranges.empty())
          items.push_back("<strong>" + Esc(r.model_id) + "</strong> alpha: " + Esc(PointFlagWords(flag)) + " at " +
                          ranges + " <span class=\"mono\">[" + flag + "]</span>");
      }
      for (const std::string& n : b.notes) items.push_back("<strong>" + Esc(r.model_id) + "</strong> bands: " + Esc(n));
    } else if (k < sr.bands.size() && !sr.bands[k].message.empty()) {
      items.push_back("<strong>" + Esc(r.model_id) + "</strong> alpha: not computed: " + Esc(sr.bands[k].message));
    }
  }
  o << "<h3>Flags and notes</h3>\n";
  if (const std::string w = detail::KDryAboveKsWarning(ss, sr); !w.empty())
    o << "<p class=\"warning\" role=\"alert\"><strong>Warning:</strong> " << Esc(w) << "</p>\n";
  if (items.empty()) {
    o << "<p>No flags raised.</p>\n";
    return;
  }
  o << "<ul class=\"flags\">\n";
  for (const std::string& i : items) o << "<li>" << i << "</li>\n";
  o << "</ul>\n";
}

}  // namespace

HtmlSection HtmlReport::Section(size_t index, const SampleRun& sr) const {
  const StudySample& ss = study_.samples[index];
  const Sample& s = ss.sample;
  const std::string& slug = slugs_[index];
  HtmlSection out;
  const bool has_section = index < options_.section_sample_limit;
  size_t converged = 0, failed = 0;
  for (const FitResult& r : sr.fits) (r.status == FitStatus::kConverged ? converged : failed) += 1;
  if (has_section) {
  std::ostringstream o;
  o << "<section class=\"sample\" id=\"s-" << slug << "\" data-sample=\"" << Esc(s.id) << "\">\n<h2>Sample "
    << Esc(s.id);
  if (!s.lithology.empty()) o << " &mdash; " << Esc(s.lithology);
  o << "</h2>\n";
  double pmin = INFINITY, pmax = -INFINITY;
  for (const DataPoint& p : s.points) {
    pmin = std::min(pmin, p.pressure);
    pmax = std::max(pmax, p.pressure);
  }
  o << "<p class=\"meta\">" << Esc(std::string(ToString(s.kind))) << ", " << Esc(std::string(ToString(s.branch)))
    << ", cycle " << s.cycle << "; " << s.points.size() << " points, P " << Sig(pmin / units::kMPa, 3) << " to "
    << Sig(pmax / units::kMPa, 3) << " MPa; porosity " << HtmlNum("%.3f", s.porosity) << "; "
    << (IsWeighted(s) ? (ss.options.scale_covariance ? "weighted by sigma, SE rescaled by the scatter"
                                                     : "weighted by calibrated sigma, SE not rescaled")
                      : "unweighted, SE from the scatter");
  if (ss.grain.given) {
    o << "; K_s = " << HtmlNum("%.2f", ss.grain.value.k_s / units::kGPa) << " &plusmn; "
      << HtmlNum("%.2f", ss.grain.value.sigma_k_s / units::kGPa) << " GPa ("
      << Esc(std::string(poro::ToString(ss.grain.value.method))) << ")";
  } else {
    o << "; no grain modulus: alpha not computed";
  }
  o << ".</p>\n";

  // Failures first, plainly.
  for (const FitResult& r : sr.fits) {
    if (r.status == FitStatus::kConverged) continue;
    o << "<div class=\"warning fit-failed\" role=\"alert\" data-model=\"" << Esc(r.model_id)
      << "\"><strong>Fit failed: " << Esc(r.model_id) << " &mdash; " << Esc(StatusText(r.status))
      << "</strong><br>" << Esc(r.message) << "<br>No curve is drawn for this model"
      << (HasEstimates(r) ? "; its estimates are listed below but are unreliable." : ".") << "</div>\n";
  }
  if (sr.fits.empty()) o << "<div class=\"warning\" role=\"alert\"><strong>No fits were run for this sample.</strong></div>\n";

  if (index < options_.figure_sample_limit) {
    const std::vector<detail::SampleFigure> figs = detail::DrawSampleFigures(ss, sr, registry_, slug);
    if (!figs.empty()) {
      o << "<div class=\"figures\">\n";
      for (const detail::SampleFigure& f : figs) {
        const std::string key = slug + "_" + f.name;
        o << "<figure id=\"fig-" << key << "\">\n" << detail::InlineSvg(f.svg) << "\n<figcaption>" << f.caption
          << " <span class=\"note\">(file <code>figures/" << key << ".svg</code>)</span></figcaption>\n</figure>\n";
        out.figures.push_back({key, "figures/" + key + ".svg", f.svg});
      }
      o << "</div>\n";
    }
  } else {
    o << "<p class=\"note\">Figures not drawn: beyond the figure limit of " << options_.figure_sample_limit
      << " samples.</p>\n";
  }

  // Fit statistics.
  o << "<h3>Fit statistics</h3>\n<table class=\"fits\">\n<tr><th>model</th><th>status</th><th>n</th><th>p</th>"
       "<th>RMSE</th><th>&chi;&sup2;<sub>&nu;</sub></th><th>R&sup2;</th><th>AICc</th><th>flags</th></tr>\n";
  const bool strain = IsStrainSample(ss);
  for (const FitResult& r : sr.fits) {
    const bool has = HasEstimates(r);
    const std::vector<std::string> flags = detail::FitFlags(r, ss.options);
    o << "<tr" << (r.status != FitStatus::kConverged ? " class=\"failed\"" : !flags.empty() ? " class=\"flagged\"" : "")
      << "><td>" << Esc(r.model_id) << "</td><td>" << Esc(StatusText(r.status)) << "</td><td class=\"num\">" << r.n
      << "</td><td class=\"num\">" << r.p << "</td><td class=\"num\">"
      << (has ? (strain ? HtmlNum("%.3g", r.rmse * 1e6) + "&nbsp;&micro;strain" : HtmlNum("%.4g", r.rmse / units::kGPa) + "&nbsp;GPa")
              : std::string("&ndash;"))
      << "</td><td class=\"num\">" << (has ? HtmlNum("%.3g", r.chi2_reduced) : "&ndash;") << "</td><td class=\"num\">"
      << (has ? HtmlNum("%.4f", r.r_squared) : "&ndash;") << "</td><td class=\"num\">"
      << (has ? HtmlNum("%.2f", r.aicc) : "&ndash;") << "</td><td class=\"mono\">"
      << (flags.empty() ? std::string("&ndash;") : Esc(detail::Join(flags, ", "))) << "</td></tr>\n";
  }
  o << "</table>\n";
  ParameterTable(ss, sr, o);
  CorrelationTables(sr, o);
  ComparisonTable(sr, o);
  FlagList(ss, sr, o);
  o << "<p><a href=\"#contents\">Back to contents</a></p>\n</section>\n";
  out.html = o.str();
  }

  // Overview row.
  std::ostringstream v;
  const compare::SampleComparison& c = sr.comparison;
  const compare::ModelScore* best = nullptr;
  const compare::ModelScore* next = nullptr;
  for (const compare::ModelScore& m : c.models) {
    if (m.rank == 1) best = &m;
    if (m.rank == 2) next = &m;
  }
  v << "<tr" << (failed > 0 ? " class=\"failed\"" : "") << "><td>"
    << (has_section ? "<a href=\"#s-" + slug + "\">" + Esc(s.id) + "</a>" : Esc(s.id)) << "</td><td>" << Esc(s.lithology) << "</td><td class=\"num\">" << sr.fits.size() << "</td><td class=\"num\">"
    << converged << "</td><td>" << (best ? Esc(best->model_id) : std::string("&ndash;")) << "</td><td class=\"num\">"
    << (best ? HtmlNum("%.3f", best->weight_aicc) : std::string("&ndash;")) << "</td><td>"
    << (next ? Esc(next->model_id) + ", " + HtmlNum("%.2f", next->delta_aicc) : std::string("&ndash;")) << "</td><td>";
  std::vector<std::string> bad;
  for (const FitResult& r : sr.fits)
    if (r.status != FitStatus::kConverged) bad.push_back(Esc(r.model_id) + " (" + Esc(StatusText(r.status)) + ")");
  v << (bad.empty() ? std::string("&ndash;") : detail::Join(bad, ", ")) << "</td></tr>\n";
  out.overview_row = v.str();
  return out;
}

}  // namespace porofit

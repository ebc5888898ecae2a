#include <algorithm>
#include <cmath>
#include <cstdio>

#include "branch_writer.h"
#include "comparison_writer.h"
#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"
#include "user_models_report.h"
#include "porofit/report/stream.h"

namespace porofit {
namespace {

std::string Fmt(const char* f, double v) {
  if (!std::isfinite(v)) return "-";
  char buf[64];
  std::snprintf(buf, sizeof buf, f, v);
  return buf;
}

std::string Pad(const std::string& s, size_t w) { return s.size() >= w ? s : s + std::string(w - s.size(), ' '); }
std::string PadLeft(const std::string& s, size_t w) {
  return s.size() >= w ? s : std::string(w - s.size(), ' ') + s;
}

std::string ParameterText(const FitResult& r) {
  std::vector<std::string> parts;
  const bool has = r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
  if (!has) return {};
  for (const ParameterResult& p : r.parameters) {
    const double est = p.estimate / p.si_factor;
    std::string s = p.name + " = ";
    if (p.fixed) {
      s += FormatRounded(est, 4) + " (fixed)";
    } else if (std::isfinite(p.std_error) && p.std_error > 0) {
      s += FormatPlusMinus(est, p.std_error / p.si_factor);
    } else {
      s += FormatRounded(est, 4) + " ± ?";
    }
    if (p.unit != "1" && !p.unit.empty()) s += " " + p.unit;
    if (!p.fixed && (p.at_lower || p.at_upper)) s += p.at_lower ? " [at lower bound]" : " [at upper bound]";
    parts.push_back(s);
  }
  return detail::Join(parts, ", ");
}

// Grid points shown in the summary: nearest to 5, 20 and 40 MPa among those
// inside the data range (the middle grid point when none is).
std::vector<size_t> SummaryPoints(const bands::PressureGrid& g) {
  std::vector<size_t> out;
  for (double target : {5.0, 20.0, 40.0}) {
    size_t best = g.size();
    double gap = INFINITY;
    for (size_t j = 0; j < g.size(); ++j) {
      if (j < g.extrapolated.size() && g.extrapolated[j]) continue;
      const double d = std::fabs(g.pressure[j] / units::kMPa - target);
      if (d < gap) gap = d, best = j;
    }
    if (best < g.size() && std::find(out.begin(), out.end(), best) == out.end()) out.push_back(best);
  }
  if (out.empty() && g.size() > 0) out.push_back(g.size() / 2);
  return out;
}

std::string Interval(double lo, double hi) { return "[" + Fmt("%.3f", lo) + ", " + Fmt("%.3f", hi) + "]"; }

void AlphaBlock(const StudySample& ss, const SampleRun& sr, const FitResult* best, std::ostream& out) {
  const GrainModulusChoice& g = ss.grain;
  if (!g.given) {
    out << "  alpha: not computed (grain_modulus: none).\n";
    return;
  }
  const poro::GrainModulus& v = g.value;
  out << "  K_s = " << FormatPlusMinus(v.k_s / units::kGPa, v.sigma_k_s / units::kGPa) << " GPa ("
      << poro::ToString(v.method);
  if (!g.group.empty()) out << ", shared group '" << g.group << "'";
  out << ")";
  if (ss.fluid) out << "; K_f = " << FormatPlusMinus(ss.fluid->k_f / units::kGPa, ss.fluid->sigma / units::kGPa) << " GPa";
  out << "\n";
  if (const std::string w = detail::KDryAboveKsWarning(ss, sr); !w.empty()) out << "  WARNING: " << w << "\n";
  if (best == nullptr) {
    out << "  alpha: no converged fit to evaluate.\n";
    return;
  }
  size_t k = 0;
  while (k < sr.fits.size() && &sr.fits[k] != best) ++k;
  if (k >= sr.bands.size()) return;
  const bands::BandResult& b = sr.bands[k];
  if (!b.computed) {
    out << "  alpha (" << best->model_id << "): " << b.message << "\n";
    return;
  }
  out << "  alpha from " << best->model_id << " (" << Fmt("%.0f", 100 * b.confidence) << " % bands):\n";
  for (size_t j : SummaryPoints(b.grid)) {
    out << "    P " << PadLeft(Fmt("%.1f", b.grid.pressure[j] / units::kMPa), 5) << " MPa: alpha "
        << Fmt("%.3f", b.alpha[j]);
    if (b.delta.computed) {
      out << "  delta " << Interval(b.delta.alpha_confidence.lower[j], b.delta.alpha_confidence.upper[j]);
      if (j < b.delta.grain_share.size()) out << " (K_s share " << Fmt("%.0f", 100 * b.delta.grain_share[j]) << " %)";
    }
    if (b.monte_carlo.computed) out << "  MC " << Interval(b.monte_carlo.alpha.lower[j], b.monte_carlo.alpha.upper[j]);
    if (b.bootstrap.computed) out << "  boot " << Interval(b.bootstrap.alpha.lower[j], b.bootstrap.alpha.upper[j]);
    const std::vector<std::string> f = detail::PointFlagNames(b.flags[j]);
    if (!f.empty()) out << "  [" << detail::Join(f, ",") << "]";
    out << "\n";
  }
  // The K_s correlation caveat is stated once at the end of the summary (and
  // the group on the K_s line); the other notes are specific to this fit.
  for (const std::string& n : b.notes) {
    if (n.rfind("alpha errors are fully correlated", 0) == 0 || n.rfind("K_s is shared by group", 0) == 0) continue;
    out << "      note: " << n << "\n";
  }
}

void SampleBlock(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  const Sample& s = ss.sample;
  double pmin = INFINITY, pmax = -INFINITY;
  for (const DataPoint& p : s.points) {
    pmin = std::min(pmin, p.pressure);
    pmax = std::max(pmax, p.pressure);
  }
  out << "Sample " << s.id;
  if (!s.lithology.empty()) out << " - " << s.lithology;
  out << "\n  " << ToString(s.kind) << ", " << ToString(s.branch) << ", cycle " << s.cycle << "; "
      << s.points.size() << " points, P " << Fmt("%.3g", pmin / units::kMPa) << " to "
      << Fmt("%.3g", pmax / units::kMPa) << " MPa; porosity " << Fmt("%.3f", s.porosity)
      << (IsWeighted(s) ? (ss.options.scale_covariance ? "; weighted by sigma, SE rescaled by the scatter"
                                                       : "; weighted by calibrated sigma, SE not rescaled")
                        : "; unweighted, SE from the scatter")
      << "\n";
  // The flags column is as wide as this sample's longest flag list.
  size_t flags_width = 5;
  for (const FitResult& r : sr.fits) {
    flags_width = std::max(flags_width, detail::Join(detail::FitFlags(r, ss.options), ",").size());
  }
  flags_width += 2;
  const bool strain = IsStrainSample(ss);  // residuals in strain: RMSE in microstrain
  if (strain)
    out << "  response: volumetric strain eps_v, fitted in strain form (K-model parameters); tangent, secant and "
           "chord moduli in moduli.csv\n";
  out << "  " << Pad("model", 15) << Pad("status", 16) << PadLeft(strain ? "RMSE ustr" : "RMSE GPa", 10) << PadLeft("AICc", 10) << "  "
      << Pad("flags", flags_width) << "parameters (estimate ± 1 SE)\n";
  const FitResult* best = nullptr;
  const FitResult* second = nullptr;
  for (const FitResult& r : sr.fits) {
    const bool has = r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
    const std::vector<std::string> flags = detail::FitFlags(r, ss.options);
    out << "  " << Pad(r.model_id, 15) << Pad(std::string(ToString(r.status)), 16)
        << PadLeft(has ? (strain ? Fmt("%.2f", r.rmse * 1e6) : Fmt("%.4f", r.rmse / units::kGPa)) : "-", 10)
        << PadLeft(has ? Fmt("%.2f", r.aicc) : "-", 10) << "  " << Pad(flags.empty() ? "-" : detail::Join(flags, ","), flags_width)
        << ParameterText(r) << "\n";
    if (r.status != FitStatus::kConverged) out << "      ! " << r.message << "\n";
    for (const std::string& w : r.warnings) out << "      note: " << w << "\n";
    if (r.status == FitStatus::kConverged && std::isfinite(r.aicc)) {
      if (best == nullptr || r.aicc < best->aicc) {
        second = best;
        best = &r;
      } else if (second == nullptr || r.aicc < second->aicc) {
        second = &r;
      }
    }
  }
  if (best != nullptr) {
    out << "  Lowest AICc: " << best->model_id;
    if (second != nullptr) {
      const double gap = second->aicc - best->aicc;
      out << " (next " << second->model_id << ", ΔAICc " << Fmt("%.2f", gap)
          << (gap < 2 ? ": the data do not tell them apart" : "") << ")";
    }
    out << ".\n";
  } else {
    out << "  No converged fit with a defined AICc.\n";
  }
  detail::WriteSampleComparisonLines(sr.comparison, out);
  AlphaBlock(ss, sr, best, out);
}

}  // namespace

void SummaryCounts::Add(const StudySample& ss, const SampleRun& sr) {
  for (const FitResult& r : sr.fits) {
    ++fits;
    converged += r.status == FitStatus::kConverged ? 1 : 0;
    flagged += detail::FitFlags(r, ss.options).empty() ? 0 : 1;
  }
}

void WriteSummaryHead(const Study& study, const RunMetadata& meta, const SummaryCounts& c, std::ostream& out) {
  out << "porofit " << meta.tool_version << " - study \"" << study.name << "\" - " << study.samples.size()
      << " samples, " << c.fits << " fits (" << c.converged << " converged, " << c.flagged << " flagged) - run "
      << meta.started_utc << "\n";
  out << CautionText() << "\n";
  const std::string invented = InventedNotice(study);
  if (!invented.empty()) out << invented << "\n";
  for (const std::string& w : study.warnings) out << w << "\n";
  detail::WriteUserModelsSummary(study, out);
}

void WriteSummarySample(const StudySample& ss, const SampleRun& sr, std::ostream& out) {
  out << "\n";
  SampleBlock(ss, sr, out);
}

void WriteSummaryAcross(const StudyRun& run, std::ostream& out) {
  detail::WriteComparisonGroupTable(run, out);
  detail::WriteBranchSummary(run, out);
  WriteJointSummary(run, out);
  WriteDepthSummary(run, out);
}

void WriteSummary(const StudyRun& run, std::ostream& out) {
  SummaryCounts counts;
  for (size_t i = 0; i < run.samples.size(); ++i) counts.Add(run.study.samples[i], run.samples[i]);
  WriteSummaryHead(run.study, run.metadata, counts, out);
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i)
    WriteSummarySample(run.study.samples[i], run.samples[i], out);
  WriteSummaryAcross(run, out);
  WriteSummaryFoot(run.study, out);
}

void WriteSummaryFoot(const Study& study, std::ostream& out) {
  out << "\nRMSE from raw residuals. AICc: lower is better, compare only fits of the same sample; a gap under 2 "
         "does not separate two models (Burnham & Anderson 2002). Check every flag and note before using a fit; "
         "flags are explained in docs/outputs.md.\n";
  bool any_alpha = false;
  for (const StudySample& ss : study.samples) any_alpha = any_alpha || ss.grain.given;
  if (any_alpha) out << "alpha = 1 - K_dry/K_s. " << detail::CorrelationCaveat() << ".\n";
}

}  // namespace porofit

#include <algorithm>
#include <cmath>
#include <cstdio>

#include "format.h"
#include "porofit/core/units.h"
#include "porofit/report/report.h"

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
    std::string s = p.name + " = " + Fmt("%.4g", est);
    if (p.fixed) {
      s += " (fixed)";
    } else if (std::isfinite(p.std_error)) {
      s += " ± " + Fmt("%.2g", p.std_error / p.si_factor);
    } else {
      s += " ± ?";
    }
    if (p.unit != "1" && !p.unit.empty()) s += " " + p.unit;
    if (!p.fixed && (p.at_lower || p.at_upper)) s += p.at_lower ? " [at lower bound]" : " [at upper bound]";
    parts.push_back(s);
  }
  return detail::Join(parts, ", ");
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
  out << "  " << Pad("model", 15) << Pad("status", 16) << PadLeft("RMSE GPa", 10) << PadLeft("AICc", 10) << "  "
      << Pad("flags", flags_width) << "parameters (estimate ± 1 SE)\n";
  const FitResult* best = nullptr;
  const FitResult* second = nullptr;
  for (const FitResult& r : sr.fits) {
    const bool has = r.status == FitStatus::kConverged || r.status == FitStatus::kMaxIterations;
    const std::vector<std::string> flags = detail::FitFlags(r, ss.options);
    out << "  " << Pad(r.model_id, 15) << Pad(std::string(ToString(r.status)), 16)
        << PadLeft(has ? Fmt("%.4f", r.rmse / units::kGPa) : "-", 10)
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
}

}  // namespace

void WriteSummary(const StudyRun& run, std::ostream& out) {
  size_t n_fits = 0, n_converged = 0, n_flagged = 0;
  for (size_t i = 0; i < run.samples.size(); ++i) {
    for (const FitResult& r : run.samples[i].fits) {
      ++n_fits;
      n_converged += r.status == FitStatus::kConverged ? 1 : 0;
      n_flagged += detail::FitFlags(r, run.study.samples[i].options).empty() ? 0 : 1;
    }
  }
  out << "porofit " << run.metadata.tool_version << " - study \"" << run.study.name << "\" - "
      << run.study.samples.size() << " samples, " << n_fits << " fits (" << n_converged << " converged, " << n_flagged
      << " flagged) - run " << run.metadata.started_utc << "\n";
  out << CautionText() << "\n";
  const std::string invented = InventedNotice(run.study);
  if (!invented.empty()) out << invented << "\n";
  for (const std::string& w : run.study.warnings) out << w << "\n";
  for (size_t i = 0; i < run.study.samples.size() && i < run.samples.size(); ++i) {
    out << "\n";
    SampleBlock(run.study.samples[i], run.samples[i], out);
  }
  out << "\nRMSE from raw residuals. AICc: lower is better, compare only fits of the same sample; a gap under 2 "
         "does not separate two models (Burnham & Anderson 2002). Check every flag and note before using a fit; "
         "flags are explained in docs/outputs.md.\n";
}

}  // namespace porofit

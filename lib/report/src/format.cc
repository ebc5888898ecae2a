#include "format.h"

#include <cctype>
#include <charconv>
#include <algorithm>
#include <cmath>

#include "porofit/report/report.h"

namespace porofit {

std::string CautionText() {
  return "CAUTION: decision support only. These results must be reviewed by qualified geomechanics or "
         "petroleum engineers before any use; local regulations and operator standards govern any "
         "operational use.";
}

bool IsInventedStudy(const Study& study) { return study.invented; }

std::string InventedNotice(const Study& study) {
  if (!IsInventedStudy(study)) return {};
  return "NOTE: this study's data are invented for demonstration; they are not measurements of any real rock, "
         "well or field.";
}

namespace detail {

std::string Num(double v) {
  if (std::isnan(v)) return {};
  if (std::isinf(v)) return v > 0 ? "inf" : "-inf";
  if (v == 0) return "0";  // also folds -0
  char buf[64];
  auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, v);
  return ec == std::errc() ? std::string(buf, ptr) : std::string();
}

std::string CsvField(std::string_view s) {
  const bool quote = s.find_first_of(",\"\r\n") != std::string_view::npos ||
                     (!s.empty() && (s.front() == ' ' || s.back() == ' ' || s.front() == '#'));
  if (!quote) return std::string(s);
  std::string q = "\"";
  for (char c : s) {
    if (c == '"') q += '"';
    q += c;
  }
  return q + "\"";
}

std::string CsvRow(const std::vector<std::string>& fields) {
  std::string line;
  for (size_t i = 0; i < fields.size(); ++i) {
    if (i) line += ',';
    line += fields[i];
  }
  return line + "\n";
}

std::string CsvPreamble(const std::string& title, const Study& study, const std::string& started_utc,
                        const std::string& tool_version, const std::vector<std::string>& extra) {
  std::string s = "# porofit " + tool_version + " - " + title + "\n";
  s += "# study: " + study.name + " (" + study.path + "), run " + started_utc + "\n";
  s += "# " + CautionText() + "\n";
  const std::string invented = InventedNotice(study);
  if (!invented.empty()) s += "# " + invented + "\n";
  for (const std::string& e : extra) s += "# " + e + "\n";
  return s;
}

std::vector<std::string> FitFlags(const FitResult& r, const FitOptions& options) {
  std::vector<std::string> f;
  if (r.rank_deficient) f.push_back("rank-deficient");
  if (r.high_correlation) f.push_back("high-correlation");
  if (r.closure_outside_range) f.push_back("closure-outside-data");
  for (const ParameterResult& p : r.parameters) {
    if (!p.fixed && (p.at_lower || p.at_upper)) {
      f.push_back("at-bound");
      break;
    }
  }
  if (options.covariance && r.status == FitStatus::kConverged && !r.covariance_ok) f.push_back("no-covariance");
  if (options.loss != RobustLoss::kNone) f.push_back("robust-loss");
  return f;
}

std::string Join(const std::vector<std::string>& parts, std::string_view sep) {
  std::string s;
  for (size_t i = 0; i < parts.size(); ++i) {
    if (i) s += sep;
    s += parts[i];
  }
  return s;
}

std::vector<int> ResidualToPoint(const FitResult& r, const Sample& sample) {
  const auto n = static_cast<int>(r.residuals.x.size());
  std::vector<int> map(static_cast<size_t>(n), -1);
  std::vector<bool> used(sample.points.size(), false);
  for (int i = 0; i < n; ++i) {
    const double x = r.residuals.x[i];
    if (i < static_cast<int>(sample.points.size()) && !used[static_cast<size_t>(i)] &&
        sample.points[static_cast<size_t>(i)].pressure == x) {
      map[static_cast<size_t>(i)] = i;
      used[static_cast<size_t>(i)] = true;
      continue;
    }
    for (size_t j = 0; j < sample.points.size(); ++j) {
      if (!used[j] && sample.points[j].pressure == x) {
        map[static_cast<size_t>(i)] = static_cast<int>(j);
        used[j] = true;
        break;
      }
    }
  }
  return map;
}

std::string KDryAboveKsWarning(const StudySample& ss, const SampleRun& sr) {
  if (!ss.grain.given) return {};
  const double k_s = ss.grain.value.k_s;
  size_t points = 0;
  for (const DataPoint& p : ss.sample.points) points += std::isfinite(p.modulus) && p.modulus >= k_s ? 1 : 0;
  std::vector<std::string> fits;
  for (size_t k = 0; k < sr.bands.size() && k < sr.fits.size(); ++k) {
    const bands::BandResult& b = sr.bands[k];
    if (!b.computed) continue;
    double lo = INFINITY, hi = -INFINITY;
    for (size_t j = 0; j < b.grid.size() && j < b.flags.size(); ++j) {
      const bool inside = j >= b.grid.extrapolated.size() || !b.grid.extrapolated[j];
      if (inside && b.flags[j].k_dry_not_below_k_s) lo = std::min(lo, b.grid.pressure[j]), hi = std::max(hi, b.grid.pressure[j]);
    }
    if (lo <= hi)
      fits.push_back(sr.fits[k].model_id + " at " + FormatRounded(lo / 1e6) + "–" + FormatRounded(hi / 1e6) + " MPa");
  }
  if (points == 0 && fits.empty()) return {};
  std::string where;
  if (points > 0)
    where = "data: " + std::to_string(points) + " of " + std::to_string(ss.sample.points.size()) + " points";
  if (!fits.empty()) where += (where.empty() ? "" : "; ") + std::string("fits: ") + Join(fits, ", ");
  return "K_dry reaches or exceeds K_s = " + FormatPlusMinus(k_s / 1e9, ss.grain.value.sigma_k_s / 1e9) +
         " GPa inside the data range (" + where +
         "): alpha = 1 - K_dry/K_s is 0 or negative there. Check K_s (its source and unit) and the unit of K "
         "before using alpha [k-dry-not-below-k-s]";
}

double RelativeErrorPercent(double estimate, double se) {
  if (!std::isfinite(estimate) || !std::isfinite(se) || estimate == 0) return std::nan("");
  return 100.0 * se / std::fabs(estimate);
}

}  // namespace detail
}  // namespace porofit

#include "format.h"

#include <cctype>
#include <charconv>
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

double RelativeErrorPercent(double estimate, double se) {
  if (!std::isfinite(estimate) || !std::isfinite(se) || estimate == 0) return std::nan("");
  return 100.0 * se / std::fabs(estimate);
}

}  // namespace detail
}  // namespace porofit

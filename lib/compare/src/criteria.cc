#include "porofit/compare/criteria.h"

#include <algorithm>
#include <cmath>
#include <limits>

#include <boost/math/distributions/fisher_f.hpp>

namespace porofit::compare {

namespace {
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
}

double AiccCorrection(int n, int k) {
  if (k < 0 || n <= k + 1) return kNaN;
  return 2.0 * k * (k + 1) / static_cast<double>(n - k - 1);
}

std::vector<double> ScoreDifferences(std::span<const double> scores) {
  double best = std::numeric_limits<double>::infinity();
  for (double s : scores)
    if (std::isfinite(s)) best = std::min(best, s);
  std::vector<double> d(scores.size(), kNaN);
  if (!std::isfinite(best)) return d;
  for (size_t i = 0; i < scores.size(); ++i)
    if (std::isfinite(scores[i])) d[i] = scores[i] - best;
  return d;
}

std::vector<double> AkaikeWeights(std::span<const double> scores) {
  std::vector<double> w = ScoreDifferences(scores);
  double sum = 0;
  for (double& x : w) {
    if (std::isnan(x)) continue;
    x = std::exp(-0.5 * x);  // Delta >= 0, so no overflow; the best model has 1
    sum += x;
  }
  for (double& x : w)
    if (!std::isnan(x)) x /= sum;
  return w;
}

FTestResult NestedFTest(double rss_small, int p_small, double rss_big, int p_big, int n, double level) {
  FTestResult r;
  r.level = level;
  r.df1 = p_big - p_small;
  r.df2 = n - p_big;
  if (!(level > 0 && level < 1)) {
    r.reason = "level must be in (0, 1)";
  } else if (r.df1 <= 0) {
    r.reason = "the fuller model must have more free parameters (" + std::to_string(p_big) + " vs " +
               std::to_string(p_small) + ")";
  } else if (r.df2 <= 0) {
    r.reason = "no residual degrees of freedom (n = " + std::to_string(n) + ", p = " + std::to_string(p_big) + ")";
  } else if (!(std::isfinite(rss_small) && std::isfinite(rss_big)) || rss_small < 0 || rss_big < 0) {
    r.reason = "residual sums of squares are not finite and non-negative";
  } else if (rss_big == 0) {
    r.reason = "the fuller model fits exactly (RSS = 0)";
  }
  if (!r.reason.empty()) {
    r.f = r.p_value = r.critical = kNaN;
    return r;
  }
  r.f = ((rss_small - rss_big) / r.df1) / (rss_big / r.df2);
  const boost::math::fisher_f dist(r.df1, r.df2);
  r.critical = boost::math::quantile(dist, level);
  r.p_value = r.f <= 0 ? 1.0 : boost::math::cdf(boost::math::complement(dist, r.f));
  r.reject = r.f > r.critical;
  r.computed = true;
  return r;
}

}  // namespace porofit::compare

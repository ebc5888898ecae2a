#include "porofit/fit/diagnostics.h"

#include <Eigen/SVD>
#include <cmath>
#include <limits>

namespace porofit {

Eigen::VectorXd Leverages(const Eigen::MatrixXd& weighted_jacobian, double rcond) {
  const Eigen::Index n = weighted_jacobian.rows();
  if (weighted_jacobian.cols() == 0 || n == 0) return Eigen::VectorXd::Zero(n);
  // H = U_r U_r^T with U_r the left singular vectors of the non-zero singular values.
  Eigen::JacobiSVD<Eigen::MatrixXd> svd(weighted_jacobian, Eigen::ComputeThinU);
  const Eigen::VectorXd& sv = svd.singularValues();
  const double cut = sv.size() > 0 ? rcond * sv(0) : 0.0;
  Eigen::VectorXd h = Eigen::VectorXd::Zero(n);
  for (Eigen::Index k = 0; k < sv.size(); ++k) {
    if (!(sv(k) > cut)) break;  // singular values are sorted in decreasing order
    h += svd.matrixU().col(k).cwiseAbs2();
  }
  return h;
}

Eigen::VectorXd StudentizedResiduals(const Eigen::VectorXd& raw, const Eigen::VectorXd& sigma,
                                     const Eigen::VectorXd& leverage, double s) {
  Eigen::VectorXd out(raw.size());
  for (Eigen::Index i = 0; i < raw.size(); ++i) {
    const double one_minus_h = 1.0 - leverage(i);
    out(i) = one_minus_h > 0 ? raw(i) / (s * sigma(i) * std::sqrt(one_minus_h))
                             : std::numeric_limits<double>::quiet_NaN();
  }
  return out;
}

RunsTest WaldWolfowitzRuns(const Eigen::VectorXd& residuals) {
  RunsTest t;
  int last = 0;
  for (Eigen::Index i = 0; i < residuals.size(); ++i) {
    const double e = residuals(i);
    if (e == 0 || std::isnan(e)) continue;
    const int sign = e > 0 ? 1 : -1;
    (sign > 0 ? t.n_positive : t.n_negative) += 1;
    if (sign != last) ++t.runs;
    last = sign;
  }
  const double n1 = t.n_positive, n2 = t.n_negative, n = n1 + n2;
  const double nan = std::numeric_limits<double>::quiet_NaN();
  if (n < 2) {
    t.z = t.p = nan;
    return t;
  }
  const double mu = 2 * n1 * n2 / n + 1;
  const double var = 2 * n1 * n2 * (2 * n1 * n2 - n) / (n * n * (n - 1));
  if (!(var > 0)) {
    t.z = t.p = nan;
    return t;
  }
  t.z = (t.runs - mu) / std::sqrt(var);
  t.p = std::erfc(std::abs(t.z) / std::sqrt(2.0));
  return t;
}

double DurbinWatson(const Eigen::VectorXd& residuals) {
  if (residuals.size() < 2) return std::numeric_limits<double>::quiet_NaN();
  const double den = residuals.squaredNorm();
  if (!(den > 0)) return std::numeric_limits<double>::quiet_NaN();
  const Eigen::Index m = residuals.size() - 1;
  return (residuals.tail(m) - residuals.head(m)).squaredNorm() / den;
}

}  // namespace porofit

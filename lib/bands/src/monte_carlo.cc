// Monte Carlo bands: parameter draws from the fit's sampling distribution,
// K_s drawn independently, percentile bands of K(P) and alpha(P).
#include <Eigen/Eigenvalues>

#include <memory>

#include "common.h"
#include "porofit/bands/random.h"

namespace porofit::bands {

MonteCarloResult ComputeMonteCarloBands(const BandRequest& r) {
  MonteCarloResult out;
  out.distribution = r.options.monte_carlo_distribution;
  if (std::string why = detail::CheckRequest(r, true, false); !why.empty()) {
    out.message = why;
    return out;
  }
  const detail::FitView v = detail::ViewOf(r);
  const ModelSpec& m = *v.model;
  const FitResult& f = *r.fit;
  const size_t G = r.grid.size();
  const int D = r.options.monte_carlo_draws;
  const auto p = static_cast<Eigen::Index>(v.free_index.size());

  // Draws are made in the fit's own coordinates: ln(theta) for parameters the
  // solver fits as logarithms (ParameterTransform::kLog), theta otherwise.
  // There the likelihood is closer to quadratic and a positive scale stays
  // positive; drawing a poorly determined P_r in linear space instead gave
  // 20 % rejected draws and 0.87 coverage for power-offset at 5 % noise
  // (measured, docs/coverage.md). Cov_u = D^-1 Cov D^-1, D = diag(theta_j or 1).
  std::vector<char> is_log(static_cast<size_t>(p));
  Eigen::VectorXd centre(p), dinv(p);
  for (Eigen::Index a = 0; a < p; ++a) {
    const auto j = static_cast<size_t>(v.free_index[static_cast<size_t>(a)]);
    const double t = v.theta_free_si[static_cast<size_t>(a)];
    is_log[static_cast<size_t>(a)] = m.parameters[j].transform == ParameterTransform::kLog && t > 0;
    centre(a) = is_log[static_cast<size_t>(a)] ? std::log(t) : t;
    dinv(a) = is_log[static_cast<size_t>(a)] ? 1.0 / t : 1.0;
  }
  const Eigen::MatrixXd cov_u = dinv.asDiagonal() * f.covariance * dinv.asDiagonal();
  // Cov_u = V diag(lambda) V^T; a square root that tolerates a semidefinite
  // covariance (tiny negative eigenvalues from rounding count as 0).
  Eigen::SelfAdjointEigenSolver<Eigen::MatrixXd> eig(cov_u);
  const Eigen::MatrixXd root = eig.eigenvectors() * eig.eigenvalues().cwiseMax(0.0).cwiseSqrt().asDiagonal();
  // Multivariate t with nu = n - p: theta_hat + L z sqrt(nu / chi2_nu). nu is
  // an integer here, so chi2_nu is a sum of nu squared normals.
  const bool use_t = out.distribution == McDistribution::kStudentT && v.scaled && f.dof > 0;
  const int nu = f.dof;

  // Row-major K of every draw (alpha is formed while gathering columns, so
  // only one draws x grid array is allocated); uninitialised: every used row
  // is written.
  std::unique_ptr<double[]> kd(new double[static_cast<size_t>(D) * G]);
  std::vector<double> ks_of(static_cast<size_t>(D), 1.0);
  std::vector<char> use(static_cast<size_t>(D), 0);
  std::vector<char> why(static_cast<size_t>(D), 0);  // 1 grain, 2 bounds, 3 curve
  constexpr int kBlock = 64;
  const int blocks = (D + kBlock - 1) / kBlock;

  detail::ParallelFor(blocks, r.options.threads, [&](int blk) {
    const int d0 = blk * kBlock, d1 = std::min(D, d0 + kBlock);
    std::vector<double> th = v.theta_working;
    Eigen::VectorXd z(p), step(p);
    for (int d = d0; d < d1; ++d) {
      Stream rng(r.options.seed, detail::kTagMonteCarlo, static_cast<std::uint64_t>(d));
      for (Eigen::Index a = 0; a < p; ++a) z(a) = rng.Normal();
      double scale = 1.0;
      if (use_t) {
        double chi2 = 0;
        for (int k = 0; k < nu; ++k) {
          const double e = rng.Normal();
          chi2 += e * e;
        }
        scale = std::sqrt(nu / chi2);
      }
      const double ks = r.k_s + r.sigma_k_s * rng.Normal();
      const auto row = static_cast<size_t>(d);
      ks_of[row] = ks;
      if (!(ks > 0)) {
        why[row] = 1;
        continue;
      }
      step.noalias() = root * z;
      bool inside = true;
      for (Eigen::Index a = 0; a < p && inside; ++a) {
        const auto j = static_cast<size_t>(v.free_index[static_cast<size_t>(a)]);
        const double u = centre(a) + scale * step(a);
        const double si = is_log[static_cast<size_t>(a)] ? std::exp(u) : u;
        const ParameterResult& q = f.parameters[j];
        const bool log = m.parameters[j].transform == ParameterTransform::kLog;
        inside = (si >= q.lower && si <= q.upper) && (!log || si > 0);
        th[j] = si / m.parameters[j].si_factor;
      }
      if (!inside) {
        why[row] = 2;
        continue;
      }
      if (!detail::CurveAt(m, th.data(), r.grid.pressure, kd.get() + row * G)) {
        why[row] = 3;
        continue;
      }
      use[row] = 1;
    }
  });

  out.draws = D;
  for (int d = 0; d < D; ++d) {
    switch (why[static_cast<size_t>(d)]) {
      case 1: ++out.rejected_grain; break;
      case 2: ++out.rejected_bounds; break;
      case 3: ++out.rejected_curve; break;
      default: ++out.accepted; break;
    }
  }
  if (out.accepted == 0) {
    out.message = "every Monte Carlo draw was rejected as unphysical";
    return out;
  }
  detail::PercentileBands(kd.get(), ks_of.data(), use, G, r.options.confidence, r.options.threads, out.k,
                          out.alpha);
  out.computed = true;
  return out;
}

}  // namespace porofit::bands

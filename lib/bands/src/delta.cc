// Delta-method bands with K_s as an extra, independent, known-variance input.
#include <cmath>
#include <Eigen/Core>
#include <boost/math/distributions/chi_squared.hpp>
#include <boost/math/distributions/fisher_f.hpp>

#include "common.h"

namespace porofit::bands {
namespace {

using detail::kInf;
using detail::kNaN;
using Fast = boost::math::policies::policy<boost::math::policies::promote_double<false>>;

// sigma(P) of one new measurement, before the s^2 scaling: relative
// sigma_i/|y_i| interpolated linearly in P (constant beyond the data) times
// K(P); a constant 1 working unit for unweighted data.
std::vector<double> NoiseSigma(const BandRequest& r, const std::vector<double>& k) {
  const FitData& d = r.fit_request->data;
  const ModelSpec& m = *r.fit_request->model;
  // Data of another quantity than K (strain fits): no noise level of K known.
  if (r.curve_model != nullptr && r.curve_model != r.fit_request->model) return std::vector<double>(r.grid.size(), kNaN);
  std::vector<double> out(r.grid.size(), m.y_si_factor);
  if (d.sigma.empty()) return out;
  std::vector<std::pair<double, double>> rel;
  for (size_t i = 0; i < d.y.size(); ++i)
    if (std::isfinite(d.sigma[i]) && d.y[i] != 0) rel.emplace_back(d.x[i], d.sigma[i] / std::abs(d.y[i]));
  std::sort(rel.begin(), rel.end());
  if (rel.empty()) return out;
  for (size_t g = 0; g < r.grid.size(); ++g) {
    const double p = r.grid.pressure[g];
    double q;
    if (p <= rel.front().first) {
      q = rel.front().second;
    } else if (p >= rel.back().first) {
      q = rel.back().second;
    } else {
      const auto it = std::lower_bound(rel.begin(), rel.end(), std::make_pair(p, -kInf));
      const auto& b = *it;
      const auto& a = *(it - 1);
      const double t = b.first > a.first ? (p - a.first) / (b.first - a.first) : 0.0;
      q = a.second + t * (b.second - a.second);
    }
    out[g] = q * std::abs(k[g]);
  }
  return out;
}

// Two-sided whole-curve multiplier sqrt(q F_{q, nu}) (Working–Hotelling /
// Scheffé), or sqrt(chi2_q) when nu is infinite.
double ScheffeMultiplier(double confidence, int q, double nu) {
  if (q < 1) return kNaN;
  if (std::isinf(nu)) {
    return std::sqrt(boost::math::quantile(boost::math::chi_squared_distribution<double, Fast>(q), confidence));
  }
  if (!(nu > 0)) return kNaN;
  return std::sqrt(q * boost::math::quantile(boost::math::fisher_f_distribution<double, Fast>(q, nu), confidence));
}

void Resize(Band& b, size_t g) {
  b.estimate.assign(g, kNaN);
  b.lower.assign(g, kNaN);
  b.upper.assign(g, kNaN);
}

}  // namespace

DeltaResult ComputeDeltaBands(const BandRequest& r) {
  DeltaResult out;
  out.quantile_rule = r.options.delta_quantile;
  if (std::string why = detail::CheckRequest(r, true, false); !why.empty()) {
    out.message = why;
    return out;
  }
  const detail::FitView v = detail::ViewOf(r);
  const ModelSpec& m = *v.model;
  const FitResult& f = *r.fit;
  const size_t G = r.grid.size();
  const double conf = r.options.confidence;
  const CurveGradient cg = EvaluateCurve(f, m, r.grid.pressure);
  const Eigen::MatrixXd& cov = f.covariance;
  const auto p = static_cast<Eigen::Index>(v.free_index.size());
  const double ks = r.k_s, var_ks = r.sigma_k_s * r.sigma_k_s;
  // Noise scale for the prediction band: SSR/(n-p) for least squares; for a
  // robust loss the fit's M-estimator scale, in which an outlier enters through
  // its bounded psi rather than its full squared residual.
  const bool robust = r.fit_request != nullptr && r.fit_request->options.loss != RobustLoss::kNone &&
                      std::isfinite(f.residual_scale);
  const double s2 = !v.scaled ? 1.0 : robust ? f.residual_scale * f.residual_scale : f.chi2_reduced;

  out.k_dof = v.k_dof;
  out.k_quantile = TwoSidedT(conf, out.quantile_rule == DeltaQuantile::kNormal ? kInf : v.k_dof);
  for (auto* b : {&out.k_confidence, &out.alpha_confidence, &out.k_prediction, &out.alpha_prediction,
                  &out.k_simultaneous, &out.alpha_simultaneous})
    Resize(*b, G);
  out.k_se.assign(G, kNaN);
  out.alpha_se.assign(G, kNaN);
  out.alpha_var_fit.assign(G, kNaN);
  out.alpha_var_grain.assign(G, kNaN);
  out.grain_share.assign(G, kNaN);
  out.alpha_dof.assign(G, kNaN);
  out.alpha_quantile.assign(G, kNaN);
  out.noise_sigma = NoiseSigma(r, cg.value);

  out.k_simultaneous_quantile = ScheffeMultiplier(conf, static_cast<int>(p), v.k_dof);
  out.alpha_simultaneous_quantile =
      ScheffeMultiplier(conf, static_cast<int>(p) + (var_ks > 0 ? 1 : 0), v.k_dof);

  // One quantile per distinct dof: the rule decides the dof of each point.
  auto alpha_dof = [&](double v_fit, double v_grain) {
    switch (out.quantile_rule) {
      case DeltaQuantile::kWelchSatterthwaite: return WelchSatterthwaiteDof(v_fit, v.k_dof, v_grain);
      case DeltaQuantile::kStudentT: return v.k_dof;
      case DeltaQuantile::kNormal: return kInf;
    }
    return v.k_dof;
  };

  const detail::TQuantileCurve tq(conf, v.k_dof);
  Eigen::VectorXd g(p);
  for (size_t i = 0; i < G; ++i) {
    const double k = cg.value[i];
    for (Eigen::Index a = 0; a < p; ++a) g(a) = cg.gradient[i][static_cast<size_t>(a)];
    const double var_k = std::max(0.0, g.dot(cov * g));
    const double alpha = 1.0 - k / ks;
    const double v_fit = var_k / (ks * ks);
    const double v_grain = (k / (ks * ks)) * (k / (ks * ks)) * var_ks;
    const double var_a = v_fit + v_grain;
    out.k_se[i] = std::sqrt(var_k);
    out.alpha_se[i] = std::sqrt(var_a);
    out.alpha_var_fit[i] = v_fit;
    out.alpha_var_grain[i] = v_grain;
    out.grain_share[i] = var_a > 0 ? v_grain / var_a : kNaN;
    out.alpha_dof[i] = alpha_dof(v_fit, v_grain);
    out.alpha_quantile[i] = tq(out.alpha_dof[i]);

    auto set = [](Band& b, size_t at, double c, double half) {
      b.estimate[at] = c;
      b.lower[at] = c - half;
      b.upper[at] = c + half;
    };
    set(out.k_confidence, i, k, out.k_quantile * out.k_se[i]);
    set(out.alpha_confidence, i, alpha, out.alpha_quantile[i] * out.alpha_se[i]);

    const double noise2 = out.noise_sigma[i] * out.noise_sigma[i] * s2;
    out.noise_sigma[i] = std::sqrt(noise2);
    const double var_k_pred = var_k + noise2;
    const double v_fit_pred = var_k_pred / (ks * ks);
    set(out.k_prediction, i, k, out.k_quantile * std::sqrt(var_k_pred));
    set(out.alpha_prediction, i, alpha,
        tq(alpha_dof(v_fit_pred, v_grain)) * std::sqrt(v_fit_pred + v_grain));

    set(out.k_simultaneous, i, k, out.k_simultaneous_quantile * out.k_se[i]);
    set(out.alpha_simultaneous, i, alpha, out.alpha_simultaneous_quantile * out.alpha_se[i]);
  }
  out.computed = true;
  return out;
}

}  // namespace porofit::bands

// Residual and wild bootstrap with refits through porofit::Fit.
#include <atomic>
#include <memory>

#include "common.h"
#include "porofit/bands/random.h"

namespace porofit::bands {

BootstrapResult ComputeBootstrapBands(const BandRequest& r) {
  BootstrapResult out;
  out.kind = r.options.bootstrap_kind;
  if (std::string why = detail::CheckRequest(r, false, true); !why.empty()) {
    out.message = why;
    return out;
  }
  const detail::FitView v = detail::ViewOf(r);
  const ModelSpec& m = *v.model;
  const FitResult& f = *r.fit;
  const ResidualDiagnostics& d = f.residuals;
  const size_t G = r.grid.size();
  const int B = r.options.bootstrap_replicates;
  const auto n = static_cast<size_t>(f.n);

  // Leverage-adjusted standardised residuals e_i = r_i / (sigma_i sqrt(1 - h_ii)):
  // the raw residuals of a least-squares fit are too small by sqrt(1 - h_ii)
  // on average (Efron & Tibshirani, 1993, ch. 9; Davison & Hinkley, 1997,
  // Bootstrap Methods and their Application, Cambridge, §6.2 [from memory]).
  // A point with h_ii ~ 1 carries no residual information; it gets 0.
  std::vector<double> e(n), fitted(n), sigma(n);
  for (size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Eigen::Index>(i);
    const double h = d.leverage(ii);
    sigma[i] = d.sigma(ii);
    fitted[i] = d.fitted(ii);
    e[i] = h < 1.0 - 1e-10 ? d.raw(ii) / (sigma[i] * std::sqrt(1.0 - h)) : 0.0;
  }
  if (out.kind == BootstrapKind::kResidual) {
    double mean = 0;
    for (double x : e) mean += x;
    mean /= static_cast<double>(n);
    for (double& x : e) x -= mean;
  }

  // Refit template: warm start at theta_hat, one start, no covariance. A
  // user start in the settings would override the warm start, so drop it.
  FitRequest base = *r.fit_request;
  base.extra_starts = {v.theta_working};
  base.only_extra_starts = true;
  base.options.multistart = 1;
  base.options.covariance = false;
  base.options.residual_diagnostics = false;
  base.options.function_tolerance = r.options.refit_tolerance;
  base.options.gradient_tolerance = r.options.refit_tolerance;
  base.options.parameter_tolerance = r.options.refit_tolerance;
  for (auto& [name, s] : base.settings) s.start.reset();

  // Row-major K of every replicate; uninitialised: every used row is written.
  std::unique_ptr<double[]> kd(new double[static_cast<size_t>(B) * G]);
  std::vector<double> ks_of(static_cast<size_t>(B), 1.0);
  std::vector<char> use(static_cast<size_t>(B), 0);
  std::vector<char> why(static_cast<size_t>(B), 0);  // 1 status, 2 curve

  std::atomic<size_t> finished{0};
  auto report = [&] {
    const size_t k = finished.fetch_add(1) + 1;
    if (r.bootstrap_progress) r.bootstrap_progress(k, static_cast<size_t>(B));
  };
  detail::ParallelFor(B, r.options.threads, [&](int b) {
    Stream rng(r.options.seed, detail::kTagBootstrap, static_cast<std::uint64_t>(b));
    FitRequest req = base;
    for (size_t i = 0; i < n; ++i) {
      const double ei = out.kind == BootstrapKind::kResidual ? e[rng.Below(n)] : e[i] * rng.Sign();
      req.data.y[i] = fitted[i] + sigma[i] * ei;
    }
    const double ks = r.k_s + r.sigma_k_s * rng.Normal();
    const auto row = static_cast<size_t>(b);
    const FitResult fr = Fit(req);
    if (fr.status != FitStatus::kConverged) {
      why[row] = 1;
      report();
      return;
    }
    std::vector<double> th(m.parameters.size());
    for (size_t j = 0; j < th.size(); ++j) th[j] = fr.parameters[j].estimate / m.parameters[j].si_factor;
    if (!detail::CurveAt(m, th.data(), r.grid.pressure, kd.get() + row * G) || !(ks > 0)) {
      why[row] = 2;
      report();
      return;
    }
    ks_of[row] = ks;
    use[row] = 1;
    report();
  });

  out.replicates = B;
  for (int b = 0; b < B; ++b) {
    switch (why[static_cast<size_t>(b)]) {
      case 1: ++out.failed_status; break;
      case 2: ++out.failed_curve; break;
      default: ++out.succeeded; break;
    }
  }
  if (out.succeeded == 0) {
    out.message = "every bootstrap refit failed";
    return out;
  }
  detail::PercentileBands(kd.get(), ks_of.data(), use, G, r.options.confidence, r.options.threads, out.k,
                          out.alpha);
  out.computed = true;
  return out;
}

}  // namespace porofit::bands

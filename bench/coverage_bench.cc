// Coverage study of the nominal 95 % pointwise alpha(P) bands (a program, not
// a test; docs/coverage.md records its output).
//
// Design (all seeded; invented truths of typical dry-sandstone size):
//   models  exp-modulus     K_inf 20, K_0 8 GPa, P_close 10 MPa
//           exp-compliance  C_inf 0.05, C_0 0.125 1/GPa, P_close 10 MPa
//           power-offset    K_0 9 GPa, n 0.25, P_r 5 MPa
//           linear-exp      A 18 GPa, B 0.05 GPa/MPa, C 10 GPa, D 0.1 1/MPa
//   n       8, 12, 20 pressures, linearly spaced over 2..60 MPa
//   noise   K_obs = K_true (1 + 0.02 z); sigma_i = 0.02 K_obs (relative
//           weights, covariance scaled by s^2, as a lab quoting "2 % of reading")
//   K_s     true 37 GPa; the lab's estimate K_s_hat ~ N(37, 1), sigma 1 GPa
//   covered lo <= alpha_true(P) <= hi at P = 5, 20, 40, 60 and 90 MPa (90 is an
//           extrapolation), alpha_true = 1 - K_true(P)/37
//   methods delta with the Welch–Satterthwaite quantile (default), t(n-p) on
//           the whole variance, z; Monte Carlo (multivariate t and normal,
//           4,000 draws); residual and wild bootstrap (--replicates refits)
//   failed  fits that do not converge or lack a covariance are left out of
//           the denominator and counted.
//
// usage: porofit_coverage [--datasets N] [--boot-datasets M] [--replicates B]
//                         [--threads T] [--models id,id] [--no-boot]
//                         [--noise 0.02] [--sigma-ks 1] [--n 8,12,20]
// --noise / --sigma-ks change the design (relative noise, K_s spread in GPa)
// to a fit-dominated variance, where the quantile rules differ most.
#include <chrono>
#include <cmath>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <mutex>
#include <sstream>
#include <string>
#include <thread>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/bands/random.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace {

using namespace porofit;
using namespace porofit::bands;

struct Truth {
  const char* id;
  std::vector<double> theta;  // working units, model order
};

const std::vector<Truth>& Truths() {
  static const std::vector<Truth> t = {
      {"exp-modulus", {20.0, 8.0, 10.0}},
      {"exp-compliance", {0.05, 0.125, 10.0}},
      {"power-offset", {9.0, 0.25, 5.0}},
      {"linear-exp", {18.0, 0.05, 10.0, 0.1}},
  };
  return t;
}

const double kPe[] = {5.0, 20.0, 40.0, 60.0, 90.0};
constexpr int kNp = 5;

enum Method { kWs, kT, kZ, kMcT, kMcN, kBootRes, kBootWild, kNumMethods };
const char* kMethodName[] = {"delta, Welch-Satterthwaite t (default)", "delta, t(n-p) (naive)", "delta, z",
                             "Monte Carlo, multivariate t",          "Monte Carlo, normal",   "bootstrap, residual",
                             "bootstrap, wild"};

struct Tally {
  long covered[kNp] = {};
  double half_width[kNp] = {};
  long used = 0;
  long failed_fit = 0;        // dataset's own fit unusable
  long failed_replicates = 0;  // bootstrap refits that failed / MC draws rejected
  long replicates = 0;
  void Add(const Tally& o) {
    for (int i = 0; i < kNp; ++i) {
      covered[i] += o.covered[i];
      half_width[i] += o.half_width[i];
    }
    used += o.used;
    failed_fit += o.failed_fit;
    failed_replicates += o.failed_replicates;
    replicates += o.replicates;
  }
};

struct Config {
  int datasets = 2000;
  int boot_datasets = 2000;
  int replicates = 400;
  int threads = 2;
  bool boot = true;
  double noise = 0.02;     // relative noise of K and the declared relative sigma
  double sigma_ks = 1.0;   // GPa: spread of the lab's K_s estimate and its declared sigma
  std::vector<int> ns = {8, 12, 20};
  std::vector<std::string> models;
};

void Score(const Band& b, const double* a_true, Tally& t) {
  ++t.used;
  for (int i = 0; i < kNp; ++i) {
    t.covered[i] += b.lower[static_cast<size_t>(i)] <= a_true[i] && a_true[i] <= b.upper[static_cast<size_t>(i)];
    t.half_width[i] += 0.5 * (b.upper[static_cast<size_t>(i)] - b.lower[static_cast<size_t>(i)]);
  }
}

// One dataset: simulate, fit, run every method, score.
void RunDataset(const Truth& truth, const ModelSpec& m, int n, int index, std::uint64_t cell, const Config& cfg,
                Tally* tally) {
  Stream rng(20261201, cell, static_cast<std::uint64_t>(index));
  FitRequest req;
  req.model = &m;
  for (int i = 0; i < n; ++i) {
    const double p = 2.0 + 58.0 * i / (n - 1);
    const double k = m.value(truth.theta.data(), p) * (1.0 + cfg.noise * rng.Normal());
    req.data.x.push_back(p * 1e6);
    req.data.y.push_back(k * 1e9);
    req.data.sigma.push_back(cfg.noise * k * 1e9);
  }
  const double ks_hat = 37.0 + cfg.sigma_ks * rng.Normal();
  const FitResult fit = Fit(req);
  const bool usable = fit.IsUsable() && fit.covariance_ok;
  double a_true[kNp];
  for (int i = 0; i < kNp; ++i) a_true[i] = 1.0 - m.value(truth.theta.data(), kPe[i]) / 37.0;

  BandRequest r;
  r.fit_request = &req;
  r.fit = &fit;
  r.k_s = ks_hat * 1e9;
  r.sigma_k_s = cfg.sigma_ks * 1e9;
  std::vector<double> g;
  for (double p : kPe) g.push_back(p * 1e6);
  r.grid = GridAt(g, 2e6, 60e6);
  r.options.seed = 7000 + static_cast<std::uint64_t>(index);

  const bool boot = cfg.boot && index < cfg.boot_datasets;
  for (int meth = 0; meth < kNumMethods; ++meth) {
    if ((meth == kBootRes || meth == kBootWild) && !boot) continue;
    Tally& t = tally[meth];
    if (!usable) {
      ++t.failed_fit;
      continue;
    }
    switch (meth) {
      case kWs:
      case kT:
      case kZ: {
        r.options.delta_quantile = meth == kWs ? DeltaQuantile::kWelchSatterthwaite
                                   : meth == kT ? DeltaQuantile::kStudentT
                                                : DeltaQuantile::kNormal;
        const DeltaResult d = ComputeDeltaBands(r);
        if (!d.computed) {
          ++t.failed_fit;
          break;
        }
        Score(d.alpha_confidence, a_true, t);
        break;
      }
      case kMcT:
      case kMcN: {
        r.options.monte_carlo_distribution = meth == kMcT ? McDistribution::kStudentT : McDistribution::kNormal;
        const MonteCarloResult mc = ComputeMonteCarloBands(r);
        t.replicates += mc.draws;
        t.failed_replicates += mc.rejected();
        if (!mc.computed) {
          ++t.failed_fit;
          break;
        }
        Score(mc.alpha, a_true, t);
        break;
      }
      case kBootRes:
      case kBootWild: {
        r.options.bootstrap_kind = meth == kBootRes ? BootstrapKind::kResidual : BootstrapKind::kWild;
        r.options.bootstrap_replicates = cfg.replicates;
        const BootstrapResult b = ComputeBootstrapBands(r);
        t.replicates += b.replicates;
        t.failed_replicates += b.failed();
        if (!b.computed) {
          ++t.failed_fit;
          break;
        }
        Score(b.alpha, a_true, t);
        break;
      }
      default: break;
    }
  }
}

std::vector<std::string> Split(const std::string& s) {
  std::vector<std::string> out;
  std::stringstream ss(s);
  std::string item;
  while (std::getline(ss, item, ',')) out.push_back(item);
  return out;
}

}  // namespace

int main(int argc, char** argv) {
  Config cfg;
  for (int i = 1; i < argc; ++i) {
    const std::string a = argv[i];
    auto next = [&]() -> std::string {
      if (i + 1 >= argc) {
        std::fprintf(stderr, "porofit_coverage: error: %s needs a value\n", a.c_str());
        std::exit(1);
      }
      return argv[++i];
    };
    if (a == "--datasets") cfg.datasets = std::atoi(next().c_str());
    else if (a == "--boot-datasets") cfg.boot_datasets = std::atoi(next().c_str());
    else if (a == "--replicates") cfg.replicates = std::atoi(next().c_str());
    else if (a == "--threads") cfg.threads = std::atoi(next().c_str());
    else if (a == "--models") cfg.models = Split(next());
    else if (a == "--no-boot") cfg.boot = false;
    else if (a == "--noise") cfg.noise = std::atof(next().c_str());
    else if (a == "--sigma-ks") cfg.sigma_ks = std::atof(next().c_str());
    else if (a == "--n") {
      cfg.ns.clear();
      for (const auto& v : Split(next())) cfg.ns.push_back(std::atoi(v.c_str()));
    }
    else {
      std::fprintf(stderr, "porofit_coverage: error: unrecognized argument: %s\n", a.c_str());
      return 1;
    }
  }
  if (cfg.models.empty())
    for (const Truth& t : Truths()) cfg.models.push_back(t.id);

  std::printf("# porofit coverage study: nominal 95 %% pointwise alpha band; %d datasets per cell "
              "(bootstrap: first %d, %d replicates); threads %d; noise %g of K; K_s 37 +- %g GPa; "
              "MC s.e. of 0.95 at 2000 = 0.0049\n",
              cfg.datasets, cfg.boot ? cfg.boot_datasets : 0, cfg.replicates, cfg.threads, cfg.noise, cfg.sigma_ks);
  std::printf("| model | n | method | P=5 | P=20 | P=40 | P=60 | P=90 (extrap.) | used | failed fits | "
              "failed/rejected replicates | mean half-width at P=20 |\n|---|---|---|---|---|---|---|---|---|---|---|---|\n");
  std::fflush(stdout);
  std::uint64_t cell = 0;
  for (const Truth& truth : Truths()) {
    bool wanted = false;
    for (const auto& id : cfg.models) wanted = wanted || id == truth.id;
    if (!wanted) continue;
    const ModelSpec& m = *ModelRegistry::Builtin().Find(truth.id);
    for (int n : cfg.ns) {
      ++cell;
      const auto t0 = std::chrono::steady_clock::now();
      std::vector<std::vector<Tally>> per_thread(static_cast<size_t>(cfg.threads),
                                                 std::vector<Tally>(kNumMethods));
      std::vector<std::thread> pool;
      for (int th = 0; th < cfg.threads; ++th) {
        pool.emplace_back([&, th] {
          for (int d = th; d < cfg.datasets; d += cfg.threads)
            RunDataset(truth, m, n, d, cell * 100 + static_cast<std::uint64_t>(n), cfg,
                       per_thread[static_cast<size_t>(th)].data());
        });
      }
      for (auto& p : pool) p.join();
      std::vector<Tally> total(kNumMethods);
      for (const auto& pt : per_thread)
        for (int k = 0; k < kNumMethods; ++k) total[static_cast<size_t>(k)].Add(pt[static_cast<size_t>(k)]);
      const double secs = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
      for (int k = 0; k < kNumMethods; ++k) {
        const Tally& t = total[static_cast<size_t>(k)];
        if (t.used == 0 && t.failed_fit == 0) continue;
        std::printf("| %s | %d | %s |", truth.id, n, kMethodName[k]);
        for (int i = 0; i < kNp; ++i)
          std::printf(" %.3f |", t.used > 0 ? static_cast<double>(t.covered[i]) / static_cast<double>(t.used) : NAN);
        std::printf(" %ld | %ld | %ld / %ld | %.4f |\n", t.used, t.failed_fit, t.failed_replicates, t.replicates,
                    t.used > 0 ? t.half_width[1] / static_cast<double>(t.used) : NAN);
      }
      std::printf("<!-- %s n=%d: %.1f s -->\n", truth.id, n, secs);
      std::fflush(stdout);
    }
  }
  return 0;
}

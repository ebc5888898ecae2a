// Timing of the uncertainty layer on one invented 15-point sample (the same
// job as the scipy anchor: P = 2..60 MPa, exp-modulus truth 20 / 8 / 10,
// Gaussian noise 0.2 GPa, unweighted, K_s = 37 +- 1 GPa, 200-point grid):
//   BM_ModelEval200     200 value_and_gradient calls (the floor of a band)
//   BM_FitWithCovariance one full porofit::Fit (baseline: what a band follows)
//   BM_Refit            one warm-started bootstrap refit (diagnostics on/off)
//   BM_DeltaBands       delta bands (confidence, prediction, simultaneous) on 200 points
//   BM_MonteCarloBands  4,000 draws on the 200-point grid
//   BM_Bootstrap        2,000-replicate residual bootstrap with percentile bands
// Single-threaded unless the name says otherwise.
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace {

using namespace porofit;

struct Job {
  FitRequest request;
  FitResult fit;
  bands::BandRequest bands;
};

const Job& TheJob() {
  static const Job job = [] {
    Job j;
    const ModelSpec* m = ModelRegistry::Builtin().Find("exp-modulus");
    j.request.model = m;
    std::mt19937_64 rng(20240601);
    std::normal_distribution<double> noise(0.0, 0.2);
    const double truth[] = {20.0, 8.0, 10.0};
    for (int i = 0; i < 15; ++i) {
      const double p = 2.0 + 58.0 * i / 14.0;
      j.request.data.x.push_back(p * 1e6);
      j.request.data.y.push_back((m->value(truth, p) + noise(rng)) * 1e9);
    }
    j.fit = Fit(j.request);
    std::vector<double> grid(200);
    for (int i = 0; i < 200; ++i) grid[static_cast<size_t>(i)] = (2.0 + 58.0 * i / 199.0) * 1e6;
    j.bands.grid = bands::GridAt(grid, 2e6, 60e6);
    j.bands.k_s = 37e9;
    j.bands.sigma_k_s = 1e9;
    return j;
  }();
  return job;
}

bands::BandRequest Request(const Job& j) {
  bands::BandRequest r = j.bands;
  r.fit_request = &j.request;
  r.fit = &j.fit;
  return r;
}

void BM_ModelEval200(benchmark::State& state) {
  const Job& j = TheJob();
  const ModelSpec& m = *j.request.model;
  double th[3], g[3];
  for (int k = 0; k < 3; ++k) th[k] = j.fit.parameters[static_cast<size_t>(k)].estimate / m.parameters[static_cast<size_t>(k)].si_factor;
  for (auto _ : state) {
    double acc = 0;
    for (double p : j.bands.grid.pressure) acc += m.value_and_gradient(th, p * 1e-6, g);
    benchmark::DoNotOptimize(acc);
  }
}
BENCHMARK(BM_ModelEval200);

void BM_FitWithCovariance(benchmark::State& state) {
  const Job& j = TheJob();
  for (auto _ : state) benchmark::DoNotOptimize(Fit(j.request));
}
BENCHMARK(BM_FitWithCovariance)->Unit(benchmark::kMicrosecond);

void BM_Refit(benchmark::State& state) {
  const Job& j = TheJob();
  FitRequest req = j.request;
  const ModelSpec& m = *req.model;
  std::vector<double> th(3);
  for (size_t k = 0; k < 3; ++k) th[k] = j.fit.parameters[k].estimate / m.parameters[k].si_factor;
  req.extra_starts = {th};
  req.only_extra_starts = true;
  req.options.multistart = 1;
  req.options.covariance = false;
  req.options.residual_diagnostics = state.range(0) == 1;
  if (state.range(0) == 2) {
    req.options.function_tolerance = 1e-12;
    req.options.parameter_tolerance = 1e-12;
    req.options.gradient_tolerance = 1e-12;
  }
  std::mt19937_64 rng(7);
  std::normal_distribution<double> noise(0.0, 0.2e9);
  std::vector<std::vector<double>> ys(64, j.request.data.y);
  for (auto& y : ys)
    for (double& v : y) v += noise(rng);
  size_t k = 0;
  for (auto _ : state) {
    req.data.y = ys[k++ % ys.size()];
    benchmark::DoNotOptimize(Fit(req));
  }
  state.SetLabel(state.range(0) == 1 ? "with residual diagnostics" : state.range(0) == 0 ? "diagnostics off" : "diagnostics off, tolerances 1e-12");
  int iters = 0;
  req.data.y = ys[0];
  iters = Fit(req).iterations;
  state.counters["iterations"] = iters;
}
BENCHMARK(BM_Refit)->Arg(1)->Arg(0)->Arg(2)->Unit(benchmark::kMicrosecond);

void BM_DeltaBands(benchmark::State& state) {
  const Job& j = TheJob();
  const bands::BandRequest r = Request(j);
  for (auto _ : state) benchmark::DoNotOptimize(bands::ComputeDeltaBands(r));
}
BENCHMARK(BM_DeltaBands)->Unit(benchmark::kMicrosecond);

void BM_MonteCarloBands(benchmark::State& state) {
  const Job& j = TheJob();
  bands::BandRequest r = Request(j);
  r.options.threads = static_cast<int>(state.range(0));
  for (auto _ : state) benchmark::DoNotOptimize(bands::ComputeMonteCarloBands(r));
  state.SetLabel("4000 draws x 200 points, threads=" + std::to_string(state.range(0)));
}
BENCHMARK(BM_MonteCarloBands)->Arg(1)->Arg(2)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_Bootstrap(benchmark::State& state) {
  const Job& j = TheJob();
  bands::BandRequest r = Request(j);
  r.options.threads = static_cast<int>(state.range(0));
  r.options.bootstrap_kind = state.range(1) != 0 ? bands::BootstrapKind::kWild : bands::BootstrapKind::kResidual;
  int failed = 0;
  for (auto _ : state) {
    const bands::BootstrapResult b = bands::ComputeBootstrapBands(r);
    failed = b.failed();
    benchmark::DoNotOptimize(b);
  }
  state.counters["failed_refits"] = failed;
  state.SetLabel(std::string(state.range(1) != 0 ? "wild" : "residual") +
                 ", 2000 replicates, threads=" + std::to_string(state.range(0)));
}
BENCHMARK(BM_Bootstrap)->Args({1, 0})->Args({1, 1})->Args({2, 0})->Unit(benchmark::kMillisecond)->UseRealTime();

}  // namespace

BENCHMARK_MAIN();

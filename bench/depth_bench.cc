// Timing of depth tables (porofit/depth/table.h) on one invented well: 1000 m
// of sea water, rock from 1000 m below MSL, S_v from a constant gradient of
// 22.6 kPa/m (or a 10,000-sample density profile), hydrostatic P_p at
// 10.1 kPa/m, one exp-modulus curve fitted to 15 invented points (P = 2..60
// MPa, truth 20 / 8 / 10, Gaussian noise 0.2 GPa, K_s = 37 +- 1 GPa),
// 50,000 rows from 1000 m to 5999.9 m, every row with K and alpha bands:
//   BM_TableTerzaghiMean      mean effective stress, k = 0.6, Terzaghi
//   BM_TableBiotVertical      vertical effective stress, Biot fixed point per row
//   BM_TableProfileDepletion  S_v from the density profile, Terzaghi vertical, two depletion scenarios
//   BM_NaivePerRowBands       baseline: the same rows computed one at a time, one
//                             bands::ComputeDeltaBands call on a one-point grid
//                             per row (2,000 rows; compare items_per_second)
// Single-threaded.
#include <benchmark/benchmark.h>

#include <cmath>
#include <random>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/depth/table.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace {

using namespace porofit;
using namespace porofit::depth;

constexpr int kRows = 50000;

struct Job {
  FitRequest request;
  FitResult fit;
  DepthTableSpec spec;
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
    DepthTableSpec& s = j.spec;
    s.name = "bench";
    s.datum.kind = DatumKind::kMeanSeaLevel;
    s.datum.water_depth = 1000;
    s.datum.water_density = 1030;
    s.top = 1000;
    s.step = 0.1;
    s.base = s.top + (kRows - 1) * s.step;
    s.overburden.gradient = 22600;
    s.pore_pressure.gradient = 10100;
    return j;
  }();
  return job;
}

DepthTableSpec SpecOf(const Job& j) {
  DepthTableSpec s = j.spec;
  FittedCurve c;
  c.sample_id = "bench";
  c.model_id = "exp-modulus";
  c.model = j.request.model;
  c.fit = &j.fit;
  c.k_s = 37e9;
  c.sigma_k_s = 1e9;
  c.porosity = 0.2;
  c.lab_min = 2e6;
  c.lab_max = 60e6;
  s.curves = {c};
  s.intervals = {{s.top, s.base + 1, 0}};
  return s;
}

void Run(benchmark::State& state, const DepthTableSpec& s) {
  size_t rows = 0;
  double iterations = 0;
  for (auto _ : state) {
    DepthTable t = BuildDepthTable(s);
    rows = t.rows.size();
    benchmark::DoNotOptimize(t.rows.back().alpha_upper);
    state.PauseTiming();
    iterations = 0;
    for (const DepthRow& r : t.rows) iterations += r.iterations;
    state.ResumeTiming();
  }
  if (rows != static_cast<size_t>(kRows)) state.SkipWithError("unexpected row count");
  state.SetItemsProcessed(static_cast<int64_t>(state.iterations()) * static_cast<int64_t>(rows));
  // Biot fixed-point iterations per row (0 for Terzaghi).
  state.counters["fp_iter_per_row"] = iterations / static_cast<double>(rows);
}

void BM_TableTerzaghiMean(benchmark::State& state) {
  DepthTableSpec s = SpecOf(TheJob());
  s.stress.measure = StressMeasure::kMeanEffective;
  s.stress.horizontal = HorizontalStressKind::kRatio;
  s.stress.ratio = 0.6;
  Run(state, s);
}
BENCHMARK(BM_TableTerzaghiMean)->Unit(benchmark::kMillisecond);

void BM_TableBiotVertical(benchmark::State& state) {
  DepthTableSpec s = SpecOf(TheJob());
  s.stress.law = EffectiveStressLaw::kBiot;
  Run(state, s);
}
BENCHMARK(BM_TableBiotVertical)->Unit(benchmark::kMillisecond);

void BM_TableProfileDepletion(benchmark::State& state) {
  DepthTableSpec s = SpecOf(TheJob());
  s.overburden.kind = OverburdenKind::kDensityProfile;
  DensityProfile& p = s.overburden.profile;
  // 10,000 samples, 0.5 m apart, an invented compaction trend with a ripple.
  for (int i = 0; i < 10000; ++i) {
    const double z = 1000 + 0.5 * i;
    p.depth.push_back(z);
    p.density.push_back(2000 + 0.1 * (z - 1000) + 30 * std::sin(z / 7.0));
    p.source.push_back(DensitySource::kMeasured);
  }
  s.depletion = {{"minus 5 MPa", 5e6}, {"minus 10 MPa", 10e6}};
  s.base = std::min(s.base, p.depth.back());
  s.step = (s.base - s.top) / (kRows - 1);
  s.base = s.top + (kRows - 1) * s.step;
  Run(state, s);
}
BENCHMARK(BM_TableProfileDepletion)->Unit(benchmark::kMillisecond);

// Baseline: the rows of BM_TableTerzaghiMean's first kNaive depths computed
// one by one, each with its own band call on a one-point grid.
void BM_NaivePerRowBands(benchmark::State& state) {
  const Job& j = TheJob();
  constexpr int kNaive = 2000;
  bands::BandRequest r;
  r.fit_request = &j.request;
  r.fit = &j.fit;
  r.k_s = 37e9;
  r.sigma_k_s = 1e9;
  r.options.confidence = 0.80;
  const double g = 9.80665;
  for (auto _ : state) {
    double sink = 0;
    for (int i = 0; i < kNaive; ++i) {
      const double z = j.spec.top + i * j.spec.step;
      const double sv = 1030 * g * 1000 + 22600 * (z - 1000);
      const double pp = 10100 * z;
      const double p = (1 + 0.6 + 0.6) / 3 * (sv - pp);
      r.grid = bands::GridAt({p}, 2e6, 60e6);
      const bands::DeltaResult d = bands::ComputeDeltaBands(r);
      sink += d.alpha_confidence.lower[0] + d.alpha_confidence.upper[0] + d.k_confidence.lower[0];
    }
    benchmark::DoNotOptimize(sink);
  }
  state.SetItemsProcessed(static_cast<int64_t>(state.iterations()) * kNaive);
}
BENCHMARK(BM_NaivePerRowBands)->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();

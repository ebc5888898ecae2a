// Large batches: 10,000 samples x 4 models (exp-modulus, exp-compliance,
// power-offset, linear-exp), 10-15 points each, covariance on, default fit
// options (multistart 8). SYNTHETIC data, generated here from a seed:
// K = K_inf - (K_inf - K_0) exp(-P / P_c) GPa plus Gaussian noise (0.15 GPa),
// P = 2..60 MPa, truths drawn per sample. No real measurement is involved.
//
//   porofit_batch_bench [benchmark flags]           time the batch (1 and 2 threads)
//   porofit_batch_bench --write-study DIR N         write an N-sample batch study to DIR
//                                                   (study.yaml, samples.csv, points.csv)
//
// Benchmarks:
//   BM_LoadBatchStudy/N      LoadStudy of an N-sample sample_table study (files in a temp dir)
//   BM_RunBatch/N/threads/multistart/solver  RunStudyStreaming over N samples, a sink that keeps nothing
//   BM_RunAndWrite/N/threads/multistart the CLI's path: run + every output file into a folder
// The baseline in the same run is the Ceres solver path (auto_solver:0), 1 thread.
#include <benchmark/benchmark.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <cstring>
#include <filesystem>
#include <fstream>
#include <iostream>
#include <map>
#include <random>
#include <string>
#include <tuple>

#include "porofit/io/study_loader.h"
#include "porofit/report/stream.h"
#include "porofit/run/stream.h"

namespace {
namespace fs = std::filesystem;

void WriteBatchStudy(const fs::path& dir, int n) {
  fs::create_directories(dir);
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> noise(0.0, 0.15);
  std::ofstream t(dir / "samples.csv"), d(dir / "points.csv");
  t.precision(10);
  d.precision(10);
  t << "id,lithology,porosity,bulk_density [g/cc],branch,well\n";
  d << "sample,P [MPa],K [GPa]\n";
  for (int i = 0; i < n; ++i) {
    const std::string id = "SYN-" + std::to_string(i + 1);
    t << id << ",synthetic sandstone," << 0.1 + 0.15 * u(rng) << ",2.3,loading,W-" << i % 20 << "\n";
    const double kinf = 15 + 10 * u(rng), k0 = 3 + 4 * u(rng), pc = 4 + 8 * u(rng);
    const int points = 10 + i % 6;
    for (int k = 0; k < points; ++k) {
      const double p = 2 + 58.0 * k / (points - 1);
      d << id << "," << p << "," << kinf - (kinf - k0) * std::exp(-p / pc) + noise(rng) << "\n";
    }
  }
  std::ofstream(dir / "study.yaml")
      << "name: synthetic batch benchmark (invented)\n"
         "description: SYNTHETIC seeded data written by bench/batch_bench.cc, not measurements\n"
         "defaults:\n  models: [exp-modulus, exp-compliance, power-offset, linear-exp]\n"
         "sample_table:\n  file: samples.csv\n  data: points.csv\n";
}

fs::path BenchDir(int n) {
  static std::map<int, fs::path> made;
  auto it = made.find(n);
  if (it != made.end()) return it->second;
  const fs::path dir = fs::temp_directory_path() / ("porofit-batch-bench-" + std::to_string(::getpid()) + "-" +
                                                    std::to_string(n));
  WriteBatchStudy(dir, n);
  made[n] = dir;
  return dir;
}

// The loaded study with FitOptions::multistart set on every sample (the
// study file itself uses the defaults, multistart 8).
// solver: 1 = FitOptions::solver auto (the default), 0 = ceres (the baseline).
const porofit::Study& BenchStudy(int n, int multistart, int solver = 1) {
  static std::map<std::tuple<int, int, int>, porofit::Study> loaded;
  auto it = loaded.find({n, multistart, solver});
  if (it == loaded.end()) {
    porofit::Study s = porofit::LoadStudy((BenchDir(n) / "study.yaml").string());
    for (porofit::StudySample& ss : s.samples) {
      ss.options.multistart = multistart;
      ss.options.solver = solver == 0 ? porofit::SolverChoice::kCeres : porofit::SolverChoice::kAuto;
    }
    it = loaded.emplace(std::make_tuple(n, multistart, solver), std::move(s)).first;
  }
  return it->second;
}

void BM_LoadBatchStudy(benchmark::State& state) {
  const int n = static_cast<int>(state.range(0));
  const std::string path = (BenchDir(n) / "study.yaml").string();
  for (auto _ : state) {
    porofit::Study s = porofit::LoadStudy(path);
    benchmark::DoNotOptimize(s.samples.data());
  }
  state.counters["samples"] = n;
}
BENCHMARK(BM_LoadBatchStudy)->Arg(10000)->Unit(benchmark::kMillisecond)->Iterations(3);

void BM_RunBatch(benchmark::State& state) {
  const int n = static_cast<int>(state.range(0));
  const porofit::Study& study = BenchStudy(n, static_cast<int>(state.range(2)), static_cast<int>(state.range(3)));
  porofit::RunOptions o;
  o.threads = static_cast<int>(state.range(1));
  size_t fits = 0, converged = 0, at_limit = 0;
  for (auto _ : state) {
    fits = converged = 0;
    porofit::RunStudyStreaming(study, o, [&](size_t, porofit::SampleRun&& r) {
      for (const porofit::FitResult& f : r.fits) {
        ++fits;
        converged += f.status == porofit::FitStatus::kConverged ? 1 : 0;
        at_limit += f.status == porofit::FitStatus::kAtLimit ? 1 : 0;
      }
    });
  }
  state.counters["fits"] = static_cast<double>(fits);
  state.counters["converged"] = static_cast<double>(converged);
  state.counters["at_limit"] = static_cast<double>(at_limit);
  state.counters["us_per_fit"] = benchmark::Counter(static_cast<double>(fits) * 1e-6,
                                                    benchmark::Counter::kIsIterationInvariantRate |
                                                        benchmark::Counter::kInvert);
}
// Args: samples, threads, multistart, solver (1 auto = default, 0 ceres =
// baseline). The Ceres baseline at multistart 8 is timed on 1,000 samples
// only, to keep the session short.
BENCHMARK(BM_RunBatch)
    ->ArgNames({"samples", "threads", "multistart", "auto_solver"})
    ->Args({1000, 1, 8, 0})
    ->Args({1000, 1, 8, 1})
    ->Args({1000, 1, 1, 0})
    ->Args({1000, 1, 1, 1})
    ->Args({10000, 1, 8, 1})
    ->Args({10000, 2, 8, 1})
    ->Args({10000, 1, 1, 1})
    ->Args({10000, 2, 1, 1})
    ->Args({10000, 1, 1, 0})
    ->Unit(benchmark::kSecond)
    ->Iterations(1)
    ->UseRealTime();

void BM_RunAndWrite(benchmark::State& state) {
  const int n = static_cast<int>(state.range(0));
  const porofit::Study& study = BenchStudy(n, static_cast<int>(state.range(2)));
  porofit::RunOptions o;
  o.threads = static_cast<int>(state.range(1));
  porofit::AtomicFolderOptions fo;
  fo.overwrite = true;
  const fs::path out = BenchDir(n) / "out";
  for (auto _ : state) porofit::RunAndWriteReportFolder(study, o, out, fo);
  state.counters["fits"] = 4.0 * n;
}
BENCHMARK(BM_RunAndWrite)->Args({10000, 2, 1})->Unit(benchmark::kSecond)->Iterations(1)->UseRealTime();

}  // namespace

int main(int argc, char** argv) {
  if (argc == 4 && std::strcmp(argv[1], "--write-study") == 0) {
    WriteBatchStudy(argv[2], std::atoi(argv[3]));
    std::cout << "wrote " << argv[2] << "/study.yaml (" << argv[3] << " synthetic samples)\n";
    return 0;
  }
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  for (int n : {1000, 10000}) {
    std::error_code ec;
    fs::remove_all(fs::temp_directory_path() / ("porofit-batch-bench-" + std::to_string(::getpid()) + "-" +
                                                std::to_string(n)), ec);
  }
  return 0;
}

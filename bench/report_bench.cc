// The HTML report of a 100-sample study (issue target: under 5 s).
// SYNTHETIC data generated here from a seed: K = K_inf - (K_inf - K_0)
// exp(-P / P_c) GPa plus Gaussian noise (sigma 0.15 GPa, given per point),
// P = 2..60 MPa, 12 points, truths drawn per sample; one invented grain
// modulus shared by every sample (so every sample has alpha bands). No real
// measurement is involved.
//
// The study is run once (RunStudy, 2 threads, not timed); then:
//   BM_RenderHtml             report.html and every figure, in memory (WriteHtmlReport)
//   BM_WriteFolderWithHtml    WriteReportFolder: every report file + report.html + figures/*.svg
//   BM_WriteFolderWithoutHtml baseline in the same run: the same CSV and JSON files written
//                             atomically by their public writers, no HTML, no figures
#include <benchmark/benchmark.h>
#include <unistd.h>

#include <cmath>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>

#include "porofit/io/study_loader.h"
#include "porofit/report/html.h"
#include "porofit/report/report.h"

namespace {
namespace fs = std::filesystem;

const fs::path& Dir() {
  static const fs::path d = fs::temp_directory_path() / ("porofit-report-bench-" + std::to_string(::getpid()));
  return d;
}

void WriteStudy(const fs::path& dir, int n) {
  fs::create_directories(dir);
  std::mt19937_64 rng(20261203);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> noise(0.0, 0.15);
  std::ofstream t(dir / "samples.csv"), d(dir / "points.csv");
  t.precision(10);
  d.precision(10);
  t << "id,lithology,porosity,bulk_density [g/cc],branch,grain_modulus\n";
  d << "sample,P [MPa],K [GPa],sigma_K [GPa]\n";
  for (int i = 0; i < n; ++i) {
    const std::string id = "SYN-" + std::to_string(i + 1);
    t << id << ",synthetic sandstone " << i % 4 << "," << 0.1 + 0.15 * u(rng) << ",2.3,loading,syn\n";
    const double kinf = 15 + 10 * u(rng), k0 = 3 + 4 * u(rng), pc = 4 + 8 * u(rng);
    for (int k = 0; k < 12; ++k) {
      const double p = 2 + 58.0 * k / 11;
      d << id << "," << p << "," << kinf - (kinf - k0) * std::exp(-p / pc) + noise(rng) << ",0.15\n";
    }
  }
  std::ofstream(dir / "study.yaml")
      << "name: synthetic report benchmark (invented)\n"
         "description: SYNTHETIC seeded data written by bench/report_bench.cc, not measurements\n"
         "defaults:\n  models: [exp-modulus, exp-compliance]\n"
         "grain_moduli:\n  syn:\n    measured: {K_s: 37 GPa, sigma: 1 GPa, source: invented for the benchmark}\n"
         "sample_table:\n  file: samples.csv\n  data: points.csv\n  uncertainty_calibrated: true\n";
}

const porofit::StudyRun& Run() {
  static const porofit::StudyRun run = [] {
    WriteStudy(Dir() / "study", 100);
    const porofit::Study study = porofit::LoadStudy((Dir() / "study" / "study.yaml").string());
    porofit::RunOptions o;
    o.threads = 2;
    o.command_line = "report_bench";
    return porofit::RunStudy(study, o);
  }();
  return run;
}

void BM_RenderHtml(benchmark::State& state) {
  const porofit::StudyRun& run = Run();
  const std::vector<porofit::InputDigest> inputs = porofit::DigestInputs(run.study);
  size_t bytes = 0, figures = 0;
  for (auto _ : state) {
    std::ostringstream s;
    std::vector<porofit::HtmlFigure> f;
    porofit::WriteHtmlReport(run, inputs, s, &f);
    bytes = s.str().size();
    figures = f.size();
  }
  state.counters["samples"] = static_cast<double>(run.samples.size());
  state.counters["html_MB"] = static_cast<double>(bytes) / 1e6;
  state.counters["figures"] = static_cast<double>(figures);
}
BENCHMARK(BM_RenderHtml)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_WriteFolderWithHtml(benchmark::State& state) {
  const porofit::StudyRun& run = Run();
  porofit::AtomicFolderOptions fo;
  fo.overwrite = true;
  for (auto _ : state) porofit::WriteReportFolder(run, Dir() / "with-html", fo);
  state.counters["samples"] = static_cast<double>(run.samples.size());
}
BENCHMARK(BM_WriteFolderWithHtml)->Unit(benchmark::kMillisecond)->UseRealTime();

void BM_WriteFolderWithoutHtml(benchmark::State& state) {
  const porofit::StudyRun& run = Run();
  porofit::AtomicFolderOptions fo;
  fo.overwrite = true;
  for (auto _ : state) {
    const std::vector<porofit::InputDigest> inputs = porofit::DigestInputs(run.study);
    porofit::WriteFolderAtomically(
        Dir() / "without-html",
        [&](const fs::path& staging) {
          auto emit = [&](const char* name, auto&& writer) {
            std::ostringstream s;
            writer(s);
            porofit::WriteFileDurably(staging / name, s.str());
          };
          emit("summary.txt", [&](std::ostream& o) { porofit::WriteSummary(run, o); });
          emit("parameters.csv", [&](std::ostream& o) { porofit::WriteParametersCsv(run, o); });
          emit("fits.csv", [&](std::ostream& o) { porofit::WriteFitsCsv(run, o); });
          emit("residuals.csv", [&](std::ostream& o) { porofit::WriteResidualsCsv(run, o); });
          emit("alpha.csv", [&](std::ostream& o) { porofit::WriteAlphaCsv(run, o); });
          emit("comparison.csv", [&](std::ostream& o) { porofit::WriteComparisonCsv(run, o); });
          emit("results.json", [&](std::ostream& o) { porofit::WriteResultsJson(run, inputs, o); });
        },
        fo);
  }
}
BENCHMARK(BM_WriteFolderWithoutHtml)->Unit(benchmark::kMillisecond)->UseRealTime();

}  // namespace

int main(int argc, char** argv) {
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  std::error_code ec;
  fs::remove_all(Dir(), ec);
  return 0;
}

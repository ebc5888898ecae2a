// End-to-end: a 240-sample study in the sample_table batch form, run through
// the CLI with 1 and 2 threads.
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cmath>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

namespace porofit {
namespace {
namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

std::string Quote(const std::string& s) {
  std::string q = "'";
  for (char c : s) q += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return q + "'";
}

// Invented synthetic batch: K = K_inf - (K_inf - K_0) exp(-P / P_c) GPa with
// seeded Gaussian noise, 10-15 points per sample, every 50th sample with two
// points only (so its 3-parameter fits fail and the failure is streamed too).
void WriteBatch(const fs::path& dir, int n) {
  std::mt19937_64 rng(20261202);
  std::uniform_real_distribution<double> u(0.0, 1.0);
  std::normal_distribution<double> noise(0.0, 0.15);
  std::ofstream t(dir / "samples.csv"), d(dir / "points.csv");
  t << "id,lithology,porosity,bulk_density [g/cc],branch,well\n";
  d << "sample,P [MPa],K [GPa]\n";
  for (int i = 0; i < n; ++i) {
    const std::string id = "SYN-" + std::to_string(i + 1);
    t << id << ",synthetic sandstone," << 0.1 + 0.1 * u(rng) << ",2.3," << (i % 3 ? "loading" : "unloading")
      << ",W-" << i % 4 << "\n";
    const double kinf = 15 + 10 * u(rng), k0 = 3 + 4 * u(rng), pc = 4 + 8 * u(rng);
    const int points = i % 50 == 7 ? 2 : 10 + i % 6;
    for (int k = 0; k < points; ++k) {
      const double p = 2 + 58.0 * k / std::max(points - 1, 1);
      d << id << "," << p << "," << kinf - (kinf - k0) * std::exp(-p / pc) + noise(rng) << "\n";
    }
  }
  std::ofstream(dir / "study.yaml") << "name: synthetic batch (invented)\n"
                                       "description: seeded synthetic data for the thread test\n"
                                       "defaults:\n  models: [exp-modulus, linear]\n  fit: {multistart: 2}\n"
                                       "sample_table:\n  file: samples.csv\n  data: points.csv\n";
}

int RunCli(const std::string& args, const fs::path& dir) {
  const std::string cmd = "POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z " + Quote(POROFIT_EXE) + " " + args + " >" +
                          Quote((dir / "stdout.txt").string()) + " 2>" + Quote((dir / "stderr.txt").string());
  const int status = std::system(cmd.c_str());
  return WIFEXITED(status) ? WEXITSTATUS(status) : -1;
}

TEST(BatchStudy, OutputIsIdenticalForOneAndTwoThreads) {
  const fs::path dir = fs::temp_directory_path() / ("porofit-e2e-batch-" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  WriteBatch(dir, 240);
  const std::string study = Quote((dir / "study.yaml").string());
  ASSERT_EQ(RunCli("fit " + study + " --out " + Quote((dir / "one").string()) + " --threads 1", dir), 0)
      << Slurp(dir / "stderr.txt");
  const std::string summary_one = Slurp(dir / "stdout.txt");
  ASSERT_EQ(RunCli("fit " + study + " --out " + Quote((dir / "two").string()) + " --threads 2", dir), 0)
      << Slurp(dir / "stderr.txt");
  EXPECT_EQ(Slurp(dir / "stderr.txt"), "");  // not a terminal, short run: no progress lines
  for (const char* f : {"summary.txt", "parameters.csv", "fits.csv", "residuals.csv", "alpha.csv",
                        "grain_modulus.csv", "alpha_vti.csv"})
    EXPECT_EQ(Slurp(dir / "one" / f), Slurp(dir / "two" / f)) << f;
  using nlohmann::json;
  json a = json::parse(Slurp(dir / "one" / "results.json")), b = json::parse(Slurp(dir / "two" / "results.json"));
  ASSERT_EQ(a["samples"].size(), 240u);
  EXPECT_EQ(a["samples"][5]["fields"]["well"], "W-1");  // extra sample_table column
  for (json* j : {&a, &b}) {
    (*j)["provenance"].erase("command_line");
    (*j)["provenance"].erase("threads");
  }
  EXPECT_EQ(a.dump(1), b.dump(1));
  // The terminal summary of a large batch: 100 sample blocks, then counts per model.
  EXPECT_NE(summary_one.find("140 more samples are not shown one by one"), std::string::npos);
  EXPECT_NE(summary_one.find("All 240 samples, per model:"), std::string::npos);
  EXPECT_EQ(summary_one.find("Sample SYN-101 "), std::string::npos);
  EXPECT_NE(Slurp(dir / "one" / "fits.csv").find("\nSYN-240,"), std::string::npos);
  fs::remove_all(dir);
}

}  // namespace
}  // namespace porofit

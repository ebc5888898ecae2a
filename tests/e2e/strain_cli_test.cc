// End to end: the porofit command line on a study with strain samples
// (tests/data/good/strain.yaml, invented data from known curves).
#include <gtest/gtest.h>
#include <sys/wait.h>
#include <unistd.h>

#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include <nlohmann/json.hpp>

namespace porofit {
namespace {
namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

TEST(StrainCli, FitsAStrainStudyAndWritesTangentSecantAndChordModuli) {
  const fs::path dir = fs::temp_directory_path() / ("porofit-e2e-strain-" + std::to_string(::getpid()));
  fs::remove_all(dir);
  fs::create_directories(dir);
  const fs::path out = dir / "out";
  const std::string study = std::string(POROFIT_TEST_DATA_DIR) + "/good/strain.yaml";
  const std::string cmd = std::string("POROFIT_FIXED_TIMESTAMP=2026-02-03T04:05:06Z '") + POROFIT_EXE + "' fit '" +
                          study + "' --out '" + out.string() + "' --quiet >'" + (dir / "log.txt").string() + "' 2>&1";
  const int status = std::system(cmd.c_str());
  ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << Slurp(dir / "log.txt");

  const std::string moduli = Slurp(out / "moduli.csv");
  EXPECT_NE(moduli.find("S1-eps,exp-modulus,fitted,"), std::string::npos);
  EXPECT_NE(moduli.find("S1-eps,,data-chord,3,2,4,"), std::string::npos);
  EXPECT_NE(moduli.find("S2-eps,exp-compliance,fitted-chord,"), std::string::npos);
  EXPECT_NE(Slurp(out / "strain_residuals.csv").find("\nS2-eps,exp-compliance,1,"), std::string::npos);
  EXPECT_NE(Slurp(out / "alpha.csv").find("S1-eps"), std::string::npos) << "alpha from the tangent K";

  const auto j = nlohmann::json::parse(Slurp(out / "results.json"));
  for (const auto& s : j["samples"]) {
    EXPECT_EQ(s["response"], "strain");
    for (const auto& f : s["fits"]) {
      EXPECT_EQ(f["status"], "converged") << s["id"] << " " << f["model"] << ": " << f["message"];
      EXPECT_FALSE(f["strain"]["moduli"].empty());
    }
  }
  // S1-eps was generated from exp-modulus K_inf 20, K_0 8 GPa, P_close 10 MPa
  // (check value 12 parameters, docs/check-values.md) with 2 microstrain noise.
  const auto& fit = j["samples"][0]["fits"][0];
  ASSERT_EQ(fit["model"], "exp-modulus");
  for (const auto& p : fit["parameters"]) {
    const double truth = p["name"] == "K_inf" ? 20.0 : p["name"] == "K_0" ? 8.0 : 10.0;
    EXPECT_NEAR(p["estimate"].get<double>(), truth, 4 * p["std_error"].get<double>()) << p["name"];
  }
  fs::remove_all(dir);
}

}  // namespace
}  // namespace porofit

// Timing of porofit::Fit on 15-point samples, with baselines measured in the
// same run so the figures can be compared across machines:
//   BM_ModelEval        15 value_and_gradient calls (the floor: the model itself)
//   BM_BareCeresSolve   the same exp-modulus problem as a bare Ceres solve
//                       (one block, analytic Jacobian, no covariance, no checks)
//   BM_FixedParameter   K_0 held fixed: SubsetManifold (arg 1) vs removed (arg 0)
//   BM_Fit/<model>/...  porofit::Fit with covariance and residual diagnostics
//                       (".../ceres-solver": FitOptions::solver = ceres, the baseline;
//                        ".../auto-solver": the default, compact LM where it applies)
//   BM_Covariance*      the covariance step alone (ceres::Covariance vs Eigen SVD)
//   BM_FitBatch         fits per second over 1,000 different samples
// The data are invented: P = 2..60 MPa (15 points), Gaussian noise, fixed seed.
#include <benchmark/benchmark.h>
#include <ceres/ceres.h>

#include <Eigen/SVD>
#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace {

using namespace porofit;

struct Case {
  const char* id;
  std::vector<double> theta;  // working units
  double noise;
};

// Invented truths, one per catalogue model (typical dry-sandstone magnitudes).
const std::vector<Case>& Cases() {
  static const std::vector<Case> cases = {
      {"linear", {8.0, 0.15}, 0.2},
      {"exp-modulus", {20.0, 8.0, 10.0}, 0.2},
      {"exp-compliance", {0.05, 0.2, 10.0}, 0.2},
      {"linear-exp", {18.0, 0.05, 10.0, 0.1}, 0.1},
      {"power-ref", {15.0, 0.25, 20.0}, 0.2},
      {"power-offset", {9.0, 0.25, 5.0}, 0.1},
      {"grain-contact", {4.0}, 0.2},
  };
  return cases;
}

std::vector<double> Pressures() {
  std::vector<double> p(15);
  for (int i = 0; i < 15; ++i) p[static_cast<size_t>(i)] = 2.0 + 58.0 * i / 14.0;
  return p;
}

FitRequest MakeRequest(const ModelSpec& m, const Case& c, std::mt19937_64& rng) {
  FitRequest req;
  req.model = &m;
  std::normal_distribution<double> normal(0.0, c.noise);
  for (double p : Pressures()) {
    req.data.x.push_back(p * 1e6);
    req.data.y.push_back((m.value(c.theta.data(), p) + normal(rng)) * 1e9);
  }
  return req;
}

const ModelSpec& Model(const char* id) { return *ModelRegistry::Builtin().Find(id); }

void BM_Fit(benchmark::State& state, const Case& c, int multistart, CovarianceBackend backend, bool covariance,
            bool unbounded_first, SolverChoice solver) {
  const ModelSpec& m = Model(c.id);
  std::mt19937_64 rng(20261201);
  FitRequest req = MakeRequest(m, c, rng);
  req.options.multistart = multistart;
  req.options.covariance_backend = backend;
  req.options.covariance = covariance;
  req.options.unbounded_first = unbounded_first;
  req.options.solver = solver;
  int converged = 0;
  for (auto _ : state) {
    FitResult r = Fit(req);
    converged += r.status == FitStatus::kConverged;
    benchmark::DoNotOptimize(r);
  }
  if (converged != static_cast<int>(state.iterations())) state.SkipWithError("a fit did not converge");
  state.SetItemsProcessed(static_cast<int64_t>(state.iterations()));
}

// The floor: evaluating the model and its gradient at 15 points.
void BM_ModelEval(benchmark::State& state) {
  const ModelSpec& m = Model("exp-modulus");
  const std::vector<double> p = Pressures();
  const double theta[3] = {20, 8, 10};
  double g[3];
  for (auto _ : state) {
    double acc = 0;
    for (double x : p) acc += m.value_and_gradient(theta, x, g) + g[2];
    benchmark::DoNotOptimize(acc);
  }
}

// Bare Ceres solve of the same exp-modulus problem: one residual block with an
// analytic Jacobian, ln P_close, the same tolerances, nothing else.
class ExpBlock final : public ceres::SizedCostFunction<15, 3> {
 public:
  ExpBlock(const std::vector<double>& x, const std::vector<double>& y) : x_(x), y_(y) {}
  bool Evaluate(double const* const* p, double* r, double** J) const override {
    const double ki = p[0][0], k0 = p[0][1], pc = std::exp(p[0][2]);
    for (int i = 0; i < 15; ++i) {
      const double e = std::exp(-x_[static_cast<size_t>(i)] / pc);
      r[i] = y_[static_cast<size_t>(i)] - (ki - (ki - k0) * e);
      if (J != nullptr && J[0] != nullptr) {
        J[0][3 * i + 0] = -(1 - e);
        J[0][3 * i + 1] = -e;
        J[0][3 * i + 2] = (ki - k0) * e * x_[static_cast<size_t>(i)] / pc;
      }
    }
    return true;
  }

 private:
  std::vector<double> x_, y_;
};

void BM_BareCeresSolve(benchmark::State& state) {
  const ModelSpec& m = Model("exp-modulus");
  std::mt19937_64 rng(20261201);
  const FitRequest req = MakeRequest(m, Cases()[1], rng);
  std::vector<double> x, y;
  for (size_t i = 0; i < 15; ++i) {
    x.push_back(req.data.x[i] / 1e6);
    y.push_back(req.data.y[i] / 1e9);
  }
  const std::vector<double> start = m.start(x, y);
  ceres::Solver::Options so;
  so.linear_solver_type = ceres::DENSE_QR;
  so.logging_type = ceres::SILENT;
  const FitOptions defaults;  // the same tolerances as porofit::Fit
  so.function_tolerance = defaults.function_tolerance;
  so.gradient_tolerance = defaults.gradient_tolerance;
  so.parameter_tolerance = defaults.parameter_tolerance;
  so.max_num_iterations = defaults.max_iterations;
  for (auto _ : state) {
    double u[3] = {start[0], start[1], std::log(start[2])};
    ceres::Problem problem;
    problem.AddResidualBlock(new ExpBlock(x, y), nullptr, u);
    ceres::Solver::Summary summary;
    ceres::Solve(so, &problem, &summary);
    benchmark::DoNotOptimize(u);
  }
}

// A fixed parameter (K_0 held at 7.5 GPa), two ways: the full 3-vector with
// ceres::SubsetManifold, or removed from the solver vector (what Fit does).
class ExpBlockFixedK0 final : public ceres::SizedCostFunction<15, 2> {
 public:
  ExpBlockFixedK0(const std::vector<double>& x, const std::vector<double>& y, double k0) : x_(x), y_(y), k0_(k0) {}
  bool Evaluate(double const* const* p, double* r, double** J) const override {
    const double ki = p[0][0], pc = std::exp(p[0][1]);
    for (int i = 0; i < 15; ++i) {
      const double e = std::exp(-x_[static_cast<size_t>(i)] / pc);
      r[i] = y_[static_cast<size_t>(i)] - (ki - (ki - k0_) * e);
      if (J != nullptr && J[0] != nullptr) {
        J[0][2 * i + 0] = -(1 - e);
        J[0][2 * i + 1] = (ki - k0_) * e * x_[static_cast<size_t>(i)] / pc;
      }
    }
    return true;
  }

 private:
  std::vector<double> x_, y_;
  double k0_;
};

void BM_FixedParameter(benchmark::State& state) {
  const bool manifold = state.range(0) == 1;
  const ModelSpec& m = Model("exp-modulus");
  std::mt19937_64 rng(20261201);
  const FitRequest req = MakeRequest(m, Cases()[1], rng);
  std::vector<double> x, y;
  for (size_t i = 0; i < 15; ++i) {
    x.push_back(req.data.x[i] / 1e6);
    y.push_back(req.data.y[i] / 1e9);
  }
  const FitOptions defaults;
  ceres::Solver::Options so;
  so.linear_solver_type = ceres::DENSE_QR;
  so.logging_type = ceres::SILENT;
  so.function_tolerance = defaults.function_tolerance;
  so.gradient_tolerance = defaults.gradient_tolerance;
  so.parameter_tolerance = defaults.parameter_tolerance;
  for (auto _ : state) {
    ceres::Problem problem;
    ceres::Solver::Summary summary;
    if (manifold) {
      double u[3] = {21.0, 7.5, std::log(13.0)};
      problem.AddResidualBlock(new ExpBlock(x, y), nullptr, u);
      problem.SetManifold(u, new ceres::SubsetManifold(3, {1}));
      ceres::Solve(so, &problem, &summary);
      benchmark::DoNotOptimize(u);
    } else {
      double u[2] = {21.0, std::log(13.0)};
      problem.AddResidualBlock(new ExpBlockFixedK0(x, y, 7.5), nullptr, u);
      ceres::Solve(so, &problem, &summary);
      benchmark::DoNotOptimize(u);
    }
  }
  state.SetLabel(manifold ? "subset-manifold" : "removed");
}

// The covariance step alone, at a converged exp-modulus solution.
void BM_CovarianceCeres(benchmark::State& state) {
  const ModelSpec& m = Model("exp-modulus");
  std::mt19937_64 rng(20261201);
  const FitRequest req = MakeRequest(m, Cases()[1], rng);
  const FitResult fit = Fit(req);
  std::vector<double> x, y;
  for (size_t i = 0; i < 15; ++i) {
    x.push_back(req.data.x[i] / 1e6);
    y.push_back(req.data.y[i] / 1e9);
  }
  double u[3] = {fit.parameters[0].estimate / 1e9, fit.parameters[1].estimate / 1e9,
                 std::log(fit.parameters[2].estimate / 1e6)};
  ceres::Problem problem;
  problem.AddResidualBlock(new ExpBlock(x, y), nullptr, u);
  ceres::Covariance::Options co;
  co.algorithm_type = ceres::DENSE_SVD;
  for (auto _ : state) {
    ceres::Covariance cov(co);
    const std::vector<std::pair<const double*, const double*>> blocks{{u, u}};
    bool ok = cov.Compute(blocks, &problem);
    double c[9];
    ok = ok && cov.GetCovarianceBlock(u, u, c);
    benchmark::DoNotOptimize(c);
    if (!ok) state.SkipWithError("covariance failed");
  }
}

void BM_CovarianceEigen(benchmark::State& state) {
  Eigen::MatrixXd J(15, 3);
  const std::vector<double> p = Pressures();
  for (int i = 0; i < 15; ++i) {
    const double e = std::exp(-p[static_cast<size_t>(i)] / 10.0);
    J(i, 0) = 1 - e;
    J(i, 1) = e;
    J(i, 2) = 12 * e * p[static_cast<size_t>(i)] / 10.0;
  }
  for (auto _ : state) {
    Eigen::VectorXd c = J.colwise().norm().cwiseInverse().transpose();
    Eigen::JacobiSVD<Eigen::MatrixXd> svd(J * c.asDiagonal(), Eigen::ComputeThinV);
    Eigen::MatrixXd cov = c.asDiagonal() *
                          (svd.matrixV() * svd.singularValues().cwiseAbs2().cwiseInverse().asDiagonal() *
                           svd.matrixV().transpose()) *
                          c.asDiagonal();
    benchmark::DoNotOptimize(cov);
  }
}

// Fits per second over 1,000 different exp-modulus samples (covariance on;
// multistart 1 and the default 8).
void BM_FitBatch(benchmark::State& state) {
  const SolverChoice solver = state.range(1) == 0 ? SolverChoice::kCeres : SolverChoice::kAuto;
  const ModelSpec& m = Model("exp-modulus");
  std::mt19937_64 rng(7);
  std::vector<FitRequest> batch;
  for (int k = 0; k < 1000; ++k) {
    batch.push_back(MakeRequest(m, Cases()[1], rng));
    batch.back().options.multistart = static_cast<int>(state.range(0));
    batch.back().options.solver = solver;
  }
  int64_t fits = 0, failed = 0;
  for (auto _ : state) {
    for (const FitRequest& req : batch) {
      const FitResult r = Fit(req);
      failed += r.status != FitStatus::kConverged;
      ++fits;
    }
  }
  state.SetItemsProcessed(fits);
  state.counters["failed"] = static_cast<double>(failed);
}

int Register() {
  benchmark::RegisterBenchmark("BM_ModelEval/exp-modulus/15pts", BM_ModelEval);
  benchmark::RegisterBenchmark("BM_BareCeresSolve/exp-modulus", BM_BareCeresSolve);
  benchmark::RegisterBenchmark("BM_FixedParameter/exp-modulus", BM_FixedParameter)->Arg(1)->Arg(0);
  benchmark::RegisterBenchmark("BM_CovarianceCeres/exp-modulus", BM_CovarianceCeres);
  benchmark::RegisterBenchmark("BM_CovarianceEigen/exp-modulus", BM_CovarianceEigen);
  for (const Case& c : Cases()) {
    const std::string id = c.id;
    // Baseline in the same run: the Ceres solver path (FitOptions::solver = ceres).
    for (SolverChoice solver : {SolverChoice::kCeres, SolverChoice::kAuto}) {
      const std::string tag = solver == SolverChoice::kCeres ? "/ceres-solver" : "/auto-solver";
      benchmark::RegisterBenchmark(("BM_Fit/" + id + "/multistart1/ceres-cov" + tag).c_str(), BM_Fit, c, 1,
                                   CovarianceBackend::kCeres, true, false, solver);
      benchmark::RegisterBenchmark(("BM_Fit/" + id + "/multistart1/eigen-cov" + tag).c_str(), BM_Fit, c, 1,
                                   CovarianceBackend::kEigen, true, false, solver);
      benchmark::RegisterBenchmark(("BM_Fit/" + id + "/multistart8/eigen-cov" + tag).c_str(), BM_Fit, c, 8,
                                   CovarianceBackend::kEigen, true, false, solver);
    }
  }
  benchmark::RegisterBenchmark("BM_FitBatch/exp-modulus/1000", BM_FitBatch)
      ->ArgNames({"multistart", "auto_solver"})
      ->Args({1, 0})
      ->Args({1, 1})
      ->Args({8, 0})
      ->Args({8, 1})
      ->Unit(benchmark::kMillisecond);
  return 0;
}
const int registered = Register();

}  // namespace

BENCHMARK_MAIN();

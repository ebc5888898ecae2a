#pragma once
// Private helpers shared by the band methods.
#include "porofit/bands/quantile.h"
#include <algorithm>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "porofit/bands/bands.h"

namespace porofit::bands::detail {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

// Random-stream tags: one per method, so the methods never share draws.
constexpr std::uint64_t kTagMonteCarlo = 1;
constexpr std::uint64_t kTagBootstrap = 2;

// The fit's parameters, the way the methods need them.
struct FitView {
  const ModelSpec* model = nullptr;
  std::vector<double> theta_working;  // every model parameter, working units
  std::vector<int> free_index;        // model index of each free parameter
  std::vector<double> theta_free_si;  // free parameters, SI
  int n = 0, p = 0;
  bool scaled = true;
  double k_dof = kInf;  // n - p when the covariance is scaled
};

FitView ViewOf(const BandRequest& r);

// Throws InputError for invalid inputs; returns "" if the fit is usable for
// `need_covariance`-dependent methods, else the reason it is not.
std::string CheckRequest(const BandRequest& r, bool need_covariance, bool need_residuals);

// K(P) (SI) on a grid at working-unit parameters `theta` (full vector).
// Returns false if some value is not finite or not > 0.
bool CurveAt(const ModelSpec& m, const double* theta, const std::vector<double>& pressure, double* k_out);

// Two-sided t quantile of level `confidence` as a function of the effective
// dof nu = nu_fit / u, u in [0, 1] (Welch–Satterthwaite gives nu >= nu_fit).
// Boost's quantile costs microseconds per call, and every grid point has its
// own nu; a Chebyshev interpolant in u built from 24 exact quantiles is
// within 1e-9 of the exact quantile for nu_fit >= 2 (tests check it against the exact
// quantile) and costs nanoseconds. nu_fit < 2 or infinite: exact calls.
using TQuantileCurve = ::porofit::bands::TQuantileCurve;  // porofit/bands/quantile.h

// Percentile bands of K and alpha = 1 - K/K_s from a draws x grid matrix of
// K (row-major: row d holds K at every grid point for draw d) and the K_s of
// each draw, using the rows with use[d] = true. Columns are gathered in blocks
// of 50 grid points and processed on `threads` threads.
void PercentileBands(const double* k, const double* ks, const std::vector<char>& use, size_t grid,
                     double confidence, int threads, Band& k_out, Band& alpha_out);

// Lower, median and upper percentiles of v (reordered), one pass of selections.
void Percentiles3(std::vector<double>& v, double tail, double& lo, double& mid, double& hi);

// The same three percentiles, found from brackets guess[t] +- half_width[t]
// (t: lower, median, upper) in one counting pass. Returns false when a bracket
// misses its order statistic (or v holds NaN): then nothing is written that
// the caller may use. When it returns true the values equal Percentiles3()'s
// exactly. v is not reordered.
bool Percentiles3Guided(const std::vector<double>& v, double tail, const double guess[3], const double half_width[3],
                        double& lo, double& mid, double& hi);

// Runs f(i) for i in [0, count) on `threads` threads (static interleaved
// partition). Each index writes only its own slot, so results do not depend
// on the thread count. Rethrows the first exception.
template <class F>
void ParallelFor(int count, int threads, const F& f) {
  threads = std::max(1, std::min(threads, count));
  if (threads == 1) {
    for (int i = 0; i < count; ++i) f(i);
    return;
  }
  std::exception_ptr error;
  std::mutex mu;
  std::vector<std::thread> pool;
  pool.reserve(static_cast<size_t>(threads));
  for (int t = 0; t < threads; ++t) {
    pool.emplace_back([&, t] {
      try {
        for (int i = t; i < count; i += threads) f(i);
      } catch (...) {
        std::lock_guard<std::mutex> lock(mu);
        if (!error) error = std::current_exception();
      }
    });
  }
  for (auto& th : pool) th.join();
  if (error) std::rethrow_exception(error);
}

}  // namespace porofit::bands::detail

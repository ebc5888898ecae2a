#pragma once
// Invented synthetic samples for the band tests: K(P) from a catalogue model
// at a known truth, relative Gaussian noise, sigma_i declared relative to the
// observed K_i (scaled covariance), as a lab with "2 % of reading" would.
#include <random>
#include <string>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/fit/fitter.h"
#include "porofit/models/registry.h"

namespace porofit::testing {

struct Sample {
  FitRequest request;
  FitResult fit;
};

/// n pressures linearly spaced over [p_lo, p_hi] MPa; truth in working units.
inline Sample Simulate(const std::string& model_id, const std::vector<double>& truth, int n, double rel_noise,
                       std::mt19937_64& rng, double p_lo = 2.0, double p_hi = 60.0, bool weighted = true) {
  Sample s;
  const ModelSpec* m = ModelRegistry::Builtin().Find(model_id);
  s.request.model = m;
  std::normal_distribution<double> z(0.0, 1.0);
  for (int i = 0; i < n; ++i) {
    const double p = p_lo + (p_hi - p_lo) * i / (n - 1);
    const double k = m->value(truth.data(), p) * (1.0 + rel_noise * z(rng));
    s.request.data.x.push_back(p * 1e6);
    s.request.data.y.push_back(k * 1e9);
    if (weighted) s.request.data.sigma.push_back(rel_noise * k * 1e9);
  }
  s.fit = Fit(s.request);
  return s;
}

inline bands::BandRequest RequestFor(const Sample& s, double k_s, double sigma_k_s,
                                     const std::vector<double>& grid_mpa) {
  bands::BandRequest r;
  r.fit_request = &s.request;
  r.fit = &s.fit;
  r.k_s = k_s;
  r.sigma_k_s = sigma_k_s;
  std::vector<double> g;
  for (double p : grid_mpa) g.push_back(p * 1e6);
  double lo = s.request.data.x.front(), hi = lo;
  for (double x : s.request.data.x) {
    lo = std::min(lo, x);
    hi = std::max(hi, x);
  }
  r.grid = bands::GridAt(g, lo, hi);
  return r;
}

}  // namespace porofit::testing

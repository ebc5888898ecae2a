// Overburden integral of a piecewise-linear density profile and the per-depth
// record of which density sources the integral has crossed.
#include "porofit/depth/profile.h"

#include <algorithm>
#include <cmath>

#include "porofit/core/error.h"

namespace porofit::depth {
namespace {

// Depths this far below the last sample still count as "at" it: table rows are
// generated as top + k*step and may overshoot the base by rounding.
constexpr double kBottomSlack = 1e-9;  // m

void CheckProfile(const DensityProfile& p) {
  const size_t n = p.depth.size();
  if (n == 0) throw InputError({}, "density profile is empty");
  if (p.density.size() != n) {
    throw InputError({}, "density profile has " + std::to_string(n) + " depths but " +
                             std::to_string(p.density.size()) + " densities");
  }
  if (!p.source.empty() && p.source.size() != n) {
    throw InputError({}, "density profile has " + std::to_string(n) + " depths but " +
                             std::to_string(p.source.size()) + " source flags");
  }
  for (size_t i = 0; i < n; ++i) {
    if (!std::isfinite(p.depth[i])) {
      throw InputError({}, "density profile depth " + std::to_string(i + 1) + " is not finite");
    }
    if (i > 0 && !(p.depth[i] > p.depth[i - 1])) {
      throw InputError({}, "density profile depth " + FormatNumber(p.depth[i]) + " m does not increase after " +
                               FormatNumber(p.depth[i - 1]) + " m (depths must be strictly ascending)");
    }
    if (!std::isfinite(p.density[i]) || !(p.density[i] > 0)) {
      throw InputError({}, "density profile density = " + FormatNumber(p.density[i]) + " kg/m^3 at " +
                               FormatNumber(p.depth[i]) + " m must be finite and > 0");
    }
  }
}

}  // namespace

std::vector<double> CumulativeLoad(const DensityProfile& profile, const std::vector<double>& at) {
  CheckProfile(profile);
  const std::vector<double>& d = profile.depth;
  const std::vector<double>& rho = profile.density;
  const size_t n = d.size();

  // Prefix integrals at the samples: one pass, then each query is a binary
  // search plus one partial trapezoid, O(M + N log M).
  std::vector<double> prefix(n, 0.0);
  for (size_t i = 1; i < n; ++i) prefix[i] = prefix[i - 1] + 0.5 * (rho[i - 1] + rho[i]) * (d[i] - d[i - 1]);

  std::vector<double> out;
  out.reserve(at.size());
  for (const double z : at) {
    if (std::isnan(z)) throw InputError({}, "overburden requested at a depth that is not a number");
    if (z <= d.front()) {
      out.push_back(0.0);
      continue;
    }
    if (z >= d.back()) {
      if (z > d.back() + kBottomSlack) {
        throw InputError({}, "overburden requested at " + FormatNumber(z) + " m, below the density profile's last sample at " +
                                 FormatNumber(d.back()) + " m (the profile is not extrapolated)");
      }
      out.push_back(kGravity * prefix.back());
      continue;
    }
    // d[k] < z < d[k+1]
    const auto it = std::upper_bound(d.begin(), d.end(), z);
    const size_t k1 = static_cast<size_t>(it - d.begin());
    const size_t k = k1 - 1;
    const double dz = z - d[k];
    const double t = dz / (d[k1] - d[k]);
    const double rho_z = rho[k] + t * (rho[k1] - rho[k]);
    out.push_back(kGravity * (prefix[k] + 0.5 * (rho[k] + rho_z) * dz));
  }
  return out;
}

SourceIndex::SourceIndex(const DensityProfile& profile) {
  CheckProfile(profile);
  if (profile.source.size() != profile.depth.size()) {
    throw InputError({}, "density profile has " + std::to_string(profile.depth.size()) + " depths but " +
                             std::to_string(profile.source.size()) + " source flags");
  }
  depth_ = profile.depth;
  cumulative_.resize(depth_.size());
  std::uint8_t acc = 0;
  for (size_t i = 0; i < depth_.size(); ++i) {
    acc = static_cast<std::uint8_t>(acc | (1u << static_cast<unsigned>(profile.source[i])));
    cumulative_[i] = acc;
  }
}

std::uint8_t SourceIndex::SourcesAbove(double z) const {
  // The integral down to z uses every sample above z and, when z falls inside
  // a segment, the sample closing that segment (its density enters the
  // interpolated value). So: samples 0..j with j the first depth >= z.
  if (depth_.empty() || std::isnan(z) || z < depth_.front()) return 0;
  const auto it = std::lower_bound(depth_.begin(), depth_.end(), z);
  const size_t j = it == depth_.end() ? depth_.size() - 1 : static_cast<size_t>(it - depth_.begin());
  return cumulative_[j];
}

}  // namespace porofit::depth

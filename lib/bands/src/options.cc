#include "porofit/bands/options.h"

#include <cmath>

#include "porofit/core/error.h"

namespace porofit::bands {

std::string_view ToString(DeltaQuantile q) {
  switch (q) {
    case DeltaQuantile::kWelchSatterthwaite: return "welch-satterthwaite";
    case DeltaQuantile::kStudentT: return "student-t";
    case DeltaQuantile::kNormal: return "normal";
  }
  return "unknown";
}

std::string_view ToString(McDistribution d) {
  switch (d) {
    case McDistribution::kNormal: return "normal";
    case McDistribution::kStudentT: return "student-t";
  }
  return "unknown";
}

std::string_view ToString(BootstrapKind k) {
  switch (k) {
    case BootstrapKind::kResidual: return "residual";
    case BootstrapKind::kWild: return "wild";
  }
  return "unknown";
}

namespace {

std::string Violation(const char* field, double value, const char* rule) {
  return std::string("bands.") + field + " = " + FormatNumber(value) + " violates " + rule;
}

std::string OverLimit(const char* field, long long value, int limit) {
  return std::string("bands.") + field + " = " + std::to_string(value) + " exceeds the limit of " + std::to_string(limit);
}

}  // namespace

std::string BandOptions::Validate() const {
  if (!(confidence > 0 && confidence < 1)) return Violation("confidence", confidence, "0 < confidence < 1");
  if (monte_carlo_draws < 100) return Violation("monte_carlo_draws", monte_carlo_draws, "monte_carlo_draws >= 100");
  if (monte_carlo_draws > kMaxMonteCarloDraws)
    return OverLimit("monte_carlo_draws", monte_carlo_draws, kMaxMonteCarloDraws);
  if (bootstrap_replicates < 100)
    return Violation("bootstrap_replicates", bootstrap_replicates, "bootstrap_replicates >= 100");
  if (bootstrap_replicates > kMaxBootstrapReplicates)
    return OverLimit("bootstrap_replicates", bootstrap_replicates, kMaxBootstrapReplicates);
  if (!(refit_tolerance > 0 && refit_tolerance <= 1e-6))
    return Violation("refit_tolerance", refit_tolerance, "0 < refit_tolerance <= 1e-6");
  if (threads < 1) return Violation("threads", threads, "threads >= 1");
  if (threads > kMaxBandThreads) return OverLimit("threads", threads, kMaxBandThreads);
  return {};
}

}  // namespace porofit::bands

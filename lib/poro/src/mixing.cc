#include "porofit/poro/mixing.h"

#include <cmath>
#include <cstdio>
#include <limits>
#include <set>

namespace porofit::poro {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

void CheckSizes(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  POROFIT_CHECK(f.size() == m.size() && f.size() > 0, "fractions and moduli differ in length or are empty");
}

// Extremes over constituents actually present (f_i > 0): a listed mineral
// with zero fraction must not loosen the bounds.
double MaxPresent(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  double x = -std::numeric_limits<double>::infinity();
  for (Eigen::Index i = 0; i < f.size(); ++i)
    if (f[i] > 0) x = std::max(x, m[i]);
  return x;
}
double MinPresent(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  double x = std::numeric_limits<double>::infinity();
  for (Eigen::Index i = 0; i < f.size(); ++i)
    if (f[i] > 0) x = std::min(x, m[i]);
  return x;
}

// Lambda(z) = [sum f_i/(K_i + 4z/3)]^-1 - 4z/3
double Lambda(const Eigen::VectorXd& f, const Eigen::VectorXd& k, double z) {
  const double a = 4.0 * z / 3.0;
  return 1.0 / (f.array() / (k.array() + a)).sum() - a;
}
// Gamma(z) = [sum f_i/(mu_i + z)]^-1 - z
double Gamma(const Eigen::VectorXd& f, const Eigen::VectorXd& mu, double z) {
  return 1.0 / (f.array() / (mu.array() + z)).sum() - z;
}
// zeta(K, mu) = (mu/6)(9K + 8mu)/(K + 2mu)
double Zeta(double k, double mu) { return mu / 6.0 * (9.0 * k + 8.0 * mu) / (k + 2.0 * mu); }

std::string Quoted(const std::string& s) { return "'" + s + "'"; }

// Sensitivities of the Hill average to each constituent modulus:
// dM_V/dM_i = f_i, dM_R/dM_i = f_i M_R^2 / M_i^2.
double HillTableSigma(const Eigen::VectorXd& f, const Eigen::VectorXd& m, const Eigen::VectorXd& sigma) {
  const double r = ReussAverage(f, m);
  double var = 0;
  for (Eigen::Index i = 0; i < f.size(); ++i) {
    const double d = 0.5 * f[i] * (1.0 + r * r / (m[i] * m[i]));
    var += d * d * sigma[i] * sigma[i];
  }
  return std::sqrt(var);
}

}  // namespace

double VoigtAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  CheckSizes(f, m);
  return f.dot(m);
}

double ReussAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  CheckSizes(f, m);
  return 1.0 / (f.array() / m.array()).sum();
}

double HillAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m) {
  return 0.5 * (VoigtAverage(f, m) + ReussAverage(f, m));
}

Bounds HashinShtrikmanBulk(const Eigen::VectorXd& f, const Eigen::VectorXd& k, const Eigen::VectorXd& mu) {
  CheckSizes(f, k);
  CheckSizes(f, mu);
  return {Lambda(f, k, MinPresent(f, mu)), Lambda(f, k, MaxPresent(f, mu))};
}

Bounds HashinShtrikmanShear(const Eigen::VectorXd& f, const Eigen::VectorXd& k, const Eigen::VectorXd& mu) {
  CheckSizes(f, k);
  CheckSizes(f, mu);
  const double lower = Gamma(f, mu, Zeta(MinPresent(f, k), MinPresent(f, mu)));
  const double upper = Gamma(f, mu, Zeta(MaxPresent(f, k), MaxPresent(f, mu)));
  return {lower, upper};
}

Eigen::VectorXd WeightToVolumeFractions(const Eigen::VectorXd& w, const Eigen::VectorXd& rho) {
  CheckSizes(w, rho);
  const Eigen::VectorXd specific = (w.array() / rho.array()).matrix();
  return specific / specific.sum();
}

Eigen::VectorXd VolumeToWeightFractions(const Eigen::VectorXd& v, const Eigen::VectorXd& rho) {
  CheckSizes(v, rho);
  const Eigen::VectorXd mass = (v.array() * rho.array()).matrix();
  return mass / mass.sum();
}

std::string_view ToString(FractionBasis b) {
  switch (b) {
    case FractionBasis::kWeight: return "weight";
    case FractionBasis::kVolume: return "volume";
  }
  return "?";
}

std::string_view ToString(GrainModulusMethod m) {
  switch (m) {
    case GrainModulusMethod::kMineralogy: return "mineralogy";
    case GrainModulusMethod::kMeasured: return "measured";
  }
  return "?";
}

SourceLocation CompositionIssue::Where(const Composition& c) const {
  if (entry >= 0 && static_cast<size_t>(entry) < c.entries.size() && c.entries[static_cast<size_t>(entry)].where.known())
    return c.entries[static_cast<size_t>(entry)].where;
  return c.where;
}

std::optional<CompositionIssue> ValidateComposition(const MineralTable& table, const Composition& c) {
  if (c.entries.empty()) return CompositionIssue{"composition lists no minerals", -1};
  std::set<std::string> seen;
  double sum = 0;
  for (size_t i = 0; i < c.entries.size(); ++i) {
    const MineralFraction& e = c.entries[i];
    const int idx = static_cast<int>(i);
    if (!table.Find(e.mineral)) {
      return CompositionIssue{UnknownMineralMessage(table, e.mineral), idx};
    }
    if (!seen.insert(e.mineral).second)
      return CompositionIssue{"mineral " + Quoted(e.mineral) + " is listed twice", idx};
    if (!std::isfinite(e.fraction))
      return CompositionIssue{"fraction of " + e.mineral + " = " + FormatNumber(e.fraction) + " is not finite", idx};
    if (e.fraction < 0)
      return CompositionIssue{"fraction of " + e.mineral + " = " + FormatNumber(e.fraction) + " is negative", idx};
    sum += e.fraction;
  }
  if (!(std::abs(sum - 1.0) <= kFractionSumTolerance)) {
    // Six significant digits: the round-trip form of a float sum reads badly ("0.8999999999999999").
    char buf[32];
    std::snprintf(buf, sizeof buf, "%.6g", sum);
    return CompositionIssue{std::string(ToString(c.basis)) + " fractions sum to " + buf +
                                ", not 1 (tolerance " + FormatNumber(kFractionSumTolerance) + ")",
                            -1};
  }
  return std::nullopt;
}

GrainModulus GrainModulusFromMineralogy(const MineralTable& table, const Composition& c) {
  if (const auto issue = ValidateComposition(table, c)) throw InputError(issue->Where(c), issue->message);

  const auto n = static_cast<Eigen::Index>(c.entries.size());
  Eigen::VectorXd frac(n), k(n), mu(n), rho(n), sk(n), smu(n);
  Eigen::VectorXd is_clay = Eigen::VectorXd::Zero(n);
  GrainModulus g;
  g.method = GrainModulusMethod::kMineralogy;
  for (Eigen::Index i = 0; i < n; ++i) {
    const MineralFraction& e = c.entries[static_cast<size_t>(i)];
    const Mineral& m = *table.Find(e.mineral);
    frac[i] = e.fraction;
    k[i] = m.bulk;
    mu[i] = m.shear;
    rho[i] = m.density;
    sk[i] = m.sigma_bulk;
    smu[i] = m.sigma_shear;
    is_clay[i] = m.clay ? 1.0 : 0.0;
    g.minerals.push_back(e.mineral);
  }
  // Within tolerance: renormalise so the mixing laws see an exact partition.
  const Eigen::VectorXd f = c.basis == FractionBasis::kWeight ? WeightToVolumeFractions(frac, rho)
                                                              : Eigen::VectorXd(frac / frac.sum());
  g.volume_fractions.assign(f.data(), f.data() + f.size());
  g.clay_volume_fraction = f.dot(is_clay);

  g.k_voigt = VoigtAverage(f, k);
  g.k_reuss = ReussAverage(f, k);
  g.k_hill = 0.5 * (g.k_voigt + g.k_reuss);
  const Bounds khs = HashinShtrikmanBulk(f, k, mu);
  g.k_hs_lower = khs.lower;
  g.k_hs_upper = khs.upper;

  g.mu_voigt = VoigtAverage(f, mu);
  g.mu_reuss = ReussAverage(f, mu);
  g.mu_hill = 0.5 * (g.mu_voigt + g.mu_reuss);
  const Bounds muhs = HashinShtrikmanShear(f, k, mu);
  g.mu_hs_lower = muhs.lower;
  g.mu_hs_upper = muhs.upper;

  // Half the V-R spread as the half-width of a uniform law: sd = (V-R)/(2 sqrt 3).
  const double inv_2sqrt3 = 1.0 / (2.0 * std::sqrt(3.0));
  g.sigma_k_s_spread = (g.k_voigt - g.k_reuss) * inv_2sqrt3;
  g.sigma_mu_s_spread = (g.mu_voigt - g.mu_reuss) * inv_2sqrt3;
  g.sigma_k_s_table = HillTableSigma(f, k, sk);
  g.sigma_mu_s_table = HillTableSigma(f, mu, smu);

  g.k_s = g.k_hill;
  g.mu_s = g.mu_hill;
  g.sigma_k_s = std::hypot(g.sigma_k_s_spread, g.sigma_k_s_table);
  g.sigma_mu_s = std::hypot(g.sigma_mu_s_spread, g.sigma_mu_s_table);
  return g;
}

GrainModulus MeasuredGrainModulus(double k_s, double sigma_k_s, std::optional<double> mu_s, double sigma_mu_s,
                                  const SourceLocation& where) {
  if (!(k_s > 0) || !std::isfinite(k_s))
    throw InputError(where, "grain bulk modulus = " + FormatNumber(k_s / 1e9) + " GPa must be > 0");
  if (!(sigma_k_s >= 0) || !std::isfinite(sigma_k_s))
    throw InputError(where, "grain bulk modulus sigma = " + FormatNumber(sigma_k_s / 1e9) + " GPa must be >= 0");
  if (mu_s && (!(*mu_s > 0) || !std::isfinite(*mu_s)))
    throw InputError(where, "grain shear modulus = " + FormatNumber(*mu_s / 1e9) + " GPa must be > 0");
  if (mu_s && (!(sigma_mu_s >= 0) || !std::isfinite(sigma_mu_s)))
    throw InputError(where, "grain shear modulus sigma = " + FormatNumber(sigma_mu_s / 1e9) + " GPa must be >= 0");

  GrainModulus g;
  g.method = GrainModulusMethod::kMeasured;
  g.k_s = k_s;
  g.sigma_k_s = sigma_k_s;
  g.mu_s = mu_s ? *mu_s : kNaN;
  g.sigma_mu_s = mu_s ? sigma_mu_s : kNaN;
  g.k_voigt = g.k_reuss = g.k_hill = g.k_hs_lower = g.k_hs_upper = kNaN;
  g.mu_voigt = g.mu_reuss = g.mu_hill = g.mu_hs_lower = g.mu_hs_upper = kNaN;
  g.sigma_k_s_spread = g.sigma_mu_s_spread = g.sigma_mu_s_table = kNaN;
  g.sigma_k_s_table = kNaN;
  g.clay_volume_fraction = kNaN;
  return g;
}

}  // namespace porofit::poro

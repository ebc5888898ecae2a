#include "porofit/poro/poroelastic.h"

#include "porofit/core/error.h"

namespace porofit::poro {

double BiotCoefficient(double k_dry, double k_s) { return 1.0 - k_dry / k_s; }

double BiotModulus(double alpha, double phi, double k_s, double k_f) {
  return 1.0 / ((alpha - phi) / k_s + phi / k_f);
}

double BiotModulusWithPoreModulus(double alpha, double phi, double k_s, double k_f, double k_phi) {
  return 1.0 / (alpha / k_s + phi * (1.0 / k_f - 1.0 / k_phi));
}

double UndrainedBulkModulus(double k_dry, double alpha, double biot_modulus) {
  return k_dry + alpha * alpha * biot_modulus;
}

double GassmannUndrainedBulkModulus(double k_dry, double k_s, double k_f, double phi) {
  const double a = 1.0 - k_dry / k_s;
  return k_dry + a * a / (phi / k_f + (1.0 - phi) / k_s - k_dry / (k_s * k_s));
}

double SkemptonCoefficient(double alpha, double biot_modulus, double k_u) { return alpha * biot_modulus / k_u; }

double BiotLowerBoundHashinShtrikman(double phi, double k_s, double mu_s) {
  return 1.0 - (1.0 - phi) * 4.0 * mu_s / (4.0 * mu_s + 3.0 * phi * k_s);
}

VtiStiffness IsotropicStiffness(double k, double mu) {
  const double c11 = k + 4.0 * mu / 3.0;
  const double c12 = k - 2.0 * mu / 3.0;
  return {c11, c12, c12, c11};
}

AnisotropicBiot BiotCoefficientVti(const VtiStiffness& c, double k_s) {
  return {1.0 - (c.c11 + c.c12 + c.c13) / (3.0 * k_s), 1.0 - (2.0 * c.c13 + c.c33) / (3.0 * k_s)};
}

double BiotEstimate::ShareFromGrainModulus() const {
  const double total = variance_from_k_dry + variance_from_k_s + variance_from_covariance;
  if (!(total != 0)) return std::numeric_limits<double>::quiet_NaN();
  return (variance_from_k_s + 0.5 * variance_from_covariance) / total;
}

BiotEstimate BiotCoefficientWithUncertainty(double k_dry, double sigma_k_dry, double k_s, double sigma_k_s,
                                            double cov_k_dry_k_s) {
  BiotEstimate e;
  e.alpha = BiotCoefficient(k_dry, k_s);
  const double d_k = -1.0 / k_s;            // d alpha / d K_dry
  const double d_ks = k_dry / (k_s * k_s);  // d alpha / d K_s
  e.variance_from_k_dry = d_k * d_k * sigma_k_dry * sigma_k_dry;
  e.variance_from_k_s = d_ks * d_ks * sigma_k_s * sigma_k_s;
  e.variance_from_covariance = 2.0 * d_k * d_ks * cov_k_dry_k_s;
  const double var = e.variance_from_k_dry + e.variance_from_k_s + e.variance_from_covariance;
  // An inconsistent covariance (|rho| > 1) can make the sum negative.
  e.sigma = var > 0 ? std::sqrt(var) : 0.0;
  return e;
}

std::vector<std::string> BiotChecks::Messages() const {
  std::vector<std::string> out;
  if (below_porosity) out.push_back("alpha = " + FormatRounded(alpha) + " is below porosity " + FormatRounded(phi));
  if (above_one) out.push_back("alpha = " + FormatRounded(alpha) + " is above 1");
  if (below_hs_limit)
    out.push_back("alpha = " + FormatRounded(alpha) + " is below the hashin-shtrikman limit " + FormatRounded(hs_limit));
  if (k_dry_not_below_k_s)
    out.push_back("K_dry = " + FormatRounded(k_dry / 1e9) + " GPa is not below K_s = " + FormatRounded(k_s / 1e9) +
                  " GPa");
  return out;
}

BiotChecks CheckBiotCoefficient(double alpha, double phi, double k_dry, double k_s, double mu_s) {
  BiotChecks c;
  c.alpha = alpha;
  c.phi = phi;
  c.k_dry = k_dry;
  c.k_s = k_s;
  c.below_porosity = alpha < phi;
  c.above_one = alpha > 1.0;
  c.k_dry_not_below_k_s = k_dry >= k_s;
  if (std::isfinite(mu_s)) {
    c.hs_limit = BiotLowerBoundHashinShtrikman(phi, k_s, mu_s);
    c.below_hs_limit = alpha < c.hs_limit;
  }
  return c;
}

}  // namespace porofit::poro

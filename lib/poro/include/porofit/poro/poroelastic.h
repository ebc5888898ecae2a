#pragma once
// Linear isotropic and transversely isotropic poroelastic relations.
//
// Symbols: K_dry drained (frame) bulk modulus, K_s grain bulk modulus, mu_s
// grain shear modulus, K_f pore-fluid bulk modulus, phi porosity (fraction),
// alpha Biot coefficient, M Biot modulus, K_u undrained bulk modulus, B
// Skempton coefficient. Any consistent modulus unit works; porofit uses Pa.
//
// The functions are plain formulas. They do not clip or validate: inputs
// outside the physical range give the formula's value (possibly negative,
// inf or NaN). Use CheckBiotCoefficient() to flag violated bounds; the domain
// rule is to flag, never clip (a project rule).
#include <cmath>
#include <limits>
#include <string>
#include <vector>

namespace porofit::poro {

/// Biot coefficient alpha = 1 - K_dry/K_s.
/// Biot & Willis, 1957, J. Appl. Mech. 24, 594-601; Geertsma, 1957,
/// Trans. AIME 210; Nur & Byerlee, 1971, JGR 76.
double BiotCoefficient(double k_dry, double k_s);

/// Biot modulus M from 1/M = (alpha - phi)/K_s + phi/K_f (microhomogeneous
/// solid, K_phi = K_s). Biot & Willis, 1957; see Wang, 2000, Theory of Linear
/// Poroelasticity, Princeton.
double BiotModulus(double alpha, double phi, double k_s, double k_f);

/// Biot modulus with a distinct unjacketed pore modulus K_phi:
/// 1/M = alpha/K_s + phi (1/K_f - 1/K_phi) (computed from
/// Brown & Korringa, 1975, Geophysics 40, 608-616). Equals BiotModulus()
/// when K_phi = K_s.
double BiotModulusWithPoreModulus(double alpha, double phi, double k_s, double k_f,
                                  double k_phi);

/// Undrained bulk modulus K_u = K_dry + alpha^2 M (Biot & Willis, 1957).
double UndrainedBulkModulus(double k_dry, double alpha, double biot_modulus);

/// Gassmann (1951, Vierteljahrsschr. Naturforsch. Ges. Zürich 96) closed form:
/// K_u = K_dry + (1 - K_dry/K_s)^2 / (phi/K_f + (1 - phi)/K_s - K_dry/K_s^2).
/// Identical to UndrainedBulkModulus(k_dry, alpha, BiotModulus(...)).
double GassmannUndrainedBulkModulus(double k_dry, double k_s, double k_f, double phi);

/// Skempton coefficient B = alpha M / K_u (Skempton, 1954, Géotechnique 4).
double SkemptonCoefficient(double alpha, double biot_modulus, double k_u);

/// Hashin-Shtrikman lower limit of alpha for a frame of one grain material
/// with empty pores: alpha >= 1 - (1 - phi) 4 mu_s / (4 mu_s + 3 phi K_s)
/// (HS upper bound on K_dry with vacuous pores [computed]).
double BiotLowerBoundHashinShtrikman(double phi, double k_s, double mu_s);

/// Drained stiffness of a vertically transversely isotropic (VTI) frame,
/// Voigt notation, axis 3 normal to bedding.
struct VtiStiffness {
  double c11 = 0, c12 = 0, c13 = 0, c33 = 0;
};

/// Isotropic stiffness as VTI: C11 = C33 = K + 4mu/3, C12 = C13 = K - 2mu/3.
VtiStiffness IsotropicStiffness(double k, double mu);

struct AnisotropicBiot {
  double horizontal = 0;  ///< alpha_h = alpha_11 = alpha_22
  double vertical = 0;    ///< alpha_v = alpha_33
};

/// alpha_ij = delta_ij - C_ijkk/(3 K_s) for VTI:
///   alpha_h = 1 - (C11 + C12 + C13)/(3 K_s),  alpha_v = 1 - (2 C13 + C33)/(3 K_s).
/// Carroll, 1979, JGR 84; Thompson & Willis, 1991, J. Appl. Mech. 58;
/// Cheng, 1997, IJRMMS 34(2), 199-205 [citations from memory].
AnisotropicBiot BiotCoefficientVti(const VtiStiffness& c, double k_s);

/// alpha with its first-order (delta-method) uncertainty:
///   Var alpha = (sigma_K/K_s)^2 + (K sigma_Ks / K_s^2)^2 - 2 (K/K_s^3) cov(K, K_s)
/// from d alpha/dK = -1/K_s and d alpha/dK_s = K/K_s^2 (delta method [computed]).
struct BiotEstimate {
  double alpha = 0;
  double sigma = 0;                ///< sqrt of the total variance (0 if it is negative)
  double variance_from_k_dry = 0;  ///< (sigma_K/K_s)^2
  double variance_from_k_s = 0;    ///< (K sigma_Ks/K_s^2)^2
  double variance_from_covariance = 0;  ///< -2 (K/K_s^3) cov
  /// Share of the total variance owed to K_s (with half the covariance term);
  /// NaN when the total variance is 0.
  double ShareFromGrainModulus() const;
};

BiotEstimate BiotCoefficientWithUncertainty(double k_dry, double sigma_k_dry, double k_s,
                                            double sigma_k_s, double cov_k_dry_k_s = 0);

/// Bound checks for a Biot coefficient (flags only; nothing is clipped).
struct BiotChecks {
  bool below_porosity = false;   ///< alpha < phi: violates the Voigt bound K_dry <= (1-phi) K_s
  bool above_one = false;        ///< alpha > 1: negative K_dry
  bool below_hs_limit = false;   ///< alpha < BiotLowerBoundHashinShtrikman(phi, K_s, mu_s)
  bool k_dry_not_below_k_s = false;  ///< K_dry >= K_s
  double hs_limit = std::numeric_limits<double>::quiet_NaN();  ///< the HS limit used (NaN: mu_s unknown)

  bool any() const { return below_porosity || above_one || below_hs_limit || k_dry_not_below_k_s; }
  /// One short lowercase sentence per raised flag, with the values, e.g.
  /// "alpha = 0.15 is below porosity 0.2".
  std::vector<std::string> Messages() const;

  // Values the messages quote.
  double alpha = 0, phi = 0, k_dry = 0, k_s = 0;
};

/// Flags alpha outside [phi, 1], alpha below the HS limit (skipped when mu_s
/// is NaN) and K_dry >= K_s. `alpha` is usually BiotCoefficient(k_dry, k_s)
/// but may come from elsewhere (e.g. a direct pore-volume measurement).
BiotChecks CheckBiotCoefficient(double alpha, double phi, double k_dry, double k_s,
                                double mu_s = std::numeric_limits<double>::quiet_NaN());

}  // namespace porofit::poro

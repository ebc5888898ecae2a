#pragma once
// Grain (mineral) moduli of a rock from its mineralogy, or from a measurement.
//
// Mixing laws for the effective modulus of a mineral aggregate with volume
// fractions f_i (Mavko, Mukerji & Dvorkin 2009, The Rock Physics Handbook,
// 2nd ed., Cambridge University Press, chapter on effective media [from memory]):
//   Voigt   M_V = sum f_i M_i                         (upper bound)
//   Reuss   1/M_R = sum f_i / M_i                     (lower bound)
//   Hill    M_H = (M_V + M_R) / 2                     (Hill, 1952, Proc. Phys. Soc. A 65)
//   Hashin-Shtrikman bounds, Berryman's general form (as given in Mavko,
//   Mukerji & Dvorkin, 2009, The Rock Physics Handbook, 2nd ed. [from memory]):
//     K_HS+/- = Lambda(mu_max / mu_min),  Lambda(z) = [sum f_i/(K_i + 4z/3)]^-1 - 4z/3
//     mu_HS+/- = Gamma(zeta(K_max, mu_max) / zeta(K_min, mu_min)),
//       Gamma(z) = [sum f_i/(mu_i + z)]^-1 - z,  zeta(K, mu) = (mu/6)(9K + 8mu)/(K + 2mu)
//   with the extremes taken over constituents with f_i > 0. R <= HS- <= HS+ <= V.
//   Hill is not guaranteed to lie inside the HS bounds: for quartz-calcite
//   80/20 it is 43.119 GPa against HS+ 42.972 GPa [computed]).
//   Hill is still the central value (common practice); the bounds are reported.
//
// XRD reports weight fractions; volume fractions follow from the mineral
// densities: v_i = (w_i/rho_i) / sum_j (w_j/rho_j).
//
// Grain modulus uncertainty (see docs/poroelastic-relations.md):
//   sigma_spread = (M_V - M_R) / (2 sqrt 3)   -- the true aggregate value is
//       taken as uniformly distributed over [M_H - (V-R)/2, M_H + (V-R)/2];
//   sigma_table^2 = sum_i (dM_H/dM_i sigma_i)^2 -- linear propagation of the
//       table 1-sigma values through Hill, minerals independent, with
//       dM_H/dM_i = f_i (1 + M_R^2/M_i^2) / 2;
//   sigma = sqrt(sigma_spread^2 + sigma_table^2).
// Density uncertainties (weight -> volume conversion) are not propagated.
#include <optional>
#include <string>
#include <string_view>
#include <vector>

#include <Eigen/Core>

#include "porofit/core/error.h"
#include "porofit/poro/minerals.h"

namespace porofit::poro {

// ---------------------------------------------------------------- averages
// f: volume fractions (sum 1, >= 0); m, k, mu: constituent moduli (> 0), same
// length. Preconditions are POROFIT_CHECKed (sizes) or give NaN/inf (values).

double VoigtAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m);
double ReussAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m);
double HillAverage(const Eigen::VectorXd& f, const Eigen::VectorXd& m);

struct Bounds {
  double lower = 0;
  double upper = 0;
};

/// Hashin-Shtrikman bounds of the bulk modulus (Berryman general form).
Bounds HashinShtrikmanBulk(const Eigen::VectorXd& f, const Eigen::VectorXd& k,
                           const Eigen::VectorXd& mu);
/// Hashin-Shtrikman bounds of the shear modulus (Berryman general form).
Bounds HashinShtrikmanShear(const Eigen::VectorXd& f, const Eigen::VectorXd& k,
                            const Eigen::VectorXd& mu);

/// Weight fractions -> volume fractions with densities rho (> 0). The result
/// sums to 1 whenever w sums to a positive number.
Eigen::VectorXd WeightToVolumeFractions(const Eigen::VectorXd& w, const Eigen::VectorXd& rho);
/// Volume fractions -> weight fractions: w_i = v_i rho_i / sum_j v_j rho_j.
Eigen::VectorXd VolumeToWeightFractions(const Eigen::VectorXd& v, const Eigen::VectorXd& rho);

// ---------------------------------------------------------------- composition

enum class FractionBasis {
  kWeight,  ///< mass fractions, as XRD reports them
  kVolume,  ///< volume fractions of the solid
};
std::string_view ToString(FractionBasis b);

struct MineralFraction {
  std::string mineral;   ///< key in the MineralTable
  double fraction = 0;   ///< of the solid, on the composition's basis; >= 0
  SourceLocation where;  ///< where the entry was written (for errors)
};

/// Mineralogy of the solid part of a rock.
struct Composition {
  std::vector<MineralFraction> entries;
  FractionBasis basis = FractionBasis::kWeight;
  SourceLocation where;  ///< where the composition was written (for sum errors)
};

/// Tolerance on |sum of fractions - 1|. Within it the fractions are
/// renormalised to sum exactly 1; outside it the composition is rejected.
inline constexpr double kFractionSumTolerance = 1e-3;

/// What is wrong with a composition: a message in the InputError style
/// ("fraction of quartz = -0.1 is negative") and the entry at fault
/// (-1: the composition as a whole, e.g. the sum).
struct CompositionIssue {
  std::string message;
  int entry = -1;
  /// The location of the entry at fault, else of the composition.
  SourceLocation Where(const Composition& c) const;
};

/// Checks, in order: at least one entry; each mineral known to `table`
/// (suggesting the nearest name); no mineral listed twice; each fraction
/// finite and >= 0; sum within kFractionSumTolerance of 1. Returns the first
/// problem, or nullopt.
std::optional<CompositionIssue> ValidateComposition(const MineralTable& table,
                                                    const Composition& c);

// ---------------------------------------------------------------- grain modulus

enum class GrainModulusMethod {
  kMineralogy,  ///< mixed from a composition and a mineral table
  kMeasured,    ///< given directly (e.g. unjacketed test)
};
std::string_view ToString(GrainModulusMethod m);

/// Grain modulus with its derivation. SI (Pa). Fields that do not apply to
/// the method (the averages and bounds for a measured value, mu_s when not
/// measured) are NaN.
struct GrainModulus {
  GrainModulusMethod method = GrainModulusMethod::kMineralogy;

  double k_s = 0;          ///< central grain bulk modulus (Hill, or measured)
  double sigma_k_s = 0;    ///< 1-sigma of k_s
  double mu_s = 0;         ///< central grain shear modulus (Hill, or measured / NaN)
  double sigma_mu_s = 0;   ///< 1-sigma of mu_s

  double k_voigt = 0, k_reuss = 0, k_hill = 0, k_hs_lower = 0, k_hs_upper = 0;
  double mu_voigt = 0, mu_reuss = 0, mu_hill = 0, mu_hs_lower = 0, mu_hs_upper = 0;

  /// Parts of sigma_k_s / sigma_mu_s (mineralogy): (V - R)/(2 sqrt 3) and the
  /// propagated table uncertainty; sigma^2 = spread^2 + table^2.
  double sigma_k_s_spread = 0, sigma_k_s_table = 0;
  double sigma_mu_s_spread = 0, sigma_mu_s_table = 0;

  double clay_volume_fraction = 0;  ///< volume fraction of minerals flagged clay (NaN if measured)
  std::vector<std::string> minerals;     ///< mineralogy: constituents, in input order
  std::vector<double> volume_fractions;  ///< mineralogy: their volume fractions (sum 1)
};

/// Grain moduli of a composition. Throws InputError (at the location the
/// CompositionIssue names) if ValidateComposition() fails.
GrainModulus GrainModulusFromMineralogy(const MineralTable& table, const Composition& c);

/// A measured grain modulus. k_s > 0, sigma_k_s >= 0; mu_s, if given, > 0
/// with sigma_mu_s >= 0. Throws InputError at `where` otherwise.
GrainModulus MeasuredGrainModulus(double k_s, double sigma_k_s,
                                  std::optional<double> mu_s = std::nullopt,
                                  double sigma_mu_s = 0, const SourceLocation& where = {});

}  // namespace porofit::poro

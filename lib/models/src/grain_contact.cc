// M7, Hertz-Mindlin grain contact: K = a P^(1/3).
#include <cmath>
#include <limits>

#include "builtin.h"
#include "start_util.h"

namespace porofit::detail {
namespace {

constexpr double kInf = std::numeric_limits<double>::infinity();
constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct GrainContact {
  static constexpr int kNumParameters = 1;
  template <typename T>
  static T Eval(const T* th, const T& p) {
    using std::cbrt;
    if (p < 0.0) return T(kNaN);  // tension: no contact law
    // cbrt's derivative is infinite at 0 and would turn dK/da into 0 * inf;
    // the exact dK/da there is 0. (The x-slope is supplied separately.)
    if (p == 0.0) return th[0] * T(0.0);
    return th[0] * cbrt(p);
  }
  // eps = integral_0^P dP'/(a P'^(1/3)) = (3/2) P^(2/3) / a.
  template <typename T>
  static T Strain(const T* th, const T& p) {
    using std::cbrt;
    if (p < 0.0) return T(kNaN);
    if (p == 0.0) return th[0] * T(0.0);  // as in Eval: avoid 0 * inf in the Jet
    const T c = cbrt(p);
    return 1.5 * c * c / th[0];
  }
};

}  // namespace

ModelSpec MakeGrainContactModel() {
  ModelSpec s;
  s.id = "grain-contact";
  s.name = "Hertz-Mindlin grain contact (M7)";
  s.formula = "K = a P^(1/3)";
  s.reference =
      "Hertz-Mindlin contact theory, exponent 1/3: Mindlin (1949), J. Appl. Mech. 16; as given "
      "in Mavko, Mukerji & Dvorkin (2009), The Rock Physics Handbook, 2nd ed., Cambridge "
      "[structure checked; prefactors from memory]";
  s.notes =
      "For a random pack of identical spheres a = [c^2 (1-phi_0)^2 mu_s^2 / (18 pi^2 "
      "(1-nu_s)^2)]^(1/3) [prefactor from memory] (coordination number c, porosity phi_0, grain shear modulus mu_s and "
      "Poisson ratio nu_s), but only the amplitude a is identifiable from K(P). K(0) = 0 and the "
      "slope is infinite at P = 0: a granular-pack law, not a crack-closure law. It is "
      "power-ref with n = 1/3 and P_ref = 1 MPa (regular nesting, F test valid). Doubling P "
      "multiplies K by 2^(1/3) = 1.2599. Strain: eps = (3/2) P^(2/3) / a.";
  s.parameters = {
      {"a", "GPa/MPa^(1/3)", 1e9 / 1e2, 0.0, kInf, ParameterTransform::kIdentity, false,
       "contact amplitude: K at P = 1 MPa"},
  };
  AttachFunctor<GrainContact>(s);
  // dK/dP = a / (3 P^(2/3)) is +infinity at P = 0, which autodiff cannot
  // represent there; write it out so the slope is exact everywhere.
  s.slope = [](const double* th, double p) {
    if (p < 0) return kNaN;
    const double c = std::cbrt(p);
    return th[0] / (3.0 * c * c);
  };
  AttachStrainAutodiff<GrainContact>(s);
  s.start = [params = s.parameters](std::span<const double> x, std::span<const double> y) {
    const Points p = PreparePoints(x, y, true, true);
    const DataScale sc = ScaleOf(p);
    // a = mean(K / P^(1/3)) over P > 0 (least squares for a with P^(1/3) fixed [computed]).
    double acc = 0;
    for (size_t i = 0; i < p.size(); ++i) acc += p.y[i] / std::cbrt(p.x[i]);
    const double a = p.empty() ? kNaN : acc / static_cast<double>(p.size());
    return FinishStart("grain-contact", params, {a}, {sc.y_typical / std::cbrt(sc.x_max)});
  };
  return s;
}

}  // namespace porofit::detail

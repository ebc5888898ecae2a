#pragma once
// A fit model as data: formula, parameters, reference, start heuristic and
// exact derivatives, independent of any solver.
//
// Working units. Each model is written in the units its literature uses
// (crack-closure models: P in MPa, K in GPa). The fit layer converts SI data
// to these working units on the way in (divide by x_si_factor, y_si_factor)
// and the parameters back to SI on the way out (multiply by each parameter's
// si_factor), so data types stay SI while the solver sees numbers of order 1.
#include <ceres/jet.h>

#include <functional>
#include <limits>
#include <span>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

namespace porofit {

/// How the solver sees a parameter. kLog: the solver works on u = ln(theta),
/// which keeps a positive scale parameter positive and improves conditioning
/// (common practice: fit ln P*). Reported values are always theta.
enum class ParameterTransform { kIdentity, kLog };

struct ParameterSpec {
  std::string name;     ///< symbol, e.g. "K_inf"; unique within a model
  std::string unit;     ///< working unit, e.g. "GPa", "MPa", "GPa/MPa", "1/GPa", "1"
  double si_factor = 1; ///< SI value = si_factor * working value (GPa: 1e9)
  double lower = -std::numeric_limits<double>::infinity();  ///< physical bound, working units
  double upper = std::numeric_limits<double>::infinity();   ///< physical bound, working units
  ParameterTransform transform = ParameterTransform::kIdentity;  ///< kLog needs lower >= 0
  bool fixed_by_default = false;  ///< held at its start value unless the study frees it
  std::string meaning;  ///< one line, e.g. "modulus with all cracks closed"
};

/// Exact value and gradient of the model with respect to its parameters.
/// Returns the model value; writes d(value)/d(theta_j) to grad[j].
using ValueGradientFn = std::function<double(const double* theta, double x, double* grad)>;

struct ModelSpec {
  std::string id;         ///< catalogue key used in study files, e.g. "exp-modulus"
  std::string name;       ///< short title
  std::string formula;    ///< plain-text formula, e.g. "K = K_inf - (K_inf - K_0) exp(-P/P_c)"
  std::string reference;  ///< literature reference (author, year, journal)
  std::string notes;      ///< identifiability caveats, nesting, typical ranges

  std::string x_symbol = "P";
  std::string x_unit = "MPa";
  double x_si_factor = 1e6;
  std::string y_symbol = "K";
  std::string y_unit = "GPa";
  double y_si_factor = 1e9;

  std::vector<ParameterSpec> parameters;

  /// y(theta, x) in working units. NaN or inf means "not defined here" (the
  /// solver treats it as an infeasible step).
  std::function<double(const double* theta, double x)> value;
  /// y and dy/dtheta, exact (automatic differentiation or analytic).
  ValueGradientFn value_and_gradient;
  /// dy/dx, exact: the tangent modulus slope dK/dP for crack-closure models.
  std::function<double(const double* theta, double x)> slope;
  /// Volumetric strain eps(x) = integral_0^x dx'/y(x') (compression positive):
  /// in closed form where one exists (computed), else by quadrature
  /// (see strain_method); empty for models without a strain (user formulas). Working units: for K in GPa and P in MPa, eps is MPa/GPa, so
  /// multiply by 1e-3 for a plain strain.
  std::function<double(const double* theta, double x)> strain;
  /// eps and d eps/d theta_j, exact: automatic differentiation (ceres::Jet)
  /// through the closed form, or through a fixed composite Gauss–Legendre rule
  /// (porofit/models/strain_form.h) where there is none. Same units as
  /// `strain`; empty exactly when `strain` is empty.
  ValueGradientFn strain_and_gradient;
  /// How `strain` is evaluated: "closed form", "gauss-legendre" (fixed
  /// quadrature of 1/K, exact derivatives through it) or "" (no strain).
  std::string strain_method;
  /// Start heuristic from the data (working units; x need not be sorted).
  /// Must return parameters().size() finite values strictly inside the bounds.
  std::function<std::vector<double>(std::span<const double> x, std::span<const double> y)> start;

  /// Index of a pressure-scale parameter (closure pressure) whose estimate is
  /// compared with the data's pressure range for the identifiability flag;
  /// -1 if the model has none.
  int closure_parameter = -1;
  /// Closure-pressure scale in working units (MPa) at theta, for models whose
  /// closure scale is a function of the parameters rather than one of them
  /// (linear-exp: 1/D). Empty if the model has no closure scale. Where
  /// closure_parameter >= 0 this returns theta[closure_parameter], so callers
  /// may use either; ClosurePressure() below picks whichever is set.
  std::function<double(const double* theta)> closure_pressure;
  /// True if the formula is undefined at x <= 0 (power law with reference pressure).
  bool requires_positive_x = false;

  size_t num_parameters() const { return parameters.size(); }
  /// Index of the parameter called `name`, or -1.
  int ParameterIndex(std::string_view name) const;
  /// True if the model has a closure-pressure scale (either field set).
  bool has_closure_pressure() const { return closure_pressure || closure_parameter >= 0; }
  /// The closure-pressure scale (MPa) at theta: closure_pressure(theta) if set,
  /// else theta[closure_parameter]; NaN if the model has none.
  double ClosurePressure(const double* theta) const;
};

/// Builds value / value_and_gradient / slope from a functor type F with
///   static constexpr int kNumParameters;
///   template <typename T> static T Eval(const T* theta, const T& x);
/// using forward-mode automatic differentiation (ceres::Jet), so derivatives
/// are exact to rounding. The descriptive fields are filled by the caller.
template <class F>
void AttachAutodiff(ModelSpec& spec) {
  // N is declared inside each lambda: clang 14 rejects a local constexpr of
  // the enclosing function template used as an array bound in a lambda.
  spec.value = [](const double* theta, double x) { return F::template Eval<double>(theta, x); };
  spec.value_and_gradient = [](const double* theta, double x, double* grad) {
    constexpr int N = F::kNumParameters;
    using J = ceres::Jet<double, N>;
    J t[N];
    for (int j = 0; j < N; ++j) t[j] = J(theta[j], j);
    const J y = F::template Eval<J>(t, J(x));
    for (int j = 0; j < N; ++j) grad[j] = y.v[j];
    return y.a;
  };
  spec.slope = [](const double* theta, double x) {
    constexpr int N = F::kNumParameters;
    using J = ceres::Jet<double, 1>;
    J t[N];
    for (int j = 0; j < N; ++j) t[j] = J(theta[j]);
    return F::template Eval<J>(t, J(x, 0)).v[0];
  };
}

/// Sets strain, strain_and_gradient and strain_method from a functor with
///   template <typename T> static T Strain(const T* theta, const T& x);
/// (the same F as AttachAutodiff; `method` names how Strain integrates 1/K).
template <class F>
void AttachStrainAutodiff(ModelSpec& spec, std::string method = "closed form") {
  spec.strain = [](const double* theta, double x) { return F::template Strain<double>(theta, x); };
  spec.strain_and_gradient = [](const double* theta, double x, double* grad) {
    constexpr int N = F::kNumParameters;
    using J = ceres::Jet<double, N>;
    J t[N];
    for (int j = 0; j < N; ++j) t[j] = J(theta[j], j);
    const J e = F::template Strain<J>(t, J(x));
    for (int j = 0; j < N; ++j) grad[j] = e.v[j];
    return e.a;
  };
  spec.strain_method = std::move(method);
}

}  // namespace porofit

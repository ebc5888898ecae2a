#pragma once
// The two-sided Student t quantile at many effective degrees of freedom.
//
// Welch–Satterthwaite gives every grid point (or depth row) its own dof nu >=
// nu_fit, and an exact quantile costs microseconds. TQuantileCurve
// interpolates q(u) = t_level(nu_fit/u) on u in [0, 1] (u = 0 is the normal
// limit) by a Chebyshev series on 24 nodes: within 1e-9 of the exact quantile
// for nu_fit >= 2 (tests/bands check it) at a cost of nanoseconds. The alpha
// bands of lib/bands and the depth tables of lib/depth use this one class, so
// the same level, nu_fit and nu give the same quantile to the last bit.
// nu_fit < 2, nu_fit infinite or nu < nu_fit: exact calls (TwoSidedT).
namespace porofit::bands {

class TQuantileCurve {
 public:
  /// `confidence` in (0, 1): two-sided level; nu_fit: the dof of the fit part.
  TQuantileCurve(double confidence, double nu_fit);
  /// The quantile at effective dof `nu` (+inf: normal).
  double operator()(double nu) const;

 private:
  static constexpr int kNodes = 24;
  double confidence_, nu_fit_;
  bool exact_ = true;
  double coef_[kNodes] = {};
};

}  // namespace porofit::bands

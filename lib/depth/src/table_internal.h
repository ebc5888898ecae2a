#pragma once
// Private pieces of the depth-table engine shared by table.cc and stress.cc.
#include <cstdint>
#include <limits>
#include <string>
#include <vector>

#include "porofit/depth/table.h"

namespace porofit::depth::detail {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
constexpr double kInf = std::numeric_limits<double>::infinity();

/// A fitted curve ready for repeated plug-in evaluation: the working-unit
/// parameters are converted once, so K(P) costs one model call, no allocation.
class CurveEval {
 public:
  explicit CurveEval(const FittedCurve& curve);
  /// K_dry(p) in Pa at p in Pa; NaN where the model is not defined (p <= 0
  /// for a model that requires P > 0, or a non-finite value).
  double K(double p) const;
  double k_s() const { return k_s_; }

 private:
  const ModelSpec* model_;
  std::vector<double> theta_;
  double x_si_, y_si_, k_s_;
  bool positive_x_;
};

/// The Biot fixed point on a prepared curve (see SolveBiotFixedPoint).
FixedPointResult SolveFixedPoint(const CurveEval& curve, double total, double pore, double tolerance,
                                 int max_iterations);

/// S_v and the log-source flags (kLogGap | kLogFill) at ascending depths.
/// Validates the overburden against the datum and the deepest rock row;
/// `where` prefixes messages ("depth table 'A': ").
struct Overburden {
  std::vector<double> vertical_stress;
  std::vector<std::uint32_t> flags;
};
Overburden ComputeOverburden(const DepthTableSpec& spec, const std::vector<double>& depth, const std::string& where);

/// P_p at ascending depths; throws for rows at or below the rock top that a
/// table does not cover (rows in water outside it get NaN).
std::vector<double> ComputePorePressure(const DepthTableSpec& spec, const std::vector<double>& depth,
                                        const std::string& where);


/// "%.6g" for the assumption sentences.
std::string Num(double v);

/// The assumption sentences of a validated spec.
std::vector<std::string> DescribeAssumptions(const DepthTableSpec& spec);

/// Throws InputError for the first inconsistency of the spec (not the
/// overburden/pore-pressure coverage, which needs the rows).
void ValidateSpec(const DepthTableSpec& spec, const std::string& where);

}  // namespace porofit::depth::detail

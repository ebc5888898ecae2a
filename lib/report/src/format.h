#pragma once
// Formatting shared by the report writers (private).
#include <string>
#include <string_view>
#include <vector>

#include "porofit/bands/bands.h"
#include "porofit/fit/fit_result.h"
#include "porofit/io/study.h"
#include "porofit/run/run.h"

namespace porofit::detail {

/// Shortest round-trip decimal; "" for NaN; "inf" / "-inf" for infinities.
std::string Num(double v);
/// RFC 4180 field: quoted when it holds a comma, quote, CR/LF or leading/trailing space.
std::string CsvField(std::string_view s);
/// Joins already-formatted fields with commas and ends the line.
std::string CsvRow(const std::vector<std::string>& fields);

/// '#' comment block opening every CSV: title, tool, study, run time, caution,
/// invented-data notice (if any), and `extra` lines.
std::string CsvPreamble(const std::string& title, const Study& study, const std::string& started_utc,
                        const std::string& tool_version, const std::vector<std::string>& extra);

/// Short machine-readable flags of a fit, in a fixed order:
/// rank-deficient, high-correlation, closure-outside-data, at-bound,
/// no-covariance, robust-loss.
std::vector<std::string> FitFlags(const FitResult& r, const FitOptions& options);
std::string Join(const std::vector<std::string>& parts, std::string_view sep);

/// Index in `sample.points` of residual row i (the fit reports residuals in
/// data order; matched by pressure if it ever does not).
std::vector<int> ResidualToPoint(const FitResult& r, const Sample& sample);

/// Short names of the raised flags of one grid point, in a fixed order:
/// extrapolated, model-undefined, alpha-below-porosity, alpha-above-one,
/// alpha-below-hs-limit, k-dry-not-below-k-s.
std::vector<std::string> PointFlagNames(const bands::PointFlags& f);
/// The warning that K_dry reaches K_s inside a sample's data range (a data
/// point's K >= K_s, or a fit flagged k-dry-not-below-k-s at a grid pressure
/// that is not extrapolated), naming the points and fits; "" when neither
/// happens or the sample has no K_s. The summary and the HTML report print it.
std::string KDryAboveKsWarning(const StudySample& ss, const SampleRun& sr);
/// The statement that K_s correlates alpha errors (printed once per output).
std::string CorrelationCaveat();
/// Ids of the other samples in sample i's grain-modulus group.
std::vector<std::string> SharedWith(const Study& study, size_t i);

/// 100 * se / |estimate|, NaN where undefined.
double RelativeErrorPercent(double estimate, double se);

}  // namespace porofit::detail

#pragma once
// Volumetric-strain data in study files (column eps_v, optional sigma_eps):
// the strain units and the checks a strain series must pass. Kept apart from
// study_loader.cc so the loader only holds short hooks.
#include <optional>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/core/sample.h"

namespace porofit::io::detail {

/// Plain strain per unit: "1" and "fraction" 1, "%" 0.01, "millistrain" and
/// "mstrain" 1e-3, "microstrain", "ustrain" and "µstrain" 1e-6. nullopt if unknown.
std::optional<double> StrainUnitFactor(const std::string& unit);

/// As StrainUnitFactor, but throws InputError at `at` naming `what` and the
/// accepted units (with a did-you-mean hint).
double StrainUnitFactorOrThrow(const std::string& unit, const std::string& what, const SourceLocation& at);

/// "1, fraction, %, millistrain, mstrain, microstrain, ustrain, µstrain".
std::string StrainUnitsList();

/// Checks the strain series of a strain sample (points in file order).
/// Throws InputError at `data_at` when no eps_v is > 0 (compression-positive
/// strain grows from 0 as P rises; all-negative strain is a sign error).
/// Returns warnings, each with the location of the row it concerns, for rows
/// where eps_v decreases while P increases (taking the points in order of
/// pressure): the strain should grow with P on either branch.
std::vector<std::pair<SourceLocation, std::string>> CheckStrainSeries(const std::vector<DataPoint>& points,
                                                                       const std::string& what,
                                                                       const SourceLocation& data_at);

}  // namespace porofit::io::detail

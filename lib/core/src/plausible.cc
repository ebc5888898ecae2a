#include "porofit/core/plausible.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <utility>

#include "porofit/core/units.h"

namespace porofit::units {
namespace {

// The units a rock-test value is commonly written in by mistake, per quantity.
const std::vector<SlipUnit> kPressureSlips = {{"Pa", 1.0},          {"kPa", 1e3},         {"MPa", 1e6},
                                              {"GPa", 1e9},         {"psi", kPsi},        {"ksi", 1e3 * kPsi},
                                              {"Mpsi", 1e6 * kPsi}, {"bar", 1e5}};

// Ranges and their basis; docs/study-file.md ("Plausible ranges") repeats this table.
const PlausibleRange kRanges[] = {
    {"rock-test pressure", 0.0, 1e9, 20e6, "MPa", 1e6, kPressureSlips,
     "laboratory crack-closure tests run to a few hundred MPa; high-pressure rigs reach about 1 GPa "
     "(Brace 1965, 'Some new measurements of linear compressibility of rocks', J. Geophys. Res. 70, to 10 kbar; "
     "from memory)"},
    {"rock modulus", 1e7, 200e9, 15e9, "GPa", 1e9, kPressureSlips,
     "dry rock and mineral moduli: loose sand near 0.01 GPa at the lowest test pressures; the stiffest common "
     "rock-forming minerals below 200 GPa (pyrite K about 143-147 GPa; Mavko, Mukerji & Dvorkin 2009, "
     "'The Rock Physics Handbook', 2nd ed., mineral table; from memory)"},
    {"pore-fluid modulus", 1e4, 30e9, 2.2e9, "GPa", 1e9, kPressureSlips,
     "from a gas near atmospheric pressure (about 1e-4 GPa) to mercury (about 25 GPa); common practice"},
    {"rock wave speed", 50.0, 9000.0, 3000.0, "m/s", 1.0,
     {{"m/s", 1.0}, {"km/s", 1e3}, {"ft/s", kFoot}},
     "S waves in loose sand near 0.1 km/s; P waves of dense rock below 9 km/s (pyrite Vp about 8 km/s; "
     "Mavko, Mukerji & Dvorkin 2009, 'The Rock Physics Handbook', 2nd ed.; from memory)"},
    {"rock or fluid density", 300.0, 8000.0, 2400.0, "g/cc", 1e3,
     {{"kg/m3", 1.0}, {"g/cc", 1e3}, {"ppg", kPpg}},
     "dry diatomite and pumice near 0.4 g/cc, galena about 7.6 g/cc; common practice"},
    {"rock porosity", 0.0, 0.8, 0.15, "fraction", 1.0, {{"1", 1.0}, {"%", 0.01}},
     "a load-bearing rock stays below its critical porosity, at most about 0.8 (pumice); sandstones about 0.4 "
     "(Nur, Mavko, Dvorkin & Galmudi 1998, 'Critical porosity: a key to relating physical properties to "
     "porosity in rocks', The Leading Edge 17(3); from memory)"},
    {"volumetric strain of a rock test", 0.0, 0.2, 0.005, "fraction", 1.0,
     {{"1", 1.0}, {"%", 0.01}, {"millistrain", 1e-3}, {"microstrain", 1e-6}},
     "hydrostatic tests on rock compress a few per cent at most; 0.2 leaves room for loose sand; common practice"},
};

std::string Show(double v) {
  char buf[32];
  std::snprintf(buf, sizeof buf, "%.4g", v);
  std::string s = buf;
  // 3.2e+06 -> 3.2e6, 1e-05 -> 1e-5
  const size_t e = s.find('e');
  if (e != std::string::npos) {
    std::string mant = s.substr(0, e), exp = s.substr(e + 1);
    const bool neg = !exp.empty() && exp[0] == '-';
    if (!exp.empty() && (exp[0] == '+' || exp[0] == '-')) exp.erase(0, 1);
    while (exp.size() > 1 && exp[0] == '0') exp.erase(0, 1);
    s = mant + "e" + (neg ? "-" : "") + exp;
  }
  return s;
}

std::string Written(double written, std::string_view unit) {
  return FormatNumber(written) + (unit.empty() || unit == "1" ? "" : " " + std::string(unit));
}

std::string RangeText(const PlausibleRange& r) {
  return Show(r.lower_si / r.show_factor) + "–" + Show(r.upper_si / r.show_factor) +
         (r.show_unit == "fraction" ? "" : " " + std::string(r.show_unit));
}

// Imperial pressure units: a slip that stays within the written unit's family
// (MPa for GPa, ksi for psi) is likelier than one that changes family.
bool Imperial(double factor) {
  for (double f : {kPsi, 1e3 * kPsi, 1e6 * kPsi, kFoot, kPpg})
    if (std::fabs(factor - f) <= 1e-9 * f) return true;
  return false;
}

bool SameFactor(double a, double b) { return std::fabs(a - b) <= 1e-9 * std::max(std::fabs(a), std::fabs(b)); }

// Units (not the written one) whose value satisfies `ok`, nearest to `typical` first, at most two.
template <class Ok>
std::vector<std::string> Candidates(const PlausibleRange& r, double written, double written_factor, double typical,
                                    Ok ok) {
  std::vector<std::pair<double, std::string>> hits;
  for (const SlipUnit& u : r.slips) {
    if (SameFactor(u.si_factor, written_factor)) continue;
    const double v = written * u.si_factor;
    if (!ok(v)) continue;
    const double family = Imperial(u.si_factor) == Imperial(written_factor) ? 0.0 : 0.5;
    const double miss = std::fabs(std::log(std::max(std::fabs(v), 1e-300) / typical)) + family;
    bool dup = false;  // two spellings of one factor count once
    for (const auto& h : hits) dup = dup || h.second == u.name;
    if (!dup) hits.emplace_back(miss, std::string(u.name));
  }
  std::stable_sort(hits.begin(), hits.end(), [](const auto& a, const auto& b) { return a.first < b.first; });
  std::vector<std::string> out;
  for (size_t i = 0; i < hits.size() && i < 2; ++i) out.push_back(hits[i].second);
  return out;
}

std::string Hint(const std::vector<std::string>& units, bool column) {
  if (units.empty()) return ": check the value and its unit";
  std::string s = column ? ": is the column in " : ": is it in ";
  s += units[0];
  if (units.size() > 1) s += " (or " + units[1] + ")";
  return s + "?";
}

}  // namespace

const PlausibleRange& RangeOf(Measured m) { return kRanges[static_cast<int>(m)]; }

bool IsPlausible(Measured m, double si_value) {
  const PlausibleRange& r = RangeOf(m);
  if (!std::isfinite(si_value)) return false;
  if (std::fabs(si_value) > r.upper_si) return false;
  return si_value <= 0 || si_value >= r.lower_si;
}

std::vector<std::string> LikelyUnits(Measured m, double written, double written_factor) {
  return Candidates(RangeOf(m), written, written_factor, RangeOf(m).typical_si,
                    [m](double v) { return v != 0 && IsPlausible(m, v); });
}

std::string SlipHint(Measured m, double written, double written_factor, bool column) {
  return Hint(LikelyUnits(m, written, written_factor), column);
}

std::string ImplausibleMessage(Measured m, std::string_view label, double written, std::string_view written_unit,
                               double si_value, bool column) {
  if (IsPlausible(m, si_value)) return {};
  const PlausibleRange& r = RangeOf(m);
  const bool above = std::fabs(si_value) > r.upper_si;
  const double factor = written != 0 ? si_value / written : 1.0;
  return std::string(label) + " = " + Written(written, written_unit) + (above ? " is far above" : " is far below") +
         " any " + std::string(r.what) + " (" + RangeText(r) + ")" + SlipHint(m, written, factor, column);
}

void RequirePlausible(Measured m, std::string_view label, double written, std::string_view written_unit,
                      double si_value, bool column, const SourceLocation& at) {
  const std::string msg = ImplausibleMessage(m, label, written, written_unit, si_value, column);
  if (!msg.empty()) throw InputError(at, msg);
}

void RequirePlausibleSigma(Measured m, std::string_view label, double written, std::string_view written_unit,
                           double sigma_si, double value_si, bool column, const SourceLocation& at) {
  if (!std::isfinite(sigma_si) || sigma_si <= 0) return;  // the hard rules report these
  if (written_unit == "%") {
    if (written > 100)
      throw InputError(at, std::string(label) + " = " + Written(written, written_unit) +
                               " exceeds 100 % of the value it qualifies; a 1-sigma uncertainty larger than the "
                               "value itself is not a measurement");
    return;
  }
  // A sigma is small by nature: only its upper side is checked, against the
  // range of its quantity and (except strain, which can be 0) against its value.
  const PlausibleRange& r = RangeOf(m);
  const bool against_value = m != Measured::kStrain && std::isfinite(value_si) && value_si != 0;
  const double limit = against_value ? std::min(r.upper_si, std::fabs(value_si)) : r.upper_si;
  if (sigma_si <= limit) return;
  const double factor = written != 0 ? sigma_si / written : 1.0;
  const double typical = against_value ? 0.03 * std::fabs(value_si) : 0.01 * r.upper_si;
  const std::string hint = Hint(Candidates(r, written, factor, typical, [&](double v) { return v > 0 && v <= limit; }),
                                column);
  if (sigma_si > r.upper_si)
    throw InputError(at, std::string(label) + " = " + Written(written, written_unit) + " is far above any " +
                             std::string(r.what) + " (" + RangeText(r) + ")" + hint);
  throw InputError(at, std::string(label) + " = " + Written(written, written_unit) +
                           " exceeds the value it qualifies (" + Show(std::fabs(value_si) / r.show_factor) + " " +
                           std::string(r.show_unit) + ")" + hint);
}

}  // namespace porofit::units

#pragma once
// A reader for LAS 1.2 and 2.0 well-log files, written against the open
// standards of the Canadian Well Logging Society (LAS 1.2, 1990; LAS 2.0,
// 1992, updated 2009 and 2014), and the density profile built from one of
// its curves. docs/las.md lists what is accepted, what warns and what fails.
//
// Sections: ~V (first, required: VERS 1.2 or 2.0 and WRAP YES/NO), ~W
// (required: NULL; STRT, STOP, STEP are checked against the data), ~C
// (required, one line per column in data order; the first is the depth
// index), ~P and ~O (optional), ~A (required, last). Header lines are
// "MNEM.UNIT  DATA : DESCRIPTION" (first dot, first space after it, last
// colon). In LAS 1.2 files the ~W text items (COMP, WELL, ...) carry their
// value after the first colon; STRT/STOP/STEP/NULL carry it before, as in 2.0.
// Wrapped data put the index alone on a line. LAS 3.0 is refused.
//
// Output order: the index must be strictly monotonic; a file whose index
// decreases is reversed on reading, so every LasCurve ascends in depth
// (LasFile::reversed records it). The data govern: STRT, STOP and STEP that
// disagree with the index are warnings that give both values. NULL is
// matched to 1e-6 relative.
//
// Failure channels:
// * InputError (file, 1-based line, column where it helps, the rule broken)
//   for anything that would change a number read: no NULL, a depth index that
//   is not a length or not a number or not monotonic, rows that do not fit
//   ~C, UTF-16 text (its own message, naming the byte order), LAS 3.0.
// * LasFile::warnings for departures that change no number (UTF-8 byte-order
//   mark, STRT/STOP/STEP disagreeing with the data, a header line without
//   its colon, values LAS 1.2 writers put after the colon, ...).
// * Defects of one curve (its mnemonic appears twice in ~C; it holds
//   non-numbers such as "****" or "-1.#IND") are kept with the curve: an
//   InputError where that curve is used (UsableCurve), a warning when it is
//   not (WarningsFor).
#include <optional>
#include <string>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/depth/profile.h"

namespace porofit::depth {

struct LasHeaderItem {
  std::string mnemonic;  ///< as written, trimmed (case kept)
  std::string unit;      ///< text between the dot and the first space; may be empty
  std::string value;     ///< trimmed data field
  std::string description;
  int line = 0;          ///< 1-based
};

/// A departure from the standard that changes no number read, at its place.
struct LasWarning {
  SourceLocation where;
  std::string message;
  /// "file:line:col: warning: message" (the form of the study loader's warnings).
  std::string ToString() const;
};

/// A token of ~A that is not a number ("****", "-1.#IND0000", "1.2.3").
struct LasBadValue {
  int line = 0;    ///< 1-based
  int column = 0;  ///< 1-based
  std::string text;
};

struct LasCurve {
  LasHeaderItem header;        ///< from ~C
  /// One per data row; NULL values and non-numbers become NaN.
  std::vector<double> values;
  size_t bad_count = 0;        ///< non-numbers in this curve (an error where the curve is used)
  LasBadValue first_bad;       ///< the first of them in file order (valid when bad_count > 0)
};

struct LasFile {
  std::string path;
  std::string version;  ///< "1.2" or "2.0"
  bool wrapped = false;
  double null_value = -999.25;
  std::vector<LasHeaderItem> well;        ///< ~W in file order
  std::vector<LasHeaderItem> parameters;  ///< ~P in file order
  std::string other;                      ///< ~O text
  /// Curves in ~C order; curves[0] is the index. Index values are converted
  /// to metres (index_unit records the unit, upper case, as written in ~C or,
  /// when ~C gives none, as taken from STRT with a warning).
  std::vector<LasCurve> curves;
  std::string index_unit;
  /// 1-based ~A line of each row (of its index, when wrapped), parallel to
  /// the curves' values (so reversed with them).
  std::vector<int> row_line;
  /// File-level departures that change no number, in file order.
  std::vector<LasWarning> warnings;
  int data_line = 0;  ///< 1-based line of the ~A section header
  /// Extension: 1-based line of the ~C section header (named when a curve is missing).
  int curve_section_line = 0;
  /// Extension: true when the file's index decreased; the curves above were
  /// then reversed so that they ascend in depth.
  bool reversed = false;

  /// The first curve whose mnemonic equals `mnemonic` (case-insensitive), or nullptr.
  const LasCurve* Find(const std::string& mnemonic) const;
  /// How many curves carry that mnemonic (case-insensitive); > 1 is ambiguous.
  size_t Count(const std::string& mnemonic) const;
  /// The ~W item with that mnemonic (case-insensitive), or nullptr.
  const LasHeaderItem* FindWell(const std::string& mnemonic) const;
};

/// Parses LAS 1.2 or 2.0 text (bytes as read; a UTF-8 byte-order mark is
/// skipped with a warning); `path` is used in messages only.
LasFile ParseLas(const std::string& text, const std::string& path);
/// Reads and parses a file (InputError if it cannot be read).
LasFile ReadLas(const std::string& path);

/// The curve `mnemonic` for use in the role named by `role` (e.g. "density").
/// Throws InputError: not in ~C (at the ~C header, naming the curves and the
/// nearest mnemonic); in ~C more than once (at the second line, naming the
/// first); holding a non-number (at that value's line and column).
const LasCurve& UsableCurve(const LasFile& las, const std::string& mnemonic, const std::string& role);

/// The warnings of one use of the file that reads the curves `used`: the
/// file's own warnings, then one per curve not in `used` whose mnemonic
/// appears twice in ~C or that holds non-numbers. The index is always used.
std::vector<LasWarning> WarningsFor(const LasFile& las, const std::vector<std::string>& used);

/// kg/m^3 per unit of a density curve for the spellings found in the field
/// (G/CC, G/C3, GM/CC, GM/C3, G/CM3, GR/CC; KG/M3, K/M3; any case), 0 for
/// anything else. kDensityUnitsText names them for messages.
double LasDensityFactor(const std::string& unit);
inline constexpr const char* kDensityUnitsText = "G/CC, G/C3, GM/CC, GM/C3, G/CM3, GR/CC, KG/M3 or K/M3, any case";

/// A user trend for density where the log has no data (above its top): points
/// (depth m below datum, density kg/m^3), linear between them and constant
/// beyond the first and last. One point is a constant density.
struct DensityTrend {
  std::vector<double> depth;
  std::vector<double> density;
  std::string description;  ///< stated in notes, e.g. "2.10 g/cc constant (user trend)"
};

/// How to turn a LAS density curve into a DensityProfile.
struct DensityLogSpec {
  std::string curve = "RHOB";  ///< density mnemonic; a unit LasDensityFactor knows
  /// Depth below the table datum of the log's index zero, m: table depth =
  /// index depth (m) + index_offset. E.g. log depths from KB, table from MSL:
  /// index_offset = -air gap.
  double index_offset = 0;
  /// Optional survey to turn the index (measured depth, m, after the offset)
  /// into TVD: pairs (MD, TVD), both m below datum, MD strictly ascending, TVD
  /// non-decreasing; linear between them. Empty: the index is already TVD.
  std::vector<double> survey_md, survey_tvd;
  /// Bad-hole screen: samples where the correction curve's |value| exceeds
  /// the threshold (kg/m^3) are rejected and bridged. Curve "" : no screen.
  std::string correction_curve;  ///< e.g. "DRHO"
  double correction_limit = 0;   ///< kg/m^3, > 0 when correction_curve is set
  /// Fill from `rock_top` down to the first valid sample (required if the log
  /// starts below the rock top; InputError otherwise, naming the depths).
  std::optional<DensityTrend> fill_above;
  /// Where sediment starts, m below datum (mudline offshore, ground onshore).
  double rock_top = 0;
  /// Plausible bulk densities, kg/m^3 (0 < min < max). Valid samples outside
  /// [min, max] are counted in a warning and flagged in the profile; with
  /// `screen_implausible` they are rejected and bridged like NULLs
  /// (kOutOfRange), otherwise kept (kOutOfRangeKept; a value <= 0 is then an
  /// InputError, since no profile can hold it).
  double plausible_min = 1000.0;
  double plausible_max = 3300.0;
  bool screen_implausible = true;
};

/// Builds the density profile from rock_top to the last valid log sample:
/// fill (flagged kFilled) above the first valid sample, measured samples,
/// NULL runs and screened samples bridged linearly (kBridged / kBadHole /
/// kOutOfRange). DensityProfile::warnings holds WarningsFor(las, {curve,
/// correction curve}) and the count of implausible densities. Throws
/// InputError (file path and the curve's ~C line, or the value's line) when
/// the curve is not usable (UsableCurve), its unit is not a density unit, no
/// valid sample exists, or the fill is needed but not given.
DensityProfile BuildDensityProfile(const LasFile& las, const DensityLogSpec& spec);

/// Any curve against depth below the table datum, for pore-pressure and
/// facies curves: the index converted to metres, shifted by `index_offset` and
/// mapped through the survey (same rules as DensityLogSpec); rows where the
/// curve is NULL are dropped. Values are as written in the file, in `unit`
/// (the caller converts). Throws InputError (path, ~C line) when the curve is
/// not usable (UsableCurve) or has no valid value. `warnings` holds
/// WarningsFor(las, {mnemonic}), formatted.
struct CurveSeries {
  std::string mnemonic;
  std::string unit;            ///< as written in ~C
  std::vector<double> depth;   ///< m below datum, ascending
  std::vector<double> value;
  int line = 0;                ///< 1-based ~C line of the curve
  std::vector<std::string> warnings;  ///< "file:line:col: warning: ..." (LasWarning::ToString)
};
CurveSeries ExtractCurve(const LasFile& las, const std::string& mnemonic, double index_offset = 0,
                         const std::vector<double>& survey_md = {}, const std::vector<double>& survey_tvd = {});

}  // namespace porofit::depth

#pragma once
// A reader for LAS 2.0 well-log files, written against the open standard of
// the Canadian Well Logging Society (LAS 2.0, 1992; updated 2009 and 2014;
// rules as recalled from the standard [from memory]), and the density profile built
// from one of its curves.
//
// Sections: ~V (first, required: VERS 2.0 and WRAP YES/NO), ~W (required:
// STRT, STOP, STEP, NULL, ...), ~C (required, one line per column in data
// order; the first is the index DEPT/DEPTH), ~P and ~O (optional), ~A
// (required, last). Header lines are "MNEM.UNIT  DATA : DESCRIPTION" (first
// dot, first space after it, last colon). Wrapped data put the index alone on
// a line. Depth units M, F or FT.
//
// Output order: the index must be strictly monotonic; a file whose index
// decreases is reversed on reading, so every LasCurve ascends in depth
// (LasFile::reversed records it). STRT and STOP must agree with the first and
// last index value as written, to 1e-6 of the largest |STRT|, |STOP| (at
// least 5e-5 in file units); a regular STEP must place every index value
// within 1% of STEP of STRT + i*STEP. NULL is matched to 1e-6 relative.
//
// Failure: any violation of the standard that makes the file ambiguous throws
// porofit::InputError with the file path and the 1-based line (and column
// where it helps) and the rule broken. Tolerated departures (unknown ~W
// mnemonics, extra spaces, lower-case mnemonics) are accepted silently;
// departures that change numbers (STRT/STOP disagreeing with the data,
// an index that is not monotonic) are errors.
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

struct LasCurve {
  LasHeaderItem header;        ///< from ~C
  std::vector<double> values;  ///< one per data row; NULL values become NaN
};

struct LasFile {
  std::string path;
  std::string version;  ///< "2.0"
  bool wrapped = false;
  double null_value = -999.25;
  std::vector<LasHeaderItem> well;        ///< ~W in file order
  std::vector<LasHeaderItem> parameters;  ///< ~P in file order
  std::string other;                      ///< ~O text
  /// Curves in ~C order; curves[0] is the index. Index values are converted
  /// to metres (index_unit records the unit as written: "M", "F" or "FT").
  std::vector<LasCurve> curves;
  std::string index_unit;
  int data_line = 0;  ///< 1-based line of the ~A section header
  /// Extension: 1-based line of the ~C section header (named when a curve is missing).
  int curve_section_line = 0;
  /// Extension: true when the file's index decreased; the curves above were
  /// then reversed so that they ascend in depth.
  bool reversed = false;

  /// The curve whose mnemonic equals `mnemonic` (case-insensitive), or nullptr.
  const LasCurve* Find(const std::string& mnemonic) const;
  /// The ~W item with that mnemonic (case-insensitive), or nullptr.
  const LasHeaderItem* FindWell(const std::string& mnemonic) const;
};

/// Parses LAS 2.0 text; `path` is used in error messages only.
LasFile ParseLas(const std::string& text, const std::string& path);
/// Reads and parses a file (InputError if it cannot be read).
LasFile ReadLas(const std::string& path);

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
  std::string curve = "RHOB";  ///< density mnemonic; units G/C3, G/CC, G/CM3 or K/M3 (KG/M3)
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
};

/// Builds the density profile from rock_top to the last valid log sample:
/// fill (flagged kFilled) above the first valid sample, measured samples,
/// NULL runs and screened samples bridged linearly (kBridged / kBadHole).
/// Throws InputError (file path and the curve's ~C line) when the curve is
/// missing, its unit is not a density unit, no valid sample exists, or the
/// fill is needed but not given.
DensityProfile BuildDensityProfile(const LasFile& las, const DensityLogSpec& spec);

/// Any curve against depth below the table datum, for pore-pressure and
/// facies curves: the index converted to metres, shifted by `index_offset` and
/// mapped through the survey (same rules as DensityLogSpec); rows where the
/// curve is NULL are dropped. Values are as written in the file, in `unit`
/// (the caller converts). Throws InputError (path, ~C line) when the curve is
/// missing or has no valid value.
struct CurveSeries {
  std::string mnemonic;
  std::string unit;            ///< as written in ~C
  std::vector<double> depth;   ///< m below datum, ascending
  std::vector<double> value;
  int line = 0;                ///< 1-based ~C line of the curve
};
CurveSeries ExtractCurve(const LasFile& las, const std::string& mnemonic, double index_offset = 0,
                         const std::vector<double>& survey_md = {}, const std::vector<double>& survey_tvd = {});

}  // namespace porofit::depth

#pragma once
// Lab CSV files as they are written (private to the io layer): the dialect
// keys of a study (`delimiter`, `decimal`) and the mapping of a file's own
// header names onto porofit's column roles, with units taken from the header
// ("name_UNIT", "name (UNIT)", "name [UNIT]", "name UNIT") or from the study.
// One path for every CSV the study loader reads (data.file and the two
// sample_table files). Rules: docs/study-file.md, "CSV files".
#include <functional>
#include <string>

#include "porofit/io/csv.h"
#include "yaml_map.h"

namespace porofit::io::detail {

/// The reader options a study gives for its CSV files: `delimiter` (auto,
/// comma, semicolon, tab) and `decimal` (auto, point, comma); absent keys mean
/// auto. Throws InputError at the value for an unknown word, and at `decimal`
/// for a decimal comma with a comma delimiter.
csv::ReadOptions ReadDialectKeys(const Field& delimiter, const Field& decimal);

/// One entry of a study's column map (`role: header name` or
/// `role: {column: header name, unit: U}`): the header name and the unit, if
/// given. Throws InputError for an empty name, an unknown key or an empty unit.
struct MappedName {
  std::string header, unit;
  SourceLocation at;       ///< the header name in the study
  SourceLocation unit_at;  ///< the unit in the study (if given)
};
MappedName ReadMappedName(const Field& entry, const std::string& file);

/// A column the study asks a file for.
struct ColumnWish {
  std::string role;    ///< porofit's name for it (P_c, K, ...), for messages
  std::string header;  ///< the file's header name to find (the role name unless mapped)
  std::string unit;    ///< unit given in the study, or "" to take the header's
  SourceLocation at;   ///< where the study names the column
  /// Whether a text is a unit of this column (for the "name_UNIT" header form).
  std::function<bool(const std::string&)> accepts;
};

/// Where a wished-for column is in the file.
struct FoundColumn {
  int index = -1;           ///< header field; -1 if no field names it
  std::string header_unit;  ///< unit written in the header, or ""
  SourceLocation at;        ///< the header cell
  explicit operator bool() const { return index >= 0; }
};

/// Finds the header field that names `wish.header`: the whole field equals it
/// (its unit then comes from a bracketed group or an accepted "_UNIT" suffix),
/// or the name part of "name [U]", "name (U)", "name_U" (U accepted) or
/// "name U" does. Throws InputError at the second field if two name it.
FoundColumn FindColumn(const csv::Table& table, const ColumnWish& wish);

/// The unit of a found column: the study's or the header's; when both give
/// one they must agree (`same(study_unit, header_unit)`). Throws InputError at
/// the header cell on a conflict, and when neither gives a unit (naming the
/// column and both ways to give it).
std::string ColumnUnit(const FoundColumn& found, const ColumnWish& wish,
                       const std::function<bool(const std::string&, const std::string&)>& same);

/// The error for a mapped column no header field names: at `wish.at`, naming
/// the file and listing its header fields (with the nearest as a hint).
[[noreturn]] void ThrowColumnNotInHeader(const csv::Table& table, const ColumnWish& wish,
                                         const std::string& file_name);

}  // namespace porofit::io::detail

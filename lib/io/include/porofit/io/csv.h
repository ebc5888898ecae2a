#pragma once
// A small reader for comma-separated data tables, with line numbers.
//
// Accepted input (RFC 4180 plus the habits of lab spreadsheets):
//   - fields separated by `delimiter` (default ','); surrounding spaces and
//     tabs of unquoted fields are trimmed;
//   - double-quoted fields, with "" for a literal quote; a quoted field may
//     contain the delimiter, '#' and line breaks;
//   - a line whose first non-blank character is `comment` (default '#') is a
//     comment; blank lines are skipped; '#' inside a data line is data;
//   - LF or CRLF line ends; a UTF-8 byte-order mark at the start is ignored.
// The first non-comment, non-blank line is the header when `has_header`.
//
// Failure modes: a file that cannot be opened and an unterminated quote throw
// porofit::InputError (the latter located at the line where the quote opened).
// Field counts and cell contents are the caller's to check, with the line and
// column numbers kept here.
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"

namespace porofit::csv {

struct ReadOptions {
  char delimiter = ',';
  char comment = '#';
  bool has_header = true;
};

struct Row {
  int line = 0;                     ///< one-based line where the row starts
  std::vector<std::string> fields;  ///< unquoted, trimmed
  std::vector<int> columns;         ///< one-based character column where each field starts
  /// Location of field `i` (file:line:col); i out of range gives file:line.
  SourceLocation Where(const std::string& file, size_t i) const;
};

struct Table {
  std::string file;  ///< as given to the reader, used in locations
  bool has_header = false;
  Row header;             ///< valid if has_header
  std::vector<Row> rows;  ///< data rows in file order

  /// Index of the header field equal to `name`, or -1.
  int ColumnIndex(std::string_view name) const;
};

/// Parses CSV text; `file` is used only in error locations.
Table ParseCsv(std::string_view text, const std::string& file, const ReadOptions& options = {});

/// Reads and parses a file. Throws InputError (location `file`) if it cannot be read.
Table ReadCsvFile(const std::string& file, const ReadOptions& options = {});

/// Parses a whole cell as a finite or non-finite double ("1.5", "-2e3", "+4");
/// returns false for anything else, including empty text and trailing junk.
bool ParseNumber(std::string_view text, double& value);

}  // namespace porofit::csv

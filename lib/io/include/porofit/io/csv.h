#pragma once
// A small reader for delimited data tables as laboratories write them, with
// line and column numbers.
//
// Accepted input (RFC 4180 plus the habits of lab spreadsheets):
//   - fields separated by `delimiter`: ',', ';' or tab, or detected from the
//     header line (kDetect; see DetectDelimiter); surrounding blanks of
//     unquoted fields are trimmed (spaces, and tabs unless tab is the delimiter);
//   - double-quoted fields, with "" for a literal quote; a quoted field may
//     contain the delimiter, '#' and line breaks;
//   - a line whose first non-blank character is `comment` (default '#') is a
//     comment; blank lines, and lines made only of delimiters and blanks (the
//     empty rows spreadsheets write), are skipped; '#' inside a data line is data;
//   - LF or CRLF line ends; a UTF-8 byte-order mark at the start is ignored
//     (columns are counted in bytes after it);
//   - a decimal mark '.' or ',' for numeric cells (ParseNumber), declared or
//     detected from the data cells (kDetect; see DetectDecimal). A ',' decimal
//     mark needs a ';' or tab delimiter: a comma-delimited file is never read
//     with decimal commas.
// The first non-comment, non-blank line is the header when `has_header`.
//
// Failure modes (porofit::InputError, located in the file): a file that cannot
// be opened; an unterminated quote (at the line where the quote opened); text
// after a closing quote; a header line with more than one kind of delimiter
// when detecting; data cells with both decimal marks when detecting (at the
// second kind's cell); a ',' decimal mark with a ',' delimiter. Field counts
// and cell contents are the caller's to check, with the line and column
// numbers kept here.
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"

namespace porofit::csv {

/// ReadOptions::delimiter or ::decimal: find it from the text.
inline constexpr char kDetect = '\0';

struct ReadOptions {
  char delimiter = ',';  ///< ',', ';', '\t' or kDetect
  char decimal = '.';    ///< '.', ',' or kDetect
  char comment = '#';
  bool has_header = true;
};

/// How a table was written: what the reader used, and whether it detected it.
struct Dialect {
  char delimiter = ',';
  char decimal = '.';
  bool delimiter_detected = false;
  bool decimal_detected = false;
};

/// "comma", "semicolon", "tab", "point": a mark's name for messages.
std::string MarkName(char mark);

struct Row {
  int line = 0;                     ///< one-based line where the row starts
  std::vector<std::string> fields;  ///< unquoted, trimmed
  std::vector<int> columns;         ///< one-based byte column where each field starts
  char decimal = '.';               ///< decimal mark of the file (for ParseNumber)
  /// Location of field `i` (file:line:col); i out of range gives file:line.
  SourceLocation Where(const std::string& file, size_t i) const;
};

struct Table {
  std::string file;  ///< as given to the reader, used in locations
  Dialect dialect;
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

/// Parses a whole cell as a finite or non-finite double ("1.5", "-2e3", "+4")
/// written with the decimal mark `decimal` ('.' or ','); returns false for
/// anything else, including empty text, trailing junk and the other decimal mark.
bool ParseNumber(std::string_view text, double& value, char decimal = '.');

/// "" or, for a cell written with the other decimal mark than `decimal`, a
/// note for messages ("; the decimal mark of this file is a comma").
std::string DecimalHint(std::string_view text, char decimal);

/// The decimal mark a cell is written with: '.' or ',' for a number with one
/// of them ("12.5", "-0,3e2"), '\0' for anything else (integers, text).
char DecimalMarkOf(std::string_view text);

/// A header field split into a name and the unit written with it:
/// "name [UNIT]" and "name (UNIT)" (a bracketed group ending the field), or
/// "name UNIT" (at the first blank). No unit: the whole field is the name.
struct HeaderField {
  std::string name, unit;
};
HeaderField SplitHeaderField(std::string_view field);

}  // namespace porofit::csv

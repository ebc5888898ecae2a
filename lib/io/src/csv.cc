#include "porofit/io/csv.h"

#include <charconv>
#include <fstream>
#include <sstream>

#include "porofit/core/input_file.h"

namespace porofit::csv {
namespace {

bool IsBlank(char c) { return c == ' ' || c == '\t'; }

std::string_view Trim(std::string_view s) {
  while (!s.empty() && IsBlank(s.front())) s.remove_prefix(1);
  while (!s.empty() && IsBlank(s.back())) s.remove_suffix(1);
  return s;
}

}  // namespace

SourceLocation Row::Where(const std::string& file, size_t i) const {
  SourceLocation loc{file, line, 0};
  if (i < columns.size()) loc.column = columns[i];
  return loc;
}

int Table::ColumnIndex(std::string_view name) const {
  for (size_t i = 0; i < header.fields.size(); ++i)
    if (header.fields[i] == name) return static_cast<int>(i);
  return -1;
}

Table ParseCsv(std::string_view text, const std::string& file, const ReadOptions& options) {
  if (text.substr(0, 3) == "\xEF\xBB\xBF") text.remove_prefix(3);
  Table table;
  table.file = file;
  bool need_header = options.has_header;

  size_t pos = 0;
  int line = 1;
  while (pos < text.size()) {
    // Find where this physical line ends to decide whether it is blank or a comment.
    size_t eol = text.find('\n', pos);
    if (eol == std::string_view::npos) eol = text.size();
    std::string_view physical = text.substr(pos, eol - pos);
    if (!physical.empty() && physical.back() == '\r') physical.remove_suffix(1);
    const std::string_view trimmed = Trim(physical);
    if (trimmed.empty() || trimmed.front() == options.comment) {
      pos = eol + 1;
      ++line;
      continue;
    }

    // Parse one record, which may span lines inside quotes.
    Row row;
    row.line = line;
    size_t line_start = pos;
    bool record_done = false;
    while (!record_done) {
      // Skip leading blanks of the field.
      while (pos < text.size() && IsBlank(text[pos])) ++pos;
      row.columns.push_back(static_cast<int>(pos - line_start) + 1);
      std::string field;
      if (pos < text.size() && text[pos] == '"') {
        const int quote_line = line;
        const int quote_col = static_cast<int>(pos - line_start) + 1;
        ++pos;
        bool closed = false;
        while (pos < text.size()) {
          const char c = text[pos];
          if (c == '"') {
            if (pos + 1 < text.size() && text[pos + 1] == '"') {
              field += '"';
              pos += 2;
              continue;
            }
            ++pos;
            closed = true;
            break;
          }
          if (c == '\n') {
            ++line;
            line_start = pos + 1;
          }
          field += c;
          ++pos;
        }
        if (!closed)
          throw InputError({file, quote_line, quote_col}, "unterminated quoted field");
        // Only blanks may follow the closing quote before the delimiter.
        while (pos < text.size() && IsBlank(text[pos])) ++pos;
        if (pos < text.size() && text[pos] != options.delimiter && text[pos] != '\n' &&
            text[pos] != '\r')
          throw InputError({file, line, static_cast<int>(pos - line_start) + 1},
                           "unexpected text after a closing quote");
      } else {
        const size_t start = pos;
        while (pos < text.size() && text[pos] != options.delimiter && text[pos] != '\n') ++pos;
        std::string_view raw = text.substr(start, pos - start);
        if (!raw.empty() && raw.back() == '\r' && (pos >= text.size() || text[pos] == '\n'))
          raw.remove_suffix(1);
        field = std::string(Trim(raw));
      }
      row.fields.push_back(std::move(field));
      if (pos < text.size() && text[pos] == options.delimiter) {
        ++pos;
        continue;
      }
      // End of record: consume an optional CR and the LF.
      if (pos < text.size() && text[pos] == '\r') ++pos;
      if (pos < text.size() && text[pos] == '\n') ++pos;
      ++line;
      record_done = true;
    }
    if (need_header) {
      table.header = std::move(row);
      table.has_header = true;
      need_header = false;
    } else {
      table.rows.push_back(std::move(row));
    }
  }
  return table;
}

Table ReadCsvFile(const std::string& file, const ReadOptions& options) {
  return ParseCsv(ReadInputFile({file, "data file", "", {}, kMaxTableFileBytes}), file, options);
}

bool ParseNumber(std::string_view text, double& value) {
  if (!text.empty() && text.front() == '+') text.remove_prefix(1);
  if (text.empty() || text.front() == '+') return false;
  const char* first = text.data();
  const char* last = text.data() + text.size();
  auto [ptr, ec] = std::from_chars(first, last, value, std::chars_format::general);
  return ec == std::errc() && ptr == last;
}

}  // namespace porofit::csv

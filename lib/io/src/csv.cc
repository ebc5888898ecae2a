#include "porofit/io/csv.h"

#include <array>
#include <charconv>
#include <fstream>
#include <sstream>

#include "porofit/core/input_file.h"

namespace porofit::csv {
namespace {

// Blanks trimmed around unquoted fields: spaces, and tabs unless they delimit.
struct Blanks {
  char delimiter;
  bool operator()(char c) const { return c == ' ' || (c == '\t' && delimiter != '\t'); }
};

std::string_view Trim(std::string_view s, Blanks blank) {
  while (!s.empty() && blank(s.front())) s.remove_prefix(1);
  while (!s.empty() && blank(s.back())) s.remove_suffix(1);
  return s;
}

std::string_view Trim(std::string_view s) { return Trim(s, Blanks{'\0'}); }

// One physical line [begin, end) without its line end, and where the next starts.
struct Line {
  size_t begin = 0, end = 0, next = 0;
};

Line LineAt(std::string_view text, size_t pos) {
  Line l;
  l.begin = pos;
  l.end = text.find('\n', pos);
  if (l.end == std::string_view::npos) l.end = text.size();
  l.next = l.end + 1;
  if (l.end > l.begin && text[l.end - 1] == '\r') --l.end;
  return l;
}

// A line that holds no record: blank, a comment, or only delimiters and blanks.
bool Skipped(std::string_view physical, const ReadOptions& o, std::string_view delimiters) {
  const std::string_view t = Trim(physical);
  if (!t.empty() && t.front() == o.comment) return true;
  for (char c : t)
    if (c != ' ' && c != '\t' && delimiters.find(c) == std::string_view::npos) return false;
  return true;
}

// The delimiter of the first record line: the one kind of ',', ';' or tab
// found outside quotes (',' if none: a one-column table).
char DetectDelimiter(std::string_view text, const ReadOptions& o, const std::string& file) {
  size_t pos = 0;
  int line = 1;
  while (pos < text.size()) {
    const Line l = LineAt(text, pos);
    const std::string_view physical = text.substr(l.begin, l.end - l.begin);
    if (Skipped(physical, o, ",;")) {
      pos = l.next;
      ++line;
      continue;
    }
    constexpr std::array<char, 3> kinds = {',', ';', '\t'};
    std::array<int, 3> count{}, first{};
    bool quoted = false;
    for (size_t i = 0; i < physical.size(); ++i) {
      if (physical[i] == '"') quoted = !quoted;
      for (size_t k = 0; k < kinds.size() && !quoted; ++k)
        if (physical[i] == kinds[k] && count[k]++ == 0) first[k] = static_cast<int>(i) + 1;
    }
    // The kind met first on the line, and the one met next (if any).
    int first_kind = -1, second_kind = -1;
    for (int k = 0; k < static_cast<int>(kinds.size()); ++k) {
      if (count[static_cast<size_t>(k)] == 0) continue;
      if (first_kind < 0 || first[static_cast<size_t>(k)] < first[static_cast<size_t>(first_kind)]) {
        second_kind = first_kind;
        first_kind = k;
      } else if (second_kind < 0 || first[static_cast<size_t>(k)] < first[static_cast<size_t>(second_kind)]) {
        second_kind = k;
      }
    }
    if (second_kind >= 0) {
      const auto a = static_cast<size_t>(first_kind), b = static_cast<size_t>(second_kind);
      throw InputError({file, line, first[b]}, "ambiguous delimiter: the header line holds both " +
                                                   MarkName(kinds[a]) + "s (" + std::to_string(count[a]) + ") and " +
                                                   MarkName(kinds[b]) + "s (" + std::to_string(count[b]) +
                                                   "); declare the delimiter in the study");
    }
    return first_kind < 0 ? ',' : kinds[static_cast<size_t>(first_kind)];
  }
  return ',';
}

// Reads one (possibly quoted) field starting at `pos`; leaves `pos` after it.
// `line` and `line_start` follow line breaks inside quotes.
std::string ReadField(std::string_view text, size_t& pos, int& line, size_t& line_start, char delimiter,
                      const std::string& file) {
  const Blanks blank{delimiter};
  if (pos >= text.size() || text[pos] != '"') {
    const size_t start = pos;
    while (pos < text.size() && text[pos] != delimiter && text[pos] != '\n') ++pos;
    std::string_view raw = text.substr(start, pos - start);
    if (!raw.empty() && raw.back() == '\r') raw.remove_suffix(1);
    return std::string(Trim(raw, blank));
  }
  const int quote_line = line;
  const int quote_col = static_cast<int>(pos - line_start) + 1;
  ++pos;
  std::string field;
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
  if (!closed) throw InputError({file, quote_line, quote_col}, "unterminated quoted field");
  // Only blanks may follow the closing quote before the delimiter.
  while (pos < text.size() && blank(text[pos])) ++pos;
  if (pos < text.size() && text[pos] != delimiter && text[pos] != '\n' && text[pos] != '\r')
    throw InputError({file, line, static_cast<int>(pos - line_start) + 1}, "unexpected text after a closing quote");
  return field;
}

// Reads one record (which may span lines inside quotes) starting at `pos`.
Row ReadRecord(std::string_view text, size_t& pos, int& line, char delimiter, const std::string& file) {
  const Blanks blank{delimiter};
  Row row;
  row.line = line;
  size_t line_start = pos;
  while (true) {
    while (pos < text.size() && blank(text[pos])) ++pos;
    row.columns.push_back(static_cast<int>(pos - line_start) + 1);
    row.fields.push_back(ReadField(text, pos, line, line_start, delimiter, file));
    if (pos < text.size() && text[pos] == delimiter) {
      ++pos;
      continue;
    }
    // End of record: consume an optional CR and the LF.
    if (pos < text.size() && text[pos] == '\r') ++pos;
    if (pos < text.size() && text[pos] == '\n') ++pos;
    ++line;
    return row;
  }
}

// The decimal mark of the data cells: ',' if some cell is written with a
// decimal comma, '.' otherwise; both kinds in one file is an error.
char DetectDecimal(const Table& t) {
  const Row* seen_row = nullptr;
  size_t seen_field = 0;
  char seen = '\0';
  for (const Row& row : t.rows)
    for (size_t i = 0; i < row.fields.size(); ++i) {
      const char mark = DecimalMarkOf(row.fields[i]);
      if (mark == '\0') continue;
      if (seen == '\0') {
        seen = mark;
        seen_row = &row;
        seen_field = i;
      } else if (mark != seen) {
        throw InputError(row.Where(t.file, i),
                         "mixed decimal marks: '" + row.fields[i] + "' is written with a " + MarkName(mark) +
                             " but '" + seen_row->fields[seen_field] + "' (line " + std::to_string(seen_row->line) +
                             ") with a " + MarkName(seen) + "; declare the decimal mark in the study");
      }
    }
  return seen == ',' ? ',' : '.';
}

}  // namespace

std::string MarkName(char mark) {
  switch (mark) {
    case ',': return "comma";
    case ';': return "semicolon";
    case '\t': return "tab";
    case '.': return "point";
    default: return std::string("'") + mark + "'";
  }
}

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
  Dialect& d = table.dialect;
  d.delimiter_detected = options.delimiter == kDetect;
  d.delimiter = d.delimiter_detected ? DetectDelimiter(text, options, file) : options.delimiter;
  bool need_header = options.has_header;
  size_t pos = 0;
  int line = 1;
  while (pos < text.size()) {
    const Line l = LineAt(text, pos);
    if (Skipped(text.substr(l.begin, l.end - l.begin), options, std::string_view(&d.delimiter, 1))) {
      pos = l.next;
      ++line;
      continue;
    }
    Row row = ReadRecord(text, pos, line, d.delimiter, file);
    if (need_header) {
      table.header = std::move(row);
      table.has_header = true;
      need_header = false;
    } else {
      table.rows.push_back(std::move(row));
    }
  }
  d.decimal_detected = options.decimal == kDetect;
  if (d.decimal_detected) d.decimal = d.delimiter == ',' ? '.' : DetectDecimal(table);
  else d.decimal = options.decimal;
  if (d.decimal == ',' && d.delimiter == ',')
    throw InputError({file, table.has_header ? table.header.line : 1, 0},
                     "the decimal mark is a comma but the fields are separated by commas; a file with decimal "
                     "commas separates its fields with semicolons or tabs");
  table.header.decimal = d.decimal;
  for (Row& r : table.rows) r.decimal = d.decimal;
  return table;
}

Table ReadCsvFile(const std::string& file, const ReadOptions& options) {
  return ParseCsv(ReadInputFile({file, "data file", "", {}, kMaxTableFileBytes}), file, options);
}

bool ParseNumber(std::string_view text, double& value, char decimal) {
  std::string swapped;
  if (decimal == ',') {
    if (text.find('.') != std::string_view::npos) return false;
    const size_t comma = text.find(',');
    if (comma != std::string_view::npos) {
      if (text.find(',', comma + 1) != std::string_view::npos) return false;
      swapped = std::string(text);
      swapped[comma] = '.';
      text = swapped;
    }
  } else if (text.find(',') != std::string_view::npos) {
    return false;
  }
  if (!text.empty() && text.front() == '+') text.remove_prefix(1);
  if (text.empty() || text.front() == '+') return false;
  const char* first = text.data();
  const char* last = text.data() + text.size();
  auto [ptr, ec] = std::from_chars(first, last, value, std::chars_format::general);
  return ec == std::errc() && ptr == last;
}

char DecimalMarkOf(std::string_view text) {
  const size_t comma = text.find(','), point = text.find('.');
  if ((comma == std::string_view::npos) == (point == std::string_view::npos)) return '\0';
  const char mark = comma != std::string_view::npos ? ',' : '.';
  double v = 0;
  return ParseNumber(text, v, mark) ? mark : '\0';
}

std::string DecimalHint(std::string_view text, char decimal) {
  const char mark = DecimalMarkOf(text);
  if (mark == '\0' || mark == decimal) return "";
  return "; the decimal mark of this file is a " + MarkName(decimal);
}

HeaderField SplitHeaderField(std::string_view field) {
  field = Trim(field);
  if (!field.empty() && (field.back() == ')' || field.back() == ']')) {
    const char open = field.back() == ')' ? '(' : '[';
    const size_t at = field.rfind(open);
    if (at != std::string_view::npos && at > 0)
      return {std::string(Trim(field.substr(0, at))),
              std::string(Trim(field.substr(at + 1, field.size() - at - 2)))};
  }
  const size_t blank = field.find_first_of(" \t");
  if (blank == std::string_view::npos) return {std::string(field), ""};
  return {std::string(field.substr(0, blank)), std::string(Trim(field.substr(blank)))};
}

}  // namespace porofit::csv

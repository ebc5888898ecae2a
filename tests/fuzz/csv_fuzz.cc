// libFuzzer harness for the CSV reader (porofit/io/csv.h).
//
// The first input byte chooses the read options (delimiter ',', ';', tab or
// space; header or not; comment '#' or ';'); the rest is the file text. Every
// cell is also handed to ParseNumber and every row's Where(). Expected
// outcomes: a Table, or porofit::InputError. The documented shape (one
// column per field, rows in line order, header first) is checked; a
// violation traps, as does any other exception, crash, leak or UB.
#include <cstddef>
#include <cstdint>
#include <string_view>

#include "porofit/core/error.h"
#include "porofit/io/csv.h"

namespace {

porofit::csv::ReadOptions OptionsFrom(uint8_t byte) {
  static constexpr char kDelimiters[] = {',', ';', '\t', ' '};
  porofit::csv::ReadOptions options;
  options.delimiter = kDelimiters[byte & 3];
  options.has_header = (byte & 4) == 0;
  options.comment = (byte & 8) == 0 ? '#' : ';';
  return options;
}

void CheckRow(const porofit::csv::Row& row, int previous_line) {
  if (row.fields.size() != row.columns.size() || row.line <= previous_line) __builtin_trap();
  for (size_t i = 0; i < row.fields.size(); ++i) {
    double value = 0;
    (void)porofit::csv::ParseNumber(row.fields[i], value);
    (void)row.Where("fuzz.csv", i);
  }
  (void)row.Where("fuzz.csv", row.fields.size());
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  if (size == 0) return 0;
  const std::string_view text(reinterpret_cast<const char*>(data) + 1, size - 1);
  try {
    const porofit::csv::Table table = porofit::csv::ParseCsv(text, "fuzz.csv", OptionsFrom(data[0]));
    int line = 0;
    if (table.has_header) {
      CheckRow(table.header, line);
      line = table.header.line;
      if (!table.header.fields.empty()) (void)table.ColumnIndex(table.header.fields.back());
    }
    for (const porofit::csv::Row& row : table.rows) {
      CheckRow(row, line);
      line = row.line;
    }
  } catch (const porofit::InputError&) {
    // The expected way to reject bad input.
  }
  return 0;
}

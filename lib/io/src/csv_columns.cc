#include "csv_columns.h"

#include <vector>

namespace porofit::io::detail {
namespace {

std::string Quote(const std::string& s) { return "'" + s + "'"; }

// The unit a header field carries by itself: a bracketed group ending it, or a
// "_UNIT" suffix the column accepts.
std::string OwnUnit(const std::string& field, const ColumnWish& wish) {
  const std::string_view text(field);
  if (!text.empty() && (text.back() == ')' || text.back() == ']')) {
    const csv::HeaderField h = csv::SplitHeaderField(field);
    if (h.name != field) return h.unit;
  }
  const size_t cut = field.rfind('_');
  if (cut != std::string::npos && cut + 1 < field.size() && wish.accepts && wish.accepts(field.substr(cut + 1)))
    return field.substr(cut + 1);
  return "";
}

// Whether `field` names `wish.header`; sets `unit` to the unit written with it.
bool Names(const std::string& field, const ColumnWish& wish, std::string& unit) {
  if (field == wish.header) {
    unit = OwnUnit(field, wish);
    return true;
  }
  const csv::HeaderField h = csv::SplitHeaderField(field);
  if (h.name == wish.header && !h.unit.empty()) {
    unit = h.unit;
    return true;
  }
  const std::string prefix = wish.header + "_";
  if (field.size() > prefix.size() && field.compare(0, prefix.size(), prefix) == 0 && wish.accepts &&
      wish.accepts(field.substr(prefix.size()))) {
    unit = field.substr(prefix.size());
    return true;
  }
  return false;
}

}  // namespace

csv::ReadOptions ReadDialectKeys(const Field& delimiter, const Field& decimal) {
  csv::ReadOptions o;
  o.delimiter = csv::kDetect;
  o.decimal = csv::kDetect;
  if (delimiter)
    o.delimiter = ParseChoice<char>(delimiter, {{"auto", csv::kDetect},
                                                {"comma", ','},
                                                {"semicolon", ';'},
                                                {"tab", '\t'},
                                                {",", ','},
                                                {";", ';'}});
  if (decimal)
    o.decimal = ParseChoice<char>(decimal, {{"auto", csv::kDetect}, {"point", '.'}, {"comma", ','}, {".", '.'}, {",", ','}});
  if (o.decimal == ',' && o.delimiter == ',')
    throw InputError(decimal.at, "'" + decimal.path + "' = comma needs a semicolon or tab delimiter: a file with "
                                 "decimal commas cannot also separate its fields with commas");
  return o;
}

MappedName ReadMappedName(const Field& entry, const std::string& file) {
  MappedName n;
  n.at = entry.at;
  if (entry.node.IsMap()) {
    MapReader m(entry.node, file, "column " + Quote(entry.key), entry.path);
    Field column = m.Get("column"), unit = m.Get("unit");
    m.Finish();
    if (!column) throw InputError(m.at(), "missing required key '" + entry.path + ".column' (the file's header name)");
    n.header = column.Scalar();
    n.at = column.at;
    if (unit) {
      n.unit = unit.Scalar();
      n.unit_at = unit.at;
      if (n.unit.empty()) throw InputError(unit.at, Quote(unit.path) + " must not be empty");
    }
  } else {
    n.header = entry.Scalar();
  }
  if (n.header.empty()) throw InputError(n.at, "the header name of column " + Quote(entry.key) + " must not be empty");
  return n;
}

FoundColumn FindColumn(const csv::Table& table, const ColumnWish& wish) {
  FoundColumn found;
  for (size_t i = 0; i < table.header.fields.size(); ++i) {
    std::string unit;
    if (!Names(table.header.fields[i], wish, unit)) continue;
    const SourceLocation at = table.header.Where(table.file, i);
    if (found)
      throw InputError(at, "header fields " + Quote(table.header.fields[static_cast<size_t>(found.index)]) + " and " +
                               Quote(table.header.fields[i]) + " both name column " + Quote(wish.header) + " (" +
                               wish.role + ")");
    found.index = static_cast<int>(i);
    found.header_unit = unit;
    found.at = at;
  }
  return found;
}

std::string ColumnUnit(const FoundColumn& found, const ColumnWish& wish,
                       const std::function<bool(const std::string&, const std::string&)>& same) {
  const std::string& field = wish.header;
  if (!wish.unit.empty() && !found.header_unit.empty() && wish.unit != found.header_unit &&
      !same(wish.unit, found.header_unit))
    throw InputError(found.at, "header mismatch: column " + Quote(field) + " is declared in " + wish.unit +
                                   " but the file header says " + found.header_unit);
  if (!wish.unit.empty()) return wish.unit;
  if (!found.header_unit.empty()) return found.header_unit;
  const std::string named = Quote(field) + (field == wish.role ? "" : " (" + wish.role + ")");
  throw InputError(found.at, "column " + named + " needs a unit: write it in the header (" + Quote(field + " [unit]") +
                                 ") or in the study (" + wish.role + ": {column: " + field + ", unit: ...})");
}

void ThrowColumnNotInHeader(const csv::Table& table, const ColumnWish& wish, const std::string& file_name) {
  std::vector<std::string> names;
  std::string listed;
  for (const std::string& f : table.header.fields) {
    names.push_back(f);
    listed += (listed.empty() ? "" : ", ") + Quote(f);
  }
  std::string msg = "column " + Quote(wish.header) + " (mapped to " + wish.role + ") is not in the header of " +
                    Quote(file_name) + " (header: " + listed + ")";
  const std::string near = NearestWord(wish.header, names);
  if (!near.empty()) msg += "; did you mean " + Quote(near) + "?";
  throw InputError(wish.at, msg);
}

}  // namespace porofit::io::detail

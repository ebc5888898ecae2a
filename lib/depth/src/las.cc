// LAS 1.2 / 2.0 reader (CWLS LAS 1.2 and 2.0 standards; docs/las.md).
//
// Stages: the bytes are checked for their encoding (UTF-16 refused, a UTF-8
// byte-order mark skipped), split into lines, and read in one pass: section
// lines switch state, header lines are split by the first dot / first space
// after it / last colon rule, ~A rows are tokenised. The checks across
// sections (NULL, the index curve) run when ~A starts; the index and the ~W
// range (STRT, STOP, STEP) are checked after the data. The data govern: ~W
// values that disagree with them are warnings.
#include <algorithm>
#include <fstream>
#include <limits>
#include <map>
#include <optional>
#include <sstream>

#include "las_internal.h"
#include "porofit/depth/las.h"

#include "porofit/core/input_file.h"

namespace porofit::depth {
namespace {

using las_detail::IsSpace;
using las_detail::LengthFactor;
using las_detail::ParseNumber;
using las_detail::Trim;
using las_detail::Upper;

struct Token {
  std::string text;
  int column = 0;  // 1-based
};

std::vector<Token> Tokens(const std::string& line) {
  std::vector<Token> out;
  size_t i = 0;
  while (i < line.size()) {
    while (i < line.size() && IsSpace(line[i])) ++i;
    if (i >= line.size()) break;
    const size_t start = i;
    while (i < line.size() && !IsSpace(line[i])) ++i;
    out.push_back({line.substr(start, i - start), static_cast<int>(start) + 1});
  }
  return out;
}

// UTF-16 in either byte order, with or without its byte-order mark: "~V" is
// '~' 0 'V' 0 (little-endian) or 0 '~' 0 'V' (big-endian).
std::string Utf16Order(const std::string& t) {
  auto byte = [&](size_t i) { return static_cast<unsigned char>(t[i]); };
  if (t.size() >= 2 && byte(0) == 0xFF && byte(1) == 0xFE) return "little-endian";
  if (t.size() >= 2 && byte(0) == 0xFE && byte(1) == 0xFF) return "big-endian";
  if (t.size() >= 4 && byte(0) != 0 && byte(1) == 0 && byte(2) != 0 && byte(3) == 0) return "little-endian";
  if (t.size() >= 4 && byte(0) == 0 && byte(1) != 0 && byte(2) == 0 && byte(3) != 0) return "big-endian";
  return {};
}

// The text to parse: UTF-16 refused with its own message, a UTF-8 BOM skipped.
std::string CheckEncoding(const std::string& text, const std::string& path, std::vector<LasWarning>& warnings) {
  const std::string order = Utf16Order(text);
  if (!order.empty()) {
    const std::string code = order == "little-endian" ? "UTF-16LE" : "UTF-16BE";
    throw InputError({path, 1, 1}, "the file is UTF-16 text (" + order +
                                       "); LAS files are read as ASCII or UTF-8. Convert it first, e.g. "
                                       "'iconv -f " + code + " -t UTF-8 in.las > out.las'");
  }
  if (text.rfind("\xEF\xBB\xBF", 0) == 0) {
    warnings.push_back(las_detail::MakeWarning(path, 1, 1, "UTF-8 byte-order mark at the start of the file skipped"));
    return text.substr(3);
  }
  return text;
}

// LF, CRLF and lone CR line ends.
std::vector<std::string> SplitLines(const std::string& text) {
  std::vector<std::string> lines;
  std::string cur;
  for (size_t i = 0; i < text.size(); ++i) {
    const char c = text[i];
    if (c == '\n' || c == '\r') {
      lines.push_back(cur);
      cur.clear();
      if (c == '\r' && i + 1 < text.size() && text[i + 1] == '\n') ++i;
    } else {
      cur += c;
    }
  }
  if (!cur.empty()) lines.push_back(cur);
  return lines;
}

bool IsRangeItem(const std::string& upper) { return upper == "STRT" || upper == "STOP" || upper == "STEP"; }

// A ~W number (STRT, STOP, STEP or NULL) as read, with where it came from.
struct WellNumber {
  const LasHeaderItem* item = nullptr;  // nullptr: no such line
  std::optional<double> value;
};

class Parser {
 public:
  Parser(const std::string& text, const std::string& path) : path_(path) {
    las_.path = path;
    lines_ = SplitLines(CheckEncoding(text, path, las_.warnings));
  }

  LasFile Run();

 private:
  [[noreturn]] void Fail(int line, const std::string& msg, int column = 0) const {
    throw InputError({path_, line, column}, msg);
  }
  void Warn(int line, const std::string& msg, int column = 0) { las_.warnings.push_back(las_detail::MakeWarning(path_, line, column, msg)); }

  std::optional<LasHeaderItem> HeaderLine(const std::string& raw, int line);
  void SwapLas12Text(const std::string& raw, LasHeaderItem& item) const;
  void EnterSection(char letter, int line);
  void FinishVersion();
  WellNumber ReadWellNumber(const char* mnemonic);
  void CheckHeadersBeforeData(int line);
  void CheckIndexCurve();
  void DataLine(const std::string& raw, int line);
  double DataToken(const Token& t, size_t position, int line);
  void FinishData();
  void CheckIndexOrder(bool decreasing) const;
  void CheckWellRange();
  void StoreColumns(bool decreasing);

  std::string path_;
  std::vector<std::string> lines_;
  LasFile las_;

  char section_ = 0;          // current section letter (upper case), 0 before the first
  std::map<char, int> seen_;  // section letter -> line of its first header
  std::vector<LasHeaderItem> version_items_;
  std::vector<LasHeaderItem> curve_items_;
  bool las12_ = false;

  WellNumber strt_, stop_, step_;
  double index_factor_ = 1.0;  // m per index unit

  // ~A state
  std::vector<std::vector<double>> rows_;
  std::vector<int> row_lines_;
  std::vector<double> pending_;
  int pending_line_ = 0;
  std::vector<std::pair<size_t, LasBadValue>> bad_;  // (curve, token) for non-numbers
  int long_lines_ = 0, first_long_line_ = 0, first_long_size_ = 0;
};

std::optional<LasHeaderItem> Parser::HeaderLine(const std::string& raw, int line) {
  // "MNEM.UNIT  DATA : DESCRIPTION": first dot, first space after it, last colon.
  // A colon before the first dot ("COMP   COMPANY:  ACME CO. LTD.") means the
  // mnemonic has no dot of its own.
  const size_t dot = raw.find('.');
  if (dot == std::string::npos || raw.find(':') < dot) {
    const std::string form = "(header lines are \"MNEM.UNIT  DATA : DESCRIPTION\")";
    if (section_ == 'C' || section_ == 'V') Fail(line, "header line has no '.' after the mnemonic " + form);
    Warn(line, "header line has no '.' after the mnemonic " + form + "; line skipped");
    return std::nullopt;
  }
  LasHeaderItem item;
  item.line = line;
  item.mnemonic = Trim(raw.substr(0, dot));
  if (item.mnemonic.empty()) Fail(line, "header line has no mnemonic before the '.'");
  size_t unit_end = dot + 1;
  while (unit_end < raw.size() && !IsSpace(raw[unit_end])) ++unit_end;
  size_t colon = raw.rfind(':');
  if (colon == std::string::npos || colon < dot) {
    Warn(line, "header line for " + item.mnemonic + " has no ':' after the data; read with no description");
    colon = raw.size();
  }
  if (colon < unit_end) unit_end = colon;  // "MNEM.UNIT:desc": the unit ends at the colon
  item.unit = raw.substr(dot + 1, unit_end - dot - 1);
  item.value = Trim(raw.substr(unit_end, colon - unit_end));
  item.description = colon < raw.size() ? Trim(raw.substr(colon + 1)) : std::string();
  if (las12_ && section_ == 'W' && !IsRangeItem(Upper(item.mnemonic)) && Upper(item.mnemonic) != "NULL") {
    SwapLas12Text(raw, item);
  }
  return item;
}

// LAS 1.2 ~W text items read "MNEM.UNIT  DESCRIPTION : VALUE", split at the
// first colon (a value such as a time may hold colons of its own).
void Parser::SwapLas12Text(const std::string& raw, LasHeaderItem& item) const {
  const size_t from = raw.find('.') + 1 + item.unit.size();
  const size_t colon = raw.find(':', from);
  if (colon == std::string::npos) return;
  item.description = Trim(raw.substr(from, colon - from));
  item.value = Trim(raw.substr(colon + 1));
}

void Parser::EnterSection(char letter, int line) {
  if (section_ == 'A') {
    Fail(line, std::string("section ~") + letter + " after ~A (the ~A data section must be last)");
  }
  if (section_ == 0 && letter != 'V') {
    Fail(line, std::string("~V must be the first section, found ~") + letter);
  }
  if (const auto it = seen_.find(letter); it != seen_.end()) {
    const std::string what = std::string("second ~") + letter + " section (the first is at line " +
                             std::to_string(it->second) + ")";
    if (letter == 'V' || letter == 'W' || letter == 'C') Fail(line, what + "; ~V, ~W and ~C appear once");
    Warn(line, what + "; read as a continuation of the first");
  }
  if (section_ == 'V') FinishVersion();
  seen_.emplace(letter, line);
  section_ = letter;
  if (letter == 'C') las_.curve_section_line = line;
  if (letter == 'A') {
    las_.data_line = line;
    CheckHeadersBeforeData(line);
  }
}

void Parser::FinishVersion() {
  const int vline = seen_['V'];
  const LasHeaderItem* vers = nullptr;
  const LasHeaderItem* wrap = nullptr;
  for (const LasHeaderItem& it : version_items_) {
    const std::string m = Upper(it.mnemonic);
    if (m == "VERS") vers = &it;
    if (m == "WRAP") wrap = &it;
  }
  if (vers == nullptr) Fail(vline, "~V has no VERS line (VERS. 1.2 or VERS. 2.0)");
  double v = 0;
  const std::string shown = vers->value.empty() ? vers->description : vers->value;
  if (!ParseNumber(vers->value, &v)) {
    if (vers->value.empty() && ParseNumber(vers->description, &v)) {
      Warn(vers->line, "VERS written after the colon; read as " + vers->description);
    } else {
      Fail(vers->line, "VERS = " + (shown.empty() ? std::string("(empty)") : shown) + " is not a LAS version number");
    }
  }
  if (v == 3.0) {
    Fail(vers->line, "VERS = " + shown + ": LAS 3.0 files are not read (their log data sections differ); "
                     "export the log as LAS 2.0");
  }
  if (v != 2.0 && v != 1.2) Fail(vers->line, "VERS = " + shown + ": only LAS 1.2 and 2.0 files are read");
  las12_ = v == 1.2;
  las_.version = las12_ ? "1.2" : "2.0";
  if (wrap == nullptr) Fail(vline, "~V has no WRAP line (WRAP. YES or NO)");
  const std::string w = Upper(wrap->value.empty() ? wrap->description : wrap->value);
  if (w != "YES" && w != "NO") {
    Fail(wrap->line, "WRAP = " + (wrap->value.empty() ? std::string("(empty)") : wrap->value) + " must be YES or NO");
  }
  if (wrap->value.empty()) Warn(wrap->line, "WRAP written after the colon; read as " + w);
  las_.wrapped = w == "YES";
}

// A ~W number: before the colon as the standards say, or, when that field is
// empty, after it (some LAS 1.2 writers), with a warning. nullopt when absent
// or not a number (the caller decides whether that matters).
WellNumber Parser::ReadWellNumber(const char* mnemonic) {
  WellNumber out;
  for (const LasHeaderItem& it : las_.well) {
    if (Upper(it.mnemonic) != mnemonic) continue;
    if (out.item != nullptr) {
      Warn(it.line, std::string(mnemonic) + " appears twice in ~W; the first, at line " +
                        std::to_string(out.item->line) + ", is read");
      continue;
    }
    out.item = &it;
  }
  if (out.item == nullptr) return out;
  const LasHeaderItem& it = *out.item;
  double v = 0;
  if (ParseNumber(it.value, &v)) {
    out.value = v;
  } else if (it.value.empty() && ParseNumber(it.description, &v)) {
    Warn(it.line, std::string(mnemonic) + " written after the colon (as some LAS 1.2 writers do); read as " +
                      FormatNumber(v));
    out.value = v;
  }
  return out;
}

void Parser::CheckHeadersBeforeData(int line) {
  for (const char s : {'W', 'C'}) {
    if (seen_.count(s) == 0) Fail(line, std::string("no ~") + s + " section before ~A (~V, ~W and ~C are required)");
  }
  const WellNumber null = ReadWellNumber("NULL");
  if (null.item == nullptr) Fail(seen_['W'], "~W has no NULL line (the NULL value marks missing data)");
  if (!null.value) {
    Fail(null.item->line, "NULL = " + (null.item->value.empty() ? std::string("(empty)") : null.item->value) +
                              " is not a number");
  }
  las_.null_value = *null.value;
  strt_ = ReadWellNumber("STRT");
  stop_ = ReadWellNumber("STOP");
  step_ = ReadWellNumber("STEP");
  // "RHOB. G/CC : ..." (a space after the dot): the unit landed in the data
  // field. A lone length or density unit there is read as the unit.
  for (LasHeaderItem& c : curve_items_) {
    if (!c.unit.empty() || (LengthFactor(c.value) == 0 && LasDensityFactor(c.value) == 0)) continue;
    Warn(c.line, "curve " + c.mnemonic + ": unit '" + c.value + "' written after a space; read as the unit");
    c.unit = c.value;
    c.value.clear();
  }
  CheckIndexCurve();
  las_.curves.clear();
  for (const LasHeaderItem& it : curve_items_) las_.curves.push_back({it, {}, 0, {}});
}

// The first ~C curve is the index: a length (M or FT and their spellings).
void Parser::CheckIndexCurve() {
  if (curve_items_.empty()) Fail(las_.curve_section_line, "~C has no curves (the first curve must be the depth index)");
  LasHeaderItem& idx = curve_items_.front();
  const std::string im = Upper(idx.mnemonic);
  if (im == "TIME" || im == "ETIM") {
    Fail(idx.line, "index curve " + idx.mnemonic + " is time; a depth index (DEPT or DEPTH) is needed");
  }
  if (idx.unit.empty() && strt_.item != nullptr && LengthFactor(strt_.item->unit) > 0) {
    Warn(idx.line, "index curve " + idx.mnemonic + " has no unit; the STRT unit " + strt_.item->unit +
                       " (line " + std::to_string(strt_.item->line) + ") is used");
    idx.unit = strt_.item->unit;
  }
  index_factor_ = LengthFactor(idx.unit);
  if (index_factor_ == 0) {
    Fail(idx.line, "index curve " + idx.mnemonic + " unit '" + idx.unit +
                       "' is not a length (M, FT or their spellings): a depth index is needed");
  }
  if (im != "DEPT" && im != "DEPTH") {
    Warn(idx.line, "first curve " + idx.mnemonic + " is read as the depth index (its unit " + idx.unit +
                       " is a length)");
  }
  las_.index_unit = Upper(idx.unit);
}

// One token of ~A at `position` in its row: a number, or, outside the index,
// a non-number kept as NaN and recorded against its curve.
double Parser::DataToken(const Token& t, size_t position, int line) {
  double v = 0;
  if (ParseNumber(t.text, &v)) return v;
  if (position == 0) Fail(line, "index value '" + t.text + "' in ~A is not a number", t.column);
  bad_.push_back({position, {line, t.column, t.text}});
  return std::numeric_limits<double>::quiet_NaN();
}

void Parser::DataLine(const std::string& raw, int line) {
  const size_t ncurves = las_.curves.size();
  const std::vector<Token> toks = Tokens(raw);
  if (toks.empty()) return;
  if (!las_.wrapped) {
    if (toks.size() != ncurves) {
      Fail(line, "row has " + std::to_string(toks.size()) + " values but ~C declares " + std::to_string(ncurves) +
                     " curves");
    }
    std::vector<double> vals;
    vals.reserve(ncurves);
    for (size_t k = 0; k < toks.size(); ++k) vals.push_back(DataToken(toks[k], k, line));
    rows_.push_back(std::move(vals));
    row_lines_.push_back(line);
    return;
  }
  if (raw.size() > 80 && long_lines_++ == 0) {
    first_long_line_ = line;
    first_long_size_ = static_cast<int>(raw.size());
  }
  if (pending_.empty()) {
    if (toks.size() != 1) {
      Fail(line, "wrapped row starts with " + std::to_string(toks.size()) +
                     " values; in a wrapped file the index is alone on its line", toks[1].column);
    }
    pending_line_ = line;
  } else if (pending_.size() + toks.size() > ncurves) {
    Fail(line, "wrapped row starting at line " + std::to_string(pending_line_) + " has " +
                   std::to_string(pending_.size() + toks.size()) + " values but ~C declares " +
                   std::to_string(ncurves) + " curves");
  }
  for (const Token& t : toks) pending_.push_back(DataToken(t, pending_.size(), line));
  if (pending_.size() == ncurves) {
    rows_.push_back(std::move(pending_));
    row_lines_.push_back(pending_line_);
    pending_.clear();
  }
}

void Parser::CheckIndexOrder(bool decreasing) const {
  const double null = las_.null_value;
  const double null_tol = 1e-6 * std::max(1.0, std::fabs(null));
  for (size_t r = 0; r < rows_.size(); ++r) {
    if (std::fabs(rows_[r][0] - null) <= null_tol) {
      Fail(row_lines_[r], "index value " + FormatNumber(rows_[r][0]) + " is the NULL value", 1);
    }
  }
  for (size_t r = 1; r < rows_.size(); ++r) {
    const double a = rows_[r - 1][0], b = rows_[r][0];
    if (decreasing ? !(b < a) : !(b > a)) {
      Fail(row_lines_[r], "index " + FormatNumber(b) + " does not " + (decreasing ? "decrease" : "increase") +
                              " from " + FormatNumber(a) + " (line " + std::to_string(row_lines_[r - 1]) +
                              "); the index must be strictly monotonic");
    }
  }
}

// STRT, STOP and STEP against the data, which govern: every disagreement is a
// warning giving both. Values are compared in the index unit.
void Parser::CheckWellRange() {
  const double first = rows_.front()[0], last = rows_.back()[0];
  auto in_index_unit = [&](const WellNumber& w, const char* name) -> std::optional<double> {
    if (w.item == nullptr) {
      Warn(seen_['W'], std::string("~W has no ") + name + " line; the data govern");
      return std::nullopt;
    }
    if (!w.value) {
      Warn(w.item->line, std::string(name) + " = " + (w.item->value.empty() ? "(empty)" : w.item->value) +
                             " is not a number; the data govern");
      return std::nullopt;
    }
    const double f = LengthFactor(w.item->unit);
    if (f == 0 || f == index_factor_) {
      if (f == 0) Warn(w.item->line, std::string(name) + " unit '" + w.item->unit + "' is not a length; read in the index unit " + las_.index_unit);
      return *w.value;
    }
    Warn(w.item->line, std::string(name) + " unit " + w.item->unit + " differs from the index unit " + las_.index_unit +
                           "; converted to compare");
    return *w.value * f / index_factor_;
  };
  const std::optional<double> strt = in_index_unit(strt_, "STRT");
  const std::optional<double> stop = in_index_unit(stop_, "STOP");
  const std::optional<double> step = in_index_unit(step_, "STEP");
  const double tol = std::max(1e-6 * std::max({1.0, std::fabs(first), std::fabs(last)}), 5e-5);
  auto against = [&](const std::optional<double>& w, const WellNumber& item, const char* name, double data,
                     const char* which, int line) {
    if (w && std::fabs(*w - data) > tol) {
      Warn(item.item->line, std::string(name) + " = " + item.item->value + " disagrees with the " + which +
                                " index value " + FormatNumber(data) + " (line " + std::to_string(line) +
                                "); the data govern");
    }
  };
  against(strt, strt_, "STRT", first, "first", row_lines_.front());
  against(stop, stop_, "STOP", last, "last", row_lines_.back());
  if (!step || *step == 0) return;
  for (size_t r = 0; r < rows_.size(); ++r) {
    const double expected = first + static_cast<double>(r) * *step;
    if (std::fabs(rows_[r][0] - expected) > 0.01 * std::fabs(*step) + 1e-9 * std::fabs(expected)) {
      Warn(row_lines_[r], "index " + FormatNumber(rows_[r][0]) + " is off the regular STEP = " + step_.item->value +
                              " (line " + std::to_string(step_.item->line) + ") grid, which expects " +
                              FormatNumber(expected) + "; the data govern (STEP = 0 declares an irregular index)", 1);
      return;
    }
  }
}

void Parser::StoreColumns(bool decreasing) {
  const size_t n = rows_.size();
  const double null = las_.null_value;
  const double null_tol = 1e-6 * std::max(1.0, std::fabs(null));
  for (LasCurve& c : las_.curves) c.values.resize(n);
  las_.row_line.resize(n);
  for (size_t r = 0; r < n; ++r) {
    const size_t out = decreasing ? n - 1 - r : r;
    las_.row_line[out] = row_lines_[r];
    las_.curves[0].values[out] = rows_[r][0] * index_factor_;
    for (size_t c = 1; c < las_.curves.size(); ++c) {
      const double v = rows_[r][c];
      las_.curves[c].values[out] = std::fabs(v - null) <= null_tol ? std::numeric_limits<double>::quiet_NaN() : v;
    }
  }
  for (const auto& [c, bad] : bad_) {
    if (las_.curves[c].bad_count++ == 0) las_.curves[c].first_bad = bad;
  }
  las_.reversed = decreasing;
}

void Parser::FinishData() {
  const int last_line = static_cast<int>(lines_.size());
  if (!pending_.empty()) {
    Fail(last_line, "wrapped row starting at line " + std::to_string(pending_line_) + " ends with " +
                        std::to_string(pending_.size()) + " of " + std::to_string(las_.curves.size()) + " values");
  }
  if (rows_.empty()) Fail(las_.data_line, "~A has no data rows");
  if (long_lines_ > 0) {
    Warn(first_long_line_, std::to_string(long_lines_) + " wrapped data line(s) longer than 80 characters (the first " +
                               std::to_string(first_long_size_) + "); read anyway");
  }
  const bool decreasing = rows_.size() > 1 && rows_[1][0] < rows_[0][0];
  CheckIndexOrder(decreasing);
  CheckWellRange();
  StoreColumns(decreasing);
}

LasFile Parser::Run() {
  for (size_t i = 0; i < lines_.size(); ++i) {
    const int line = static_cast<int>(i) + 1;
    const std::string& raw = lines_[i];
    const std::string t = Trim(raw);
    if (section_ == 'O' && !t.empty() && t[0] != '~') {
      if (t[0] == '#') continue;
      if (!las_.other.empty()) las_.other += '\n';
      las_.other += t;
      continue;
    }
    if (t.empty() || t[0] == '#') continue;
    if (t[0] == '~') {
      if (t.size() < 2 || IsSpace(t[1])) Fail(line, "section line '~' has no section letter");
      EnterSection(static_cast<char>(std::toupper(static_cast<unsigned char>(t[1]))), line);
      continue;
    }
    std::optional<LasHeaderItem> item;
    switch (section_) {
      case 0: Fail(line, "text before the ~V section (a LAS file starts with ~V)");
      case 'A': DataLine(raw, line); continue;
      case 'V': case 'W': case 'C': case 'P': item = HeaderLine(raw, line); break;
      default: continue;  // a section the reader does not use: its text is skipped
    }
    if (!item) continue;
    if (section_ == 'V') version_items_.push_back(*item);
    if (section_ == 'W') las_.well.push_back(*item);
    if (section_ == 'C') curve_items_.push_back(*item);
    if (section_ == 'P') las_.parameters.push_back(*item);
  }
  const int last_line = std::max(1, static_cast<int>(lines_.size()));
  if (seen_.count('V') == 0) Fail(last_line, "no ~V section (a LAS file starts with ~V)");
  if (section_ == 'V') FinishVersion();
  if (seen_.count('A') == 0) Fail(last_line, "no ~A section (the data section is required and last)");
  FinishData();
  std::stable_sort(las_.warnings.begin(), las_.warnings.end(),
                   [](const LasWarning& a, const LasWarning& b) { return a.where.line < b.where.line; });
  return std::move(las_);
}

}  // namespace

LasFile ParseLas(const std::string& text, const std::string& path) { return Parser(text, path).Run(); }

LasFile ReadLas(const std::string& path) {
  return ParseLas(ReadInputFile({path, "LAS file", "", {}, kMaxLasFileBytes}), path);
}

}  // namespace porofit::depth

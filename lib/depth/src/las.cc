// LAS 2.0 reader (CWLS LAS 2.0 standard, as recalled [from memory]; docs/las.md).
//
// One pass over the lines: section lines switch state, header lines are split
// by the first dot / first space after it / last colon rule, ~A rows are
// tokenised. All cross-section checks (units, STRT/STOP, the index) run when
// ~A starts or after the data, so ~W, ~C, ~P may come in any order after ~V.
#include <algorithm>
#include <array>
#include <cctype>
#include <charconv>
#include <cmath>
#include <fstream>
#include <limits>
#include <map>
#include <sstream>

#include "porofit/depth/las.h"

namespace porofit::depth {
namespace {

constexpr double kFoot = 0.3048;  // m, exact by definition

std::string Upper(std::string s) {
  for (char& c : s) c = static_cast<char>(std::toupper(static_cast<unsigned char>(c)));
  return s;
}

bool IsSpace(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\f' || c == '\v'; }

std::string Trim(const std::string& s) {
  size_t a = 0, b = s.size();
  while (a < b && IsSpace(s[a])) ++a;
  while (b > a && IsSpace(s[b - 1])) --b;
  return s.substr(a, b - a);
}

bool ParseNumber(const std::string& s, double* out) {
  if (s.empty()) return false;
  const char* first = s.data();
  const char* last = s.data() + s.size();
  if (*first == '+') ++first;  // from_chars rejects a leading '+'
  auto [ptr, ec] = std::from_chars(first, last, *out);
  return ec == std::errc() && ptr == last && std::isfinite(*out);
}

bool IsDepthUnit(const std::string& u) { return u == "M" || u == "F" || u == "FT"; }
bool IsFeet(const std::string& u) { return u == "F" || u == "FT"; }

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

class Parser {
 public:
  Parser(const std::string& text, const std::string& path) : path_(path) { SplitLines(text); }

  LasFile Run();

 private:
  [[noreturn]] void Fail(int line, const std::string& msg, int column = 0) const {
    throw InputError({path_, line, column}, msg);
  }

  void SplitLines(const std::string& text) {
    // Accept LF, CRLF and lone CR line ends.
    std::string cur;
    for (size_t i = 0; i < text.size(); ++i) {
      const char c = text[i];
      if (c == '\n' || c == '\r') {
        lines_.push_back(cur);
        cur.clear();
        if (c == '\r' && i + 1 < text.size() && text[i + 1] == '\n') ++i;
      } else {
        cur += c;
      }
    }
    if (!cur.empty()) lines_.push_back(cur);
  }

  LasHeaderItem HeaderLine(const std::string& raw, int line) const;
  void EnterSection(char letter, int line);
  void FinishVersion();
  void CheckHeadersBeforeData(int line);
  void DataLine(const std::string& raw, int line);
  void FinishData();

  std::string path_;
  std::vector<std::string> lines_;
  LasFile las_;

  char section_ = 0;  // current section letter (upper case), 0 before the first
  std::map<char, int> seen_;  // section letter -> line of its header
  std::vector<LasHeaderItem> version_items_;
  std::vector<LasHeaderItem> curve_items_;

  // ~A state
  std::vector<std::vector<double>> rows_;
  std::vector<int> row_lines_;
  std::vector<double> pending_;
  int pending_line_ = 0;
  size_t strt_ = 0, stop_ = 0, step_ = 0;  // positions in las_.well, set before ~A
};

LasHeaderItem Parser::HeaderLine(const std::string& raw, int line) const {
  // "MNEM.UNIT  DATA : DESCRIPTION": first dot, first space after it, last colon.
  const size_t dot = raw.find('.');
  if (dot == std::string::npos) {
    Fail(line, "header line has no '.' after the mnemonic (LAS 2.0 header lines are \"MNEM.UNIT  DATA : DESCRIPTION\")");
  }
  LasHeaderItem item;
  item.line = line;
  item.mnemonic = Trim(raw.substr(0, dot));
  if (item.mnemonic.empty()) Fail(line, "header line has no mnemonic before the '.'");
  size_t unit_end = dot + 1;
  while (unit_end < raw.size() && !IsSpace(raw[unit_end])) ++unit_end;
  const size_t colon = raw.rfind(':');
  if (colon == std::string::npos || colon < dot) {
    Fail(line, "header line for " + item.mnemonic +
                   " has no ':' after the data (LAS 2.0 header lines are \"MNEM.UNIT  DATA : DESCRIPTION\")");
  }
  if (colon < unit_end) {
    // A colon inside the unit field, e.g. "MNEM.UNIT:desc": the unit ends at the colon.
    unit_end = colon;
  }
  item.unit = raw.substr(dot + 1, unit_end - dot - 1);
  item.value = Trim(raw.substr(unit_end, colon - unit_end));
  item.description = Trim(raw.substr(colon + 1));
  return item;
}

void Parser::EnterSection(char letter, int line) {
  if (section_ == 'A') {
    Fail(line, std::string("section ~") + letter + " after ~A (the ~A data section must be last)");
  }
  if (section_ == 0 && letter != 'V') {
    Fail(line, std::string("~V must be the first section, found ~") + letter);
  }
  if (const auto it = seen_.find(letter); it != seen_.end()) {
    Fail(line, std::string("second ~") + letter + " section (each section appears at most once; the first is at line " +
                   std::to_string(it->second) + ")");
  }
  if (section_ == 'V') FinishVersion();
  seen_[letter] = line;
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
  if (vers == nullptr) Fail(vline, "~V has no VERS line (LAS 2.0 requires VERS. 2.0)");
  double v = 0;
  if (!ParseNumber(vers->value, &v) || v != 2.0) {
    std::string shown = vers->value.empty() ? vers->description : vers->value;
    Fail(vers->line, "VERS = " + (shown.empty() ? std::string("(empty)") : shown) +
                         ": only LAS 2.0 files are read (LAS 1.2 and 3.0 differ in layout)");
  }
  las_.version = "2.0";
  if (wrap == nullptr) Fail(vline, "~V has no WRAP line (LAS 2.0 requires WRAP. YES or NO)");
  const std::string w = Upper(wrap->value);
  if (w == "YES") {
    las_.wrapped = true;
  } else if (w == "NO") {
    las_.wrapped = false;
  } else {
    Fail(wrap->line, "WRAP = " + (wrap->value.empty() ? std::string("(empty)") : wrap->value) + " must be YES or NO");
  }
}

void Parser::CheckHeadersBeforeData(int line) {
  for (const char s : {'W', 'C'}) {
    if (seen_.count(s) == 0) Fail(line, std::string("no ~") + s + " section before ~A (LAS 2.0 requires ~V, ~W and ~C)");
  }
  const int wline = seen_['W'];
  // ~W required items.
  auto find_w = [&](const char* m) -> const LasHeaderItem* {
    for (const LasHeaderItem& it : las_.well) {
      if (Upper(it.mnemonic) == m) return &it;
    }
    return nullptr;
  };
  std::array<double, 4> num{};
  const std::array<const char*, 4> req = {"STRT", "STOP", "STEP", "NULL"};
  for (size_t i = 0; i < req.size(); ++i) {
    const LasHeaderItem* it = find_w(req[i]);
    if (it == nullptr) Fail(wline, std::string("~W has no ") + req[i] + " line (LAS 2.0 requires STRT, STOP, STEP and NULL)");
    for (const LasHeaderItem& other : las_.well) {
      if (&other != it && Upper(other.mnemonic) == req[i]) {
        Fail(other.line, std::string(req[i]) + " appears twice in ~W (first at line " + std::to_string(it->line) + ")");
      }
    }
    if (it->value.empty() && ParseNumber(Trim(it->description), &num[i])) {
      Fail(it->line, std::string(req[i]) +
                         " has its value after the colon, as LAS 1.2 writes it; LAS 2.0 puts the value before the "
                         "colon and only 2.0 is read");
    }
    if (!ParseNumber(it->value, &num[i])) {
      Fail(it->line, std::string(req[i]) + " = " + (it->value.empty() ? std::string("(empty)") : it->value) +
                         " is not a number");
    }
  }
  las_.null_value = num[3];
  const LasHeaderItem* strt = find_w("STRT");
  const LasHeaderItem* stop = find_w("STOP");
  const LasHeaderItem* step = find_w("STEP");
  strt_ = static_cast<size_t>(strt - las_.well.data());
  stop_ = static_cast<size_t>(stop - las_.well.data());
  step_ = static_cast<size_t>(step - las_.well.data());
  for (const LasHeaderItem* it : {strt, stop, step}) {
    if (!IsDepthUnit(Upper(it->unit))) {
      Fail(it->line, it->mnemonic + " unit '" + it->unit + "' is not a depth unit (M, F or FT): a depth index is needed");
    }
  }
  for (const LasHeaderItem* it : {stop, step}) {
    if (IsFeet(Upper(it->unit)) != IsFeet(Upper(strt->unit))) {
      Fail(it->line, it->mnemonic + " unit " + it->unit + " differs from STRT unit " + strt->unit +
                         " (line " + std::to_string(strt->line) + ")");
    }
  }
  // ~C: the index curve.
  if (curve_items_.empty()) Fail(las_.curve_section_line, "~C has no curves (the first curve must be the depth index)");
  const LasHeaderItem& idx = curve_items_.front();
  const std::string im = Upper(idx.mnemonic);
  if (im == "TIME" || im == "ETIM") {
    Fail(idx.line, "index curve " + idx.mnemonic + " is time; a depth index (DEPT or DEPTH) is needed");
  }
  if (im != "DEPT" && im != "DEPTH") {
    Fail(idx.line, "first curve " + idx.mnemonic + " is not a depth index (the first ~C curve must be DEPT or DEPTH)");
  }
  const std::string iu = Upper(idx.unit);
  if (!IsDepthUnit(iu)) {
    Fail(idx.line, "index curve " + idx.mnemonic + " unit '" + idx.unit + "' is not a depth unit (M, F or FT)");
  }
  if (IsFeet(iu) != IsFeet(Upper(strt->unit))) {
    Fail(idx.line, "index curve unit " + idx.unit + " differs from STRT/STOP/STEP unit " + strt->unit + " (line " +
                       std::to_string(strt->line) + ")");
  }
  las_.index_unit = iu;
  for (size_t i = 0; i < curve_items_.size(); ++i) {
    for (size_t j = 0; j < i; ++j) {
      if (Upper(curve_items_[i].mnemonic) == Upper(curve_items_[j].mnemonic)) {
        Fail(curve_items_[i].line, "curve " + curve_items_[i].mnemonic + " appears twice in ~C (first at line " +
                                       std::to_string(curve_items_[j].line) + ")");
      }
    }
  }
  las_.curves.clear();
  for (const LasHeaderItem& it : curve_items_) las_.curves.push_back({it, {}});
}

void Parser::DataLine(const std::string& raw, int line) {
  const size_t ncurves = las_.curves.size();
  if (las_.wrapped && raw.size() > 80) {
    Fail(line, "line is " + std::to_string(raw.size()) + " characters long; wrapped LAS data lines are at most 80");
  }
  const std::vector<Token> toks = Tokens(raw);
  if (toks.empty()) return;
  std::vector<double> vals;
  vals.reserve(toks.size());
  for (const Token& t : toks) {
    double v = 0;
    if (!ParseNumber(t.text, &v)) Fail(line, "value '" + t.text + "' in ~A is not a number", t.column);
    vals.push_back(v);
  }
  if (!las_.wrapped) {
    if (vals.size() != ncurves) {
      Fail(line, "row has " + std::to_string(vals.size()) + " values but ~C declares " + std::to_string(ncurves) +
                     " curves");
    }
    rows_.push_back(std::move(vals));
    row_lines_.push_back(line);
    return;
  }
  if (pending_.empty()) {
    if (vals.size() != 1) {
      Fail(line, "wrapped row starts with " + std::to_string(vals.size()) +
                     " values; in a wrapped file the index is alone on its line", toks[1].column);
    }
    pending_line_ = line;
  } else if (pending_.size() + vals.size() > ncurves) {
    Fail(line, "wrapped row starting at line " + std::to_string(pending_line_) + " has " +
                   std::to_string(pending_.size() + vals.size()) + " values but ~C declares " +
                   std::to_string(ncurves) + " curves");
  }
  pending_.insert(pending_.end(), vals.begin(), vals.end());
  if (pending_.size() == ncurves) {
    rows_.push_back(std::move(pending_));
    row_lines_.push_back(pending_line_);
    pending_.clear();
  }
}

void Parser::FinishData() {
  const int last_line = static_cast<int>(lines_.size());
  if (!pending_.empty()) {
    Fail(last_line, "wrapped row starting at line " + std::to_string(pending_line_) + " ends with " +
                        std::to_string(pending_.size()) + " of " + std::to_string(las_.curves.size()) + " values");
  }
  if (rows_.empty()) Fail(las_.data_line, "~A has no data rows");
  const double null = las_.null_value;
  const double null_tol = 1e-6 * std::max(1.0, std::fabs(null));
  auto is_null = [&](double v) { return std::fabs(v - null) <= null_tol; };

  // The index: not NULL, strictly monotonic, agreeing with STRT/STOP/STEP.
  const size_t n = rows_.size();
  for (size_t r = 0; r < n; ++r) {
    if (is_null(rows_[r][0])) Fail(row_lines_[r], "index value " + FormatNumber(rows_[r][0]) + " is the NULL value", 1);
  }
  const bool decreasing = n > 1 && rows_[1][0] < rows_[0][0];
  for (size_t r = 1; r < n; ++r) {
    const double a = rows_[r - 1][0], b = rows_[r][0];
    if (decreasing ? !(b < a) : !(b > a)) {
      Fail(row_lines_[r], "index " + FormatNumber(b) + " does not " + (decreasing ? "decrease" : "increase") +
                              " from " + FormatNumber(a) + " (line " + std::to_string(row_lines_[r - 1]) +
                              "); the index must be strictly monotonic");
    }
  }
  const LasHeaderItem& strt_i = las_.well[strt_];
  const LasHeaderItem& stop_i = las_.well[stop_];
  const LasHeaderItem& step_i = las_.well[step_];
  double strt = 0, stop = 0, step = 0;
  ParseNumber(strt_i.value, &strt);
  ParseNumber(stop_i.value, &stop);
  ParseNumber(step_i.value, &step);
  const double tol = std::max(1e-6 * std::max({1.0, std::fabs(strt), std::fabs(stop)}), 5e-5);
  if (std::fabs(strt - rows_.front()[0]) > tol) {
    Fail(strt_i.line, "STRT = " + strt_i.value + " disagrees with the first index value " +
                          FormatNumber(rows_.front()[0]) + " (line " + std::to_string(row_lines_.front()) + ")");
  }
  if (std::fabs(stop - rows_.back()[0]) > tol) {
    Fail(stop_i.line, "STOP = " + stop_i.value + " disagrees with the last index value " +
                          FormatNumber(rows_.back()[0]) + " (line " + std::to_string(row_lines_.back()) + ")");
  }
  if (step != 0) {
    for (size_t r = 0; r < n; ++r) {
      const double expected = rows_.front()[0] + static_cast<double>(r) * step;
      if (std::fabs(rows_[r][0] - expected) > 0.01 * std::fabs(step) + 1e-9 * std::fabs(expected)) {
        Fail(row_lines_[r], "index " + FormatNumber(rows_[r][0]) + " is off the regular STEP = " + step_i.value +
                                " (line " + std::to_string(step_i.line) + ") grid; expected " + FormatNumber(expected) +
                                " (STEP = 0 declares an irregular index)", 1);
      }
    }
  }

  const double to_m = IsFeet(las_.index_unit) ? kFoot : 1.0;
  for (LasCurve& c : las_.curves) c.values.resize(n);
  for (size_t r = 0; r < n; ++r) {
    const size_t out = decreasing ? n - 1 - r : r;
    las_.curves[0].values[out] = rows_[r][0] * to_m;
    for (size_t c = 1; c < las_.curves.size(); ++c) {
      const double v = rows_[r][c];
      las_.curves[c].values[out] = is_null(v) ? std::numeric_limits<double>::quiet_NaN() : v;
    }
  }
  las_.reversed = decreasing;
}

LasFile Parser::Run() {
  las_.path = path_;
  std::string other;
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
    switch (section_) {
      case 0: Fail(line, "text before the ~V section (a LAS file starts with ~V)");
      case 'V': version_items_.push_back(HeaderLine(raw, line)); break;
      case 'W': las_.well.push_back(HeaderLine(raw, line)); break;
      case 'C': curve_items_.push_back(HeaderLine(raw, line)); break;
      case 'P': las_.parameters.push_back(HeaderLine(raw, line)); break;
      case 'A': DataLine(raw, line); break;
      default: break;  // a section LAS 2.0 does not define: its text is not used
    }
  }
  const int last_line = std::max(1, static_cast<int>(lines_.size()));
  if (seen_.count('V') == 0) Fail(last_line, "no ~V section (a LAS file starts with ~V)");
  if (section_ == 'V') FinishVersion();
  if (seen_.count('A') == 0) Fail(last_line, "no ~A section (the data section is required and last)");
  FinishData();
  return std::move(las_);
}

}  // namespace

const LasCurve* LasFile::Find(const std::string& mnemonic) const {
  const std::string m = Upper(mnemonic);
  for (const LasCurve& c : curves) {
    if (Upper(c.header.mnemonic) == m) return &c;
  }
  return nullptr;
}

const LasHeaderItem* LasFile::FindWell(const std::string& mnemonic) const {
  const std::string m = Upper(mnemonic);
  for (const LasHeaderItem& it : well) {
    if (Upper(it.mnemonic) == m) return &it;
  }
  return nullptr;
}

LasFile ParseLas(const std::string& text, const std::string& path) { return Parser(text, path).Run(); }

LasFile ReadLas(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw InputError({path, 0, 0}, "cannot open LAS file");
  std::ostringstream ss;
  ss << in.rdbuf();
  if (in.bad()) throw InputError({path, 0, 0}, "cannot read LAS file");
  return ParseLas(ss.str(), path);
}

}  // namespace porofit::depth

#include "yaml_map.h"

#include <algorithm>
#include <cmath>
#include <vector>

#include "porofit/io/csv.h"

namespace porofit::io::detail {

SourceLocation Where(const std::string& file, const YAML::Mark& mark) {
  if (mark.is_null()) return {file, 0, 0};
  return {file, mark.line + 1, mark.column + 1};
}

namespace {

// Line (one-based) of the "---" that opens the document whose content starts
// on zero-based line `content_line`, searching back no further than
// `after_line`; 0 if there is none.
int MarkerLine(const std::string& text, int content_line, int after_line) {
  std::vector<size_t> starts = {0};
  for (size_t i = 0; i < text.size(); ++i)
    if (text[i] == '\n') starts.push_back(i + 1);
  for (int line = std::min<int>(content_line, static_cast<int>(starts.size()) - 1); line > after_line; --line)
    if (text.compare(starts[static_cast<size_t>(line)], 3, "---") == 0) return line + 1;
  return 0;
}

}  // namespace

YAML::Node LoadSingleDocument(const std::string& text, const std::string& file, const std::string& what) {
  std::vector<YAML::Node> docs;
  try {
    docs = YAML::LoadAll(text);
  } catch (const YAML::Exception& e) {
    throw InputError(Where(file, e.mark), "yaml syntax error: " + e.msg);
  }
  if (docs.empty()) return YAML::Node();
  if (docs.size() > 1) {
    SourceLocation at = Where(file, docs[1].Mark());
    const int first_line = docs[0].Mark().is_null() ? -1 : docs[0].Mark().line;
    if (const int line = MarkerLine(text, at.line - 1, first_line); line > 0) at = {file, line, 1};
    throw InputError(at, what + " holds more than one YAML document: a second one starts here (after '---'); "
                              "write one document per file");
  }
  return docs.front();
}

std::string TypeName(const YAML::Node& node) {
  switch (node.Type()) {
    case YAML::NodeType::Map: return "a mapping";
    case YAML::NodeType::Sequence: return "a list";
    case YAML::NodeType::Scalar: return "a scalar";
    case YAML::NodeType::Null:
    case YAML::NodeType::Undefined: break;
  }
  return "nothing";
}

const std::string& Field::Scalar() const {
  if (!node.IsScalar())
    throw InputError(at, "'" + path + "' must be a single value, found " + TypeName(node));
  return node.Scalar();
}

double Field::Number() const {
  const std::string& text = Scalar();
  double v = 0;
  if (!csv::ParseNumber(text, v))
    throw InputError(at, "'" + path + "' = '" + text + "' is not a number");
  if (!std::isfinite(v)) throw InputError(at, "'" + path + "' = " + text + " is not finite");
  return v;
}

long long Field::Integer() const {
  const std::string& text = Scalar();
  double v = 0;
  if (!csv::ParseNumber(text, v) || !std::isfinite(v) || v != std::floor(v) || std::fabs(v) > 9e15)
    throw InputError(at, "'" + path + "' = '" + text + "' is not a whole number");
  return static_cast<long long>(v);
}

bool Field::Boolean() const {
  const std::string& text = Scalar();
  static const char* const kTrue[] = {"true", "True", "TRUE", "yes", "Yes", "on", "On"};
  static const char* const kFalse[] = {"false", "False", "FALSE", "no", "No", "off", "Off"};
  for (const char* t : kTrue)
    if (text == t) return true;
  for (const char* f : kFalse)
    if (text == f) return false;
  throw InputError(at, "'" + path + "' = '" + text + "' is not true or false");
}

void Field::ExpectList() const {
  if (!node.IsSequence())
    throw InputError(at, "'" + path + "' must be a list, found " + TypeName(node));
}

MapReader::MapReader(const YAML::Node& node, std::string file, std::string what, std::string prefix)
    : file_(std::move(file)), what_(std::move(what)), prefix_(std::move(prefix)) {
  at_ = Where(file_, node.Mark());
  if (!node.IsMap())
    throw InputError(at_, what_ + " must be a mapping of keys to values, found " + TypeName(node));
  for (auto it = node.begin(); it != node.end(); ++it) {
    Entry e;
    const SourceLocation key_at = Where(file_, it->first.Mark());
    if (!it->first.IsScalar())
      throw InputError(key_at, "keys in " + what_ + " must be plain words");
    e.key = it->first.Scalar();
    for (const Entry& prior : entries_)
      if (prior.key == e.key)
        throw InputError(key_at, "duplicate key '" + e.key + "' in " + what_ + " (first given at line " +
                                     std::to_string(prior.key_at.line) + ")");
    e.value = it->second;
    e.key_at = key_at;
    e.value_at = e.value.IsNull() ? key_at : Where(file_, e.value.Mark());
    entries_.push_back(std::move(e));
  }
}

Field MapReader::Get(const std::string& key) {
  asked_.push_back(key);
  Field f;
  f.key = key;
  f.path = prefix_.empty() ? key : prefix_ + "." + key;
  f.at = at_;
  f.key_at = at_;
  for (Entry& e : entries_) {
    if (e.key != key) continue;
    e.used = true;
    f.node = e.value;
    f.key_at = e.key_at;
    f.at = e.value_at;
    f.present = true;
    break;
  }
  return f;
}

void MapReader::Finish() const {
  for (const Entry& e : entries_) {
    if (e.used) continue;
    std::string msg = "unknown key '" + e.key + "' in " + what_;
    const std::string near = NearestWord(e.key, asked_);
    if (!near.empty()) msg += "; did you mean '" + near + "'?";
    throw InputError(e.key_at, msg);
  }
}

}  // namespace porofit::io::detail

#pragma once
// Strict reading of YAML mappings: every key that is looked up is recorded,
// and Finish() rejects the keys nobody asked for, with a suggestion. Values
// carry their source location for messages.
#include <yaml-cpp/yaml.h>

#include <string>
#include <utility>
#include <vector>

#include "porofit/core/error.h"

namespace porofit::io::detail {

/// yaml-cpp marks are zero-based.
SourceLocation Where(const std::string& file, const YAML::Mark& mark);

/// Parses `text` as exactly one YAML document. A syntax error is an InputError
/// at its mark; a second document ("---" after the first) is an InputError at
/// the line of its "---" (or where its content starts).
YAML::Node LoadSingleDocument(const std::string& text, const std::string& file, const std::string& what);

/// Runs `read` and turns any yaml-cpp exception that escapes it (a conversion
/// or an access to a missing node that the reading code did not foresee) into
/// an InputError at the exception's mark, so no YAML failure leaves a loader
/// without a location.
template <class F>
auto WithYamlLocations(const std::string& file, F&& read) -> decltype(read()) {
  try {
    return read();
  } catch (const YAML::Exception& e) {
    throw InputError(Where(file, e.mark), "cannot read this YAML value: " + e.msg);
  }
}

/// "a mapping", "a list", "a scalar", "nothing".
std::string TypeName(const YAML::Node& node);

/// One value looked up in a mapping.
struct Field {
  std::string key;        ///< the key as written
  std::string path;       ///< for messages, e.g. "uncertainty.K"
  YAML::Node node;        ///< the value (null node when written as "key:")
  SourceLocation key_at;  ///< where the key is written
  SourceLocation at;      ///< where the value is written (the key, for empty values)
  bool present = false;
  explicit operator bool() const { return present; }

  /// The value as a scalar's text; throws for lists, mappings and empty values.
  const std::string& Scalar() const;
  /// The value as a finite number (plain YAML number, no unit).
  double Number() const;
  /// The value as an integer; throws for fractions and non-numbers.
  long long Integer() const;
  /// true/false (also yes/no, on/off as YAML 1.1 spells them).
  bool Boolean() const;
  /// Throws unless the value is a list.
  void ExpectList() const;
};

class MapReader {
 public:
  /// `what` names the mapping in messages ("sample 'B-3'", "the study").
  /// Throws InputError if `node` is not a mapping or repeats a key.
  MapReader(const YAML::Node& node, std::string file, std::string what, std::string prefix = "");

  /// Looks `key` up and marks it as read; an absent key gives !field. Callers
  /// look up every key a mapping may hold first, then call Finish(), and only
  /// then check required keys and values, so that a misspelt required key is
  /// reported as unknown (with a suggestion) rather than as missing.
  Field Get(const std::string& key);
  /// Throws for the first key that was never looked up.
  void Finish() const;

  const SourceLocation& at() const { return at_; }
  const std::string& file() const { return file_; }
  const std::string& what() const { return what_; }

 private:
  struct Entry {
    std::string key;
    YAML::Node value;
    SourceLocation key_at;
    SourceLocation value_at;
    bool used = false;
  };
  std::vector<Entry> entries_;
  std::vector<std::string> asked_;
  std::string file_, what_, prefix_;
  SourceLocation at_;
};

/// The value of an enumerated key: one of the listed words, else an
/// InputError at the value listing them all (with the nearest as a hint).
template <class E>
E ParseChoice(const Field& f, const std::vector<std::pair<std::string, E>>& choices) {
  const std::string& text = f.Scalar();
  std::vector<std::string> names;
  std::string listed;
  for (const auto& [name, value] : choices) {
    if (name == text) return value;
    names.push_back(name);
    listed += (listed.empty() ? "" : ", ") + name;
  }
  std::string msg = "'" + f.path + "' = '" + text + "' is not one of " + listed;
  const std::string near = NearestWord(text, names);
  if (!near.empty()) msg += "; did you mean '" + near + "'?";
  throw InputError(f.at, msg);
}

}  // namespace porofit::io::detail

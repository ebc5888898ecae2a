#pragma once
// Mineral elastic moduli as data.
//
// A MineralTable maps a mineral name ("quartz", "illite", ...) to its bulk
// and shear modulus, density, 1-sigma uncertainties of both moduli, the
// published source of the values and, separately, how they were checked
// against it. The default table is config/minerals.yaml,
// compiled into the library at build time (MineralTable::Builtin()), so no
// file is needed at run time; a study may load its own table and Merge() it
// over the built-in one.
//
// File format (YAML, every key checked; unknown keys are errors with a
// "did you mean" suggestion):
//
//   units:
//     modulus: GPa        # any modulus unit of porofit::units (Pa, GPa, Mpsi, ...)
//     density: g/cc       # any density unit (kg/m3, g/cc, ...)
//   minerals:
//     quartz:             # name: lowercase letters, digits and '_'
//       bulk: 37.0        # K, > 0
//       shear: 44.0       # mu, >= 0
//       density: 2.65     # rho, > 0
//       sigma_bulk: 0.74  # 1-sigma of K, >= 0
//       sigma_shear: 0.88 # 1-sigma of mu, >= 0
//       clay: false       # optional, default false; counts toward the clay volume fraction
//       source: "..."     # required, non-empty: the published source (author, year,
//                         #   title, publisher or journal, table where known)
//       checked: from memory  # optional: how the values were checked against the
//                         #   source, one of MineralCheckValues(); absent = not stated
//
// All values are stored in SI (Pa, kg/m^3). Errors are porofit::InputError
// located at the offending key or value (one-based line and column).
#include <cstddef>
#include <map>
#include <string>
#include <string_view>
#include <vector>

#include "porofit/core/error.h"

namespace porofit::poro {

/// One mineral's elastic properties, SI units.
struct Mineral {
  std::string name;          ///< table key, e.g. "quartz"
  double bulk = 0;           ///< K, Pa
  double shear = 0;          ///< mu, Pa
  double density = 0;        ///< rho, kg/m^3
  double sigma_bulk = 0;     ///< 1-sigma uncertainty of K, Pa
  double sigma_shear = 0;    ///< 1-sigma uncertainty of mu, Pa
  bool clay = false;         ///< counts toward the clay volume fraction
  std::string source;        ///< published source of the values
  /// How the values were checked against `source`: one of
  /// MineralCheckValues(), or "" when the table does not say.
  std::string checked;
  SourceLocation where;      ///< where the entry was written

  /// Equal values (name, moduli, density, sigmas, clay flag, source, checked);
  /// the location is ignored.
  bool SameValues(const Mineral& other) const;
};

/// Name -> mineral, iterated in name order.
class MineralTable {
 public:
  MineralTable() = default;

  /// The table compiled from config/minerals.yaml at build time. Parsed once,
  /// on first use; locations name "<builtin>/config/minerals.yaml".
  static const MineralTable& Builtin();

  /// The mineral called `name`, or nullptr.
  const Mineral* Find(std::string_view name) const;

  /// The mineral called `name`; throws InputError at `where` with
  /// UnknownMineralMessage() if there is none.
  const Mineral& Get(std::string_view name, const SourceLocation& where = {}) const;

  /// Names close to `name`, best first: for "clay" or "clays" every clay
  /// mineral; otherwise names that start with `name` or contain it (or that
  /// `name` contains), then names within max(2, |name|/3) edits of it, nearest
  /// first. At most `limit` names; empty when nothing is close.
  std::vector<std::string> CloseMatches(std::string_view name, std::size_t limit = 8) const;

  /// Adds or replaces one mineral (whole entry). POROFIT_CHECKs a non-empty name.
  void Set(Mineral mineral);

  /// A copy of this table in which every mineral of `overrides` replaces the
  /// entry of the same name (whole entry, no per-field merge) or is added.
  MineralTable Merge(const MineralTable& overrides) const;

  std::vector<std::string> Names() const;
  std::size_t size() const { return minerals_.size(); }
  bool empty() const { return minerals_.empty(); }
  const std::map<std::string, Mineral, std::less<>>& minerals() const { return minerals_; }

 private:
  std::map<std::string, Mineral, std::less<>> minerals_;
};

/// The accepted values of a mineral's `checked` key, in order of strength:
/// "against source excerpt", "against secondary citation", "from memory".
const std::vector<std::string>& MineralCheckValues();

/// "" if `value` is one of MineralCheckValues(); otherwise the message of the
/// rule broken, naming `field` and the value ("quartz.checked = 'yes' is not
/// one of ...").
std::string MineralCheckIssue(const std::string& field, const std::string& value);

/// "unknown mineral 'illit' (did you mean 'illite'?)": the name and its
/// CloseMatches() in `table` (several: "did you mean one of 'a', 'b'?";
/// "clay": "the clay minerals are 'a', 'b', ...").
std::string UnknownMineralMessage(const MineralTable& table, std::string_view name);

/// The table as text for a person: one block per mineral with K, mu, density,
/// their 1-sigmas in GPa and g/cc, the clay flag, the source and how it was
/// checked, each on its own line; minerals named in `from_study` are marked
/// as the study's. Starts with the units and the table's cautions.
std::string DescribeMineralTable(const MineralTable& table, const std::vector<std::string>& from_study = {});

/// Reads a mineral table file (format above). Throws InputError if the file
/// cannot be read, is not valid YAML, or breaks a rule (unknown or missing key,
/// negative modulus, bad unit, empty source, a `checked` value outside
/// MineralCheckValues(), duplicate or malformed name).
MineralTable LoadMineralTable(const std::string& path);

/// Parses mineral-table text; `file_label` names it in error locations.
MineralTable ParseMineralTable(std::string_view text, const std::string& file_label);

/// The YAML text compiled into the library (the build-time copy of
/// config/minerals.yaml).
std::string_view BuiltinMineralTableText();

}  // namespace porofit::poro

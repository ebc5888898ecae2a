#include "porofit/poro/minerals.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cctype>
#include <fstream>
#include <sstream>

namespace porofit::poro {
namespace {

constexpr double GPa = 1e9;

const std::string kTablePath = std::string(POROFIT_SOURCE_DIR) + "/config/minerals.yaml";

// A small valid table; tests edit single lines of it. Line numbers are 1-based:
//  1 units, 2 modulus, 3 density, 4 minerals, 5 quartz, 6 bulk, 7 shear,
//  8 density, 9 sigma_bulk, 10 sigma_shear, 11 source.
std::vector<std::string> GoodLines() {
  return {
      "units:",
      "  modulus: GPa",
      "  density: g/cc",
      "minerals:",
      "  quartz:",
      "    bulk: 37",
      "    shear: 44",
      "    density: 2.65",
      "    sigma_bulk: 0.74",
      "    sigma_shear: 0.88",
      "    source: \"test entry [invented]\"",
  };
}

std::string Join(const std::vector<std::string>& lines) {
  std::string s;
  for (const auto& l : lines) s += l + "\n";
  return s;
}

// Parses `lines` expecting an InputError; returns it.
InputError ParseError(const std::vector<std::string>& lines) {
  try {
    ParseMineralTable(Join(lines), "minerals.yaml");
  } catch (const InputError& e) {
    return e;
  }
  ADD_FAILURE() << "expected InputError for:\n" << Join(lines);
  return InputError({}, "");
}

TEST(MineralTable, GoodTextParsesIntoSiUnits) {
  const MineralTable t = ParseMineralTable(Join(GoodLines()), "minerals.yaml");
  ASSERT_EQ(t.size(), 1u);
  const Mineral& q = t.Get("quartz");
  EXPECT_DOUBLE_EQ(q.bulk, 37 * GPa);
  EXPECT_DOUBLE_EQ(q.shear, 44 * GPa);
  EXPECT_DOUBLE_EQ(q.density, 2650.0);
  EXPECT_DOUBLE_EQ(q.sigma_bulk, 0.74 * GPa);
  EXPECT_FALSE(q.clay);
  EXPECT_EQ(q.source, "test entry [invented]");
  EXPECT_EQ(q.where.ToString(), "minerals.yaml:5:3");
}

TEST(MineralTable, OtherUnitsAreConverted) {
  auto lines = GoodLines();
  lines[1] = "  modulus: Mpsi";
  lines[2] = "  density: kg/m3";
  lines[7] = "    density: 2650";
  const MineralTable t = ParseMineralTable(Join(lines), "m.yaml");
  const Mineral& q = t.Get("quartz");
  EXPECT_NEAR(q.bulk, 37 * 6.894757293168361e9, 1e-3);
  EXPECT_DOUBLE_EQ(q.density, 2650.0);
}

TEST(MineralTable, UnknownKeyIsLocatedAndSuggestsTheNearestKey) {
  auto lines = GoodLines();
  lines[8] = "    sigma_bluk: 0.74";
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "unknown key 'sigma_bluk' in mineral 'quartz' (did you mean 'sigma_bulk'?)");
  EXPECT_EQ(e.location().ToString(), "minerals.yaml:9:5");
}

TEST(MineralTable, UnknownTopLevelKeyIsRejected) {
  auto lines = GoodLines();
  lines.push_back("minerls: {}");
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "unknown key 'minerls' in mineral table (did you mean 'minerals'?)");
  EXPECT_EQ(e.location().line, 12);
}

TEST(MineralTable, NegativeModulusIsLocatedAtTheValue) {
  auto lines = GoodLines();
  lines[5] = "    bulk: -37";
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "quartz.bulk = -37 must be > 0");
  EXPECT_EQ(e.location().ToString(), "minerals.yaml:6:11");
}

TEST(MineralTable, NegativeSigmaAndNonNumbersAreRejected) {
  auto lines = GoodLines();
  lines[9] = "    sigma_shear: -0.1";
  EXPECT_EQ(ParseError(lines).message(), "quartz.sigma_shear = -0.1 must be >= 0");
  lines = GoodLines();
  lines[6] = "    shear: stiff";
  EXPECT_EQ(ParseError(lines).message(), "quartz.shear = 'stiff' is not a number");
  lines = GoodLines();
  lines[6] = "    shear:";
  EXPECT_EQ(ParseError(lines).message(), "quartz.shear has no value");
}

TEST(MineralTable, MissingSourceIsLocatedAtTheMineral) {
  auto lines = GoodLines();
  lines.pop_back();
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "missing key 'source' in mineral 'quartz'");
  EXPECT_EQ(e.location().ToString(), "minerals.yaml:5:3");
}

TEST(MineralTable, EmptySourceIsRejected) {
  auto lines = GoodLines();
  lines[10] = "    source: \"  \"";
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "quartz.source is empty; give the published source (author, year, title, table)");
  EXPECT_EQ(e.location().line, 11);
}

TEST(MineralTable, BadUnitListsTheAcceptedUnits) {
  auto lines = GoodLines();
  lines[1] = "  modulus: m/s";
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.message().rfind("units.modulus = 'm/s' is not a modulus unit (accepted: ", 0), 0u) << e.message();
  EXPECT_NE(e.message().find("GPa"), std::string::npos);
  EXPECT_EQ(e.location().ToString(), "minerals.yaml:2:12");
}

TEST(MineralTable, DuplicateAndMalformedNamesAreRejected) {
  auto lines = GoodLines();
  auto entry = std::vector<std::string>(lines.begin() + 4, lines.end());
  lines.insert(lines.end(), entry.begin(), entry.end());
  InputError e = ParseError(lines);
  EXPECT_EQ(e.message(), "mineral 'quartz' is listed twice");
  EXPECT_EQ(e.location().line, 12);
  lines = GoodLines();
  lines[4] = "  Quartz:";
  EXPECT_EQ(ParseError(lines).message(), "mineral name 'Quartz' must use only lowercase letters, digits and '_'");
}

TEST(MineralTable, BadClayFlagIsRejected) {
  auto lines = GoodLines();
  lines.push_back("    clay: maybe");
  EXPECT_EQ(ParseError(lines).message(), "quartz.clay = 'maybe' is not true or false");
}

TEST(MineralTable, YamlSyntaxErrorIsLocated) {
  auto lines = GoodLines();
  lines[6] = "    shear: [44";
  const InputError e = ParseError(lines);
  EXPECT_EQ(e.location().file, "minerals.yaml");
  EXPECT_GT(e.location().line, 0);
}

TEST(LoadMineralTable, ErrorsNameTheFileLineAndColumn) {
  const std::string path = std::string(POROFIT_SOURCE_DIR) + "/tests/poro/data/negative_shear.yaml";
  try {
    LoadMineralTable(path);
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(e.message(), "calcite.shear = -32 must be > 0");
    EXPECT_EQ(e.location().file, path);
    EXPECT_EQ(e.location().line, 14);
    EXPECT_EQ(e.location().column, 12);
  }
}

TEST(LoadMineralTable, MissingFileIsAnInputError) {
  try {
    LoadMineralTable("no/such/minerals.yaml");
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_EQ(e.message().rfind("cannot open mineral table 'no/such/minerals.yaml'", 0), 0u) << e.message();
  }
}

TEST(MineralTable, UnknownMineralSuggestsTheNearestName) {
  try {
    MineralTable::Builtin().Get("dolomit", {"study.yaml", 3, 7});
    FAIL() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "study.yaml:3:7: error: unknown mineral 'dolomit' (did you mean 'dolomite'?)");
  }
}

TEST(MineralTable, MergeOverridesWholeEntriesAndAddsNewOnes) {
  auto lines = GoodLines();
  lines[5] = "    bulk: 36.6";
  lines.insert(lines.end(), {"  chamosite:", "    bulk: 95", "    shear: 11", "    density: 2.8",
                             "    sigma_bulk: 30", "    sigma_shear: 4", "    clay: true",
                             "    source: \"invented study value\""});
  const MineralTable overrides = ParseMineralTable(Join(lines), "study-minerals.yaml");
  const MineralTable& base = MineralTable::Builtin();
  const MineralTable merged = base.Merge(overrides);
  EXPECT_EQ(merged.size(), base.size() + 1);
  EXPECT_DOUBLE_EQ(merged.Get("quartz").bulk, 36.6 * GPa);
  EXPECT_EQ(merged.Get("quartz").source, "test entry [invented]");
  EXPECT_EQ(merged.Get("quartz").where.file, "study-minerals.yaml");
  EXPECT_TRUE(merged.Get("chamosite").clay);
  EXPECT_TRUE(merged.Get("calcite").SameValues(base.Get("calcite")));
  // The base table is unchanged.
  EXPECT_DOUBLE_EQ(base.Get("quartz").bulk, 37 * GPa);
}

// ----------------------------------------------------------- builtin table

TEST(BuiltinMineralTable, EqualsTheConfigFile) {
  const MineralTable file = LoadMineralTable(kTablePath);
  const MineralTable& builtin = MineralTable::Builtin();
  ASSERT_EQ(builtin.Names(), file.Names());
  for (const auto& [name, m] : file.minerals()) {
    EXPECT_TRUE(builtin.Get(name).SameValues(m)) << name;
  }
  std::ifstream in(kTablePath, std::ios::binary);
  std::ostringstream text;
  text << in.rdbuf();
  EXPECT_EQ(BuiltinMineralTableText(), text.str());
}

TEST(BuiltinMineralTable, EveryEntryNamesAPublishedSourceAndHowItWasChecked) {
  const MineralTable& t = MineralTable::Builtin();
  const std::vector<std::string> expected = {
      "albite",     "anhydrite", "calcite",   "chlorite",        "dolomite", "feldspar", "gulf_clay",
      "gypsum",     "halite",    "illite",    "kaolinite",       "mixed_clay", "montmorillonite", "muscovite",
      "orthoclase", "pyrite",    "quartz",    "siderite",        "smectite"};
  EXPECT_EQ(t.Names(), expected);
  const auto& allowed = MineralCheckValues();
  for (const auto& [name, m] : t.minerals()) {
    // A citation, not a tag: an author and a four-digit year, and no bracket tags.
    bool has_year = false;
    for (size_t i = 0; i + 4 <= m.source.size(); ++i)
      has_year = has_year || (std::isdigit(static_cast<unsigned char>(m.source[i])) &&
                              std::isdigit(static_cast<unsigned char>(m.source[i + 3])) &&
                              (m.source.compare(i, 2, "19") == 0 || m.source.compare(i, 2, "20") == 0));
    EXPECT_TRUE(has_year) << name << ": " << m.source;
    EXPECT_GT(m.source.size(), 40u) << name << ": a title belongs in the source: " << m.source;
    EXPECT_EQ(m.source.find('['), std::string::npos) << name << ": " << m.source;
    EXPECT_EQ(m.source.find("memory"), std::string::npos) << name << ": provenance belongs in 'checked'";
    EXPECT_NE(std::find(allowed.begin(), allowed.end(), m.checked), allowed.end()) << name << ": " << m.checked;
    EXPECT_GT(m.sigma_bulk, 0) << name;
    EXPECT_GT(m.sigma_shear, 0) << name;
  }
  // Table values as config/minerals.yaml records them, with their sources there.
  EXPECT_DOUBLE_EQ(t.Get("quartz").bulk, 37 * GPa);
  EXPECT_DOUBLE_EQ(t.Get("quartz").shear, 44 * GPa);
  EXPECT_DOUBLE_EQ(t.Get("calcite").bulk, 76.8 * GPa);
  EXPECT_DOUBLE_EQ(t.Get("pyrite").density, 4930);
  EXPECT_DOUBLE_EQ(t.Get("gulf_clay").bulk, 25 * GPa);
  EXPECT_EQ(t.Get("calcite").checked, "against source excerpt");
  EXPECT_EQ(t.Get("illite").checked, "from memory");
}

// The species of an XRD report and the common accessories, with physically
// sane values: K, mu > 0, Poisson ratio in (-1, 0.5), density of a mineral
// (2-5.5 g/cc), the clay flag on the clays only, and clays at 40 % sigma.
TEST(BuiltinMineralTable, HoldsTheXrdClaysAndAccessoriesWithSaneValues) {
  const MineralTable& t = MineralTable::Builtin();
  const std::vector<std::string> clays = {"illite", "kaolinite", "chlorite", "smectite", "montmorillonite"};
  const std::vector<std::string> others = {"muscovite", "anhydrite", "gypsum", "siderite", "pyrite", "halite"};
  for (const std::string& name : clays) {
    const Mineral* m = t.Find(name);
    ASSERT_NE(m, nullptr) << name;
    EXPECT_TRUE(m->clay) << name;
    EXPECT_NEAR(m->sigma_bulk / m->bulk, 0.4, 1e-12) << name;
    EXPECT_NEAR(m->sigma_shear / m->shear, 0.4, 1e-12) << name;
  }
  for (const std::string& name : others) {
    const Mineral* m = t.Find(name);
    ASSERT_NE(m, nullptr) << name;
    EXPECT_FALSE(m->clay) << name;
  }
  for (const auto& [name, m] : t.minerals()) {
    const double nu = (3 * m.bulk - 2 * m.shear) / (2 * (3 * m.bulk + m.shear));
    EXPECT_GT(nu, -1) << name;
    EXPECT_LT(nu, 0.5) << name;
    EXPECT_GE(m.density, 2000) << name;
    EXPECT_LE(m.density, 5500) << name;
    EXPECT_LE(m.bulk, 200 * GPa) << name;
  }
  EXPECT_GT(t.Get("pyrite").density, t.Get("siderite").density);
  EXPECT_GT(t.Get("siderite").density, t.Get("quartz").density);
}

TEST(MineralTable, CheckedMustBeOneOfTheAcceptedValues) {
  auto lines = GoodLines();
  lines.push_back("    checked: from memory");
  EXPECT_EQ(ParseMineralTable(Join(lines), "minerals.yaml").Get("quartz").checked, "from memory");
  lines.back() = "    checked: yes";
  const InputError e = ParseError(lines);
  EXPECT_STREQ(e.what(),
               "minerals.yaml:12:14: error: quartz.checked = 'yes' is not one of 'against source excerpt', "
               "'against secondary citation', 'from memory'");
  // Absent: not stated.
  EXPECT_EQ(ParseMineralTable(Join(GoodLines()), "minerals.yaml").Get("quartz").checked, "");
}

TEST(MineralTable, CloseMatchesByPrefixSubstringAndEditDistance) {
  const MineralTable& t = MineralTable::Builtin();
  EXPECT_EQ(t.CloseMatches("illit"), std::vector<std::string>{"illite"});
  EXPECT_EQ(t.CloseMatches("mont"), std::vector<std::string>{"montmorillonite"});
  EXPECT_EQ(t.CloseMatches("kaolin"), std::vector<std::string>{"kaolinite"});
  EXPECT_EQ(t.CloseMatches("feldspars"), std::vector<std::string>{"feldspar"});
  EXPECT_EQ(t.CloseMatches("Quartz"), std::vector<std::string>{"quartz"});
  EXPECT_EQ(t.CloseMatches("clorite"), std::vector<std::string>{"chlorite"});
  const std::vector<std::string> clays = {"chlorite",   "gulf_clay",       "illite",  "kaolinite",
                                          "mixed_clay", "montmorillonite", "smectite"};
  EXPECT_EQ(t.CloseMatches("clay"), clays);
  EXPECT_EQ(t.CloseMatches("clays"), clays);
  EXPECT_TRUE(t.CloseMatches("zircon").empty());
  EXPECT_EQ(t.CloseMatches("clay", 2).size(), 2u);
}

TEST(MineralTable, UnknownMineralListsTheCloseMatches) {
  const MineralTable& t = MineralTable::Builtin();
  // Regression: 'illite' used to suggest 'albite' (no clay species in the table).
  EXPECT_EQ(UnknownMineralMessage(t, "illit"), "unknown mineral 'illit' (did you mean 'illite'?)");
  EXPECT_EQ(UnknownMineralMessage(t, "clay"),
            "unknown mineral 'clay' (the clay minerals are 'chlorite', 'gulf_clay', 'illite', 'kaolinite', "
            "'mixed_clay', 'montmorillonite' and 'smectite')");
  EXPECT_EQ(UnknownMineralMessage(t, "zircon"), "unknown mineral 'zircon'");
  MineralTable small;
  for (const char* n : {"calcite", "calcite_hmc"}) {
    Mineral m = t.Get("calcite");
    m.name = n;
    small.Set(m);
  }
  EXPECT_EQ(UnknownMineralMessage(small, "calc"), "unknown mineral 'calc' (did you mean one of 'calcite', 'calcite_hmc'?)");
  try {
    t.Get("illit", {"study.yaml", 4, 9});
    ADD_FAILURE() << "expected InputError";
  } catch (const InputError& e) {
    EXPECT_STREQ(e.what(), "study.yaml:4:9: error: unknown mineral 'illit' (did you mean 'illite'?)");
  }
}

TEST(MineralTable, DescriptionShowsSourceAndCheckedOnTheirOwnLines) {
  const std::string d = DescribeMineralTable(MineralTable::Builtin(), {"quartz"});
  EXPECT_NE(d.find("decision support only"), std::string::npos);
  EXPECT_NE(d.find("\nquartz [from the study file]\n  K 37 +- 0.74 GPa, mu 44 +- 0.88 GPa, rho 2.65 g/cc\n"
                   "  source:  Carmichael 1989, Practical Handbook"),
            std::string::npos)
      << d;
  EXPECT_NE(d.find("\nillite (clay)\n"), std::string::npos);
  EXPECT_NE(d.find("  checked: from memory\n"), std::string::npos);
  EXPECT_NE(d.find("  checked: against source excerpt\n"), std::string::npos);
  EXPECT_EQ(d.find("[from memory"), std::string::npos);
  size_t blocks = 0;
  for (size_t at = d.find("\n  source:  "); at != std::string::npos; at = d.find("\n  source:  ", at + 1)) ++blocks;
  EXPECT_EQ(blocks, MineralTable::Builtin().size());
  MineralTable plain = ParseMineralTable(Join(GoodLines()), "minerals.yaml");
  EXPECT_NE(DescribeMineralTable(plain).find("  checked: not stated\n"), std::string::npos);
}

TEST(BuiltinMineralTable, ClaysCarryTheWidestRelativeUncertainty) {
  const MineralTable& t = MineralTable::Builtin();
  double widest_non_clay = 0, narrowest_clay = 1e9;
  for (const auto& [name, m] : t.minerals()) {
    const double rel = m.sigma_bulk / m.bulk;
    if (m.clay) narrowest_clay = std::min(narrowest_clay, rel);
    else widest_non_clay = std::max(widest_non_clay, rel);
  }
  EXPECT_TRUE(t.Get("gulf_clay").clay);
  EXPECT_TRUE(t.Get("mixed_clay").clay);
  EXPECT_GT(narrowest_clay, 2 * widest_non_clay);
}

}  // namespace
}  // namespace porofit::poro

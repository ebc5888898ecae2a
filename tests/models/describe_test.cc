// The plain-text catalogue listing for the `models` command.
#include <gtest/gtest.h>

#include <sstream>
#include <string>

#include "porofit/models/describe.h"

namespace porofit {
namespace {

// Wrapping moves line breaks; compare text with whitespace runs collapsed.
std::string Collapse(const std::string& s) {
  std::istringstream in(s);
  std::string word, out;
  while (in >> word) out += (out.empty() ? "" : " ") + word;
  return out;
}

TEST(DescribeCatalogue, MentionsEveryIdFormulaAndReference) {
  const std::string text = DescribeCatalogue(ModelRegistry::Builtin());
  const std::string flat = Collapse(text);
  for (const ModelSpec& m : ModelRegistry::Builtin().models()) {
    EXPECT_NE(text.find(m.id + "  -  " + m.name), std::string::npos) << m.id;
    EXPECT_NE(flat.find(Collapse(m.formula)), std::string::npos) << m.id;
    EXPECT_NE(flat.find(Collapse(m.reference)), std::string::npos) << m.id;
    EXPECT_NE(flat.find(Collapse(m.notes)), std::string::npos) << m.id;
  }
  EXPECT_EQ(text.rfind("7 models.", 0), 0u);
}

TEST(DescribeCatalogue, WrapsToAtMostOneHundredColumns) {
  std::istringstream in(DescribeCatalogue(ModelRegistry::Builtin()));
  std::string line;
  int lines = 0;
  while (std::getline(in, line)) {
    EXPECT_LE(line.size(), 100u) << line;
    ++lines;
  }
  EXPECT_GT(lines, 50);
}

TEST(DescribeModel, ListsEachParameterWithUnitBoundsAndMeaning) {
  const ModelSpec& m = *ModelRegistry::Builtin().Find("power-ref");
  const std::string text = DescribeModel(m);
  EXPECT_NE(text.find("K_ref  GPa"), std::string::npos) << text;
  EXPECT_NE(text.find("[0, +inf)"), std::string::npos) << text;
  EXPECT_NE(text.find("[0, 1]"), std::string::npos) << text;
  EXPECT_NE(text.find("[fixed unless freed]"), std::string::npos) << text;
  EXPECT_NE(text.find("P > 0 only"), std::string::npos) << text;
  for (const ParameterSpec& p : m.parameters)
    EXPECT_NE(Collapse(text).find(Collapse(p.meaning)), std::string::npos) << p.name;
}

TEST(DescribeModel, NamesTheClosureScale) {
  EXPECT_NE(DescribeModel(*ModelRegistry::Builtin().Find("exp-modulus")).find("closure:    P_close (MPa)"),
            std::string::npos);
  EXPECT_NE(DescribeModel(*ModelRegistry::Builtin().Find("linear-exp")).find("no closed form"),
            std::string::npos);
}

}  // namespace
}  // namespace porofit

// Every row of tests/data/bad/cases.tsv: loading the study must fail with an
// InputError at exactly the listed location, with the fragment in the message.
#include <gtest/gtest.h>

#include <cctype>
#include <fstream>
#include <ostream>
#include <sstream>
#include <string>
#include <vector>

#include "porofit/io/study_loader.h"

namespace porofit {
namespace {

struct BadCase {
  std::string study, location, fragment;
};

void PrintTo(const BadCase& c, std::ostream* os) { *os << c.study << " -> " << c.location; }

std::vector<BadCase> ReadManifest() {
  std::ifstream in(std::string(POROFIT_TEST_DATA_DIR) + "/bad/cases.tsv");
  std::vector<BadCase> out;
  std::string line;
  bool header = true;
  while (std::getline(in, line)) {
    if (header) { header = false; continue; }
    if (!line.empty() && line.back() == '\r') line.pop_back();
    if (line.empty() || line[0] == '#') continue;
    std::istringstream fields(line);
    BadCase c;
    std::getline(fields, c.study, '\t');
    std::getline(fields, c.location, '\t');
    std::getline(fields, c.fragment, '\t');  // an optional exit-status column may follow
    out.push_back(c);
  }
  return out;
}

TEST(BadInputCorpus, ManifestListsAtLeastTwentyDistinctStudies) {
  const auto cases = ReadManifest();
  ASSERT_GE(cases.size(), 20u);
  for (size_t i = 0; i < cases.size(); ++i)
    for (size_t j = 0; j < i; ++j) EXPECT_NE(cases[i].study, cases[j].study);
}

class BadInput : public ::testing::TestWithParam<BadCase> {};

TEST_P(BadInput, FailsAtTheListedLocationWithTheListedMessage) {
  const BadCase& c = GetParam();
  const std::string dir = std::string(POROFIT_TEST_DATA_DIR) + "/bad";
  try {
    LoadStudy(dir + "/" + c.study);
    FAIL() << c.study << " loaded without error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), dir + "/" + c.location) << e.what();
    EXPECT_NE(e.message().find(c.fragment), std::string::npos)
        << "message: " << e.message() << "\nexpected fragment: " << c.fragment;
    // what() is the full "location: error: message" diagnostic.
    EXPECT_EQ(std::string(e.what()), e.location().ToString() + ": error: " + e.message());
  }
}

std::string CaseName(const ::testing::TestParamInfo<BadCase>& info) {
  std::string s = info.param.study.substr(0, info.param.study.rfind('.'));
  for (char& ch : s)
    if (!std::isalnum(static_cast<unsigned char>(ch))) ch = '_';
  return s;
}

INSTANTIATE_TEST_SUITE_P(Manifest, BadInput, ::testing::ValuesIn(ReadManifest()), CaseName);

}  // namespace
}  // namespace porofit

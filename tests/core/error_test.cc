#include "porofit/core/error.h"

#include <gtest/gtest.h>

#include <vector>

namespace porofit {

TEST(InputError, WhatCarriesFileLineAndColumn) {
  InputError e({"study.yaml", 12, 5}, "porosity = 1.3 is outside [0, 1)");
  EXPECT_STREQ(e.what(), "study.yaml:12:5: error: porosity = 1.3 is outside [0, 1)");
  EXPECT_EQ(e.location().line, 12);
}

TEST(SourceLocation, OmitsUnknownParts) {
  EXPECT_EQ((SourceLocation{"a.csv", 3, 0}).ToString(), "a.csv:3");
  EXPECT_EQ((SourceLocation{"a.csv", 0, 0}).ToString(), "a.csv");
}

TEST(NearestWord, SuggestsCloseKeyOnly) {
  const std::vector<std::string> keys = {"porosity", "lithology", "bulk_density"};
  EXPECT_EQ(NearestWord("porsity", keys), "porosity");
  EXPECT_EQ(NearestWord("lithologgy", keys), "lithology");
  EXPECT_EQ(NearestWord("zzzzzzzzzzzz", keys), "");
}

TEST(FormatNumber, ShortestRoundTrip) {
  EXPECT_EQ(FormatNumber(1.3), "1.3");
  EXPECT_EQ(FormatNumber(-999.25), "-999.25");
}

}  // namespace porofit

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

namespace porofit {

// Human-facing numbers: meaningful digits, never a 16-digit double.
TEST(FormatRounded, KeepsSignificantDigitsAndTrailingZeros) {
  EXPECT_EQ(FormatRounded(0.9900855958079328), "0.990");
  EXPECT_EQ(FormatRounded(20.7496), "20.7");
  EXPECT_EQ(FormatRounded(9.996), "10.0");
  EXPECT_EQ(FormatRounded(3.2e6), "3.20e6");
  EXPECT_EQ(FormatRounded(-0.000012345), "-1.23e-5");
  EXPECT_EQ(FormatRounded(0.0), "0");
  EXPECT_EQ(FormatRounded(1234.5, 3), "1230");
}

TEST(FormatPlusMinus, RoundsTheValueToTheErrorsPlace) {
  EXPECT_EQ(FormatPlusMinus(20.7496, 4.91871), "20.7 ± 4.9");
  EXPECT_EQ(FormatPlusMinus(0.6512, 0.0123), "0.651 ± 0.012");
  EXPECT_EQ(FormatPlusMinus(812.4, 96.2), "812 ± 96");
  EXPECT_EQ(FormatPlusMinus(5.0, 0.0), "5.00 ± ?");
}

}  // namespace porofit

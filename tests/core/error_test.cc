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

// Messages quote user text; whatever bytes it held, the message stays valid
// UTF-8 with no control characters other than line feed and tab.
TEST(PrintableText, EscapesInvalidUtf8AndControlBytes) {
  EXPECT_EQ(PrintableText("plain ascii"), "plain ascii");
  EXPECT_EQ(PrintableText("K \xC3\x97 P, \xE2\x89\xA4 1, \xF0\x9F\x98\x80"), "K \xC3\x97 P, \xE2\x89\xA4 1, \xF0\x9F\x98\x80");
  EXPECT_EQ(PrintableText("lone \xC3 byte"), "lone \\xC3 byte");
  EXPECT_EQ(PrintableText("cut \xE2\x89"), "cut \\xE2\\x89");
  EXPECT_EQ(PrintableText("latin-1 caf\xE9"), "latin-1 caf\\xE9");
  EXPECT_EQ(PrintableText("overlong \xC0\xAF"), "overlong \\xC0\\xAF");
  EXPECT_EQ(PrintableText("surrogate \xED\xA0\x80"), "surrogate \\xED\\xA0\\x80");
  using namespace std::string_literals;  // "..."s keeps the NUL byte
  EXPECT_EQ(PrintableText("nul \0 bell \a del \x7F"s), "nul \\x00 bell \\x07 del \\x7F");
  EXPECT_EQ(PrintableText("line\nand\ttab"), "line\nand\ttab");
}

TEST(InputError, MessageIsValidUtf8WhateverTheInput) {
  const InputError e({"study.yaml", 3, 1}, "unexpected '\xC3' in 'S\x01'");
  EXPECT_EQ(e.message(), "unexpected '\\xC3' in 'S\\x01'");
  EXPECT_STREQ(e.what(), "study.yaml:3:1: error: unexpected '\\xC3' in 'S\\x01'");
  EXPECT_EQ(PrintableText(e.what()), e.what());
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

#include "porofit/io/csv.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>

namespace porofit::csv {
namespace {

TEST(Csv, ReadsHeaderAndRowsWithLineNumbers) {
  const Table t = ParseCsv("a,b\n1,2\n\n3,4\n", "t.csv");
  ASSERT_TRUE(t.has_header);
  EXPECT_EQ(t.header.fields, (std::vector<std::string>{"a", "b"}));
  ASSERT_EQ(t.rows.size(), 2u);
  EXPECT_EQ(t.rows[0].line, 2);
  EXPECT_EQ(t.rows[1].line, 4);  // the blank line 3 is skipped but counted
  EXPECT_EQ(t.rows[1].fields, (std::vector<std::string>{"3", "4"}));
}

TEST(Csv, SkipsCommentLinesButKeepsHashInsideData) {
  const Table t = ParseCsv("# header comment\n  # indented comment\nname,x\n\"a#1\",2\n", "t.csv");
  EXPECT_EQ(t.header.line, 3);
  ASSERT_EQ(t.rows.size(), 1u);
  EXPECT_EQ(t.rows[0].fields[0], "a#1");
  EXPECT_EQ(t.rows[0].line, 4);
}

TEST(Csv, HandlesCrlfAndByteOrderMark) {
  const Table t = ParseCsv("\xEF\xBB\xBFP,K\r\n1,2\r\n3,4\r\n", "t.csv");
  EXPECT_EQ(t.header.fields, (std::vector<std::string>{"P", "K"}));
  ASSERT_EQ(t.rows.size(), 2u);
  EXPECT_EQ(t.rows[1].fields, (std::vector<std::string>{"3", "4"}));
  EXPECT_EQ(t.rows[1].line, 3);
}

TEST(Csv, UnquotesFieldsWithDelimitersAndEscapedQuotes) {
  const Table t = ParseCsv("a,b,c\n\"x, y\",\"say \"\"hi\"\"\", z \n", "t.csv");
  ASSERT_EQ(t.rows.size(), 1u);
  EXPECT_EQ(t.rows[0].fields, (std::vector<std::string>{"x, y", "say \"hi\"", "z"}));
}

TEST(Csv, QuotedFieldMaySpanLinesAndLaterRowsKeepTheirLineNumbers) {
  const Table t = ParseCsv("a,b\n\"two\nlines\",1\n5,6\n", "t.csv");
  ASSERT_EQ(t.rows.size(), 2u);
  EXPECT_EQ(t.rows[0].fields[0], "two\nlines");
  EXPECT_EQ(t.rows[0].line, 2);
  EXPECT_EQ(t.rows[1].line, 4);
}

TEST(Csv, RecordsTheCharacterColumnOfEachField) {
  const Table t = ParseCsv("a,b,c\n10, 20,  x\n", "t.csv");
  ASSERT_EQ(t.rows.size(), 1u);
  EXPECT_EQ(t.rows[0].columns, (std::vector<int>{1, 5, 10}));
  EXPECT_EQ(t.rows[0].Where("t.csv", 2).ToString(), "t.csv:2:10");
  EXPECT_EQ(t.rows[0].Where("t.csv", 9).ToString(), "t.csv:2");
}

TEST(Csv, KeepsTrailingEmptyField) {
  const Table t = ParseCsv("a,b\n1,\n", "t.csv");
  ASSERT_EQ(t.rows.size(), 1u);
  EXPECT_EQ(t.rows[0].fields, (std::vector<std::string>{"1", ""}));
}

TEST(Csv, UnterminatedQuoteIsAnErrorAtTheOpeningQuote) {
  try {
    ParseCsv("a,b\n1,\"open\n2,3\n", "t.csv");
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_EQ(e.location().ToString(), "t.csv:2:3");
    EXPECT_NE(e.message().find("unterminated"), std::string::npos);
  }
}

TEST(Csv, TextAfterClosingQuoteIsAnError) {
  EXPECT_THROW(ParseCsv("a\n\"x\"y\n", "t.csv"), InputError);
}

TEST(Csv, WithoutHeaderAllLinesAreRows) {
  ReadOptions o;
  o.has_header = false;
  o.delimiter = ';';
  const Table t = ParseCsv("1;2\n3;4\n", "t.csv", o);
  EXPECT_FALSE(t.has_header);
  ASSERT_EQ(t.rows.size(), 2u);
  EXPECT_EQ(t.rows[0].fields[1], "2");
}

TEST(Csv, MissingFileIsAnInputErrorNamingTheFile) {
  try {
    ReadCsvFile("definitely-not-here.csv");
    FAIL() << "no error";
  } catch (const InputError& e) {
    EXPECT_NE(e.message().find("definitely-not-here.csv"), std::string::npos);
  }
}

TEST(CsvNumber, AcceptsPlainAndSignedAndExponentForms) {
  double v = 0;
  EXPECT_TRUE(ParseNumber("1.5", v));
  EXPECT_DOUBLE_EQ(v, 1.5);
  EXPECT_TRUE(ParseNumber("+4", v));
  EXPECT_DOUBLE_EQ(v, 4);
  EXPECT_TRUE(ParseNumber("-2e3", v));
  EXPECT_DOUBLE_EQ(v, -2000);
}

TEST(CsvNumber, RejectsEmptyTrailingJunkAndDoubleSign) {
  double v = 0;
  EXPECT_FALSE(ParseNumber("", v));
  EXPECT_FALSE(ParseNumber("1.5 GPa", v));
  EXPECT_FALSE(ParseNumber("++1", v));
  EXPECT_FALSE(ParseNumber("n/a", v));
  EXPECT_FALSE(ParseNumber("0x10", v));
}

}  // namespace
}  // namespace porofit::csv

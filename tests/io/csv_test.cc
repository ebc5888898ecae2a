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


// ---- dialects: delimiter and decimal mark, declared or detected

ReadOptions Detect() {
  ReadOptions o;
  o.delimiter = kDetect;
  o.decimal = kDetect;
  return o;
}

SourceLocation ErrorAt(std::string_view text, const ReadOptions& o) {
  try {
    ParseCsv(text, "t.csv", o);
  } catch (const InputError& e) {
    return e.location();
  }
  ADD_FAILURE() << "no error for: " << text;
  return {};
}

TEST(CsvDialect, DetectsTheSemicolonFromTheHeaderAndTheDecimalCommaFromTheCells) {
  const Table t = ParseCsv("P (MPa);K [GPa]\n5;12,5\n10;-0,75e1\n", "t.csv", Detect());
  EXPECT_EQ(t.dialect.delimiter, ';');
  EXPECT_EQ(t.dialect.decimal, ',');
  EXPECT_TRUE(t.dialect.delimiter_detected);
  EXPECT_TRUE(t.dialect.decimal_detected);
  ASSERT_EQ(t.rows.size(), 2u);
  double v = 0;
  ASSERT_TRUE(ParseNumber(t.rows[0].fields[1], v, t.rows[0].decimal));
  EXPECT_DOUBLE_EQ(v, 12.5);
  ASSERT_TRUE(ParseNumber(t.rows[1].fields[1], v, t.rows[1].decimal));
  EXPECT_DOUBLE_EQ(v, -7.5);
}

TEST(CsvDialect, SemicolonFileWithPointDecimalsKeepsThePoint) {
  const Table t = ParseCsv("P;K\n5;12.5\n10;13\n", "t.csv", Detect());
  EXPECT_EQ(t.dialect.delimiter, ';');
  EXPECT_EQ(t.dialect.decimal, '.');
}

TEST(CsvDialect, CommaDelimitedFileIsNeverReadWithDecimalCommas) {
  // Detected: a comma header means '.' decimals, so "12,5" is two fields.
  const Table t = ParseCsv("P,K\n5,12,5\n", "t.csv", Detect());
  EXPECT_EQ(t.dialect.decimal, '.');
  EXPECT_EQ(t.rows[0].fields.size(), 3u);
  // Declared decimal comma over a comma header: an error at the header line.
  ReadOptions o = Detect();
  o.decimal = ',';
  const SourceLocation at = ErrorAt("# note\nP,K\n5,12\n", o);
  EXPECT_EQ(at.line, 2);
}

TEST(CsvDialect, TabDelimiterKeepsEmptyFieldsAndTrimsOnlySpaces) {
  const Table t = ParseCsv("P [MPa]\tK [GPa]\tnote\n 5 \t\tx y\n", "t.csv", Detect());
  EXPECT_EQ(t.dialect.delimiter, '\t');
  ASSERT_EQ(t.rows[0].fields.size(), 3u);
  EXPECT_EQ(t.rows[0].fields[0], "5");
  EXPECT_EQ(t.rows[0].fields[1], "");
  EXPECT_EQ(t.rows[0].fields[2], "x y");
  EXPECT_EQ(t.rows[0].columns[2], 6);
}

TEST(CsvDialect, HeaderWithTwoKindsOfDelimiterIsAmbiguousAtTheSecondKind) {
  const SourceLocation at = ErrorAt("# c\nP;K,x\n1;2\n", Detect());
  EXPECT_EQ(at.line, 2);
  EXPECT_EQ(at.column, 4);  // the first ',', the kind met second on the line
  // A delimiter inside quotes does not count.
  EXPECT_EQ(ParseCsv("\"P, abs\";K\n1;2\n", "t.csv", Detect()).dialect.delimiter, ';');
}

TEST(CsvDialect, MixedDecimalMarksAreAnErrorAtTheDisagreeingCell) {
  const SourceLocation at = ErrorAt("P;K\n1,5;2\n3;4.25\n", Detect());
  EXPECT_EQ(at.line, 3);
  EXPECT_EQ(at.column, 3);
}

TEST(CsvDialect, DeclaredDecimalCommaRejectsPointCells) {
  ReadOptions o;
  o.delimiter = ';';
  o.decimal = ',';
  const Table t = ParseCsv("P;K\n1;2.5\n", "t.csv", o);
  double v = 0;
  EXPECT_FALSE(ParseNumber(t.rows[0].fields[1], v, t.rows[0].decimal));
  EXPECT_EQ(DecimalHint(t.rows[0].fields[1], ','), "; the decimal mark of this file is a comma");
  EXPECT_EQ(DecimalHint("2,5", ','), "");
}

TEST(CsvDialect, SkipsDelimiterOnlyRowsCommentsAndTrailingBlankLines) {
  const Table t = ParseCsv("# exported\r\nP;K\r\n1;2\r\n;;\r\n ; \r\n3;4\r\n;;\r\n\r\n\r\n", "t.csv", Detect());
  ASSERT_EQ(t.rows.size(), 2u);
  EXPECT_EQ(t.rows[1].line, 6);
  EXPECT_EQ(t.rows[1].fields[1], "4");
}

TEST(CsvDialect, ColumnsCountBytesAfterTheByteOrderMark) {
  const Table t = ParseCsv("\xEF\xBB\xBFP (MPa);K [GPa]\r\n10;x\r\n", "t.csv", Detect());
  EXPECT_EQ(t.header.columns[1], 9);  // the BOM takes no column
  EXPECT_EQ(t.header.fields[0], "P (MPa)");
  EXPECT_EQ(t.rows[0].Where("t.csv", 1).ToString(), "t.csv:2:4");
}

TEST(CsvNumber, DecimalCommaForm) {
  double v = 0;
  EXPECT_TRUE(ParseNumber("12,5", v, ','));
  EXPECT_DOUBLE_EQ(v, 12.5);
  EXPECT_TRUE(ParseNumber("7", v, ','));
  EXPECT_FALSE(ParseNumber("1,2,3", v, ','));
  EXPECT_FALSE(ParseNumber("1.234,5", v, ','));
  EXPECT_FALSE(ParseNumber("12,5", v));
  EXPECT_EQ(DecimalMarkOf("12,5"), ',');
  EXPECT_EQ(DecimalMarkOf("-1.5e3"), '.');
  EXPECT_EQ(DecimalMarkOf("12"), '\0');
  EXPECT_EQ(DecimalMarkOf("A. N. Other"), '\0');
}

TEST(CsvHeader, SplitsBracketedAndBlankSeparatedUnits) {
  EXPECT_EQ(SplitHeaderField("Pressure (MPa)").name, "Pressure");
  EXPECT_EQ(SplitHeaderField("Pressure (MPa)").unit, "MPa");
  EXPECT_EQ(SplitHeaderField("Confining pressure [psi]").name, "Confining pressure");
  EXPECT_EQ(SplitHeaderField("K[GPa]").unit, "GPa");
  EXPECT_EQ(SplitHeaderField("P_c psi").name, "P_c");
  EXPECT_EQ(SplitHeaderField("P_c psi").unit, "psi");
  EXPECT_EQ(SplitHeaderField("K_GPa").unit, "");  // the _UNIT form needs the column's units (csv_columns.h)
}

}  // namespace
}  // namespace porofit::csv

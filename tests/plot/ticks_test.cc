#include <sstream>
#include <locale>
#include "porofit/plot/ticks.h"

#include <gtest/gtest.h>

#include <clocale>
#include <stdexcept>
#include <string>
#include <vector>

using porofit::plot::EscapeXml;
using porofit::plot::FormatNumber;
using porofit::plot::FormatTick;
using porofit::plot::MakeTicks;
using porofit::plot::Scale;

// Expected ticks follow the 1-2-5 rule written in ticks.h (common practice).
TEST(MakeTicks, ZeroToOneStepsByTwoTenths) {
  const auto t = MakeTicks(0, 1, Scale::kLinear, true);
  ASSERT_EQ(t.major.size(), 6u);
  EXPECT_DOUBLE_EQ(t.lo, 0);
  EXPECT_DOUBLE_EQ(t.hi, 1);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"0", "0.2", "0.4", "0.6", "0.8", "1"}));
}

TEST(MakeTicks, ZeroToThirtySevenSnapsToFortyInStepsOfTen) {
  const auto t = MakeTicks(0, 37, Scale::kLinear, true);
  EXPECT_DOUBLE_EQ(t.hi, 40);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"0", "10", "20", "30", "40"}));
}

TEST(MakeTicks, LogRangeHasDecadeMajorsAndEightMinorsPerDecade) {
  const auto t = MakeTicks(1e-3, 1e2, Scale::kLog, true);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"0.001", "0.01", "0.1", "1", "10", "100"}));
  EXPECT_EQ(t.minor.size(), 40u);  // 2..9 in each of 5 decades
  EXPECT_DOUBLE_EQ(t.minor.front(), 2e-3);
  EXPECT_DOUBLE_EQ(t.minor.back(), 90);
}

TEST(MakeTicks, WideLogRangeLabelsEveryOtherDecade) {
  const auto t = MakeTicks(1e-6, 1e6, Scale::kLog, true);
  EXPECT_LE(t.major.size(), 7u);
  EXPECT_GE(t.major.size(), 4u);
  EXPECT_TRUE(t.minor.empty());  // 12 decades: minor ticks would be clutter
}

TEST(MakeTicks, LogRangeInsideOneDecadeStillHasLabelledTicks) {
  const auto t = MakeTicks(2, 8, Scale::kLog, false);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"2", "5"}));
}

TEST(MakeTicks, NarrowLogRangeSnapsToOneTwoFiveMultiples) {
  const auto t = MakeTicks(1000, 3000, Scale::kLog, true);
  EXPECT_DOUBLE_EQ(t.lo, 1000);
  EXPECT_DOUBLE_EQ(t.hi, 5000);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"1000", "2000", "5000"}));
  EXPECT_EQ(t.minor.size(), 4u);  // 2000, 3000, 4000, 5000
}

TEST(MakeTicks, NegativeRangeSnapsOutward) {
  const auto t = MakeTicks(-7.3, -2.1, Scale::kLinear, true);
  EXPECT_DOUBLE_EQ(t.lo, -8);
  EXPECT_DOUBLE_EQ(t.hi, -2);
  EXPECT_EQ(t.labels, (std::vector<std::string>{"-8", "-7", "-6", "-5", "-4", "-3", "-2"}));
}

TEST(MakeTicks, RangeAcrossZeroHasAnExactZeroTick) {
  const auto t = MakeTicks(-0.3, 0.7, Scale::kLinear, true);
  bool zero = false;
  for (std::size_t i = 0; i < t.major.size(); ++i) zero = zero || (t.major[i] == 0 && t.labels[i] == "0");
  EXPECT_TRUE(zero);
}

TEST(MakeTicks, DegenerateRangeIsWidenedAroundTheValue) {
  const auto t = MakeTicks(5, 5, Scale::kLinear, true);
  EXPECT_LT(t.lo, 5);
  EXPECT_GT(t.hi, 5);
  EXPECT_GE(t.major.size(), 3u);
  const auto z = MakeTicks(0, 0, Scale::kLinear, true);
  EXPECT_DOUBLE_EQ(z.lo, -1);
  EXPECT_DOUBLE_EQ(z.hi, 1);
  const auto l = MakeTicks(3, 3, Scale::kLog, true);
  EXPECT_LT(l.lo, 3);
  EXPECT_GT(l.hi, 3);
}

TEST(MakeTicks, WithoutSnapKeepsTheGivenRange) {
  const auto t = MakeTicks(0.3, 9.7, Scale::kLinear, false);
  EXPECT_DOUBLE_EQ(t.lo, 0.3);
  EXPECT_DOUBLE_EQ(t.hi, 9.7);
  for (double v : t.major) {
    EXPECT_GE(v, 0.3);
    EXPECT_LE(v, 9.7);
  }
}

TEST(MakeTicks, ReversedInputOrderGivesTheSameTicks) {
  EXPECT_EQ(MakeTicks(37, 0, Scale::kLinear, true).labels, MakeTicks(0, 37, Scale::kLinear, true).labels);
}

TEST(MakeTicks, RejectsNonFiniteAndNonPositiveLogRanges) {
  EXPECT_THROW(MakeTicks(0, 10, Scale::kLog, true), std::invalid_argument);
  EXPECT_THROW(MakeTicks(0, std::numeric_limits<double>::quiet_NaN(), Scale::kLinear, true), std::invalid_argument);
}

TEST(FormatTick, UsesJustEnoughDecimalsAndNeverMinusZero) {
  EXPECT_EQ(FormatTick(0.25, 0.25), "0.25");
  EXPECT_EQ(FormatTick(2.5, 2.5), "2.5");
  EXPECT_EQ(FormatTick(-0.0, 1), "0");
  EXPECT_EQ(FormatTick(1500, 500), "1500");
  EXPECT_EQ(FormatTick(1e-5, 1e-5), "1e-05");
  EXPECT_EQ(FormatTick(2.5e6, 5e5), "2.5e+06");
}

TEST(FormatNumber, TrimsTrailingZerosAndNegativeZero) {
  EXPECT_EQ(FormatNumber(12.5), "12.5");
  EXPECT_EQ(FormatNumber(3), "3");
  EXPECT_EQ(FormatNumber(-0.001), "0");
  EXPECT_EQ(FormatNumber(1.005, 3), "1.005");
  EXPECT_EQ(FormatNumber(std::numeric_limits<double>::quiet_NaN()), "nan");
}

// A comma-decimal global C++ locale built in the test (no system locale
// needed): a number written through the stream reads "1,5"; FormatNumber
// must not follow it.
struct CommaDecimal : std::numpunct<char> {
  char do_decimal_point() const override { return ','; }
};

TEST(FormatNumber, IgnoresACommaDecimalLocale) {
  const std::locale saved = std::locale::global(std::locale(std::locale::classic(), new CommaDecimal));
  std::ostringstream through_stream;
  through_stream << 1.5;
  const std::string s = FormatNumber(1.5);
  std::locale::global(saved);
  EXPECT_EQ(through_stream.str(), "1,5");  // the locale is in effect
  EXPECT_EQ(s, "1.5");
}

TEST(EscapeXml, EscapesMarkupCharactersAndDropsControlCharacters) {
  EXPECT_EQ(EscapeXml("a<b & \"c\" 'd'>"), "a&lt;b &amp; &quot;c&quot; &apos;d&apos;&gt;");
  EXPECT_EQ(EscapeXml(std::string("x\x01y\tz")), "xy\tz");
  EXPECT_EQ(EscapeXml("K\xc3\xa9 \xce\xb1"), "K\xc3\xa9 \xce\xb1");  // UTF-8 passes through
}

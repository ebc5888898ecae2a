#include "porofit/run/progress.h"

#include <gtest/gtest.h>

#include <sstream>

namespace porofit {
namespace {

TEST(FormatProgress, ShowsBarCountPercentRateAndEta) {
  EXPECT_EQ(FormatProgress(5000, 10000, 5.0, 20),
            "[##########----------]   5000/10000   50.0%  1000 samples/s  ETA 0:05");
}

TEST(FormatProgress, LeavesRateAndEtaOutBeforeAnythingIsDone) {
  EXPECT_EQ(FormatProgress(0, 200, 0.0, 10), "[----------]    0/200    0.0%");
  EXPECT_EQ(FormatProgress(0, 200, 3.0, 0), "  0/200    0.0%");
}

TEST(FormatProgress, EtaPastAnHourHasHours) {
  // 1 sample in 2 s, 1,999 left: 3,998 s = 1:06:38.
  EXPECT_EQ(FormatProgress(1, 2000, 2.0, 0), "   1/2000    0.1%  0.5 samples/s  ETA 1:06:38");
}

TEST(FormatProgress, FinishedRunShowsTotalTimeInsteadOfEta) {
  EXPECT_EQ(FormatProgress(300, 300, 60.0, 4), "[####]  300/300  100.0%  5.0 samples/s  in 1:00");
}

TEST(ProgressMeter, WritesNothingOffTerminalForAShortRun) {
  std::ostringstream out;
  ProgressMeter m(out, false, 10);
  for (size_t i = 1; i <= 10; ++i) m.Update(i);
  m.Finish();
  EXPECT_EQ(out.str(), "");
}

TEST(ProgressMeter, OnATerminalEndsWithTheFinalLine) {
  std::ostringstream out;
  ProgressMeter m(out, true, 4);
  for (size_t i = 1; i <= 4; ++i) m.Update(i);
  m.Finish();
  const std::string s = out.str();
  ASSERT_FALSE(s.empty());
  EXPECT_EQ(s.front(), '\r');
  EXPECT_EQ(s.back(), '\n');
  EXPECT_NE(s.find("4/4  100.0%"), std::string::npos) << s;
}

}  // namespace
}  // namespace porofit

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

TEST(ProgressMeter, ShowsTheWorkInsideARunningSample) {
  // Interval 0: every call writes a plain line, so the test sees each state.
  std::ostringstream out;
  ProgressMeter m(out, false, 3, ProgressMeter::Clock::duration::zero());
  m.Inner(0, "S-1: bootstrap exp-modulus", 812, 2000);
  EXPECT_EQ(m.Line(), "0/3    0.0%  | S-1: bootstrap exp-modulus 812/2000");
  EXPECT_NE(out.str().find("progress: 0/3    0.0%  | S-1: bootstrap exp-modulus 812/2000\n"), std::string::npos)
      << out.str();
  // A second sample reporting at once: the lowest index is shown, the rest counted.
  m.Inner(1, "S-2: bootstrap linear", 10, 2000);
  EXPECT_NE(m.Line().find("| S-1: bootstrap exp-modulus 812/2000 (+1 more)"), std::string::npos) << m.Line();
  // Done work leaves the line; so does the work of samples counted as done.
  m.Inner(0, "S-1: bootstrap exp-modulus", 2000, 2000);
  EXPECT_NE(m.Line().find("| S-2: bootstrap linear 10/2000"), std::string::npos) << m.Line();
  EXPECT_EQ(m.Line().find("more"), std::string::npos);
  m.Update(2);
  EXPECT_EQ(m.Line().find('|'), std::string::npos) << m.Line();
  m.Inner(1, "S-2: bootstrap linear", 11, 2000);  // late report of a sample already done: ignored
  EXPECT_EQ(m.Line().find('|'), std::string::npos) << m.Line();
  m.Update(3);
  m.Finish();
  const std::string s = out.str();
  const std::string last = s.substr(s.rfind("progress: "));
  EXPECT_EQ(last.rfind("progress: 3/3  100.0%", 0), 0u) << last;
  EXPECT_EQ(last.find('|'), std::string::npos) << last;  // the final line has no inner work
}

TEST(ProgressMeter, OnATerminalTheInnerWorkIsPartOfTheRedrawnLine) {
  std::ostringstream out;
  ProgressMeter m(out, true, 1, ProgressMeter::Clock::duration::zero());
  m.Inner(0, "A: bootstrap power-ref", 5, 10);
  const std::string s = out.str();
  ASSERT_FALSE(s.empty());
  EXPECT_EQ(s.front(), '\r');
  EXPECT_NE(s.find("[--------------------]  0/1    0.0%  | A: bootstrap power-ref 5/10\x1b[K"), std::string::npos) << s;
}

}  // namespace
}  // namespace porofit

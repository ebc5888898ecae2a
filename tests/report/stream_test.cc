// The streaming report (porofit/report/stream.h) against the whole-run writers.
#include "porofit/report/stream.h"

#include <gtest/gtest.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <sstream>
#include <stdexcept>

#include "porofit/io/study_loader.h"
#include "porofit_test/folder_snapshot.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p, std::ios::binary);
  std::ostringstream s;
  s << in.rdbuf();
  return s.str();
}

fs::path Scratch(const std::string& name) {
  const fs::path d = fs::temp_directory_path() / ("porofit-stream-" + std::to_string(::getpid()) + "-" + name);
  fs::remove_all(d);
  return d;
}

const Study& SampleStudy() {
  static const Study s = LoadStudy(std::string(POROFIT_SOURCE_DIR) + "/samples/invented-field-study.yaml");
  return s;
}

RunOptions Fixed(int threads) {
  RunOptions o;
  o.threads = threads;
  o.timestamp_utc = "2026-02-03T04:05:06Z";
  o.command_line = "porofit fit study.yaml";
  return o;
}

TEST(StreamingReport, WritesTheSameBytesAsTheWholeRunWriters) {
  const fs::path a = Scratch("whole"), b = Scratch("stream");
  WriteReportFolder(RunStudy(SampleStudy(), Fixed(1)), a);
  StreamOptions window;
  window.window = 1;  // the smallest reorder window still keeps the order
  const StreamReportResult r = RunAndWriteReportFolder(SampleStudy(), Fixed(2), b, {}, {}, window);
  // The sample study has a depth table: its file is compared too.
  ASSERT_FALSE(SampleStudy().depth_tables.empty());
  std::vector<std::string> files = ReportFileNames(SampleStudy());
  files.push_back(kOutputMarkerName);  // the same run stamp in both
  for (const std::string& f : files) {
    if (f == "results.json") continue;
    ASSERT_TRUE(fs::exists(b / f)) << f;
    EXPECT_EQ(Slurp(a / f), Slurp(b / f)) << f;
  }
  // results.json records the thread count; otherwise identical.
  std::string ja = Slurp(a / "results.json"), jb = Slurp(b / "results.json");
  const std::string one = "\"threads\": 1", two = "\"threads\": 2";
  ASSERT_NE(jb.find(two), std::string::npos);
  jb.replace(jb.find(two), two.size(), one);
  EXPECT_EQ(ja, jb);
  EXPECT_EQ(r.summary, Slurp(b / "summary.txt"));
  EXPECT_EQ(r.metadata.threads, 2);
  fs::remove_all(a);
  fs::remove_all(b);
}

TEST(StreamingReport, LargeStudySummaryShowsTheFirstSamplesThenCountsPerModel) {
  const fs::path b = Scratch("limit");
  StreamReportOptions o;
  o.summary_sample_limit = 2;
  const StreamReportResult r = RunAndWriteReportFolder(SampleStudy(), Fixed(1), b, {}, o);
  const size_t n = SampleStudy().samples.size();
  ASSERT_GT(n, 2u);
  const std::string& s = r.summary;
  EXPECT_NE(s.find("Sample " + SampleStudy().samples[1].sample.id + " "), std::string::npos) << s;
  EXPECT_EQ(s.find("Sample " + SampleStudy().samples[2].sample.id + " "), std::string::npos) << s;
  EXPECT_NE(s.find(std::to_string(n - 2) + " more samples are not shown one by one (summary limit 2)"),
            std::string::npos) << s;
  EXPECT_NE(s.find("All " + std::to_string(n) + " samples, per model:"), std::string::npos) << s;
  EXPECT_NE(s.find("  exp-modulus    "), std::string::npos) << s;
  // The files still hold every sample.
  const std::string fits = Slurp(b / "fits.csv");
  for (const StudySample& ss : SampleStudy().samples) EXPECT_NE(fits.find("\n" + ss.sample.id + ","), std::string::npos);
  fs::remove_all(b);
}

TEST(StreamingReport, FailureWhileWritingLeavesNoFolder) {
  const fs::path b = Scratch("fail");
  StreamOptions stream;
  stream.progress = [](size_t done, size_t) {
    if (done == 2) throw std::runtime_error("simulated failure");
  };
  EXPECT_THROW(RunAndWriteReportFolder(SampleStudy(), Fixed(2), b, {}, {}, stream), std::runtime_error);
  EXPECT_FALSE(fs::exists(b));
  for (const auto& e : fs::directory_iterator(b.parent_path()))
    EXPECT_EQ(e.path().filename().string().find(b.filename().string()), std::string::npos) << e.path();
}

TEST(StreamingReport, CountsTheFitsAndTheConvergedOnes) {
  const fs::path b = Scratch("counts");
  const StreamReportResult r = RunAndWriteReportFolder(SampleStudy(), Fixed(1), b);
  size_t requested = 0;
  for (const StudySample& ss : SampleStudy().samples) requested += ss.models.size();
  EXPECT_EQ(r.fits, requested);
  EXPECT_GT(r.converged_fits, 0u);
  EXPECT_LE(r.converged_fits, r.fits);
  fs::remove_all(b);
}

// The location rule holds before any fitting: a folder inside the sample
// study's data folder is refused and nothing there changes.
TEST(StreamingReport, RefusesAnOutputInsideTheDataFolderBeforeFitting) {
  const fs::path data = fs::path(POROFIT_SOURCE_DIR) / "samples" / "data";
  const auto before = test::SnapshotFolder(data);
  StreamOptions stream;
  bool fitted = false;
  stream.progress = [&](size_t, size_t) { fitted = true; };
  try {
    RunAndWriteReportFolder(SampleStudy(), Fixed(1), data / "out", {}, {}, stream);
    FAIL() << "expected OutputError";
  } catch (const OutputError& e) {
    EXPECT_NE(std::string(e.what()).find("lies inside '" + fs::weakly_canonical(data).string() + "'"),
              std::string::npos)
        << e.what();
  }
  EXPECT_FALSE(fitted);
  EXPECT_EQ(test::SnapshotFolder(data), before);
}

}  // namespace
}  // namespace porofit

// The one gate for input files: regular files only (stat before open, so a
// FIFO never blocks), a size limit, and located messages naming what the path is.
#include "porofit/core/input_file.h"

#include <gtest/gtest.h>
#include <sys/socket.h>
#include <sys/stat.h>
#include <sys/un.h>
#include <unistd.h>

#include <filesystem>
#include <fstream>
#include <random>
#include <string>

#include "porofit/core/sample.h"

namespace porofit {
namespace {

namespace fs = std::filesystem;

class InputFileTest : public ::testing::Test {
 protected:
  void SetUp() override {
    std::random_device rd;
    dir_ = fs::temp_directory_path() / ("porofit-input-file-" + std::to_string(rd()) + std::to_string(::getpid()));
    fs::create_directories(dir_);
  }
  void TearDown() override {
    std::error_code ec;
    fs::remove_all(dir_, ec);
  }
  std::string Path(const std::string& name) const { return (dir_ / name).string(); }
  std::string Write(const std::string& name, const std::string& text) const {
    std::ofstream(Path(name), std::ios::binary) << text;
    return Path(name);
  }
  // The InputError that reading `r` throws (fails the test if none).
  static InputError Refusal(const InputFileRequest& r) {
    try {
      ReadInputFile(r);
    } catch (const InputError& e) {
      return e;
    }
    ADD_FAILURE() << r.path << " was read";
    return InputError({}, "");
  }
  fs::path dir_;
};

TEST_F(InputFileTest, ReadsARegularFileWhole) {
  const std::string text = std::string("a,b\n1,2\n") + std::string(200000, 'x');
  EXPECT_EQ(ReadInputFile({Write("t.csv", text), "data file", "", {}, kMaxTableFileBytes}), text);
}

TEST_F(InputFileTest, MissingFileIsLocatedWhereItWasNamed) {
  const InputError e = Refusal({Path("none.csv"), "data file", "none.csv", {"study.yaml", 7, 9}, kMaxTableFileBytes});
  EXPECT_EQ(e.location().ToString(), "study.yaml:7:9");
  EXPECT_NE(e.message().find("cannot open data file 'none.csv' (looked for '" + Path("none.csv") + "')"),
            std::string::npos) << e.message();
}

TEST_F(InputFileTest, DirectoryIsNotAFile) {
  fs::create_directories(dir_ / "data");
  const InputError e = Refusal({Path("data"), "data file", "data/", {"study.yaml", 3, 5}, kMaxTableFileBytes});
  EXPECT_EQ(e.location().ToString(), "study.yaml:3:5");
  EXPECT_NE(e.message().find("data file 'data/'"), std::string::npos) << e.message();
  EXPECT_NE(e.message().find("is a directory, not a file"), std::string::npos) << e.message();
}

TEST_F(InputFileTest, UnlocatedRefusalPointsAtTheFileItself) {
  const InputError e = Refusal({dir_.string(), "study file", "", {}, kMaxStudyFileBytes});
  EXPECT_EQ(e.location().ToString(), dir_.string());
  EXPECT_NE(e.message().find("is a directory, not a file"), std::string::npos) << e.message();
}

TEST_F(InputFileTest, CharacterDeviceIsRefusedUnread) {
  // /dev/zero would be read forever (until memory runs out) without the check.
  const InputError e = Refusal({"/dev/zero", "data file", "", {"s.yaml", 1, 1}, kMaxTableFileBytes});
  EXPECT_NE(e.message().find("'/dev/zero' is a character device, not a file"), std::string::npos) << e.message();
}

TEST_F(InputFileTest, FifoIsRefusedWithoutBlocking) {
  // Opening a FIFO for reading blocks until a writer appears; stat() first means
  // this test returns instead of hanging.
  ASSERT_EQ(::mkfifo(Path("pipe").c_str(), 0600), 0);
  const InputError e = Refusal({Path("pipe"), "LAS file", "pipe", {"s.yaml", 2, 3}, kMaxLasFileBytes});
  EXPECT_NE(e.message().find("is a named pipe (FIFO), not a file"), std::string::npos) << e.message();
  EXPECT_THROW(CheckRegularInputFile({Path("pipe"), "LAS file", "", {}, kMaxLasFileBytes}), InputError);
}

TEST_F(InputFileTest, SocketIsRefused) {
  const std::string path = Path("sock");
  sockaddr_un addr{};
  addr.sun_family = AF_UNIX;
  if (path.size() >= sizeof addr.sun_path) GTEST_SKIP() << "temporary path too long for a socket";
  path.copy(addr.sun_path, path.size());
  const int fd = ::socket(AF_UNIX, SOCK_STREAM, 0);
  ASSERT_GE(fd, 0);
  ASSERT_EQ(::bind(fd, reinterpret_cast<const sockaddr*>(&addr), sizeof addr), 0);
  const InputError e = Refusal({path, "study file", "", {}, kMaxStudyFileBytes});
  ::close(fd);
  EXPECT_NE(e.message().find("is a socket, not a file"), std::string::npos) << e.message();
}

TEST_F(InputFileTest, FileOverTheLimitIsRefusedNamingTheLimit) {
  const std::string path = Write("big.csv", std::string(1001, 'x'));
  const InputError e = Refusal({path, "data file", "big.csv", {"s.yaml", 4, 2}, 1000});
  EXPECT_EQ(e.location().ToString(), "s.yaml:4:2");
  EXPECT_NE(e.message().find("is 1001 bytes, over the limit of 1000 bytes for a data file"), std::string::npos)
      << e.message();
  EXPECT_EQ(ReadInputFile({Write("ok.csv", std::string(1000, 'x')), "data file", "", {}, 1000}).size(), 1000u);
}

TEST_F(InputFileTest, LimitsAreGenerousForRealInputs) {
  // A 100,000-sample study in a sample table with ~20 points per sample is
  // about 100 MB of CSV; the limits must take it.
  EXPECT_GE(kMaxTableFileBytes, 200u * kMiB);
  EXPECT_GE(kMaxLasFileBytes, 100u * kMiB);
  EXPECT_GE(kMaxStudyFileBytes, 8u * kMiB);
}

TEST(SampleId, RulesAreLengthCharacterSetAndUtf8) {
  EXPECT_EQ(SampleIdProblem("B-3 plug 12 (loading)"), "");
  EXPECT_EQ(SampleIdProblem("Bohrung-\xC3\x9C" "1"), "");  // non-ASCII letters are fine
  EXPECT_EQ(SampleIdProblem(std::string(kMaxSampleIdLength, 'S')), "");
  EXPECT_EQ(SampleIdProblem(""), "must not be empty");
  std::string wide;  // 64 two-byte characters: 128 bytes, still 64 characters
  for (size_t i = 0; i < kMaxSampleIdLength; ++i) wide += "\xC3\x9C";
  EXPECT_EQ(SampleIdProblem(wide), "");
  EXPECT_NE(SampleIdProblem(wide + "\xC3\x9C").find("65 characters long, over the limit of 64"), std::string::npos);
  EXPECT_NE(SampleIdProblem(std::string("S\0" "1", 3)).find("control character \\x00"), std::string::npos);
  EXPECT_NE(SampleIdProblem("S\t1").find("control character \\x09"), std::string::npos);
  EXPECT_NE(SampleIdProblem("S\n1").find("control character"), std::string::npos);
  EXPECT_NE(SampleIdProblem("S\xC2\x85" "1").find("control character"), std::string::npos);
  EXPECT_EQ(SampleIdProblem("caf\xE9"), "is not valid UTF-8");
  EXPECT_EQ(SampleIdProblem(" S1"), "must not start or end with a blank");
}

}  // namespace
}  // namespace porofit

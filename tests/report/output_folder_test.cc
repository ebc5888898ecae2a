#include "porofit/report/output_folder.h"

#include <gtest/gtest.h>
#include <signal.h>
#include <sys/wait.h>

#include <fstream>
#include <sstream>
#include <stdexcept>
#include <unistd.h>

#include <string_view>
#include <vector>

#include "porofit/version.h"
#include "porofit_test/folder_snapshot.h"

namespace porofit {
namespace {
namespace fs = std::filesystem;

std::string Slurp(const fs::path& p) {
  std::ifstream in(p);
  std::stringstream s;
  s << in.rdbuf();
  return s.str();
}

class AtomicFolder : public ::testing::Test {
 protected:
  void SetUp() override {
    root_ = fs::temp_directory_path() /
            ("porofit-atomic-" + std::to_string(::getpid()) + "-" +
             ::testing::UnitTest::GetInstance()->current_test_info()->name());
    fs::remove_all(root_);
    fs::create_directories(root_);
    dest_ = root_ / "out";
  }
  void TearDown() override { fs::remove_all(root_); }

  // Everything in root_ other than the destination: staging or old folders left behind.
  std::vector<std::string> Leftovers() const {
    std::vector<std::string> v;
    for (const auto& e : fs::directory_iterator(root_)) {
      if (e.path() != dest_) v.push_back(e.path().filename().string());
    }
    return v;
  }

  static void WriteOne(const fs::path& dir, const std::string& name, const std::string& text) {
    WriteFileDurably(dir / name, text);
  }

  fs::path root_, dest_;
};

TEST_F(AtomicFolder, CreatesTheFolderWithEveryFile) {
  WriteFolderAtomically(dest_, [](const fs::path& d) {
    WriteOne(d, "a.txt", "alpha");
    WriteOne(d, "b.txt", "beta");
  });
  EXPECT_EQ(Slurp(dest_ / "a.txt"), "alpha");
  EXPECT_EQ(Slurp(dest_ / "b.txt"), "beta");
  EXPECT_TRUE(Leftovers().empty());
}

TEST_F(AtomicFolder, EveryFolderCarriesTheMarkerNamingToolVersionAndRun) {
  AtomicFolderOptions o;
  o.run_stamp = "2026-02-03T04:05:06Z";
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "a.txt", "alpha"); }, o);
  EXPECT_EQ(Slurp(dest_ / kOutputMarkerName),
            std::string("porofit output folder\ntool: porofit ") + kVersion +
                "\nrun: 2026-02-03T04:05:06Z\nThis folder was written by porofit; 'porofit fit --overwrite' may "
                "replace it as a whole.\n");
}

TEST_F(AtomicFolder, RefusesAPorofitFolderWithoutOverwrite) {
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "old.txt", "old"); });
  bool called = false;
  try {
    WriteFolderAtomically(dest_, [&](const fs::path&) { called = true; });
    FAIL() << "expected OutputError";
  } catch (const OutputError& e) {
    EXPECT_EQ(std::string(e.what()),
              "output folder '" + dest_.string() + "' already exists; pass --overwrite to replace it");
  }
  EXPECT_FALSE(called);
  EXPECT_EQ(Slurp(dest_ / "old.txt"), "old");
  EXPECT_TRUE(Leftovers().empty());
}

// A folder porofit did not write (no marker, or a marker file with other
// text) is never replaced, with or without overwrite.
TEST_F(AtomicFolder, RefusesAFolderPorofitDidNotWriteEvenWithOverwrite) {
  fs::create_directories(dest_);
  WriteOne(dest_, "mine.txt", "mine");
  for (const bool fake_marker : {false, true}) {
    if (fake_marker) WriteOne(dest_, kOutputMarkerName, "something else\n");
    const auto before = test::SnapshotFolder(root_);
    for (const bool overwrite : {false, true}) {
      AtomicFolderOptions o;
      o.overwrite = overwrite;
      bool called = false;
      try {
        WriteFolderAtomically(dest_, [&](const fs::path&) { called = true; }, o);
        ADD_FAILURE() << "expected OutputError";
      } catch (const OutputError& e) {
        EXPECT_NE(std::string(e.what()).find("'" + dest_.string() + "' already exists and was not written by porofit"),
                  std::string::npos)
            << e.what();
        EXPECT_NE(std::string(e.what()).find("move or delete this one yourself"), std::string::npos) << e.what();
      }
      EXPECT_FALSE(called);
      EXPECT_EQ(test::SnapshotFolder(root_), before);
    }
  }
}

TEST_F(AtomicFolder, OverwriteReplacesTheWholeOldFolderInOneExchange) {
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "old.txt", "old"); });
  AtomicFolderOptions o;
  o.overwrite = true;
  std::vector<std::string> steps;
  o.before_step = [&](std::string_view s) { steps.emplace_back(s); };
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o);
  EXPECT_FALSE(fs::exists(dest_ / "old.txt"));
  EXPECT_EQ(Slurp(dest_ / "new.txt"), "new");
  EXPECT_TRUE(fs::exists(dest_ / kOutputMarkerName));
  EXPECT_TRUE(Leftovers().empty());
  // No fallback on this file system: the exchange did it.
  EXPECT_EQ(steps, (std::vector<std::string>{"stage", "sync", "exchange", "remove-old"}));
}

TEST_F(AtomicFolder, OverwriteWithTheTwoRenameFallbackReplacesTheWholeOldFolder) {
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "old.txt", "old"); });
  AtomicFolderOptions o;
  o.overwrite = true;
  o.use_exchange = false;
  std::vector<std::string> steps;
  o.before_step = [&](std::string_view s) { steps.emplace_back(s); };
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o);
  EXPECT_FALSE(fs::exists(dest_ / "old.txt"));
  EXPECT_EQ(Slurp(dest_ / "new.txt"), "new");
  EXPECT_TRUE(Leftovers().empty());
  EXPECT_EQ(steps, (std::vector<std::string>{"stage", "sync", "rename-aside", "rename-in", "remove-old"}));
}

TEST_F(AtomicFolder, FailureWhileWritingLeavesNoFolder) {
  EXPECT_THROW(WriteFolderAtomically(dest_,
                                     [](const fs::path& d) {
                                       WriteOne(d, "a.txt", "half");
                                       throw std::runtime_error("simulated disk failure");
                                     }),
               std::runtime_error);
  EXPECT_FALSE(fs::exists(dest_));
  EXPECT_TRUE(Leftovers().empty());
}

TEST_F(AtomicFolder, FailureAtEachStepOfAFreshWriteLeavesNoFolder) {
  for (const char* step : {"stage", "sync", "rename-in"}) {
    AtomicFolderOptions o;
    o.before_step = [&](std::string_view s) {
      if (s == step) throw std::runtime_error("simulated failure at " + std::string(s));
    };
    EXPECT_THROW(WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "a.txt", "x"); }, o),
                 std::runtime_error)
        << step;
    EXPECT_FALSE(fs::exists(dest_)) << step;
    EXPECT_TRUE(Leftovers().empty()) << step;
  }
}

TEST_F(AtomicFolder, FailureDuringReplaceKeepsTheOldFolderIntact) {
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "old.txt", "old"); });
  const auto before = test::SnapshotFolder(root_);
  for (const bool exchange : {true, false}) {
    const std::vector<const char*> steps =
        exchange ? std::vector<const char*>{"stage", "sync", "exchange"}
                 : std::vector<const char*>{"stage", "sync", "rename-aside", "rename-in"};
    for (const char* step : steps) {
      AtomicFolderOptions o;
      o.overwrite = true;
      o.use_exchange = exchange;
      o.before_step = [&](std::string_view s) {
        if (s == step) throw std::runtime_error("simulated failure");
      };
      EXPECT_THROW(WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o),
                   std::runtime_error)
          << step;
      EXPECT_EQ(test::SnapshotFolder(root_), before) << step << (exchange ? " (exchange)" : " (fallback)");
      EXPECT_TRUE(Leftovers().empty()) << step;
    }
  }
}

TEST_F(AtomicFolder, CreatesMissingParentFolders) {
  const fs::path deep = root_ / "a" / "b" / "out";
  WriteFolderAtomically(deep, [](const fs::path& d) { WriteOne(d, "x.txt", "x"); });
  EXPECT_EQ(Slurp(deep / "x.txt"), "x");
}

TEST_F(AtomicFolder, FailureRemovesTheParentFoldersItCreated) {
  const fs::path deep = root_ / "a" / "b" / "out";
  EXPECT_THROW(WriteFolderAtomically(deep, [](const fs::path&) { throw std::runtime_error("simulated"); }),
               std::runtime_error);
  EXPECT_FALSE(fs::exists(root_ / "a"));
}

TEST_F(AtomicFolder, MissingParentFolderIsAnOutputErrorWhenParentsAreNotCreated) {
  try {
    AtomicFolderOptions o;
    o.create_parents = false;
    WriteFolderAtomically(root_ / "no" / "such" / "out", [](const fs::path&) {}, o);
    FAIL() << "expected OutputError";
  } catch (const OutputError& e) {
    EXPECT_NE(std::string(e.what()).find("does not exist"), std::string::npos) << e.what();
  }
  EXPECT_FALSE(fs::exists(root_ / "no"));
}

TEST_F(AtomicFolder, AnExistingFileIsNeverReplaced) {
  { std::ofstream(dest_) << "a file"; }
  AtomicFolderOptions o;
  o.overwrite = true;
  EXPECT_THROW(WriteFolderAtomically(dest_, [](const fs::path&) {}, o), OutputError);
  EXPECT_EQ(Slurp(dest_), "a file");
  EXPECT_TRUE(Leftovers().empty());
}

// ---------------------------------------------------------------- stale staging

// A child process that has exited and been reaped: its PID names no process
// (unless the system reuses it at once; the tests below would then keep the
// folder and fail, never pass wrongly).
pid_t DeadPid() {
  const pid_t pid = ::fork();
  if (pid == 0) ::_exit(0);
  int status = 0;
  ::waitpid(pid, &status, 0);
  return pid;
}

// A live child blocked on a pipe until Release().
struct LiveChild {
  LiveChild() {
    EXPECT_EQ(::pipe(fds), 0);
    pid = ::fork();
    if (pid == 0) {
      ::close(fds[1]);
      char c;
      while (::read(fds[0], &c, 1) < 0) {
      }
      ::_exit(0);
    }
    ::close(fds[0]);
  }
  ~LiveChild() { Release(); }
  void Release() {
    if (pid <= 0) return;
    ::close(fds[1]);
    int status = 0;
    ::waitpid(pid, &status, 0);
    pid = -1;
  }
  int fds[2] = {-1, -1};
  pid_t pid = -1;
};

fs::path StagingName(const fs::path& dest, const std::string& tag, pid_t pid) {
  return dest.parent_path() / ("." + dest.filename().string() + "." + tag + "-" + std::to_string(pid) + "-0");
}

TEST_F(AtomicFolder, AStartingRunRemovesStagingOfDeadProcessesAndKeepsThoseOfLiveOnes) {
  LiveChild live;
  const pid_t dead = DeadPid();
  const fs::path dead_staging = StagingName(dest_, "porofit-staging", dead);
  const fs::path dead_old = StagingName(dest_, "porofit-old", dead);
  const fs::path live_staging = StagingName(dest_, "porofit-staging", live.pid);
  const fs::path other_name = StagingName(root_ / "other", "porofit-staging", dead);
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "a.txt", "old"); });
  for (const fs::path& p : {dead_staging, dead_old, live_staging, other_name}) {
    fs::create_directories(p);
    WriteOne(p, "parameters.csv", "half");
  }
  AtomicFolderOptions o;
  o.overwrite = true;
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "a.txt", "x"); }, o);
  EXPECT_FALSE(fs::exists(dead_staging));
  EXPECT_FALSE(fs::exists(dead_old));  // the destination was there: the aside copy is stale
  EXPECT_TRUE(fs::exists(live_staging / "parameters.csv"));  // a live run's work in progress
  EXPECT_TRUE(fs::exists(other_name / "parameters.csv"));    // another destination's
  EXPECT_EQ(Slurp(dest_ / "a.txt"), "x");
  live.Release();  // now that process is gone too
  EXPECT_EQ(RemoveStaleStaging(dest_), std::vector<fs::path>{live_staging});
  EXPECT_FALSE(fs::exists(live_staging));
}

TEST_F(AtomicFolder, StagingOfThisProcessAndOddNamesAreKept) {
  const fs::path mine = StagingName(dest_, "porofit-staging", ::getpid());
  const fs::path odd = root_ / ".out.porofit-staging-x1-0";
  const fs::path zero = root_ / ".out.porofit-staging-0-0";
  for (const fs::path& p : {mine, odd, zero}) fs::create_directories(p);
  EXPECT_TRUE(RemoveStaleStaging(dest_).empty());
  for (const fs::path& p : {mine, odd, zero}) EXPECT_TRUE(fs::exists(p)) << p;
}

// A real process killed (it dies without cleanup, like SIGKILL) at each step
// of a replace; afterwards the destination holds the complete old or new
// folder, and the next run for it leaves nothing else behind.
TEST_F(AtomicFolder, ARunKilledAtAnyStepLeavesAWholeFolderAndTheNextRunCleansUp) {
  struct Case {
    bool exchange;
    const char* step;
    const char* expect;  // file in the destination afterwards
  };
  for (const Case c : {Case{true, "stage", "old.txt"}, Case{true, "sync", "old.txt"}, Case{true, "exchange", "old.txt"},
                       Case{true, "remove-old", "new.txt"}, Case{false, "rename-aside", "old.txt"},
                       Case{false, "rename-in", "old.txt"}, Case{false, "remove-old", "new.txt"}}) {
    fs::remove_all(dest_);
    WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "old.txt", "old"); });
    const pid_t child = ::fork();
    if (child == 0) {
      AtomicFolderOptions o;
      o.overwrite = true;
      o.use_exchange = c.exchange;
      o.before_step = [&](std::string_view s) {
        if (s == c.step) ::_exit(0);  // dies here, no unwinding
      };
      try {
        WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o);
      } catch (...) {
      }
      ::_exit(1);  // never back into the test runner
    }
    int status = 0;
    ::waitpid(child, &status, 0);
    ASSERT_TRUE(WIFEXITED(status) && WEXITSTATUS(status) == 0) << c.step;
    const std::string label = std::string(c.step) + (c.exchange ? " (exchange)" : " (fallback)");
    // Between the fallback's two renames the destination is absent; the
    // next run puts the old folder back before anything else.
    if (!(c.exchange == false && std::string(c.step) == "rename-in")) {
      EXPECT_TRUE(fs::exists(dest_ / c.expect)) << label;
    }
    RemoveStaleStaging(dest_);
    EXPECT_TRUE(fs::exists(dest_ / c.expect)) << label;
    EXPECT_TRUE(fs::exists(dest_ / kOutputMarkerName)) << label;
    EXPECT_TRUE(Leftovers().empty()) << label;
  }
}

// ---------------------------------------------------------------- location rule

class OutputLocation : public AtomicFolder {
 protected:
  void SetUp() override {
    AtomicFolder::SetUp();
    study_dir_ = root_ / "study";
    data_dir_ = study_dir_ / "data";
    fs::create_directories(data_dir_);
    WriteOne(study_dir_, "study.yaml", "name: s\n");
    WriteOne(data_dir_, "a.csv", "P,K\n");
    WriteOne(study_dir_, "b.csv", "P,K\n");  // a data file next to the study file
    inputs_ = {{study_dir_ / "study.yaml", false}, {data_dir_ / "a.csv", true}, {study_dir_ / "b.csv", true}};
  }

  // The OutputError message, or "" when the location is accepted.
  std::string Refusal(const fs::path& out) const {
    try {
      CheckOutputLocation(out, inputs_);
    } catch (const OutputError& e) {
      return e.what();
    }
    return "";
  }

  fs::path study_dir_, data_dir_;
  std::vector<ProtectedInput> inputs_;
};

TEST_F(OutputLocation, RefusesEveryFolderThatWouldHarmAnInputAndNamesBothPaths) {
  fs::create_symlink(data_dir_, root_ / "link-to-data");
  struct Case {
    fs::path out;
    std::string names;  // the input or folder the message must name
    std::string why;
  };
  for (const Case& c : std::vector<Case>{
           {data_dir_, (data_dir_ / "a.csv").string(), "contains the input data file"},
           {data_dir_ / "sub" / "out", data_dir_.string(), "lies inside '" + data_dir_.string() + "'"},
           {study_dir_, (study_dir_ / "study.yaml").string(), "contains the input"},
           {root_, (study_dir_ / "study.yaml").string(), "contains the input"},
           {study_dir_ / "data" / ".." / "data", (data_dir_ / "a.csv").string(), "contains the input"},
           {root_ / "link-to-data", (data_dir_ / "a.csv").string(), "contains the input data file"},
           {root_ / "link-to-data" / "out", data_dir_.string(), "lies inside"},
           {data_dir_ / "a.csv", (data_dir_ / "a.csv").string(), "it is the input data file"},
           {study_dir_ / "study.yaml", (study_dir_ / "study.yaml").string(), "it is the input study file"},
       }) {
    const std::string m = Refusal(c.out);
    EXPECT_NE(m.find("refusing output folder '" + c.out.string() + "'"), std::string::npos) << c.out << ": " << m;
    EXPECT_NE(m.find(c.names), std::string::npos) << c.out << ": " << m;
    EXPECT_NE(m.find(c.why), std::string::npos) << c.out << ": " << m;
  }
}

TEST_F(OutputLocation, TheStudyFilesFolderMayHoldOutputsEvenWithDataFilesInIt) {
  EXPECT_EQ(Refusal(study_dir_ / "results"), "");
  EXPECT_EQ(Refusal(study_dir_ / "results" / "run-1"), "");
  EXPECT_EQ(Refusal(root_ / "elsewhere"), "");
  EXPECT_EQ(Refusal(study_dir_ / "datax"), "");  // a name sharing a prefix with data/ is another folder
}

TEST_F(OutputLocation, AnInputReachedThroughASymbolicLinkIsProtectedAtBothEnds) {
  const fs::path store = root_ / "store";
  fs::create_directories(store);
  WriteOne(store, "real.csv", "P,K\n");
  fs::create_symlink(store / "real.csv", data_dir_ / "linked.csv");
  inputs_.push_back({data_dir_ / "linked.csv", true});
  EXPECT_NE(Refusal(store).find("contains the input data file"), std::string::npos);
  EXPECT_NE(Refusal(store / "out").find("lies inside '" + store.string() + "'"), std::string::npos);
  EXPECT_NE(Refusal(data_dir_).find("contains the input"), std::string::npos);
}

// Changes the working folder for one scope.
struct InFolder {
  explicit InFolder(const fs::path& p) : old(fs::current_path()) { fs::current_path(p); }
  ~InFolder() { fs::current_path(old); }
  fs::path old;
};

TEST_F(OutputLocation, TheCurrentFolderAndItsAncestorsAreRefused) {
  const fs::path work = root_ / "work" / "here";
  fs::create_directories(work);
  InFolder in(work);
  for (const fs::path& out : {fs::path("."), fs::path(work), fs::path(".."), fs::path(root_), fs::path("/")}) {
    const std::string m = Refusal(out);
    EXPECT_NE(m.find("refusing output folder '" + out.string() + "'"), std::string::npos) << out << ": " << m;
    EXPECT_NE(m.find("current folder"), std::string::npos) << out << ": " << m;
  }
  EXPECT_EQ(Refusal("results"), "");
}

TEST_F(OutputLocation, WriteFolderAtomicallyRefusesBeforeWritingAndTouchesNothing) {
  // A porofit-written folder inside the data folder, so that only the
  // location rule stands in the way of the overwrite.
  WriteFolderAtomically(data_dir_ / "old-run", [](const fs::path& d) { WriteOne(d, "x.txt", "x"); });
  const auto before = test::SnapshotFolder(root_);
  for (const fs::path& out : {data_dir_, data_dir_ / "old-run", study_dir_}) {
    AtomicFolderOptions o;
    o.overwrite = true;
    o.protected_inputs = inputs_;
    bool called = false;
    EXPECT_THROW(WriteFolderAtomically(out, [&](const fs::path&) { called = true; }, o), OutputError) << out;
    EXPECT_FALSE(called) << out;
    EXPECT_EQ(test::SnapshotFolder(root_), before) << out;
  }
}

}  // namespace
}  // namespace porofit

#include "porofit/report/output_folder.h"

#include <gtest/gtest.h>

#include <fstream>
#include <sstream>
#include <stdexcept>
#include <unistd.h>

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

TEST_F(AtomicFolder, RefusesAnExistingFolderWithoutOverwrite) {
  fs::create_directories(dest_);
  WriteOne(dest_, "old.txt", "old");
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

TEST_F(AtomicFolder, OverwriteReplacesTheWholeOldFolder) {
  fs::create_directories(dest_);
  WriteOne(dest_, "old.txt", "old");
  AtomicFolderOptions o;
  o.overwrite = true;
  WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o);
  EXPECT_FALSE(fs::exists(dest_ / "old.txt"));
  EXPECT_EQ(Slurp(dest_ / "new.txt"), "new");
  EXPECT_TRUE(Leftovers().empty());
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
  fs::create_directories(dest_);
  WriteOne(dest_, "old.txt", "old");
  for (const char* step : {"stage", "sync", "rename-aside", "rename-in"}) {
    AtomicFolderOptions o;
    o.overwrite = true;
    o.before_step = [&](std::string_view s) {
      if (s == step) throw std::runtime_error("simulated failure");
    };
    EXPECT_THROW(WriteFolderAtomically(dest_, [](const fs::path& d) { WriteOne(d, "new.txt", "new"); }, o),
                 std::runtime_error)
        << step;
    EXPECT_EQ(Slurp(dest_ / "old.txt"), "old") << step;
    EXPECT_FALSE(fs::exists(dest_ / "new.txt")) << step;
    EXPECT_TRUE(Leftovers().empty()) << step;
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

}  // namespace
}  // namespace porofit

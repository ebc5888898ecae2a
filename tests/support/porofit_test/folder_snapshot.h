#pragma once
// Test support: a byte-level snapshot of a folder tree, to prove that a run
// created, changed or removed nothing in it (inputs are never touched).
//
//   const auto before = porofit::test::SnapshotFolder(dir);
//   ... run porofit ...
//   EXPECT_EQ(porofit::test::SnapshotFolder(dir), before);
//
// Keys are paths relative to the folder ('/'-separated); values are "file:"
// plus the SHA-256 of the bytes, "dir", "link:" plus the target, or "other"
// (FIFO, socket, device). Symbolic links are recorded, not followed.
#include <filesystem>
#include <map>
#include <string>
#include <system_error>

#include "porofit/report/sha256.h"

namespace porofit::test {

using FolderSnapshot = std::map<std::string, std::string>;

inline FolderSnapshot SnapshotFolder(const std::filesystem::path& root) {
  namespace fs = std::filesystem;
  FolderSnapshot out;
  std::error_code ec;
  for (auto it = fs::recursive_directory_iterator(root, fs::directory_options::none, ec);
       !ec && it != fs::recursive_directory_iterator(); it.increment(ec)) {
    const fs::path rel = fs::relative(it->path(), root);
    const fs::file_status st = it->symlink_status();
    std::string value;
    if (fs::is_symlink(st)) value = "link:" + fs::read_symlink(it->path()).string();
    else if (fs::is_directory(st)) value = "dir";
    else if (fs::is_regular_file(st)) value = "file:" + porofit::Sha256File(it->path().string()).sha256;
    else value = "other";
    out[rel.generic_string()] = value;
  }
  return out;
}

}  // namespace porofit::test

#pragma once
// All-or-nothing output folders.
//
// WriteFolderAtomically() creates a hidden sibling staging folder next to the
// destination, lets the caller write every file into it, fsyncs the files and
// the folder, then renames the staging folder into place (rename(2) within one
// parent folder is atomic on POSIX file systems). With `overwrite`, an existing
// destination is first renamed aside, the new folder renamed in, and the old
// one removed; if the second rename fails the old folder is renamed back. On
// any failure the staging folder is removed, so no partial folder remains and
// an existing destination is left as it was.
#include <filesystem>
#include <functional>
#include <stdexcept>
#include <string>
#include <string_view>

namespace porofit {

/// A problem with the output location the user can fix (folder exists, parent
/// missing, no permission, disk full). what() is the whole message.
class OutputError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

struct AtomicFolderOptions {
  /// Replace an existing destination folder. Without it, an existing
  /// destination is an OutputError and nothing is written.
  bool overwrite = false;
  /// Create missing parent folders of the destination (like mkdir -p). Parents
  /// created here are removed again if the write fails.
  bool create_parents = true;
  /// Test hook, called with the name of each step just before it runs:
  /// "stage", "sync", "rename-aside", "rename-in", "remove-old". Throwing from
  /// it simulates a failure at that step. Empty in production.
  std::function<void(std::string_view step)> before_step;
};

/// Writes `content` to `path` (created or truncated) and fsyncs it. Throws
/// OutputError naming the path on failure.
void WriteFileDurably(const std::filesystem::path& path, std::string_view content);

/// Runs `write(staging_folder)` and publishes the staging folder as
/// `destination`. Every file `write` creates must be inside the staging folder
/// (WriteFileDurably() fsyncs what it writes; other files are fsynced too).
/// Throws OutputError for location problems; any exception from `write` is
/// rethrown after the staging folder has been removed.
void WriteFolderAtomically(const std::filesystem::path& destination,
                           const std::function<void(const std::filesystem::path& staging)>& write,
                           const AtomicFolderOptions& options = {});

}  // namespace porofit

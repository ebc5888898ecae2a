#pragma once
// All-or-nothing output folders that cannot hurt the run's inputs.
//
// WriteFolderAtomically() first checks the destination (PrepareOutputFolder):
//  1. Location (CheckOutputLocation): the destination, resolved through
//     symbolic links, must not be the current folder or one of its
//     ancestors, must not be or contain an input file, and must not lie
//     inside the folder of an input *data* file (see ProtectedInput).
//  2. Stale staging (RemoveStaleStaging): hidden staging and old-aside
//     siblings of the destination left by killed porofit processes are
//     removed.
//  3. Existing destination: refused without `overwrite`; with it, replaced
//     only if it carries the marker file kOutputMarkerName, i.e. porofit
//     wrote it. A symbolic link or a file is never replaced.
// It then creates a hidden sibling staging folder
// ".<name>.porofit-staging-<pid>-<k>", lets the caller write every file into
// it, writes the marker, fsyncs the files and the folder, and renames the
// staging folder into place (rename(2) within one parent folder is atomic on
// POSIX file systems).
//
// Replacing (`overwrite`): on Linux the staging folder and the old
// destination are swapped in one atomic step, renameat2(RENAME_EXCHANGE);
// the old folder (now under the staging name) is then removed. The
// destination name always holds either the complete old folder or the
// complete new one. Fallback: when the file system does not support the
// exchange (EINVAL, ENOSYS, ENOTSUP/EOPNOTSUPP; some network and FUSE file
// systems), the old folder is renamed aside (".<name>.porofit-old-<pid>-<k>"),
// the new one renamed in, and the old one removed. A process killed between
// those two renames leaves the old folder under its aside name and nothing
// under the destination name; the next run for that destination renames it
// back (RemoveStaleStaging).
//
// On any failure the staging folder is removed, so no partial folder remains
// and an existing destination is left as it was. A process killed with
// SIGKILL cannot clean up: its staging folder stays until the next run for
// the same destination removes it.
#include <filesystem>
#include <functional>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace porofit {

/// A problem with the output location the user can fix (folder exists, parent
/// missing, no permission, disk full, a location that would harm an input).
/// what() is the whole message.
class OutputError : public std::runtime_error {
 public:
  using std::runtime_error::runtime_error;
};

/// Name of the marker file in every output folder. Its text:
///   porofit output folder
///   tool: porofit <version>
///   run: <run stamp>
/// `overwrite` replaces only folders holding this file (first line as above).
inline constexpr const char* kOutputMarkerName = ".porofit-output";

/// A file a run reads. No output folder may harm it (CheckOutputLocation).
struct ProtectedInput {
  std::filesystem::path path;
  /// true for a data file (CSV table, sample table, LAS log, ...): the output
  /// folder may not lie anywhere inside the folder that holds it. false for
  /// the study file, whose folder may hold output folders; that folder is
  /// also exempt when data files sit in it too.
  bool data = true;
};

struct AtomicFolderOptions {
  /// Replace an existing destination folder written by porofit (one holding
  /// kOutputMarkerName). Without it, an existing destination is an
  /// OutputError and nothing is written.
  bool overwrite = false;
  /// Create missing parent folders of the destination (like mkdir -p). Parents
  /// created here are removed again if the write fails.
  bool create_parents = true;
  /// Inputs of the run; the destination is checked against them
  /// (CheckOutputLocation). The report writers add the study's inputs
  /// themselves (ProtectedInputs() in report.h).
  std::vector<ProtectedInput> protected_inputs;
  /// The "run:" line of the marker file (the report writers use the run's
  /// start time, which POROFIT_FIXED_TIMESTAMP fixes). Empty: the current
  /// UTC time.
  std::string run_stamp;
  /// Test hook, called with the name of each step just before it runs:
  /// "stage", "sync", then "rename-in" (new destination) or "exchange"
  /// (replace), or with the fallback "rename-aside" and "rename-in"; last
  /// "remove-old" when replacing. Throwing from it simulates a failure at
  /// that step. Empty in production.
  std::function<void(std::string_view step)> before_step;
  /// Test hook: false replaces with the two-rename fallback, as on a file
  /// system without RENAME_EXCHANGE. true in production.
  bool use_exchange = true;
};

/// Throws OutputError, naming the destination and the input or folder it
/// would harm, when `destination` (resolved: the nearest existing ancestor
/// through std::filesystem::weakly_canonical, symbolic links followed, plus
/// the rest) is
///  - the current folder or one of its ancestors;
///  - an input file, as named or as its link target;
///  - a folder that contains an input (as named or as its link target);
///  - inside the folder of a data input (ProtectedInput::data), at any depth,
///    unless that folder is the folder of the study file (a non-data input).
/// Touches nothing on disk.
void CheckOutputLocation(const std::filesystem::path& destination, const std::vector<ProtectedInput>& inputs);

/// Removes the hidden siblings ".<name>.porofit-staging-<pid>-<k>" and
/// ".<name>.porofit-old-<pid>-<k>" of `destination` whose process <pid> is
/// gone (kill(pid, 0) fails with ESRCH). Folders of live processes, of this
/// process and of other names are kept. An old-aside folder whose destination
/// is missing (a run killed between the fallback's two renames) is renamed
/// back to `destination` instead. Returns the folders removed or restored.
/// A PID reused by a live process keeps its folder until that process ends.
std::vector<std::filesystem::path> RemoveStaleStaging(const std::filesystem::path& destination);

/// Every check WriteFolderAtomically() makes before writing: the location
/// (CheckOutputLocation with options.protected_inputs), stale staging
/// (RemoveStaleStaging), and the existing destination (refused without
/// options.overwrite; with it, refused unless porofit wrote it). Throws
/// OutputError. Call it before a long computation to fail early.
void PrepareOutputFolder(const std::filesystem::path& destination, const AtomicFolderOptions& options);

/// Writes `content` to `path` (created or truncated) and fsyncs it. Throws
/// OutputError naming the path on failure.
void WriteFileDurably(const std::filesystem::path& path, std::string_view content);

/// PrepareOutputFolder(), then runs `write(staging_folder)` and publishes the
/// staging folder, with the marker file, as `destination`. Every file `write`
/// creates must be inside the staging folder (WriteFileDurably() fsyncs what
/// it writes; other files are fsynced too). Throws OutputError for location
/// problems; any exception from `write` is rethrown after the staging folder
/// has been removed.
void WriteFolderAtomically(const std::filesystem::path& destination,
                           const std::function<void(const std::filesystem::path& staging)>& write,
                           const AtomicFolderOptions& options = {});

}  // namespace porofit

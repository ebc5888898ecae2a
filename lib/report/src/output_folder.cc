#include "porofit/report/output_folder.h"

#include <fcntl.h>
#include <signal.h>
#include <stdio.h>  // renameat2, RENAME_EXCHANGE (glibc >= 2.28, _GNU_SOURCE)
#include <unistd.h>

#include <algorithm>
#include <cerrno>
#include <cstring>
#include <ctime>
#include <fstream>
#include <set>
#include <system_error>
#include <vector>

#include "porofit/version.h"

namespace porofit {
namespace fs = std::filesystem;

namespace {

const char* const kMarkerFirstLine = "porofit output folder";
const char* const kStagingTag = "porofit-staging";
const char* const kOldTag = "porofit-old";

std::string Quote(const fs::path& p) { return "'" + p.string() + "'"; }

std::string Errno(int e) { return std::strerror(e); }

void Step(const AtomicFolderOptions& o, std::string_view name) {
  if (o.before_step) o.before_step(name);
}

// "results/" names the folder "results".
fs::path WithoutTrailingSeparator(const fs::path& p) {
  return p.has_filename() || !p.has_relative_path() ? p : p.parent_path();
}

fs::path ParentOf(const fs::path& dest) {
  return dest.parent_path().empty() ? fs::path(".") : dest.parent_path();
}

// ------------------------------------------------------------- location rule

// Absolute, symbolic links of the existing part followed, "." and ".."
// removed, no trailing separator.
fs::path Resolve(const fs::path& p) {
  std::error_code ec;
  const fs::path abs = fs::absolute(p, ec);
  fs::path r = fs::weakly_canonical(abs, ec);
  if (ec) r = abs.lexically_normal();
  while (!r.has_filename() && r.has_relative_path()) r = r.parent_path();
  return r;
}

// The input as named: its folder resolved, its own name not followed.
fs::path ResolveNamed(const fs::path& p) {
  const fs::path abs = fs::absolute(p).lexically_normal();
  return abs.has_filename() ? Resolve(abs.parent_path()) / abs.filename() : Resolve(abs);
}

// `inner` is `outer` or lies below it (both resolved).
bool IsWithin(const fs::path& inner, const fs::path& outer) {
  auto i = inner.begin(), o = outer.begin();
  for (; o != outer.end(); ++o, ++i) {
    if (i == inner.end() || *i != *o) return false;
  }
  return true;
}

std::string Described(const fs::path& given, const fs::path& resolved) {
  return Quote(given) + (given == resolved ? "" : " (" + Quote(resolved) + ")");
}

// ------------------------------------------------------------- stale staging

// pid from "<pid>-<k>" (both decimal), or 0 when `rest` has another shape.
pid_t ParseStagingSuffix(const std::string& rest) {
  const size_t dash = rest.find('-');
  if (dash == 0 || dash == std::string::npos || dash + 1 == rest.size() || dash > 9) return 0;
  const auto digits = [](const std::string& s) {
    return std::all_of(s.begin(), s.end(), [](unsigned char c) { return c >= '0' && c <= '9'; });
  };
  if (!digits(rest.substr(0, dash)) || !digits(rest.substr(dash + 1))) return 0;
  return static_cast<pid_t>(std::stol(rest.substr(0, dash)));
}

bool ProcessIsGone(pid_t pid) { return pid > 0 && ::kill(pid, 0) != 0 && errno == ESRCH; }

bool HasMarker(const fs::path& folder) {
  std::error_code ec;
  if (!fs::is_regular_file(fs::symlink_status(folder / kOutputMarkerName, ec))) return false;
  std::ifstream in(folder / kOutputMarkerName);
  std::string first;
  std::getline(in, first);
  return first == kMarkerFirstLine;
}

std::string MarkerText(const AtomicFolderOptions& o) {
  std::string stamp = o.run_stamp;
  if (stamp.empty()) {
    char buf[32];
    const std::time_t now = std::time(nullptr);
    std::tm tm{};
    ::gmtime_r(&now, &tm);
    std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
    stamp = buf;
  }
  return std::string(kMarkerFirstLine) + "\ntool: porofit " + kVersion + "\nrun: " + stamp +
         "\nThis folder was written by porofit; 'porofit fit --overwrite' may replace it as a whole.\n";
}

// ------------------------------------------------------------- writing

// fsync a file or a folder by path; folders need O_RDONLY|O_DIRECTORY.
void SyncPath(const fs::path& p, bool directory) {
  const int fd = ::open(p.c_str(), O_RDONLY | (directory ? O_DIRECTORY : 0) | O_CLOEXEC);
  if (fd < 0) throw OutputError("cannot open " + Quote(p) + " to sync it: " + Errno(errno));
  const int rc = ::fsync(fd);
  const int e = errno;
  ::close(fd);
  if (rc != 0) throw OutputError("cannot sync " + Quote(p) + ": " + Errno(e));
}

void SyncTree(const fs::path& root) {
  for (const auto& entry : fs::recursive_directory_iterator(root)) {
    if (entry.is_regular_file()) SyncPath(entry.path(), false);
    else if (entry.is_directory()) SyncPath(entry.path(), true);
  }
  SyncPath(root, true);
}

// A fresh hidden sibling of `dest`: ".<name>.<tag>-<pid>-<k>".
fs::path MakeSibling(const fs::path& dest, const std::string& tag, bool create) {
  const std::string base = "." + dest.filename().string() + "." + tag + "-" + std::to_string(::getpid());
  for (int k = 0; k < 1000; ++k) {
    const fs::path cand = ParentOf(dest) / (base + "-" + std::to_string(k));
    std::error_code ec;
    if (create) {
      if (fs::create_directory(cand, ec)) return cand;
      if (ec && ec != std::errc::file_exists) {
        throw OutputError("cannot create staging folder " + Quote(cand) + ": " + ec.message());
      }
    } else if (!fs::exists(fs::symlink_status(cand, ec))) {
      return cand;
    }
  }
  throw OutputError("cannot find a free staging name next to " + Quote(dest));
}

void RenameOrThrow(const fs::path& from, const fs::path& to) {
  if (std::rename(from.c_str(), to.c_str()) != 0) {
    throw OutputError("cannot rename " + Quote(from) + " to " + Quote(to) + ": " + Errno(errno));
  }
}

// Renames `from` to the absent `to`; never replaces a folder created there
// meanwhile (RENAME_NOREPLACE where the file system has it).
void RenameNewOrThrow(const fs::path& from, const fs::path& to) {
  if (::renameat2(AT_FDCWD, from.c_str(), AT_FDCWD, to.c_str(), RENAME_NOREPLACE) == 0) return;
  const int e = errno;
  if (e == EINVAL || e == ENOSYS || e == ENOTSUP || e == EOPNOTSUPP) return RenameOrThrow(from, to);
  throw OutputError("cannot rename " + Quote(from) + " to " + Quote(to) + ": " + Errno(e));
}

// Swaps two existing folders atomically. false: the file system cannot.
bool ExchangeOrThrow(const fs::path& a, const fs::path& b) {
  if (::renameat2(AT_FDCWD, a.c_str(), AT_FDCWD, b.c_str(), RENAME_EXCHANGE) == 0) return true;
  const int e = errno;
  if (e == EINVAL || e == ENOSYS || e == ENOTSUP || e == EOPNOTSUPP) return false;
  throw OutputError("cannot exchange " + Quote(a) + " with " + Quote(b) + ": " + Errno(e));
}

// Missing parents of `parent`, outermost first, created; returns them so a
// failure can take them away again.
std::vector<fs::path> CreateParents(const fs::path& destination, const fs::path& parent, bool allowed) {
  std::error_code ec;
  std::vector<fs::path> created;
  if (fs::is_directory(parent, ec)) return created;
  if (!allowed) {
    throw OutputError("cannot create output folder " + Quote(destination) + ": parent folder " + Quote(parent) +
                      " does not exist");
  }
  std::vector<fs::path> missing;
  for (fs::path p = parent; !p.empty() && !fs::exists(fs::symlink_status(p, ec)); p = p.parent_path()) {
    missing.push_back(p);
    if (p == p.parent_path()) break;
  }
  for (auto it = missing.rbegin(); it != missing.rend(); ++it) {
    if (!fs::create_directory(*it, ec) && ec) {
      for (auto c = created.rbegin(); c != created.rend(); ++c) fs::remove(*c, ec);
      throw OutputError("cannot create output folder " + Quote(destination) + ": cannot create " + Quote(*it) + ": " +
                        ec.message());
    }
    created.push_back(*it);
  }
  if (!fs::is_directory(parent, ec)) {
    throw OutputError("cannot create output folder " + Quote(destination) + ": " + Quote(parent) + " is not a folder");
  }
  return created;
}

// Replaces the existing `destination` by the complete `staging` folder.
void Replace(const fs::path& destination, const fs::path& staging, const AtomicFolderOptions& options) {
  fs::path old = staging;  // after the exchange, the old folder is here
  bool exchanged = false;
  if (options.use_exchange) {
    Step(options, "exchange");
    exchanged = ExchangeOrThrow(staging, destination);
  }
  if (!exchanged) {  // two renames; between them the destination name is absent
    old = MakeSibling(destination, kOldTag, /*create=*/false);
    Step(options, "rename-aside");
    RenameOrThrow(destination, old);
    try {
      Step(options, "rename-in");
      RenameOrThrow(staging, destination);
    } catch (...) {
      std::rename(old.c_str(), destination.c_str());  // best effort: put the old folder back
      throw;
    }
  }
  SyncPath(ParentOf(destination), true);
  std::error_code ec;
  Step(options, "remove-old");
  fs::remove_all(old, ec);
  if (ec) {
    throw OutputError("new output is in place, but the old folder " + Quote(old) +
                      " could not be removed: " + ec.message());
  }
}

}  // namespace

void CheckOutputLocation(const fs::path& destination, const std::vector<ProtectedInput>& inputs) {
  const fs::path out = Resolve(destination);
  const std::string named = "output folder " + Described(destination, out);
  const fs::path cwd = Resolve(fs::current_path());
  if (IsWithin(cwd, out)) {
    throw OutputError("refusing " + named + ": it is " +
                      (out == cwd ? "the current folder " : "an ancestor of the current folder ") + Quote(cwd) +
                      "; an output folder must be a new or porofit-written folder of its own");
  }
  std::set<fs::path> exempt;  // folders of the study files
  for (const ProtectedInput& in : inputs) {
    if (!in.data) {
      exempt.insert(ResolveNamed(in.path).parent_path());
      exempt.insert(Resolve(in.path).parent_path());
    }
  }
  // The input itself first (most specific message), then the folders of data files.
  for (const bool folders : {false, true}) {
    for (const ProtectedInput& in : inputs) {
      for (const fs::path& p : {ResolveNamed(in.path), Resolve(in.path)}) {
        const std::string what = std::string(in.data ? "data" : "study") + " file " + Described(in.path, p);
        if (!folders && p == out) throw OutputError("refusing " + named + ": it is the input " + what);
        if (!folders && IsWithin(p, out)) throw OutputError("refusing " + named + ": it contains the input " + what);
        const fs::path folder = p.parent_path();
        if (folders && in.data && exempt.count(folder) == 0 && IsWithin(out, folder)) {
          throw OutputError("refusing " + named + ": it lies inside " + Quote(folder) + ", the folder of the input " +
                            what + "; write outputs outside folders that hold data files (the study file's own "
                            "folder is allowed)");
        }
      }
    }
  }
}

std::vector<fs::path> RemoveStaleStaging(const fs::path& destination) {
  std::vector<fs::path> done;
  const std::string name = destination.filename().string();
  if (name.empty() || name == "." || name == "..") return done;
  std::error_code ec;
  std::vector<std::pair<fs::path, bool>> stale;  // path, is an old-aside folder
  for (auto it = fs::directory_iterator(ParentOf(destination), ec); !ec && it != fs::directory_iterator();
       it.increment(ec)) {
    const std::string f = it->path().filename().string();
    for (const bool old : {false, true}) {
      const std::string prefix = "." + name + "." + (old ? kOldTag : kStagingTag) + "-";
      if (f.rfind(prefix, 0) != 0 || !fs::is_directory(it->symlink_status())) continue;
      const pid_t pid = ParseStagingSuffix(f.substr(prefix.size()));
      if (pid != ::getpid() && ProcessIsGone(pid)) stale.emplace_back(it->path(), old);
    }
  }
  for (const auto& [path, old] : stale) {
    std::error_code e;
    if (old && !fs::exists(fs::symlink_status(destination, e)) && std::rename(path.c_str(), destination.c_str()) == 0) {
      done.push_back(path);
      continue;
    }
    fs::remove_all(path, e);
    if (!e) done.push_back(path);
  }
  return done;
}

void PrepareOutputFolder(const fs::path& given, const AtomicFolderOptions& options) {
  const fs::path destination = WithoutTrailingSeparator(given);
  if (destination.empty() || destination.filename() == "." || destination.filename() == "..") {
    throw OutputError("output folder " + Quote(destination) + " must name a folder");
  }
  CheckOutputLocation(destination, options.protected_inputs);
  RemoveStaleStaging(destination);
  std::error_code ec;
  const auto status = fs::symlink_status(destination, ec);
  if (!fs::exists(status)) return;
  if (!fs::is_directory(status)) {
    throw OutputError("output path " + Quote(destination) + " exists and is not a folder; not replacing it");
  }
  if (!HasMarker(destination)) {
    throw OutputError("output folder " + Quote(destination) + " already exists and was not written by porofit (it has no " +
                      kOutputMarkerName + " file); porofit replaces only its own output folders, even with "
                      "--overwrite. Choose a new output folder, or move or delete this one yourself");
  }
  if (!options.overwrite) {
    throw OutputError("output folder " + Quote(destination) + " already exists; pass --overwrite to replace it");
  }
}

void WriteFileDurably(const fs::path& path, std::string_view content) {
  const int fd = ::open(path.c_str(), O_WRONLY | O_CREAT | O_TRUNC | O_CLOEXEC, 0644);
  if (fd < 0) throw OutputError("cannot create " + Quote(path) + ": " + Errno(errno));
  const char* p = content.data();
  size_t left = content.size();
  while (left > 0) {
    const ssize_t w = ::write(fd, p, left);
    if (w < 0) {
      if (errno == EINTR) continue;
      const int e = errno;
      ::close(fd);
      throw OutputError("cannot write " + Quote(path) + ": " + Errno(e));
    }
    p += w;
    left -= static_cast<size_t>(w);
  }
  if (::fsync(fd) != 0) {
    const int e = errno;
    ::close(fd);
    throw OutputError("cannot sync " + Quote(path) + ": " + Errno(e));
  }
  if (::close(fd) != 0) throw OutputError("cannot close " + Quote(path) + ": " + Errno(errno));
}

void WriteFolderAtomically(const fs::path& given, const std::function<void(const fs::path& staging)>& write,
                           const AtomicFolderOptions& options) {
  const fs::path destination = WithoutTrailingSeparator(given);
  PrepareOutputFolder(destination, options);
  std::error_code ec;
  const bool dest_exists = fs::exists(fs::symlink_status(destination, ec));
  const std::vector<fs::path> created_parents = CreateParents(destination, ParentOf(destination), options.create_parents);
  fs::path staging;
  auto discard_staging = [&] {
    std::error_code ignored;
    if (!staging.empty()) fs::remove_all(staging, ignored);
    for (auto c = created_parents.rbegin(); c != created_parents.rend(); ++c) fs::remove(*c, ignored);
  };
  try {
    staging = MakeSibling(destination, kStagingTag, /*create=*/true);
    Step(options, "stage");
    write(staging);
    WriteFileDurably(staging / kOutputMarkerName, MarkerText(options));
    Step(options, "sync");
    SyncTree(staging);
    if (dest_exists) {
      Replace(destination, staging, options);
      return;
    }
    Step(options, "rename-in");
    RenameNewOrThrow(staging, destination);
  } catch (...) {
    discard_staging();
    throw;
  }
  SyncPath(ParentOf(destination), true);
}

}  // namespace porofit

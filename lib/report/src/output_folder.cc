#include "porofit/report/output_folder.h"

#include <fcntl.h>
#include <unistd.h>

#include <cerrno>
#include <cstring>
#include <system_error>
#include <vector>

namespace porofit {
namespace fs = std::filesystem;

namespace {

std::string Quote(const fs::path& p) { return "'" + p.string() + "'"; }

std::string Errno(int e) { return std::strerror(e); }

void Step(const AtomicFolderOptions& o, std::string_view name) {
  if (o.before_step) o.before_step(name);
}

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
  const fs::path parent = dest.parent_path().empty() ? fs::path(".") : dest.parent_path();
  const std::string base = "." + dest.filename().string() + "." + tag + "-" + std::to_string(::getpid());
  for (int k = 0; k < 1000; ++k) {
    const fs::path cand = parent / (base + "-" + std::to_string(k));
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

}  // namespace

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

void WriteFolderAtomically(const fs::path& destination,
                           const std::function<void(const fs::path& staging)>& write,
                           const AtomicFolderOptions& options) {
  if (destination.empty() || destination.filename().empty() || destination.filename() == "." ||
      destination.filename() == "..") {
    throw OutputError("output folder " + Quote(destination) + " must name a folder");
  }
  const fs::path parent = destination.parent_path().empty() ? fs::path(".") : destination.parent_path();
  std::error_code ec;
  const auto dest_status = fs::symlink_status(destination, ec);
  const bool dest_exists = fs::exists(dest_status);
  if (dest_exists && !options.overwrite) {
    throw OutputError("output folder " + Quote(destination) + " already exists; pass --overwrite to replace it");
  }
  if (dest_exists && !fs::is_directory(dest_status)) {
    throw OutputError("output path " + Quote(destination) + " exists and is not a folder; not replacing it");
  }

  // Missing parents, outermost first, so a failure can take them away again.
  std::vector<fs::path> created_parents;
  if (!fs::is_directory(parent, ec)) {
    if (!options.create_parents) {
      throw OutputError("cannot create output folder " + Quote(destination) + ": parent folder " +
                        Quote(parent) + " does not exist");
    }
    std::vector<fs::path> missing;
    for (fs::path p = parent; !p.empty() && !fs::exists(fs::symlink_status(p, ec)); p = p.parent_path()) {
      missing.push_back(p);
      if (p == p.parent_path()) break;
    }
    for (auto it = missing.rbegin(); it != missing.rend(); ++it) {
      if (!fs::create_directory(*it, ec) && ec) {
        for (auto c = created_parents.rbegin(); c != created_parents.rend(); ++c) fs::remove(*c, ec);
        throw OutputError("cannot create output folder " + Quote(destination) + ": cannot create " + Quote(*it) +
                          ": " + ec.message());
      }
      created_parents.push_back(*it);
    }
    if (!fs::is_directory(parent, ec)) {
      throw OutputError("cannot create output folder " + Quote(destination) + ": " + Quote(parent) +
                        " is not a folder");
    }
  }
  auto remove_created_parents = [&] {
    std::error_code ignored;
    for (auto c = created_parents.rbegin(); c != created_parents.rend(); ++c) fs::remove(*c, ignored);
  };

  fs::path staging;
  try {
    staging = MakeSibling(destination, "porofit-staging", /*create=*/true);
  } catch (...) {
    remove_created_parents();
    throw;
  }
  auto discard_staging = [&] {
    std::error_code ignored;
    fs::remove_all(staging, ignored);
    remove_created_parents();
  };
  try {
    Step(options, "stage");
    write(staging);
    Step(options, "sync");
    SyncTree(staging);
  } catch (...) {
    discard_staging();
    throw;
  }

  if (!dest_exists) {
    try {
      Step(options, "rename-in");
      RenameOrThrow(staging, destination);
    } catch (...) {
      discard_staging();
      throw;
    }
    SyncPath(parent, true);
    return;
  }

  // Replace: old aside, new in, old removed. Between the two renames the
  // destination name is briefly absent, but never holds a partial folder.
  fs::path aside;
  try {
    aside = MakeSibling(destination, "porofit-old", /*create=*/false);
    Step(options, "rename-aside");
    RenameOrThrow(destination, aside);
  } catch (...) {
    discard_staging();
    throw;
  }
  try {
    Step(options, "rename-in");
    RenameOrThrow(staging, destination);
  } catch (...) {
    std::rename(aside.c_str(), destination.c_str());  // best effort: put the old folder back
    discard_staging();
    throw;
  }
  SyncPath(parent, true);
  Step(options, "remove-old");
  fs::remove_all(aside, ec);
  if (ec) throw OutputError("new output is in place, but the old folder " + Quote(aside) +
                            " could not be removed: " + ec.message());
}

}  // namespace porofit

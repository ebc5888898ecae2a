#include "porofit/core/input_file.h"

#include <sys/stat.h>

#include <cerrno>
#include <cstring>
#include <fstream>

namespace porofit {
namespace {

std::string Shown(const InputFileRequest& r) { return r.shown.empty() ? r.path : r.shown; }

SourceLocation At(const InputFileRequest& r) { return r.named_at.known() ? r.named_at : SourceLocation{r.path, 0, 0}; }

// "data file 'x'" plus " (looked for 'y')" when the path differs from the name.
std::string Named(const InputFileRequest& r) {
  const std::string shown = Shown(r);
  return r.what + " '" + shown + "'" + (shown == r.path ? std::string() : " (looked for '" + r.path + "')");
}

const char* KindOf(mode_t mode) {
  if (S_ISDIR(mode)) return "a directory";
  if (S_ISCHR(mode)) return "a character device";
  if (S_ISBLK(mode)) return "a block device";
  if (S_ISFIFO(mode)) return "a named pipe (FIFO)";
  if (S_ISSOCK(mode)) return "a socket";
  return "a special file";
}

std::string Bytes(std::uint64_t n) {
  std::string s = std::to_string(n) + " bytes";
  if (n >= kMiB && n % kMiB == 0) s += " (" + std::to_string(n / kMiB) + " MiB)";
  return s;
}

[[noreturn]] void TooLarge(const InputFileRequest& r, const std::string& size) {
  throw InputError(At(r), Named(r) + " is " + size + ", over the limit of " + Bytes(r.max_bytes) + " for a " +
                              r.what);
}

}  // namespace

void CheckRegularInputFile(const InputFileRequest& r) {
  struct stat st {};
  if (::stat(r.path.c_str(), &st) != 0)
    throw InputError(At(r), "cannot open " + Named(r) + ": " + std::strerror(errno));
  if (!S_ISREG(st.st_mode)) throw InputError(At(r), Named(r) + " is " + KindOf(st.st_mode) + ", not a file");
  if (static_cast<std::uint64_t>(st.st_size) > r.max_bytes) TooLarge(r, Bytes(static_cast<std::uint64_t>(st.st_size)));
}

std::string ReadInputFile(const InputFileRequest& r) {
  CheckRegularInputFile(r);
  std::ifstream in(r.path, std::ios::binary);
  if (!in) throw InputError(At(r), "cannot open " + Named(r) + ": " + std::strerror(errno));
  // Read in chunks up to one byte past the limit: the size seen by stat() may
  // be stale (a file still being written) or 0 (files under /proc).
  std::string text;
  char chunk[1 << 16];
  while (in) {
    in.read(chunk, sizeof chunk);
    text.append(chunk, static_cast<size_t>(in.gcount()));
    if (text.size() > r.max_bytes) TooLarge(r, "more than " + Bytes(r.max_bytes));
  }
  if (in.bad()) throw InputError(At(r), "cannot read " + Named(r));
  return text;
}

}  // namespace porofit

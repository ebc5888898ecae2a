// libFuzzer harness for the study loader (porofit::LoadStudy) and the data
// files a study reads.
//
// Input format: the study YAML, optionally followed by data files, each
// introduced by a separator line
//     #%% file: <relative path>
// whose text up to the next separator (or the end) is written to that path
// next to the study. At most kMaxDataFiles files are written; further
// separators stay inside the last file's text. A path that is absolute,
// contains "..", an empty component or a character outside [A-Za-z0-9._/-]
// is replaced by "data<i>.csv". Seeds are packed by tests/fuzz/pack_seeds.py.
//
// Expected outcomes: a loaded study, or porofit::InputError. Anything else
// (another exception type, a crash, a leak, undefined behaviour) is a finding.
// Files go to a private folder made with mkdtemp under $TMPDIR, emptied
// before every input and removed at exit.
#include <stdlib.h>

#include <cstddef>
#include <cstdint>
#include <filesystem>
#include <fstream>
#include <string>
#include <string_view>
#include <utility>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/io/study_loader.h"

namespace {

namespace fs = std::filesystem;

constexpr std::string_view kSeparator = "#%% file: ";
constexpr size_t kMaxDataFiles = 6;

struct FuzzFile {
  std::string path;  // relative to the study's folder
  std::string_view text;
};

bool SafeRelativePath(std::string_view path) {
  if (path.empty() || path.size() > 64 || path.front() == '/' || path.back() == '/') return false;
  for (char c : path) {
    const bool ok = (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '.' ||
                    c == '_' || c == '-' || c == '/';
    if (!ok) return false;
  }
  if (path.find("//") != std::string_view::npos || path.find("..") != std::string_view::npos) return false;
  return path != "study.yaml" && path != ".";
}

// Position of the next separator that starts a line at or after `from`, or npos.
size_t FindSeparator(std::string_view input, size_t from) {
  for (size_t at = input.find(kSeparator, from); at != std::string_view::npos;
       at = input.find(kSeparator, at + 1)) {
    if (at == 0 || input[at - 1] == '\n') return at;
  }
  return std::string_view::npos;
}

// Splits the input into the study text and the data files.
std::pair<std::string_view, std::vector<FuzzFile>> Split(std::string_view input) {
  size_t sep = FindSeparator(input, 0);
  const std::string_view study = input.substr(0, sep);
  std::vector<FuzzFile> files;
  while (sep != std::string_view::npos) {
    const size_t name_begin = sep + kSeparator.size();
    size_t name_end = input.find('\n', name_begin);
    if (name_end == std::string_view::npos) name_end = input.size();
    const size_t text_begin = std::min(input.size(), name_end + 1);
    size_t next = files.size() + 1 < kMaxDataFiles ? FindSeparator(input, text_begin) : std::string_view::npos;
    std::string_view name = input.substr(name_begin, name_end - name_begin);
    if (!name.empty() && name.back() == '\r') name.remove_suffix(1);
    FuzzFile f;
    f.path = SafeRelativePath(name) ? std::string(name) : "data" + std::to_string(files.size()) + ".csv";
    f.text = input.substr(text_begin, next == std::string_view::npos ? std::string_view::npos : next - text_begin);
    files.push_back(std::move(f));
    sep = next;
  }
  return {study, files};
}

const fs::path& PrivateFolder() {
  static const fs::path folder = [] {
    const char* tmp = getenv("TMPDIR");
    std::string pattern = std::string(tmp && *tmp ? tmp : "/tmp") + "/porofit-study-fuzz-XXXXXX";
    if (!mkdtemp(pattern.data())) abort();
    atexit([] {
      std::error_code ignored;
      fs::remove_all(PrivateFolder(), ignored);
    });
    return fs::path(pattern);
  }();
  return folder;
}

void Write(const fs::path& path, std::string_view text) {
  std::error_code ignored;
  fs::create_directories(path.parent_path(), ignored);
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out.write(text.data(), static_cast<std::streamsize>(text.size()));
}

void EmptyFolder(const fs::path& folder) {
  std::error_code ignored;
  for (const auto& entry : fs::directory_iterator(folder, ignored)) fs::remove_all(entry.path(), ignored);
}

}  // namespace

extern "C" int LLVMFuzzerTestOneInput(const uint8_t* data, size_t size) {
  const std::string_view input(reinterpret_cast<const char*>(data), size);
  const fs::path& folder = PrivateFolder();
  EmptyFolder(folder);
  const auto [study, files] = Split(input);
  const fs::path study_path = folder / "study.yaml";
  Write(study_path, study);
  for (const FuzzFile& f : files) Write(folder / f.path, f.text);
  try {
    porofit::LoadStudy(study_path.string());
  } catch (const porofit::InputError&) {
    // The expected way to reject bad input.
  }
  return 0;
}

#pragma once
// Opening input files: one gate for every file porofit reads (study files,
// data CSVs, sample tables, LAS logs, mineral tables).
//
// Only regular files are read. The path is examined with stat() before it is
// opened, so a directory, a character or block device (/dev/zero), a FIFO or
// a socket is refused without opening it (opening a FIFO would block until a
// writer appears). Each kind of file has a size limit (below); a larger file is
// refused before it is read, and a file that grows past the limit while being
// read stops the read at the limit. Reasons for the limits: docs/study-file.md
// ("Limits") and docs/las.md.
//
// Failure modes: every refusal throws porofit::InputError at `named_at` (where
// the file name was written, e.g. the `data.file` key) or, when that is
// unknown, at the file itself; the message names the file and the rule
// ("data file 'data/' is a directory, not a file").
#include <cstdint>
#include <string>

#include "porofit/core/error.h"

namespace porofit {

inline constexpr std::uint64_t kMiB = 1024ull * 1024ull;
/// Study files and mineral tables (YAML). A study with thousands of samples
/// keeps them in a sample_table CSV; YAML text costs far more memory per
/// value than its size once parsed.
inline constexpr std::uint64_t kMaxStudyFileBytes = 16 * kMiB;
/// Data CSVs and sample tables: 100,000 samples of 20 points each in one long
/// data CSV is about 100 MB.
inline constexpr std::uint64_t kMaxTableFileBytes = 256 * kMiB;
/// LAS 2.0 logs: a 10 km well at 0.1 m steps with 40 curves is about 50 MB.
inline constexpr std::uint64_t kMaxLasFileBytes = 256 * kMiB;

/// What to open and how to name it in messages.
struct InputFileRequest {
  std::string path;          ///< the path opened
  std::string what;          ///< kind of file for messages: "data file", "study file", "LAS file"
  std::string shown;         ///< the name as the user wrote it; empty: `path`
  SourceLocation named_at;   ///< where the name was written; unknown (empty file): the file itself
  std::uint64_t max_bytes = kMaxTableFileBytes;
};

/// Throws InputError unless `r.path` exists and is a regular file (symbolic
/// links are followed). Does not open the file.
void CheckRegularInputFile(const InputFileRequest& r);

/// CheckRegularInputFile(r), then reads the whole file. Throws InputError if it
/// cannot be opened or read, or is larger than `r.max_bytes`.
std::string ReadInputFile(const InputFileRequest& r);

}  // namespace porofit

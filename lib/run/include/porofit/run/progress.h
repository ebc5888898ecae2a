#pragma once
// A progress meter for long runs, written to a stream (stderr in the CLI).
//
// On a terminal it redraws one line ("\r") with a bar, samples done / total,
// rate and ETA, at most 10 times a second. Elsewhere (a log file, a pipe) it
// writes a plain line at most every 10 s and at the end. The CLI turns it off
// entirely with --quiet.
#include <chrono>
#include <cstddef>
#include <ostream>
#include <string>

namespace porofit {

/// One progress line, without "\r" or newline, e.g.
/// "[##########----------]  5000/10000  50.0%  812 samples/s  ETA 0:06".
/// `bar_width` 0 leaves the bar out. Rate and ETA are omitted while
/// elapsed_seconds is 0 or nothing is done; ETA is h:mm:ss past an hour.
std::string FormatProgress(size_t done, size_t total, double elapsed_seconds, int bar_width = 20);

class ProgressMeter {
 public:
  /// `terminal`: redraw in place (the caller tests isatty); otherwise plain lines.
  ProgressMeter(std::ostream& out, bool terminal, size_t total);
  /// Reports `done` samples; cheap when nothing is due to be written.
  void Update(size_t done);
  /// Writes the final state (and, on a terminal, ends the line).
  void Finish();

 private:
  using Clock = std::chrono::steady_clock;
  std::ostream& out_;
  bool terminal_;
  size_t total_, done_ = 0;
  Clock::time_point start_, last_;
  bool wrote_ = false, finished_ = false;
};

}  // namespace porofit

#pragma once
// A progress meter for long runs, written to a stream (stderr in the CLI).
//
// On a terminal it redraws one line ("\r") with a bar, samples done / total,
// rate and ETA, at most 10 times a second. Elsewhere (a log file, a pipe) it
// writes a plain line at most every 10 s and at the end. The CLI turns it off
// entirely with --quiet.
//
// Long work inside one sample (a bootstrap of thousands of refits) is shown
// after the sample count, e.g. "... | S-3: bootstrap exp-modulus 812/2000",
// so a run of one slow sample does not look stalled. Update() and Inner() may
// be called from different threads (the meter locks); writes are whole lines.
#include <chrono>
#include <cstddef>
#include <map>
#include <mutex>
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
  using Clock = std::chrono::steady_clock;

  /// `terminal`: redraw in place (the caller tests isatty); otherwise plain lines.
  ProgressMeter(std::ostream& out, bool terminal, size_t total);
  /// The same with the shortest gap between two writes given (the defaults
  /// are 100 ms on a terminal, 10 s otherwise; tests pass 0).
  ProgressMeter(std::ostream& out, bool terminal, size_t total, Clock::duration interval);

  /// Reports `done` samples; cheap when nothing is due to be written.
  /// Forgets the inner work of samples below `done`.
  void Update(size_t done);
  /// Reports work inside sample `index` (0-based) that is still running:
  /// `label` (e.g. "S-3: bootstrap exp-modulus"), `done` of `total` units.
  /// done >= total ends that entry. Thread-safe; cheap when nothing is due.
  void Inner(size_t index, const std::string& label, size_t done, size_t total);
  /// The text the meter would write now (no "\r", no newline): the sample
  /// count, then the running sample with the lowest index and its work, and
  /// "+N more" when other samples report work too.
  std::string Line() const;
  /// Writes the final state (and, on a terminal, ends the line).
  void Finish();

 private:
  struct InnerWork {
    std::string label;
    size_t done = 0, total = 0;
  };
  std::string LineLocked(Clock::time_point now, bool final) const;
  void MaybeWriteLocked();

  std::ostream& out_;
  bool terminal_;
  size_t total_, done_ = 0;
  Clock::duration interval_;
  Clock::time_point start_, last_;
  bool wrote_ = false, finished_ = false;
  std::map<size_t, InnerWork> inner_;
  mutable std::mutex mu_;
};

}  // namespace porofit

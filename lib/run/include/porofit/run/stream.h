#pragma once
// Running a study sample by sample, with bounded memory.
//
// RunStudyStreaming() computes the samples in parallel (RunOptions::threads)
// and hands each SampleRun to a sink strictly in sample order, on the calling
// thread, then forgets it: at most `window` finished samples wait in memory
// for their turn, so memory does not grow with the number of samples. The
// order, and therefore anything a sink writes, is the same for any thread
// count. RunStudy() (run.h) is the all-in-memory form of the same work; both
// call RunSample().
//
// Failure: a fit that fails is a FitResult status. An exception thrown by the
// sink (e.g. a full disk) stops the workers and is rethrown from
// RunStudyStreaming() after they have joined.
#include <cstddef>
#include <functional>
#include <string_view>

#include "porofit/run/run.h"

namespace porofit {

struct StreamOptions {
  /// Finished samples that may wait for the sink at once (the reorder
  /// window), and so the bound on samples held in memory besides the study
  /// itself. 0: 8 per thread.
  size_t window = 0;
  /// Called on the calling thread after the sink took sample `done - 1`:
  /// (samples done, total). May be empty.
  std::function<void(size_t done, size_t total)> progress;
  /// Progress inside sample `index` while it is computed (see SampleProgress
  /// in run.h): called on the worker thread computing it, so several samples
  /// may report at once; must be thread-safe. May be empty.
  std::function<void(size_t index, std::string_view stage, size_t done, size_t total)> sample_progress;
  /// Called on the worker thread that computed sample `index` (the calling
  /// thread with one thread), before the sample waits for its turn: lets the
  /// sink's heavy work, such as formatting the sample's output rows, run in
  /// parallel. Must be thread-safe. May be empty.
  std::function<void(size_t index, const SampleRun& run)> prepare;
};

/// Receives sample `index` (0-based, strictly increasing) of the study.
using SampleSink = std::function<void(size_t index, SampleRun&& run)>;

/// Run metadata as RunStudy() records it at its start (wall_seconds 0).
RunMetadata StartRunMetadata(const RunOptions& options);

/// Runs every sample of `study` and hands each to `sink` in order. Fills
/// metadata->wall_seconds at the end when `metadata` is given. Requires
/// options.Validate().empty() (checked: aborts).
void RunStudyStreaming(const Study& study, const RunOptions& options, const SampleSink& sink,
                       const StreamOptions& stream = {}, RunMetadata* metadata = nullptr);

}  // namespace porofit

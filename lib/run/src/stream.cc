#include "porofit/run/stream.h"

#include <algorithm>
#include <chrono>
#include <condition_variable>
#include <exception>
#include <mutex>
#include <optional>
#include <thread>
#include <vector>

#include "porofit/core/error.h"
#include "porofit/version.h"

namespace porofit {

RunMetadata StartRunMetadata(const RunOptions& options) {
  RunMetadata m;
  m.started_utc = options.timestamp_utc.empty() ? UtcTimestampNow() : options.timestamp_utc;
  m.tool_version = kVersion;
  m.build_type = POROFIT_BUILD_TYPE;
  m.command_line = options.command_line;
  m.threads = options.threads;
  return m;
}

void RunStudyStreaming(const Study& study, const RunOptions& options, const SampleSink& sink,
                       const StreamOptions& stream, RunMetadata* metadata) {
  const std::string bad = options.Validate();
  POROFIT_CHECK(bad.empty(), "RunOptions: " + bad);
  // Built-ins (or options.registry) plus the study's user models, as in RunStudy().
  const ModelRegistry catalogue = StudyRegistry(study, options.registry);
  const ModelRegistry& registry = catalogue;
  const auto t0 = std::chrono::steady_clock::now();
  const size_t n = study.samples.size();
  const size_t workers = std::min<size_t>(static_cast<size_t>(options.threads), n);
  auto done = [&](size_t i) {
    if (stream.progress) stream.progress(i + 1, n);
  };
  auto inner = [&](size_t i) -> SampleProgress {
    if (!stream.sample_progress) return {};
    return [&stream, i](std::string_view stage, size_t d, size_t t) { stream.sample_progress(i, stage, d, t); };
  };

  if (workers <= 1) {
    for (size_t i = 0; i < n; ++i) {
      SampleRun r = RunSample(study.samples[i], registry, study.comparison, inner(i));
      if (stream.prepare) stream.prepare(i, r);
      sink(i, std::move(r));
      done(i);
    }
  } else {
    // Reorder window: sample i may be computed only once i < emitted + window,
    // so slot i % window is free (the sink has taken sample i - window).
    const size_t window = std::max<size_t>(stream.window > 0 ? stream.window : 8 * workers, 1);
    std::vector<std::optional<SampleRun>> slots(window);
    std::mutex mu;
    std::condition_variable slot_free, slot_ready;
    size_t next = 0, emitted = 0;
    bool stop = false;
    std::exception_ptr worker_error;

    auto work = [&] {
      for (;;) {
        size_t i;
        {
          std::unique_lock<std::mutex> lock(mu);
          if (stop || next >= n) return;
          i = next++;
          slot_free.wait(lock, [&] { return stop || i < emitted + window; });
          if (stop) return;
        }
        std::optional<SampleRun> r;
        try {
          r = RunSample(study.samples[i], registry, study.comparison, inner(i));
          if (stream.prepare) stream.prepare(i, *r);
        } catch (...) {
          std::lock_guard<std::mutex> lock(mu);
          if (!worker_error) worker_error = std::current_exception();
          stop = true;
          slot_ready.notify_all();
          slot_free.notify_all();
          return;
        }
        std::lock_guard<std::mutex> lock(mu);
        slots[i % window] = std::move(r);
        slot_ready.notify_all();
      }
    };
    std::vector<std::thread> pool;
    pool.reserve(workers);
    for (size_t w = 0; w < workers; ++w) pool.emplace_back(work);
    auto halt = [&] {
      {
        std::lock_guard<std::mutex> lock(mu);
        stop = true;
      }
      slot_free.notify_all();
      for (std::thread& t : pool) t.join();
    };
    try {
      for (size_t e = 0; e < n; ++e) {
        SampleRun r;
        {
          std::unique_lock<std::mutex> lock(mu);
          slot_ready.wait(lock, [&] { return stop || slots[e % window].has_value(); });
          if (!slots[e % window]) break;  // a worker failed
          r = std::move(*slots[e % window]);
          slots[e % window].reset();
          emitted = e + 1;
        }
        slot_free.notify_all();
        sink(e, std::move(r));
        done(e);
      }
    } catch (...) {
      halt();
      throw;
    }
    halt();
    if (worker_error) std::rethrow_exception(worker_error);
  }
  if (metadata != nullptr)
    metadata->wall_seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
}

}  // namespace porofit

#include "porofit/run/run.h"

#include <algorithm>
#include <atomic>
#include <chrono>
#include <ctime>
#include <exception>
#include <thread>

#include "porofit/version.h"

namespace porofit {

std::string RunOptions::Validate() const {
  if (threads < 1) return "threads = " + std::to_string(threads) + " must be >= 1";
  return {};
}

std::string UtcTimestampNow() {
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm tm{};
  gmtime_r(&now, &tm);
  char buf[32];
  std::strftime(buf, sizeof buf, "%Y-%m-%dT%H:%M:%SZ", &tm);
  return buf;
}

namespace {

int CountSigmas(const Sample& s) {
  int k = 0;
  for (const DataPoint& p : s.points) k += p.sigma > 0 ? 1 : 0;
  return k;
}

FitResult FailedResult(const std::string& model_id, FitStatus status, std::string message) {
  FitResult r;
  r.model_id = model_id;
  r.status = status;
  r.message = std::move(message);
  return r;
}

}  // namespace

bool IsWeighted(const Sample& s) {
  return !s.points.empty() && CountSigmas(s) == static_cast<int>(s.points.size());
}

FitRequest MakeFitRequest(const StudySample& sample, const ModelChoice& choice, const ModelSpec* model) {
  FitRequest req;
  req.model = model;
  req.settings = choice.settings;
  req.options = sample.options;
  const Sample& s = sample.sample;
  const bool weighted = IsWeighted(s);
  req.data.x.reserve(s.points.size());
  req.data.y.reserve(s.points.size());
  for (const DataPoint& p : s.points) {
    req.data.x.push_back(p.pressure);
    req.data.y.push_back(p.modulus);
    if (weighted) req.data.sigma.push_back(p.sigma);
  }
  return req;
}

FitResult RunOne(const StudySample& sample, const ModelChoice& choice, const ModelRegistry& registry) {
  const ModelSpec* model = registry.Find(choice.model_id);
  if (model == nullptr) {
    return FailedResult(choice.model_id, FitStatus::kInvalidRequest,
                        "model '" + choice.model_id + "' is not in the catalogue");
  }
  const int with_sigma = CountSigmas(sample.sample);
  const int n = static_cast<int>(sample.sample.points.size());
  if (with_sigma != 0 && with_sigma != n) {
    return FailedResult(choice.model_id, FitStatus::kInvalidRequest,
                        "sigma is given for " + std::to_string(with_sigma) + " of " + std::to_string(n) +
                            " points; give it for all points or none");
  }
  // Fit() promises not to throw for a failing fit; an exception here would be
  // a library defect, but one sample must not take the whole study down, so it
  // is recorded as this fit's failure and reported.
  try {
    FitResult r = Fit(MakeFitRequest(sample, choice, model));
    if (r.model_id.empty()) r.model_id = choice.model_id;
    return r;
  } catch (const std::exception& e) {
    return FailedResult(choice.model_id, FitStatus::kNumericalFailure,
                        std::string("internal error during fit: ") + e.what());
  }
}

StudyRun RunStudy(const Study& study, const RunOptions& options) {
  const std::string bad = options.Validate();
  POROFIT_CHECK(bad.empty(), "RunOptions: " + bad);
  const ModelRegistry& registry = options.registry ? *options.registry : ModelRegistry::Builtin();

  StudyRun run;
  run.study = study;
  run.metadata.started_utc = options.timestamp_utc.empty() ? UtcTimestampNow() : options.timestamp_utc;
  run.metadata.tool_version = kVersion;
  run.metadata.build_type = POROFIT_BUILD_TYPE;
  run.metadata.command_line = options.command_line;
  run.metadata.threads = options.threads;

  const size_t n_samples = study.samples.size();
  run.samples.resize(n_samples);
  const auto t0 = std::chrono::steady_clock::now();

  auto run_sample = [&](size_t i) {
    const StudySample& s = study.samples[i];
    std::vector<FitResult> fits;
    fits.reserve(s.models.size());
    for (const ModelChoice& c : s.models) fits.push_back(RunOne(s, c, registry));
    run.samples[i].fits = std::move(fits);  // each worker writes only its own slot
  };

  const size_t workers = std::min<size_t>(static_cast<size_t>(options.threads), n_samples);
  if (workers <= 1) {
    for (size_t i = 0; i < n_samples; ++i) run_sample(i);
  } else {
    std::atomic<size_t> next{0};
    std::vector<std::thread> pool;
    pool.reserve(workers);
    for (size_t w = 0; w < workers; ++w) {
      pool.emplace_back([&] {
        for (size_t i = next.fetch_add(1); i < n_samples; i = next.fetch_add(1)) run_sample(i);
      });
    }
    for (std::thread& t : pool) t.join();
  }
  run.metadata.wall_seconds =
      std::chrono::duration<double>(std::chrono::steady_clock::now() - t0).count();
  return run;
}

}  // namespace porofit

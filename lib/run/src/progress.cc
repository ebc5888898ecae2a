#include "porofit/run/progress.h"

#include <cmath>
#include <cstdio>

namespace porofit {

namespace {

std::string Clock(double seconds) {
  const long s = std::lround(std::max(seconds, 0.0));
  char buf[32];
  if (s >= 3600) std::snprintf(buf, sizeof buf, "%ld:%02ld:%02ld", s / 3600, s / 60 % 60, s % 60);
  else std::snprintf(buf, sizeof buf, "%ld:%02ld", s / 60, s % 60);
  return buf;
}

}  // namespace

std::string FormatProgress(size_t done, size_t total, double elapsed_seconds, int bar_width) {
  std::string out;
  const double fraction = total > 0 ? std::min(1.0, static_cast<double>(done) / static_cast<double>(total)) : 1.0;
  if (bar_width > 0) {
    const int filled = static_cast<int>(std::floor(fraction * bar_width + 1e-9));
    out += "[" + std::string(static_cast<size_t>(filled), '#') +
           std::string(static_cast<size_t>(bar_width - filled), '-') + "]  ";
  }
  char buf[96];
  const int digits = static_cast<int>(std::to_string(total).size());
  std::snprintf(buf, sizeof buf, "%*zu/%zu  %5.1f%%", digits, done, total, 100.0 * fraction);
  out += buf;
  if (elapsed_seconds > 0 && done > 0) {
    const double rate = static_cast<double>(done) / elapsed_seconds;
    std::snprintf(buf, sizeof buf, "  %.*f samples/s", rate < 10 ? 1 : 0, rate);
    out += buf;
    if (done < total) out += "  ETA " + Clock(static_cast<double>(total - done) / rate);
    else out += "  in " + Clock(elapsed_seconds);
  }
  return out;
}

ProgressMeter::ProgressMeter(std::ostream& out, bool terminal, size_t total)
    : out_(out), terminal_(terminal), total_(total), start_(Clock::now()), last_(start_) {}

void ProgressMeter::Update(size_t done) {
  done_ = done;
  const auto now = Clock::now();
  const auto gap = terminal_ ? std::chrono::milliseconds(100) : std::chrono::milliseconds(10000);
  if (now - last_ < gap) return;
  last_ = now;
  const double elapsed = std::chrono::duration<double>(now - start_).count();
  if (terminal_) out_ << "\r" << FormatProgress(done, total_, elapsed) << "\x1b[K" << std::flush;
  else out_ << "progress: " << FormatProgress(done, total_, elapsed, 0) << "\n" << std::flush;
  wrote_ = true;
}

void ProgressMeter::Finish() {
  if (finished_) return;
  finished_ = true;
  const double elapsed = std::chrono::duration<double>(Clock::now() - start_).count();
  if (terminal_) out_ << "\r" << FormatProgress(done_, total_, elapsed) << "\x1b[K\n" << std::flush;
  else if (wrote_) out_ << "progress: " << FormatProgress(done_, total_, elapsed, 0) << "\n" << std::flush;
}

}  // namespace porofit

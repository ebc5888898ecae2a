#include "porofit/run/progress.h"

#include <algorithm>
#include <cmath>
#include <cstdio>

namespace porofit {

namespace {

std::string ClockText(double seconds) {
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
    if (done < total) out += "  ETA " + ClockText(static_cast<double>(total - done) / rate);
    else out += "  in " + ClockText(elapsed_seconds);
  }
  return out;
}

ProgressMeter::ProgressMeter(std::ostream& out, bool terminal, size_t total)
    : ProgressMeter(out, terminal, total,
                    terminal ? Clock::duration(std::chrono::milliseconds(100))
                             : Clock::duration(std::chrono::seconds(10))) {}

ProgressMeter::ProgressMeter(std::ostream& out, bool terminal, size_t total, Clock::duration interval)
    : out_(out), terminal_(terminal), total_(total), interval_(interval), start_(Clock::now()), last_(start_) {}

std::string ProgressMeter::LineLocked(Clock::time_point now, bool final) const {
  const double elapsed = std::chrono::duration<double>(now - start_).count();
  std::string line = FormatProgress(done_, total_, elapsed, terminal_ ? 20 : 0);
  if (final || inner_.empty()) return line;
  const InnerWork& w = inner_.begin()->second;
  char buf[64];
  std::snprintf(buf, sizeof buf, " %zu/%zu", w.done, w.total);
  line += "  | " + w.label + buf;
  if (inner_.size() > 1) line += " (+" + std::to_string(inner_.size() - 1) + " more)";
  return line;
}

void ProgressMeter::MaybeWriteLocked() {
  if (finished_) return;
  const auto now = Clock::now();
  if (now - last_ < interval_) return;
  last_ = now;
  if (terminal_) out_ << "\r" << LineLocked(now, false) << "\x1b[K" << std::flush;
  else out_ << "progress: " << LineLocked(now, false) << "\n" << std::flush;
  wrote_ = true;
}

void ProgressMeter::Update(size_t done) {
  std::lock_guard<std::mutex> lock(mu_);
  done_ = done;
  inner_.erase(inner_.begin(), inner_.lower_bound(done));
  MaybeWriteLocked();
}

void ProgressMeter::Inner(size_t index, const std::string& label, size_t done, size_t total) {
  std::lock_guard<std::mutex> lock(mu_);
  if (index < done_) return;  // that sample is already counted as done
  if (done >= total) inner_.erase(index);
  else inner_[index] = InnerWork{label, done, total};
  MaybeWriteLocked();
}

std::string ProgressMeter::Line() const {
  std::lock_guard<std::mutex> lock(mu_);
  return LineLocked(Clock::now(), false);
}

void ProgressMeter::Finish() {
  std::lock_guard<std::mutex> lock(mu_);
  if (finished_) return;
  finished_ = true;
  const auto now = Clock::now();
  if (terminal_) out_ << "\r" << LineLocked(now, true) << "\x1b[K\n" << std::flush;
  else if (wrote_) out_ << "progress: " << LineLocked(now, true) << "\n" << std::flush;
}

}  // namespace porofit

#include "porofit/core/error.h"

#include <algorithm>
#include <charconv>
#include <vector>

namespace porofit {

std::string SourceLocation::ToString() const {
  std::string s = file.empty() ? std::string("<input>") : file;
  if (line > 0) {
    s += ":" + std::to_string(line);
    if (column > 0) s += ":" + std::to_string(column);
  }
  return s;
}

InputError::InputError(SourceLocation where, const std::string& message)
    : std::runtime_error(where.ToString() + ": error: " + message),
      where_(std::move(where)),
      message_(message) {}

std::string FormatNumber(double value) {
  char buf[64];
  auto [ptr, ec] = std::to_chars(buf, buf + sizeof buf, value);
  if (ec != std::errc()) return "?";
  return std::string(buf, ptr);
}

int EditDistance(const std::string& a, const std::string& b) {
  std::vector<int> prev(b.size() + 1), cur(b.size() + 1);
  for (size_t j = 0; j <= b.size(); ++j) prev[j] = static_cast<int>(j);
  for (size_t i = 1; i <= a.size(); ++i) {
    cur[0] = static_cast<int>(i);
    for (size_t j = 1; j <= b.size(); ++j) {
      const int sub = prev[j - 1] + (a[i - 1] == b[j - 1] ? 0 : 1);
      cur[j] = std::min({prev[j] + 1, cur[j - 1] + 1, sub});
    }
    std::swap(prev, cur);
  }
  return prev[b.size()];
}

namespace detail {
void CheckFailed(const char* expr, const char* file, int line, const std::string& msg) {
  std::fprintf(stderr, "%s:%d: internal check failed: %s (%s)\n", file, line, expr, msg.c_str());
  std::abort();
}
}  // namespace detail

}  // namespace porofit

#include "apps/progress_bar.h"

#include <unistd.h>
#include <algorithm>
#include <cmath>
#include <cstdio>

namespace loupe::cli {

ProgressBar::ProgressBar(std::string label, bool quiet)
    : label_(std::move(label)),
      active_(!quiet && ::isatty(STDERR_FILENO) == 1),
      start_(std::chrono::steady_clock::now()),
      last_draw_(start_) {}

ProgressBar::~ProgressBar() { finish(); }

double ProgressBar::elapsed_seconds() const {
  return std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count();
}

void ProgressBar::update(double done, double total, const std::string& detail) {
  if (!active_) return;
  const auto now = std::chrono::steady_clock::now();
  if (drawn_ && now - last_draw_ < std::chrono::milliseconds(100) && done < total) return;
  last_draw_ = now;
  drawn_ = true;
  const double fraction = total > 0 ? std::clamp(done / total, 0.0, 1.0) : 0.0;
  constexpr int kWidth = 30;
  const int filled = static_cast<int>(std::lround(fraction * kWidth));
  std::string bar(static_cast<std::size_t>(filled), '#');
  bar.append(static_cast<std::size_t>(kWidth - filled), '.');
  const double elapsed = elapsed_seconds();
  std::string eta;
  if (fraction > 0.02 && fraction < 1.0) {
    const double left = elapsed * (1.0 - fraction) / fraction;
    eta = " ETA " + std::to_string(static_cast<long>(std::lround(left))) + "s";
  }
  std::fprintf(stderr, "\r%s [%s] %3d%% %s%s\033[K", label_.c_str(), bar.c_str(),
               static_cast<int>(std::lround(fraction * 100)), detail.c_str(), eta.c_str());
  std::fflush(stderr);
}

void ProgressBar::finish() {
  if (active_ && drawn_) {
    std::fprintf(stderr, "\r\033[K");
    std::fflush(stderr);
  }
  drawn_ = false;
}

std::string format_bytes(double bytes) {
  const char* units[] = {"B", "KB", "MB", "GB", "TB"};
  int u = 0;
  while (bytes >= 1000.0 && u < 4) {
    bytes /= 1000.0;
    ++u;
  }
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, u == 0 ? "%.0f %s" : "%.1f %s", bytes, units[u]);
  return buffer;
}

std::string format_count(std::size_t n) {
  std::string digits = std::to_string(n);
  std::string out;
  for (std::size_t i = 0; i < digits.size(); ++i) {
    if (i > 0 && (digits.size() - i) % 3 == 0) out += ',';
    out += digits[i];
  }
  return out;
}

}  // namespace loupe::cli

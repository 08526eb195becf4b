// A one-line progress bar on stderr for long work. Draws only when stderr is a
// terminal and the user did not ask for quiet; otherwise it does nothing.
#pragma once

#include <chrono>
#include <string>

namespace loupe::cli {

class ProgressBar {
 public:
  ProgressBar(std::string label, bool quiet);
  ~ProgressBar();
  // done out of total (any unit); `detail` is shown after the bar (e.g. "12.3 MB/s").
  void update(double done, double total, const std::string& detail = "");
  void finish();
  bool active() const { return active_; }
  double elapsed_seconds() const;

 private:
  std::string label_;
  bool active_;
  bool drawn_ = false;
  std::chrono::steady_clock::time_point start_;
  std::chrono::steady_clock::time_point last_draw_;
};

// "1.8 MB", "512 B": byte counts for people.
std::string format_bytes(double bytes);
// "12,345,678": thousands separated for tables.
std::string format_count(std::size_t n);

}  // namespace loupe::cli

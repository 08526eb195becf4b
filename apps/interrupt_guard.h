// Ctrl-C for long work: while an InterruptGuard lives, the first SIGINT sets a flag
// that fits and sweeps poll after every sweep; a second one ends the program at once.
#pragma once

#include <atomic>

namespace loupe::cli {

class InterruptGuard {
 public:
  InterruptGuard();   // clears the flag and installs the handler
  ~InterruptGuard();  // restores the previous handler
  InterruptGuard(const InterruptGuard&) = delete;
  InterruptGuard& operator=(const InterruptGuard&) = delete;

  // Set by the handler; give it to FitControl::stop_requested and the like.
  static const std::atomic<bool>& stop_requested();

 private:
  void (*previous_)(int);
};

}  // namespace loupe::cli

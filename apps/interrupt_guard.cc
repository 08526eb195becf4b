#include "apps/interrupt_guard.h"

#include <csignal>

namespace loupe::cli {

namespace {

std::atomic<bool> g_stop_requested{false};

extern "C" void request_stop(int) {
  g_stop_requested.store(true);
  std::signal(SIGINT, SIG_DFL);  // a second Ctrl-C ends the program at once
}

}  // namespace

InterruptGuard::InterruptGuard() {
  g_stop_requested.store(false);
  previous_ = std::signal(SIGINT, request_stop);
}

InterruptGuard::~InterruptGuard() { std::signal(SIGINT, previous_); }

const std::atomic<bool>& InterruptGuard::stop_requested() { return g_stop_requested; }

}  // namespace loupe::cli

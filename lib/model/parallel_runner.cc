#include "model/parallel_runner.h"

#include <algorithm>
#include <atomic>
#include <exception>
#include <mutex>
#include <thread>
#include <vector>

namespace loupe {

void ParallelRunner::run(std::size_t count, const std::function<void(std::size_t)>& task) const {
  run_with_worker(count, [&](std::size_t i, std::size_t) { task(i); });
}

void ParallelRunner::run_with_worker(std::size_t count,
                                     const std::function<void(std::size_t, std::size_t)>& task) const {
  const std::size_t workers = std::min(threads_, count);
  if (workers <= 1) {
    for (std::size_t i = 0; i < count; ++i) task(i, 0);
    return;
  }
  std::atomic<std::size_t> next{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  auto work = [&](std::size_t worker) {
    for (;;) {
      const std::size_t i = next.fetch_add(1);
      if (i >= count) return;
      try {
        task(i, worker);
      } catch (...) {
        std::lock_guard lock(failure_mutex);
        if (!failure) failure = std::current_exception();
        next.store(count);
      }
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(workers - 1);
  for (std::size_t t = 1; t < workers; ++t) pool.emplace_back(work, t);
  work(0);
  for (auto& thread : pool) thread.join();
  if (failure) std::rethrow_exception(failure);
}

}  // namespace loupe

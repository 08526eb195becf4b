// Runs numbered tasks on a fixed number of threads. Tasks are handed out in
// order from a shared counter; results must not depend on which thread ran a
// task (the model code keeps every reduction in task order).
#pragma once

#include <cstddef>
#include <functional>

namespace loupe {

class ParallelRunner {
 public:
  explicit ParallelRunner(std::size_t threads) : threads_(threads == 0 ? 1 : threads) {}
  std::size_t threads() const { return threads_; }
  // Calls task(i) for every i in [0, count); returns when all are done. An
  // exception thrown by a task is rethrown here (the first one).
  void run(std::size_t count, const std::function<void(std::size_t)>& task) const;
  // The same, with the index of the worker running the task (< threads()),
  // for per-worker scratch memory.
  void run_with_worker(std::size_t count, const std::function<void(std::size_t task, std::size_t worker)>& task) const;

 private:
  std::size_t threads_;
};

}  // namespace loupe

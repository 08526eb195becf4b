#include "common/process_group.h"

#include <algorithm>

namespace loupe {

void run_together(ProcessGroup& processes, const std::function<void()>& step) {
  std::string error;
  try {
    step();
  } catch (const Error& e) {
    error = e.what();
    if (error.empty()) error = "an unnamed error";
  }
  std::size_t failed_rank = 0;
  const std::string first = processes.first_error(error, &failed_rank);
  if (!error.empty()) throw CollectiveError(error);
  if (!first.empty()) {
    throw CollectiveError("process " + std::to_string(failed_rank + 1) + " of " + std::to_string(processes.size()) +
                          " stopped: " + first);
  }
}

IndexRange share_of(std::size_t count, std::size_t rank, std::size_t size) {
  if (size == 0) return {0, count};
  const std::size_t base = count / size;
  const std::size_t extra = count % size;
  const std::size_t begin = rank * base + std::min(rank, extra);
  return {begin, begin + base + (rank < extra ? 1 : 0)};
}

}  // namespace loupe

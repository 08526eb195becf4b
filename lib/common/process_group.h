// The processes that share one job when loupe runs on several machines (one MPI
// communicator under `mpirun`; the implementation is lib/distributed, built only with MPI).
// The library reaches other processes only through this interface, so it builds without MPI.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <vector>

#include "common/error.h"

namespace loupe {

// Every call is collective: every process of the group makes the same calls in
// the same order, from the thread that started the job (never from worker threads).
class ProcessGroup {
 public:
  virtual ~ProcessGroup() = default;
  virtual std::size_t rank() const = 0;  // 0 .. size() - 1; rank 0 writes the results
  virtual std::size_t size() const = 0;

  // Element-wise sums across the processes, in place: every process ends with the same totals.
  virtual void sum(std::span<std::uint32_t> values) = 0;
  virtual void sum(std::span<std::uint64_t> values) = 0;
  // Summed in rank order, so every process gets the same bits.
  virtual void sum(std::span<double> values) = 0;

  // Every process's values concatenated in rank order, on every process.
  // Example: rank 0 gives {1, 2}, rank 1 gives {3} -> {1, 2, 3} everywhere.
  virtual std::vector<double> all_gather(std::span<const double> values) = 0;
  virtual std::vector<std::uint64_t> all_gather(std::span<const std::uint64_t> values) = 0;

  // On rank 0, every process's values concatenated in rank order; elsewhere empty.
  virtual std::vector<float> gather_to_root(std::span<const float> values) = 0;

  // The message of the lowest-ranked process whose `error` is not empty, on
  // every process, with that process's rank; "" when every `error` is empty.
  virtual std::string first_error(const std::string& error, std::size_t* failed_rank) = 0;
};

// An error that every process of a group raised together (see run_together), so
// each can report it and exit cleanly instead of leaving the others waiting.
class CollectiveError : public Error {
 public:
  using Error::Error;
};

// Runs `step` on every process; when it throws loupe::Error on any of them, every
// process throws CollectiveError: the failing process its own message, the others
// "process R of P stopped: MESSAGE". Use it around steps that read user input, so
// that a file one process cannot read stops all of them, never leaving one waiting.
void run_together(ProcessGroup& processes, const std::function<void()>& step);

// The contiguous range [begin, end) of `count` items that process `rank` of `size` takes:
// item counts differ by at most one. Example: 10 items over 3 processes -> [0,4), [4,7), [7,10).
struct IndexRange {
  std::size_t begin = 0;
  std::size_t end = 0;
};
IndexRange share_of(std::size_t count, std::size_t rank, std::size_t size);

}  // namespace loupe

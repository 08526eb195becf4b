// Processes simulated by threads of one test program, for checking code written
// against ProcessGroup (common/process_group.h) without MPI: run_as_processes(n, f)
// runs f(group) on n threads, each with its own ProcessGroup of rank 0 .. n-1.
#pragma once

#include <barrier>
#include <cstring>
#include <exception>
#include <functional>
#include <mutex>
#include <string>
#include <thread>
#include <vector>

#include "common/process_group.h"

namespace loupe::testing {

class ThreadProcessGroup final : public ProcessGroup {
 public:
  struct Shared {
    explicit Shared(std::size_t size) : barrier(static_cast<std::ptrdiff_t>(size)), slots(size) {}
    std::barrier<> barrier;
    std::vector<std::string> slots;  // each process's contribution to the current call, as bytes
  };
  ThreadProcessGroup(Shared& shared, std::size_t rank) : shared_(shared), rank_(rank) {}
  std::size_t rank() const override { return rank_; }
  std::size_t size() const override { return shared_.slots.size(); }
  void sum(std::span<std::uint32_t> values) override { sum_of(values); }
  void sum(std::span<std::uint64_t> values) override { sum_of(values); }
  void sum(std::span<double> values) override { sum_of(values); }
  std::vector<double> all_gather(std::span<const double> values) override { return gather_of(values); }
  std::vector<std::uint64_t> all_gather(std::span<const std::uint64_t> values) override { return gather_of(values); }
  std::vector<float> gather_to_root(std::span<const float> values) override {
    auto all = gather_of(values);
    if (rank_ != 0) all.clear();
    return all;
  }
  std::string first_error(const std::string& error, std::size_t* failed_rank) override {
    const auto all = exchange(error);
    for (std::size_t r = 0; r < all.size(); ++r) {
      if (all[r].empty()) continue;
      if (failed_rank != nullptr) *failed_rank = r;
      return all[r];
    }
    return {};
  }

 private:
  // Every process's bytes, in rank order, once all have given theirs.
  std::vector<std::string> exchange(std::string mine) {
    shared_.slots[rank_] = std::move(mine);
    shared_.barrier.arrive_and_wait();
    std::vector<std::string> all = shared_.slots;
    shared_.barrier.arrive_and_wait();
    return all;
  }
  template <typename T>
  void sum_of(std::span<T> values) {
    const auto all = exchange(std::string(reinterpret_cast<const char*>(values.data()), values.size_bytes()));
    for (std::size_t i = 0; i < values.size(); ++i) {
      T total{};
      for (const auto& bytes : all) {
        T value;
        std::memcpy(&value, bytes.data() + i * sizeof(T), sizeof(T));
        total += value;
      }
      values[i] = total;
    }
  }
  template <typename T>
  std::vector<T> gather_of(std::span<const T> values) {
    const auto all = exchange(std::string(reinterpret_cast<const char*>(values.data()), values.size_bytes()));
    std::vector<T> out;
    for (const auto& bytes : all) {
      const std::size_t at = out.size();
      out.resize(at + bytes.size() / sizeof(T));
      if (!bytes.empty()) std::memcpy(out.data() + at, bytes.data(), bytes.size());
    }
    return out;
  }
  Shared& shared_;
  std::size_t rank_;
};

// Runs f on `size` threads as processes 0 .. size-1; rethrows the first exception.
inline void run_as_processes(std::size_t size, const std::function<void(ProcessGroup&)>& f) {
  ThreadProcessGroup::Shared shared(size);
  std::vector<std::exception_ptr> failures(size);
  std::vector<std::thread> threads;
  for (std::size_t r = 0; r < size; ++r) {
    threads.emplace_back([&, r] {
      ThreadProcessGroup group(shared, r);
      try {
        f(group);
      } catch (...) {
        failures[r] = std::current_exception();
      }
    });
  }
  for (auto& thread : threads) thread.join();
  for (const auto& failure : failures) {
    if (failure) std::rethrow_exception(failure);
  }
}

}  // namespace loupe::testing

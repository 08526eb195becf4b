// The processes of an `mpirun` job as a ProcessGroup (common/process_group.h), over
// Open MPI's C API. Built only when CMake finds MPI (LOUPE_MPI); nothing else in lib/ includes MPI.
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <vector>

#include "common/process_group.h"

namespace loupe {

// The world communicator of an MPI job that MpiEnvironment started.
class MpiProcessGroup final : public ProcessGroup {
 public:
  MpiProcessGroup();
  std::size_t rank() const override { return rank_; }
  std::size_t size() const override { return size_; }
  void sum(std::span<std::uint32_t> values) override;
  void sum(std::span<std::uint64_t> values) override;
  void sum(std::span<double> values) override;
  std::vector<double> all_gather(std::span<const double> values) override;
  std::vector<std::uint64_t> all_gather(std::span<const std::uint64_t> values) override;
  std::vector<float> gather_to_root(std::span<const float> values) override;
  std::string first_error(const std::string& error, std::size_t* failed_rank) override;

 private:
  std::size_t rank_ = 0;
  std::size_t size_ = 1;
};

// MPI for one process's lifetime: MPI_Init_thread (MPI called from the main
// thread only) on construction, MPI_Finalize on destruction.
class MpiEnvironment {
 public:
  MpiEnvironment(int* argc, char*** argv);
  ~MpiEnvironment();
  MpiEnvironment(const MpiEnvironment&) = delete;
  MpiEnvironment& operator=(const MpiEnvironment&) = delete;
  // Ends every process of the job at once (MPI_Abort), for an error that only
  // this process met while others may be waiting for it.
  [[noreturn]] static void abort_all(int exit_code);
};

// True when this process was started by an MPI launcher (mpirun, mpiexec, srun),
// read from the variables launchers set (OMPI_COMM_WORLD_SIZE, PMI_SIZE, PMIX_RANK).
bool launched_by_mpi();

}  // namespace loupe

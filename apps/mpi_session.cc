#include "apps/mpi_session.h"

#include <algorithm>
#include <cstdlib>
#include <memory>
#include <thread>

#include "common/error.h"
#include "common/process_group.h"
#if LOUPE_WITH_MPI
#include "distributed/mpi_process_group.h"
#endif

namespace loupe::cli {

namespace {

#if LOUPE_WITH_MPI
std::unique_ptr<MpiEnvironment> g_environment;
std::unique_ptr<MpiProcessGroup> g_processes;
#endif

// A positive count from an environment variable a launcher sets, or 0.
std::size_t launcher_count(const char* name) {
  const char* value = std::getenv(name);
  if (value == nullptr) return 0;
  char* end = nullptr;
  const unsigned long count = std::strtoul(value, &end, 10);
  return end != value && *end == '\0' ? count : 0;
}

}  // namespace

MpiSession::MpiSession(int* argc, char*** argv) {
#if LOUPE_WITH_MPI
  if (!launched_by_mpi()) return;
  g_environment = std::make_unique<MpiEnvironment>(argc, argv);
  g_processes = std::make_unique<MpiProcessGroup>();
#else
  (void)argc;
  (void)argv;
  const std::size_t launched = std::max(launcher_count("OMPI_COMM_WORLD_SIZE"), launcher_count("PMI_SIZE"));
  if (launched > 1) {
    throw Error("this loupe was built without MPI, so it cannot share its work among the " + std::to_string(launched) +
                " processes mpirun started (each would do all of it). Install Open MPI (Debian: "
                "libopenmpi-dev openmpi-bin) and rebuild with -DLOUPE_MPI=ON, or run loupe without mpirun.");
  }
#endif
}

MpiSession::~MpiSession() {
#if LOUPE_WITH_MPI
  g_processes.reset();
  g_environment.reset();
#endif
}

ProcessGroup* processes() {
#if LOUPE_WITH_MPI
  return g_processes.get();
#else
  return nullptr;
#endif
}

bool is_main_process() { return processes() == nullptr || processes()->rank() == 0; }

std::string process_label() {
  const ProcessGroup* group = processes();
  if (group == nullptr) return {};
  return "process " + std::to_string(group->rank() + 1) + " of " + std::to_string(group->size());
}

void stop_other_processes(int exit_code) {
#if LOUPE_WITH_MPI
  if (g_processes && g_processes->size() > 1) MpiEnvironment::abort_all(exit_code);
#else
  (void)exit_code;
#endif
}

std::size_t default_threads() {
  const std::size_t cores = std::max(1U, std::thread::hardware_concurrency());
  const std::size_t here = processes() != nullptr ? launcher_count("OMPI_COMM_WORLD_LOCAL_SIZE") : 0;
  return std::max<std::size_t>(1, here > 1 ? cores / here : cores);
}

}  // namespace loupe::cli

// The command line's link to MPI: main starts an MpiSession; when loupe was built
// with MPI and started by mpirun, commands that can spread their work over the
// processes (fit; permutation tests) get them from processes(), else it is null.
#pragma once

#include <cstddef>
#include <string>

namespace loupe {
class ProcessGroup;
}

namespace loupe::cli {

class MpiSession {
 public:
  // Starts MPI when this process was started by an MPI launcher and loupe was
  // built with MPI. Built without MPI but started by mpirun on several processes,
  // it throws loupe::Error saying how to rebuild: each process would otherwise do the whole work.
  MpiSession(int* argc, char*** argv);
  ~MpiSession();
  MpiSession(const MpiSession&) = delete;
  MpiSession& operator=(const MpiSession&) = delete;
};

// The processes of this run, or null when loupe runs alone.
ProcessGroup* processes();

// True on the process that prints results and writes files: rank 0, or alone.
bool is_main_process();

// "process 2 of 4" under mpirun, "" alone: for messages.
std::string process_label();

// Ends the run after an error that only this process met: under mpirun with other
// processes (which may be waiting for this one) all of them at once (MPI_Abort);
// alone it returns and the caller exits as usual.
void stop_other_processes(int exit_code);

// Threads each process should use by default: the cores of this machine divided
// among the processes mpirun started on it (at least 1).
std::size_t default_threads();

}  // namespace loupe::cli

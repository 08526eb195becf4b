// The `loupe` command line: one verb a command, each in apps/command_*.cc.
// It parses arguments, calls the library and prints; no statistics live here.
// Under mpirun (built with MPI) every process runs this main; apps/mpi_session.h.
#include <iostream>
#include <optional>

#include <CLI/CLI.hpp>

#include "apps/commands.h"
#include "apps/mpi_session.h"
#include "common/error.h"
#include "common/process_group.h"
#include "common/version.h"

namespace {

void print_error(const std::string& message) {
  const std::string label = loupe::cli::process_label();
  // One write, so that the lines of several processes sharing a terminal do not interleave.
  std::cerr << "loupe: error" + (label.empty() ? std::string() : " (" + label + ")") + ": " + message + "\n"
            << std::flush;
}

}  // namespace

int main(int argc, char** argv) {
  std::optional<loupe::cli::MpiSession> mpi;
  try {
    mpi.emplace(&argc, &argv);
  } catch (const loupe::Error& e) {
    print_error(e.what());
    return 1;
  }
  CLI::App app{
      "loupe: compare grouped text collections with one shared LDA topic model.\n"
      "Run `loupe COMMAND --help` for the options of a command.",
      "loupe"};
  app.set_version_flag("--version", std::string("loupe ") + loupe::kVersion);
  app.require_subcommand(1);
  app.get_formatter()->column_width(32);
  for (const auto& add : loupe::cli::command_registry()) add(app);
  try {
    app.parse(argc, argv);
  } catch (const CLI::ParseError& e) {
    const int code = app.exit(e);
    if (code != 0) loupe::cli::stop_other_processes(code);
    return code;
  } catch (const loupe::CollectiveError& e) {
    // Every process met it together: each says so and ends cleanly.
    print_error(e.what());
    return 1;
  } catch (const loupe::Error& e) {
    print_error(e.what());
    loupe::cli::stop_other_processes(1);
    return 1;
  }
  return 0;
}

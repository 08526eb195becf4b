// Runs the built `loupe` binary for end-to-end tests and captures what it prints.
#pragma once

#include <sys/wait.h>
#include <cstdio>
#include <string>

namespace loupe::testing {

struct CommandResult {
  int exit_code = -1;
  std::string output;  // stdout and stderr together
};

// Runs COMMAND through the shell, stderr joined to stdout.
inline CommandResult run_command(const std::string& command) {
  CommandResult result;
  FILE* pipe = ::popen((command + " 2>&1").c_str(), "r");
  if (!pipe) return result;
  char buffer[4096];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) result.output.append(buffer, n);
  const int status = ::pclose(pipe);
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return result;
}

// Runs `LOUPE_CLI ARGS` through the shell (arguments must be shell-quoted by the caller).
inline CommandResult run_loupe(const std::string& args) {
  return run_command(std::string("'") + LOUPE_CLI + "' " + args);
}

inline std::string quote(const std::string& s) {
  std::string out = "'";
  for (char c : s) {
    if (c == '\'')
      out += "'\\''";
    else
      out += c;
  }
  return out + "'";
}

}  // namespace loupe::testing

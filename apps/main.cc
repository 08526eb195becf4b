// The `loupe` command line: one verb a command, each in apps/command_*.cc.
// It parses arguments, calls the library and prints; no statistics live here.
#include <iostream>

#include <CLI/CLI.hpp>

#include "apps/commands.h"
#include "common/error.h"
#include "common/version.h"

int main(int argc, char** argv) {
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
    return app.exit(e);
  } catch (const loupe::Error& e) {
    std::cerr << "loupe: error: " << e.what() << "\n";
    return 1;
  }
  return 0;
}

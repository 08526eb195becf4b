#include "apps/commands.h"

namespace loupe::cli {

const std::vector<AddCommand>& command_registry() {
  // The order here is the order `loupe --help` lists them.
  static const std::vector<AddCommand> registry = {
      add_ingest_command,
      add_demo_command,
  };
  return registry;
}

}  // namespace loupe::cli

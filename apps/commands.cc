#include "apps/commands.h"

namespace loupe::cli {

const std::vector<AddCommand>& command_registry() {
  // The order here is the order `loupe --help` lists them.
  static const std::vector<AddCommand> registry = {
      add_ingest_command, add_sweep_command,   add_fit_command,   add_topics_command,          add_stability_command,
      add_export_command, add_compare_command, add_graph_command, add_near_duplicates_command, add_attribute_command,
      add_scan_command,   add_analyze_command, add_demo_command,
  };
  return registry;
}

}  // namespace loupe::cli

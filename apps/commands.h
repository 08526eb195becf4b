// How commands join the `loupe` command line: each apps/command_NAME.cc defines
// one add_NAME_command and lists it in command_registry() (apps/commands.cc).
#pragma once

#include <functional>
#include <vector>

#include <CLI/CLI.hpp>

namespace loupe::cli {

using AddCommand = std::function<void(CLI::App&)>;
const std::vector<AddCommand>& command_registry();

// Commands (one file each).
void add_ingest_command(CLI::App& app);
void add_fit_command(CLI::App& app);
void add_topics_command(CLI::App& app);
void add_stability_command(CLI::App& app);
void add_export_command(CLI::App& app);
void add_demo_command(CLI::App& app);
void add_compare_command(CLI::App& app);
void add_graph_command(CLI::App& app);
void add_near_duplicates_command(CLI::App& app);
void add_attribute_command(CLI::App& app);
void add_scan_command(CLI::App& app);
void add_analyze_command(CLI::App& app);
void add_sweep_command(CLI::App& app);

}  // namespace loupe::cli

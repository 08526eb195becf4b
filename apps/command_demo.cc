// `loupe demo`: placeholder until the demo study lands (filled in below).
#include "apps/commands.h"
namespace loupe::cli {
void add_demo_command(CLI::App& app) { app.add_subcommand("demo", "Run loupe on the bundled invented demo collections"); }
void add_ingest_command(CLI::App& app) { app.add_subcommand("ingest", "Read folders or a manifest of texts into a corpus file"); }
}  // namespace loupe::cli

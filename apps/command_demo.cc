// `loupe demo`: runs loupe on the bundled invented scenario (demo/harbour-letters).
#include <filesystem>
#include <iostream>

#include "apps/commands.h"
#include "common/error.h"
#include "corpus/corpus_builder.h"

namespace loupe::cli {

IngestReport run_ingest(const std::string& source, const IngestOptions& options, const std::string& output,
                        const std::string& summary_json, bool quiet);

namespace {

// The bundled demo lives beside the sources; an installed copy may name another place.
std::string find_demo_source(const std::string& given) {
  namespace fs = std::filesystem;
  if (!given.empty()) return given;
  for (const fs::path& candidate : {fs::path(LOUPE_DEMO_DIR), fs::path("demo/harbour-letters")}) {
    std::error_code ec;
    if (fs::is_directory(candidate, ec)) return candidate.string();
  }
  throw Error("the bundled demo corpus was not found (looked in " + std::string(LOUPE_DEMO_DIR) +
              "). Pass its folder with --source.");
}

}  // namespace

void add_demo_command(CLI::App& app) {
  struct DemoArguments {
    std::string source;
    std::string output_dir = "loupe-demo";
    bool quiet = false;
  };
  auto args = std::make_shared<DemoArguments>();
  auto* cmd = app.add_subcommand("demo",
                                 "Run loupe on the bundled invented demo: letters of three harbour offices.\n"
                                 "  Example: loupe demo --output-dir demo-study");
  cmd->add_option("--source", args->source, "The demo folder (default: the bundled one)");
  cmd->add_option("--output-dir", args->output_dir, "Where the demo's files go")->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] {
    const std::string source = find_demo_source(args->source);
    std::error_code ec;
    std::filesystem::create_directories(args->output_dir, ec);
    if (ec) throw Error("cannot create " + args->output_dir + ": " + ec.message() + ". Choose another --output-dir.");
    IngestOptions options;
    options.drop_proper_names = true;  // clerks' and ships' names would crowd out the themes
    // Disputed letters in 50-token segments, for `loupe scan`: the long letter dsp-02
    // (about 480 modelled tokens) gets 10 segments; at 100 tokens it would get 5, and
    // with 5 no permutation p-value of a change point can fall below about 0.2.
    options.segment_words = 50;
    options.segment_disputed_only = true;
    const std::string corpus_path = (std::filesystem::path(args->output_dir) / "corpus.loupe").string();
    const std::string summary_path = (std::filesystem::path(args->output_dir) / "ingest-summary.json").string();
    if (!args->quiet) std::cout << "loupe demo: the invented letters of three harbour offices, 1880-1910\n\n";
    run_ingest(source, options, corpus_path, summary_path, args->quiet);
    if (!args->quiet) std::cout << "Demo files are in " << args->output_dir << "/\n";
  });
}

}  // namespace loupe::cli

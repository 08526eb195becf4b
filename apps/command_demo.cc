// `loupe demo`: runs the whole study (`loupe analyze`) on the bundled invented scenario (demo/harbour-letters)
// and says where its report is. It replaces its own earlier output, so it can be run again and again.
#include <filesystem>
#include <iostream>
#include <thread>

#include "apps/commands.h"
#include "apps/study_pipeline.h"
#include "common/error.h"

namespace loupe::cli {

namespace {

// The bundled demo lives beside the sources; an installed copy may name another place. A folder holding the
// manifest letters.csv is read through the manifest (ids, roles and the year, decade and clerk columns).
std::string find_demo_source(const std::string& given) {
  namespace fs = std::filesystem;
  std::string folder = given;
  if (folder.empty()) {
    for (const fs::path& candidate : {fs::path(LOUPE_DEMO_DIR), fs::path("demo/harbour-letters")}) {
      std::error_code ec;
      if (fs::is_directory(candidate, ec)) {
        folder = candidate.string();
        break;
      }
    }
    if (folder.empty()) {
      throw Error("the bundled demo corpus was not found (looked in " + std::string(LOUPE_DEMO_DIR) +
                  "). Pass its folder with --source.");
    }
  }
  std::error_code ec;
  const fs::path manifest = fs::path(folder) / "letters.csv";
  if (fs::is_directory(folder, ec) && fs::is_regular_file(manifest, ec)) folder = manifest.string();
  return fs::absolute(folder).lexically_normal().string();
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
                                 "Run a whole study on the bundled invented demo: letters of three harbour offices.\n"
                                 "  Example: loupe demo --output-dir demo-study");
  cmd->add_option("--source", args->source, "The demo folder or manifest (default: the bundled one)");
  cmd->add_option("--output-dir", args->output_dir, "The study folder (a study already there is replaced)")
      ->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] {
    StudyOptions options;
    options.source = find_demo_source(args->source);
    options.ingest.drop_proper_names = true;  // clerks' and ships' names would crowd out the themes
    // Disputed letters in 50-token segments, for the composite scan: the long letter dsp-02
    // (about 480 modelled tokens) gets 10 segments; at 100 tokens it would get 5, and
    // with 5 no permutation p-value of a change point can fall below about 0.2.
    options.ingest.segment_words = 50;
    options.ingest.segment_disputed_only = true;
    // The report shows how the number of topics was chosen: a sweep over K around the demo's 20.
    options.sweep.topics = {5, 10, 15, 20, 25, 30};
    StudyRunSettings settings;
    settings.output_dir = args->output_dir;
    settings.overwrite = true;  // the demo's own folder: `make demo` runs again and again
    settings.quiet = args->quiet;
    settings.threads = std::max(1U, std::thread::hardware_concurrency());
    if (!args->quiet) std::cout << "loupe demo: the invented letters of three harbour offices, 1880-1910\n\n";
    const StudyOutcome outcome = run_study(options, settings);
    if (!args->quiet) {
      print_study_summary(outcome, std::cout);
      std::cout << "Open " << (std::filesystem::path(args->output_dir) / "report.html").string()
                << " in a browser to read the whole study.\n";
    }
  });
}

}  // namespace loupe::cli

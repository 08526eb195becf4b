// `loupe export MODEL -o FOLDER`: the full estimates as CSV files for R, Python
// or a spreadsheet: phi and theta per chain, the log-likelihood traces and the
// per-topic priors. The model file holds the vocabulary and the document ids
// and groups, so no corpus is needed.
#include <filesystem>
#include <iostream>
#include <memory>
#include <sstream>

#include "apps/commands.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "model/model_export.h"
#include "model/model_file.h"

namespace loupe::cli {

namespace {

struct ExportArguments {
  std::string model;
  std::string folder;
  std::string chain = "all";
  bool quiet = false;
};

void run_export(const ExportArguments& args) {
  const Model model = read_model(args.model);
  const std::size_t chains = model.chains.size();
  std::vector<std::size_t> chosen;
  if (args.chain == "all") {
    for (std::size_t c = 0; c < chains; ++c) chosen.push_back(c);
  } else {
    std::size_t number = 0;
    try {
      std::size_t used = 0;
      number = std::stoul(args.chain, &used);
      if (used != args.chain.size()) number = 0;
    } catch (const std::exception&) {
      number = 0;
    }
    if (number < 1 || number > chains) {
      throw Error("--chain " + args.chain + ": " + args.model + " has " + std::to_string(chains) +
                  (chains == 1 ? " chain" : " chains") + "; give a number from 1 to " + std::to_string(chains) +
                  " or all.");
    }
    chosen.push_back(number - 1);
  }
  std::error_code ec;
  std::filesystem::create_directories(args.folder, ec);
  if (ec) throw Error("cannot create the folder " + args.folder + ": " + ec.message() + ". Choose another -o folder.");
  std::vector<std::string> written;
  auto write = [&](const std::string& name, const std::string& text) {
    const std::string path = (std::filesystem::path(args.folder) / name).string();
    write_file_atomically(path, text);
    written.push_back(path);
  };
  for (const auto c : chosen) {
    std::ostringstream phi;
    write_phi_csv(model, c, phi);
    write("phi-chain-" + std::to_string(c + 1) + ".csv", phi.str());
    std::ostringstream theta;
    write_theta_csv(model, c, theta);
    write("theta-chain-" + std::to_string(c + 1) + ".csv", theta.str());
  }
  std::ostringstream trace;
  write_trace_csv(model, trace);
  write("log-likelihood-trace.csv", trace.str());
  std::ostringstream priors;
  write_topic_priors_csv(model, priors);
  write("topics.csv", priors.str());
  if (!args.quiet) {
    for (const auto& path : written) std::cout << "Wrote " << path << "\n";
  }
}

}  // namespace

void add_export_command(CLI::App& app) {
  auto args = std::make_shared<ExportArguments>();
  auto* cmd = app.add_subcommand("export",
                                 "Write a model's phi, theta, traces and priors as CSV files.\n"
                                 "  Example: loupe export letters.model -o letters-estimates/ --chain 1");
  cmd->add_option("MODEL", args->model, "The model file (from `loupe fit`)")->required()->check(CLI::ExistingFile);
  cmd->add_option("-o,--output", args->folder, "The folder to write the CSV files into (created if missing)")
      ->required();
  cmd->add_option("--chain", args->chain, "Which chain (1 = the first) or all")->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] { run_export(*args); });
}

}  // namespace loupe::cli

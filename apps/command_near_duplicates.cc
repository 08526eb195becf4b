// `loupe near-duplicates CORPUS`: near-copies by MinHash and LSH, verified by
// exact Jaccard similarity of word shingles; with a model, each pair's topic
// Hellinger distance tells lexical copies from topical kin.
#include <filesystem>
#include <iomanip>
#include <iostream>
#include <sstream>

#include "apps/commands.h"
#include "apps/progress_bar.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "graph/document_profiles.h"
#include "graph/near_duplicates.h"
#include "model/model_file.h"

namespace loupe::cli {

// Fails early, before long work, when PATH's folder does not exist.
void check_output_folder(const std::string& path, const std::string& option) {
  if (path.empty()) return;
  const std::filesystem::path target(path);
  const auto folder = target.has_parent_path() ? target.parent_path() : std::filesystem::path(".");
  std::error_code ec;
  if (!std::filesystem::is_directory(folder, ec)) {
    throw Error("cannot write " + path + " (" + option + "): the folder " + folder.string() +
                " does not exist. Create it first or choose another path.");
  }
}

namespace {

struct NearDuplicateArguments {
  std::string corpus;
  std::string model;
  std::size_t chain = 1;  // numbered from 1, as `loupe topics` shows chains
  std::string json;
  std::string csv;
  std::size_t show = 20;
  bool quiet = false;
  NearDuplicateOptions options;
};

void run_near_duplicates(NearDuplicateArguments& a) {
  check_output_folder(a.json, "--json");
  check_output_folder(a.csv, "--csv");
  const Corpus corpus = read_corpus(a.corpus);
  Model model;
  const bool with_model = !a.model.empty();
  if (with_model) {
    model = read_model(a.model);
    check_model_matches(model, corpus, a.corpus);
    if (a.chain < 1 || a.chain > model.chains.size()) {
      throw Error("--chain " + std::to_string(a.chain) + ": the model has " + std::to_string(model.chains.size()) +
                  " chain(s), numbered from 1.");
    }
  }
  ProgressBar bar("near-duplicates", a.quiet);
  a.options.progress = [&](const char* stage, std::size_t done, std::size_t total) {
    bar.update(static_cast<double>(done), static_cast<double>(total), stage);
  };
  NearDuplicateResult result = find_near_duplicates(corpus, a.options);
  bar.finish();
  if (with_model) add_topic_distances(result, chain_profiles(model, a.chain - 1));

  if (!a.json.empty()) {
    nlohmann::json json = near_duplicates_json(result, corpus);
    json["corpus"] = a.corpus;
    json["model"] = with_model ? nlohmann::json(a.model) : nlohmann::json(nullptr);
    if (with_model) json["chain"] = a.chain;
    json["seconds"] = bar.elapsed_seconds();
    write_file_atomically(a.json, json.dump(2) + "\n");
  }
  if (!a.csv.empty()) write_file_atomically(a.csv, near_duplicates_csv(result, corpus));
  if (a.quiet) return;

  const double seconds = std::max(bar.elapsed_seconds(), 1e-9);
  std::cout << "Near-duplicates in " << a.corpus << ": " << format_count(result.documents) << " documents, "
            << result.options.shingle_words << "-word shingles of the corpus tokens (after stop words and pruning)\n"
            << "  MinHash " << result.banding.bands * result.banding.rows << " hashes in " << result.banding.bands
            << " bands of " << result.banding.rows << "; " << format_count(result.candidates)
            << " candidate pairs verified by exact Jaccard; " << std::fixed << std::setprecision(0)
            << static_cast<double>(result.documents) / seconds << " documents/s\n";
  std::cout << std::setprecision(3);
  std::cout << "  " << result.pairs.size() << " pair(s) with Jaccard >= " << result.options.threshold << " in "
            << result.clusters.size() << " cluster(s)\n";
  if (result.documents_without_shingles > 0) {
    std::cout << "  " << result.documents_without_shingles << " document(s) without tokens were left out\n";
  }
  if (!result.pairs.empty()) {
    int width = 8;
    for (std::size_t i = 0; i < result.pairs.size() && i < a.show; ++i) {
      for (const auto d : {result.pairs[i].first, result.pairs[i].second})
        width = std::max(width, static_cast<int>(corpus.documents[d].id.size()) + 2);
    }
    std::cout << "\n  " << std::left << std::setw(width) << "first" << std::setw(width) << "second" << std::right
              << std::setw(9) << "Jaccard" << (with_model ? "  topic H" : "") << "  cluster\n";
    for (std::size_t i = 0; i < result.pairs.size() && i < a.show; ++i) {
      const auto& p = result.pairs[i];
      std::cout << "  " << std::left << std::setw(width) << corpus.documents[p.first].id << std::setw(width)
                << corpus.documents[p.second].id << std::right << std::setw(9) << p.jaccard;
      if (with_model) std::cout << std::setw(9) << p.topic_distance;
      std::cout << std::setw(9) << result.cluster_of[p.first] + 1 << "\n";
    }
    if (result.pairs.size() > a.show) {
      std::cout << "  ... " << result.pairs.size() - a.show << " more (--show, or --json / --csv for all)\n";
    }
    if (with_model) {
      std::cout << "\n  topic H: Hellinger distance between the two documents' topic profiles (chain " << a.chain
                << "). A high Jaccard with a low H is a lexical copy; topical kin share topics, not wording.\n";
    }
  }
  if (!a.json.empty()) std::cout << "Wrote " << a.json << "\n";
  if (!a.csv.empty()) std::cout << "Wrote " << a.csv << "\n";
}

}  // namespace

void add_near_duplicates_command(CLI::App& app) {
  auto args = std::make_shared<NearDuplicateArguments>();
  auto* cmd =
      app.add_subcommand("near-duplicates",
                         "Find near-copies among the documents of a corpus (MinHash, verified by exact Jaccard).\n"
                         "  Example: loupe near-duplicates letters.corpus --model letters.model --json near.json");
  auto& o = args->options;
  cmd->add_option("CORPUS", args->corpus, "A corpus file written by `loupe ingest`")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->add_option("--threshold", o.threshold, "Smallest Jaccard similarity of two documents' shingle sets, in (0, 1]")
      ->capture_default_str();
  cmd->add_option("--shingle-words", o.shingle_words, "Words per shingle (consecutive corpus tokens)")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--hashes", o.num_hashes, "MinHash signature length")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--rows-per-band", o.rows_per_band,
                  "Signature values per LSH band (0: the most that still finds a pair at the threshold with "
                  "probability 0.999)")
      ->capture_default_str();
  cmd->add_option("--seed", o.seed, "Seed of the hash functions")->capture_default_str();
  cmd->add_option("--threads", o.threads, "Worker threads (0: all cores); never changes the result")
      ->capture_default_str();
  cmd->add_option("--model", args->model, "A model fitted on this corpus: adds each pair's topic Hellinger distance")
      ->check(CLI::ExistingFile);
  cmd->add_option("--chain", args->chain, "With --model: the chain whose topic profiles are used")
      ->capture_default_str();
  cmd->add_option("--json", args->json, "Write settings, pairs and clusters as JSON to this file");
  cmd->add_option("--csv", args->csv, "Write the pairs as CSV to this file");
  cmd->add_option("--show", args->show, "Pairs printed")->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] { run_near_duplicates(*args); });
}

}  // namespace loupe::cli

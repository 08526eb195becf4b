// `loupe stability MODEL`: which topics recur in every chain. Each chain's topics
// are matched to chain 1's (Hungarian algorithm on Hellinger distances); a topic's
// stability is its mean matched similarity (1 - Hellinger) over the other chains.
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>

#include "analysis/topic_alignment.h"
#include "apps/commands.h"
#include "common/error.h"
#include "model/model_export.h"
#include "model/model_file.h"

namespace loupe::cli {

namespace {

struct StabilityArguments {
  std::string model;
  std::string format = "table";
  std::size_t words = 8;
  double stable_threshold = 0.8;
  double redundancy_threshold = 0.5;
};

std::string top_words_text(const Model& model, std::size_t topic, std::size_t words) {
  std::string text;
  for (const auto& [word, weight] : model.top_words(0, topic, words)) {
    text += (text.empty() ? "" : ", ") + model.vocabulary[word];
  }
  return text;
}

std::string rhat_advice(double rhat) {
  if (!std::isfinite(rhat)) return "R-hat not available";
  char text[160];
  std::snprintf(text, sizeof text, "Gelman-Rubin R-hat of the log-likelihood traces: %.3f%s", rhat,
                rhat < 1.1 ? " (below 1.1: the chains agree)"
                           : " -- WARNING: 1.1 or more, the chains have not converged; fit again with more --sweeps");
  return text;
}

void run_stability(const StabilityArguments& args) {
  const Model model = read_model(args.model);
  AlignmentOptions options;
  options.stable_threshold = args.stable_threshold;
  const ChainAlignment alignment = align_chains(model, options);
  const auto redundant = redundant_topic_pairs(model, 0, args.redundancy_threshold);
  const std::size_t k = model.topic_count();
  std::size_t stable = 0;
  for (const bool s : alignment.stable) stable += s ? 1 : 0;

  if (args.format == "json") {
    nlohmann::json topics = nlohmann::json::array();
    for (std::size_t t = 0; t < k; ++t) {
      nlohmann::json matched = nlohmann::json::array();
      for (std::size_t c = 0; c < model.chains.size(); ++c) {
        matched.push_back(
            {{"chain", c + 1}, {"topic", alignment.topic_of[c][t] + 1}, {"similarity", alignment.similarity[c][t]}});
      }
      topics.push_back({{"topic", t + 1},
                        {"stability", alignment.stability[t]},
                        {"worst_similarity", alignment.worst_similarity[t]},
                        {"stable", static_cast<bool>(alignment.stable[t])},
                        {"top_words", top_words_text(model, t, args.words)},
                        {"matched", matched}});
    }
    nlohmann::json pairs = nlohmann::json::array();
    for (const auto& p : redundant) {
      pairs.push_back({{"topic_a", p.topic_a + 1}, {"topic_b", p.topic_b + 1}, {"hellinger", p.hellinger}});
    }
    nlohmann::json out{
        {"model", args.model},
        {"chains", model.chains.size()},
        {"topic_count", k},
        {"reference_chain", 1},
        {"seed", model.options.seed},
        {"stable_threshold", args.stable_threshold},
        {"stable_topics", stable},
        {"rhat", std::isfinite(model.rhat) ? nlohmann::json(model.rhat) : nlohmann::json(nullptr)},
        {"converged", std::isfinite(model.rhat) ? nlohmann::json(model.rhat < 1.1) : nlohmann::json(nullptr)},
        {"redundancy_threshold", args.redundancy_threshold},
        {"redundant_pairs", pairs},
        {"topics", topics}};
    std::cout << out.dump(2) << '\n';
    return;
  }
  if (args.format == "csv") {
    std::cout << "topic,stability,worst_similarity,stable";
    for (std::size_t c = 0; c < model.chains.size(); ++c) std::cout << ",chain_" << c + 1 << "_topic";
    std::cout << ",top_words\n";
    for (std::size_t t = 0; t < k; ++t) {
      char numbers[96];
      std::snprintf(numbers, sizeof numbers, "%zu,%.9g,%.9g,%s", t + 1, alignment.stability[t],
                    alignment.worst_similarity[t], alignment.stable[t] ? "yes" : "no");
      std::cout << numbers;
      for (std::size_t c = 0; c < model.chains.size(); ++c) std::cout << ',' << alignment.topic_of[c][t] + 1;
      std::cout << ',' << csv_field(top_words_text(model, t, args.words)) << '\n';
    }
    return;
  }
  std::cout << "Topic stability across " << model.chains.size() << " chains (seed " << model.options.seed
            << "): each chain's topics matched to chain 1's by the Hungarian algorithm on Hellinger distances;\n"
            << "stability = mean similarity (1 - Hellinger) of the matched topics over the other chains.\n"
            << stable << " of " << k << " topics are stable (stability at least " << args.stable_threshold << ").\n\n"
            << "topic  stability  worst  stable  top words (chain 1)\n";
  for (std::size_t t = 0; t < k; ++t) {
    char row[96];
    std::snprintf(row, sizeof row, "%5zu  %9.3f  %5.3f  %-6s  ", t + 1, alignment.stability[t],
                  alignment.worst_similarity[t], alignment.stable[t] ? "yes" : "NO");
    std::cout << row << top_words_text(model, t, args.words) << '\n';
  }
  std::cout << '\n';
  if (stable < k) {
    std::cout << "Topics marked NO do not recur in every chain: do not build conclusions on them alone; more "
                 "--sweeps or fewer --topics may help.\n";
  }
  if (redundant.empty()) {
    std::cout << "No two topics of chain 1 are closer than Hellinger " << args.redundancy_threshold << ".\n";
  } else {
    std::cout << redundant.size() << " pairs of topics in chain 1 are closer than Hellinger "
              << args.redundancy_threshold << " (split themes; fewer --topics may suit the corpus):";
    for (const auto& p : redundant) {
      char pair[64];
      std::snprintf(pair, sizeof pair, " %zu~%zu (%.3f)", p.topic_a + 1, p.topic_b + 1, p.hellinger);
      std::cout << pair;
    }
    std::cout << '\n';
  }
  std::cout << rhat_advice(model.rhat) << '\n';
}

}  // namespace

void add_stability_command(CLI::App& app) {
  auto args = std::make_shared<StabilityArguments>();
  auto* cmd = app.add_subcommand("stability",
                                 "Check which topics recur in every chain of a model, and which are near-copies.\n"
                                 "  Example: loupe stability letters.model --format csv");
  cmd->add_option("MODEL", args->model, "The model file (from `loupe fit --chains 2` or more)")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->add_option("--format", args->format, "table, csv or json")
      ->check(CLI::IsMember({"table", "csv", "json"}))
      ->capture_default_str();
  cmd->add_option("--words", args->words, "Top words shown per topic")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--stable-at", args->stable_threshold,
                  "A topic is stable when its mean matched similarity across chains is at least this")
      ->capture_default_str()
      ->check(CLI::Range(0.0, 1.0));
  cmd->add_option("--redundant-below", args->redundancy_threshold,
                  "Two topics of one chain closer than this Hellinger distance are reported as redundant")
      ->capture_default_str()
      ->check(CLI::Range(0.0, 1.0));
  cmd->callback([args] { run_stability(*args); });
}

}  // namespace loupe::cli

// `loupe compare MODEL`: do the groups differ in what they talk about? Runs the
// group tests (profiles, PERMANOVA with PERMDISP, ANOSIM, pairwise PERMANOVA,
// profile distances, distinctive topics) on every chain and prints tables.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>

#include "analysis/group_comparison.h"
#include "analysis/multiple_testing.h"
#include "apps/commands.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "model/model_file.h"

namespace loupe::cli {
namespace {

struct CompareArguments {
  std::string model;
  std::string corpus;
  std::string strata;
  std::string adjustment = "bh";
  std::string json;
  std::string csv;
  std::string profiles_csv;
  std::size_t permutations = 999;
  std::size_t bootstrap = 999;
  std::size_t anosim_limit = kAnosimDefaultMaxDocuments;
  std::uint64_t seed = 1;
  std::size_t threads = 2;
  bool include_disputed = false;
  bool weight_by_length = false;
  bool quiet = false;
};

std::string number(double value, int digits = 3) {
  if (!std::isfinite(value)) return "-";
  char text[32];
  std::snprintf(text, sizeof text, "%.*g", digits, value);
  return text;
}

std::string spread(const Spread& s, int digits = 3) {
  if (!std::isfinite(s.median)) return "-";
  if (s.min == s.max) return number(s.median, digits);
  return number(s.median, digits) + " (" + number(s.min, digits) + " to " + number(s.max, digits) + ")";
}

std::string padded(const std::string& text, std::size_t width) {
  // Pads by characters, not bytes, so "R²" lines up.
  std::size_t characters = 0;
  for (const unsigned char c : text) characters += (c & 0xC0) != 0x80;
  return characters >= width ? text + " " : text + std::string(width - characters, ' ');
}

void print_tables(const GroupComparison& comparison, const Model& model, const CompareArguments& args,
                  std::ostream& out) {
  const std::size_t chains = comparison.chains.size();
  out << "Compared " << comparison.documents_compared << " documents in "
      << comparison.chains.front().profiles.groups.size() << " groups over " << chains
      << (chains == 1 ? " chain" : " chains");
  if (comparison.disputed_left_out > 0) out << "; " << comparison.disputed_left_out << " disputed documents left out";
  if (comparison.without_group > 0) out << "; " << comparison.without_group << " without a group left out";
  out << ".\n"
      << args.permutations << " permutations, seed " << args.seed << ", "
      << (comparison.strata_column.empty() ? std::string("free permutations")
                                           : "permutations within strata of '" + comparison.strata_column + "'")
      << ".\n\n";

  out << (chains == 1 ? "Tests\n" : "Tests: median across chains (range)\n");
  std::size_t comparison_width = 22;  // wide enough for "group-a vs group-b" plus two spaces
  for (const auto& s : comparison.summaries) comparison_width = std::max(comparison_width, s.comparison.size() + 2);
  out << padded("test", 20) << padded("comparison", comparison_width) << padded("statistic", 24) << padded("value", 24)
      << padded("effect size", 34) << "p-value\n";
  for (const auto& s : comparison.summaries) {
    const auto& first = comparison.chains.front().records;
    const auto it = std::find_if(first.begin(), first.end(), [&](const TestRecord& r) {
      return r.method == s.method && r.statistic_name == s.statistic_name && r.comparison == s.comparison;
    });
    // The effect size's short name: "spread ratio (largest / ...)" -> "spread ratio".
    std::string effect_name = it == first.end() ? "" : it->effect_size_name;
    effect_name = effect_name.substr(0, effect_name.find(" ("));
    const bool same_as_statistic = s.effect_size.median == s.statistic.median && s.effect_size.min == s.statistic.min;
    const std::string effect = same_as_statistic ? "(the statistic)" : effect_name + " " + spread(s.effect_size);
    out << padded(s.method, 20) << padded(s.comparison, comparison_width) << padded(s.statistic_name, 24)
        << padded(spread(s.statistic), 24) << padded(effect, 34) << spread(s.p_value);
    if (std::isfinite(s.adjusted_p_value.median)) out << ", adjusted " << spread(s.adjusted_p_value);
    out << "\n";
  }
  // Warnings, once each (PERMANOVA and PERMDISP carry the same dispersion warning: shown once).
  std::vector<std::string> warnings;
  std::vector<std::string> seen;
  for (const auto& chain : comparison.chains) {
    for (const auto& r : chain.records) {
      if (r.warning.empty()) continue;
      const std::string key = r.comparison + "\n" + r.warning;
      if (std::find(seen.begin(), seen.end(), key) != seen.end()) continue;
      seen.push_back(key);
      warnings.push_back(r.method + " (" + r.comparison + "): " + r.warning);
    }
  }
  if (!warnings.empty()) {
    out << "\nWarnings\n";
    for (const auto& w : warnings) out << "  " << w << "\n";
  }

  // Distinctive topics of the first chain (topic numbers are chain-specific).
  const auto& records = comparison.chains.front().records;
  std::vector<const TestRecord*> distinctive;
  for (const auto& r : records) {
    if (r.topic >= 0 && std::isfinite(r.adjusted_p_value) && r.adjusted_p_value <= 0.05 && r.statistic > 0) {
      distinctive.push_back(&r);
    }
  }
  std::sort(distinctive.begin(), distinctive.end(),
            [](const TestRecord* a, const TestRecord* b) { return a->statistic > b->statistic; });
  out << "\nDistinctive topics, chain 1: more common in a group than in the rest (q <= 0.05)\n";
  if (distinctive.empty()) {
    out << "  none\n";
  } else {
    out << padded("group", 22) << padded("topic", 7) << padded("difference (95% interval)", 30) << padded("q-value", 10)
        << "top words\n";
    const std::size_t shown = std::min<std::size_t>(distinctive.size(), 20);
    for (std::size_t i = 0; i < shown; ++i) {
      const auto& r = *distinctive[i];
      std::string words;
      for (const auto& [word, p] : model.top_words(0, static_cast<std::size_t>(r.topic), 6)) {
        words += (words.empty() ? "" : " ") + model.vocabulary[word];
      }
      std::string group = r.comparison.substr(0, r.comparison.size() - std::string(" vs rest").size());
      out << padded(group, 22) << padded(std::to_string(r.topic + 1), 7)
          << padded("+" + number(r.statistic, 2) + " (" + number(r.interval_low, 2) + " to " +
                        number(r.interval_high, 2) + ")",
                    30)
          << padded(number(r.adjusted_p_value, 2), 10) << words << "\n";
    }
    if (distinctive.size() > shown) out << "  ... " << distinctive.size() - shown << " more in the CSV/JSON output\n";
  }
}

void run_compare(const CompareArguments& args) {
  const Model model = read_model(args.model);
  std::unique_ptr<Corpus> corpus;
  if (!args.corpus.empty()) {
    corpus = std::make_unique<Corpus>(read_corpus(args.corpus));
    check_model_matches(model, *corpus, args.corpus);
  } else if (!args.strata.empty()) {
    throw Error("--strata " + args.strata + " needs the corpus file the model was fitted on: add --corpus FILE");
  } else if (args.weight_by_length) {
    throw Error("--weight-by-length needs the corpus file the model was fitted on: add --corpus FILE");
  }
  GroupComparisonOptions options;
  options.tests.permutation.permutations = args.permutations;
  options.tests.permutation.seed = args.seed;
  options.tests.permutation.threads = std::max<std::size_t>(args.threads, 1);
  options.tests.bootstrap_replicates = args.bootstrap;
  options.tests.weight_by_length = args.weight_by_length;
  options.tests.pairwise_adjustment = parse_adjustment(args.adjustment);
  options.tests.anosim_max_documents = args.anosim_limit;
  options.include_disputed = args.include_disputed;
  options.strata_column = args.strata;
  const GroupComparison comparison = compare_groups(model, corpus.get(), options);
  const auto records = comparison.all_records();
  if (!args.json.empty()) write_file_atomically(args.json, to_json(comparison).dump(2) + "\n");
  if (!args.csv.empty()) write_records_csv(args.csv, records);
  if (!args.profiles_csv.empty()) {
    std::string csv;
    for (const auto& chain : comparison.chains) {
      const auto text = to_csv(chain.profiles);
      csv += csv.empty() ? text : text.substr(text.find('\n') + 1);  // one header
    }
    write_file_atomically(args.profiles_csv, csv);
  }
  if (!args.quiet) {
    print_tables(comparison, model, args, std::cout);
    for (const auto* path : {&args.json, &args.csv, &args.profiles_csv}) {
      if (!path->empty()) std::cout << "Wrote " << *path << "\n";
    }
  }
}

}  // namespace

void add_compare_command(CLI::App& app) {
  auto args = std::make_shared<CompareArguments>();
  auto* cmd = app.add_subcommand("compare",
                                 "Test whether the groups differ in their topics, on every chain of a model.\n"
                                 "  Example: loupe compare letters.model --corpus letters.corpus --strata decade");
  cmd->add_option("MODEL", args->model, "The model file")->required()->check(CLI::ExistingFile);
  cmd->add_option("--corpus", args->corpus,
                  "The corpus file the model was fitted on (needed for --strata and --weight-by-length)")
      ->check(CLI::ExistingFile);
  cmd->add_option("--permutations", args->permutations, "Permutations per test (0: statistics only)")
      ->capture_default_str();
  cmd->add_option("--seed", args->seed, "Seed of the permutations and bootstrap draws")->capture_default_str();
  cmd->add_option("--strata", args->strata,
                  "Permute group labels only among documents sharing this metadata column's value (e.g. decade)");
  cmd->add_flag("--include-disputed", args->include_disputed,
                "Count disputed documents in their group (by default they are left out of group tests)");
  cmd->add_flag("--weight-by-length", args->weight_by_length,
                "Weight documents by their length in tokens in group profiles and distinctive topics");
  cmd->add_option("--bootstrap", args->bootstrap, "Bootstrap draws for the 95% intervals")->capture_default_str();
  cmd->add_option("--pairwise-adjustment", args->adjustment,
                  "Adjustment of pairwise p-values: bh (Benjamini-Hochberg), holm or none")
      ->check(CLI::IsMember({"bh", "holm", "none"}, CLI::ignore_case))
      ->capture_default_str();
  cmd->add_option("--anosim-limit", args->anosim_limit,
                  "Run ANOSIM only up to this many documents (it ranks all N(N-1)/2 distances)")
      ->capture_default_str();
  cmd->add_option("--threads", args->threads, "Threads for permutations (never changes the results)")
      ->capture_default_str();
  cmd->add_option("--json", args->json, "Write every chain's results and the summary across chains as JSON");
  cmd->add_option("--csv", args->csv, "Write one CSV line per test and chain");
  cmd->add_option("--profiles-csv", args->profiles_csv, "Write the group topic profiles as CSV");
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] { run_compare(*args); });
}

}  // namespace loupe::cli

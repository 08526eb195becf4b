// `loupe compare MODEL`: do the groups differ in what they talk about? Runs the
// group tests (profiles, PERMANOVA with PERMDISP, ANOSIM, pairwise PERMANOVA,
// profile distances, distinctive topics) on every chain, with topics aligned to
// chain 1's, and prints each figure's median and range and each conclusion's
// agreement across chains.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <iterator>
#include <memory>
#include <vector>

#include "analysis/chain_agreement.h"
#include "analysis/group_comparison.h"
#include "analysis/multiple_testing.h"
#include "apps/commands.h"
#include "apps/mpi_session.h"
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
  double level = 0.05;
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

// A topic more common in a group than in the rest: adjusted p (q) <= level and a positive difference.
bool is_distinctive(const TestRecord& r, double level) {
  return r.topic >= 0 && std::isfinite(r.adjusted_p_value) && r.adjusted_p_value <= level && r.statistic > 0;
}

// The topics distinctive of a group on any chain, with the chains that find them. Topic numbers are chain
// 1's: the other chains' topics are aligned to them (or there is one chain).
void print_distinctive_topics(const GroupComparison& comparison, const Model& model, double level, std::ostream& out) {
  const std::size_t chains = comparison.chains.size();
  struct Finding {
    std::string comparison;
    int topic = -1;
    std::size_t backing = 0;
    std::vector<double> difference, q_value;
    double low = kNotAvailable, high = kNotAvailable;  // chain 1's 95% interval
  };
  std::vector<Finding> findings;
  for (const auto& chain : comparison.chains) {
    for (const auto& r : chain.records) {
      if (r.topic < 0) continue;
      auto it = std::find_if(findings.begin(), findings.end(),
                             [&](const Finding& f) { return f.comparison == r.comparison && f.topic == r.topic; });
      if (it == findings.end()) {
        findings.push_back({r.comparison, r.topic, 0, {}, {}, r.interval_low, r.interval_high});
        it = std::prev(findings.end());
      }
      it->backing += is_distinctive(r, level) ? 1 : 0;
      it->difference.push_back(r.statistic);
      it->q_value.push_back(r.adjusted_p_value);
    }
  }
  std::erase_if(findings, [](const Finding& f) { return f.backing == 0; });
  std::stable_sort(findings.begin(), findings.end(), [](const Finding& a, const Finding& b) {
    if (a.backing != b.backing) return a.backing > b.backing;
    return spread_of(a.difference).median > spread_of(b.difference).median;
  });
  out << "\nDistinctive topics: more common in a group than in the rest (q <= " << number(level, 3) << ")";
  if (chains > 1) out << ", topics numbered as chain 1's and matched on the other chains";
  out << "\n";
  if (findings.empty()) {
    out << "  none\n";
    return;
  }
  out << padded("group", 22) << padded("topic", 7)
      << padded(chains == 1 ? "difference (95% interval)" : "difference, median (range)", 30)
      << padded(chains == 1 ? "q-value" : "q-value, median", 17);
  if (chains > 1) out << padded("distinctive in", 26);
  out << "top words\n";
  const std::size_t shown = std::min<std::size_t>(findings.size(), 20);
  for (std::size_t i = 0; i < shown; ++i) {
    const auto& f = findings[i];
    std::string words;
    for (const auto& [word, p] : model.top_words(0, static_cast<std::size_t>(f.topic), 6)) {
      words += (words.empty() ? "" : " ") + model.vocabulary[word];
    }
    const std::string group = f.comparison.substr(0, f.comparison.size() - std::string(" vs rest").size());
    const Spread difference = spread_of(f.difference);
    const std::string difference_text =
        chains == 1 ? "+" + number(difference.median, 2) + " (" + number(f.low, 2) + " to " + number(f.high, 2) + ")"
                    : "+" + spread(difference, 2);
    out << padded(group, 22) << padded(std::to_string(f.topic + 1), 7) << padded(difference_text, 30)
        << padded(number(spread_of(f.q_value).median, 2), 17);
    if (chains > 1) out << padded(describe_backing(f.backing, chains), 26);
    out << words << "\n";
  }
  if (findings.size() > shown) out << "  ... " << findings.size() - shown << " more in the CSV/JSON output\n";
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
      << padded("effect size", 34) << padded(chains == 1 ? "conclusion" : "conclusion across chains", 34)
      << "p-value\n";
  for (const auto& s : comparison.summaries) {
    if (s.topic >= 0) continue;  // per-topic tests: the distinctive topics below
    const auto& first = comparison.chains.front().records;
    const auto it = std::find_if(first.begin(), first.end(), [&](const TestRecord& r) {
      return r.method == s.method && r.statistic_name == s.statistic_name && r.comparison == s.comparison;
    });
    // The effect size's short name: "spread ratio (largest / ...)" -> "spread ratio".
    std::string effect_name = it == first.end() ? "" : it->effect_size_name;
    effect_name = effect_name.substr(0, effect_name.find(" ("));
    const bool same_as_statistic = s.effect_size.median == s.statistic.median && s.effect_size.min == s.statistic.min;
    const std::string effect = same_as_statistic ? "(the statistic)" : effect_name + " " + spread(s.effect_size);
    const std::string conclusion =
        s.significance.conclusion == "no p-value"
            ? "no p-value"
            : s.significance.conclusion +
                  (chains == 1 ? "" : " in " + describe_backing(s.significance.backing, chains));
    out << padded(s.method, 20) << padded(s.comparison, comparison_width) << padded(s.statistic_name, 24)
        << padded(spread(s.statistic), 24) << padded(effect, 34) << padded(conclusion, 34) << spread(s.p_value);
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

  print_distinctive_topics(comparison, model, args.level, out);
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
  options.tests.permutation.processes = processes();  // under mpirun the processes share the permutations
  options.tests.bootstrap_replicates = args.bootstrap;
  options.tests.weight_by_length = args.weight_by_length;
  options.tests.pairwise_adjustment = parse_adjustment(args.adjustment);
  options.tests.anosim_max_documents = args.anosim_limit;
  options.include_disputed = args.include_disputed;
  options.strata_column = args.strata;
  options.level = args.level;
  const GroupComparison comparison = compare_groups(model, corpus.get(), options);
  const auto records = comparison.all_records();
  if (!is_main_process()) return;  // process 1 writes and prints
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
  cmd->add_option("--level", args->level,
                  "A test's conclusion on a chain: p (adjusted p when it has one) at or below this level")
      ->check(CLI::Range(1e-9, 0.5))
      ->capture_default_str();
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

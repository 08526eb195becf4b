// `loupe attribute MODEL`: which known group does each disputed text look like,
// if any? Conformal p-values against every candidate group on every chain, a
// nearest-neighbour vote, the leave-one-out calibration, and the cautions.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>

#include "analysis/attribution.h"
#include "analysis/attribution_cautions.h"
#include "analysis/chain_agreement.h"
#include "analysis/test_record.h"
#include "apps/commands.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "corpus/corpus_text_folder.h"
#include "model/model_file.h"

namespace loupe::cli {
namespace {

struct AttributeArguments {
  std::string model;
  std::string corpus;
  std::string disputed_folder;
  std::string candidates_column;
  std::string json;
  std::string csv;
  double none_level = kDefaultNoneLevel;
  std::size_t min_tokens = AttributionOptions{}.min_tokens;
  std::size_t neighbours = 5;
  std::size_t permutations = 999;
  std::uint64_t seed = 1;
  std::size_t threads = 2;
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
  std::size_t characters = 0;
  for (const unsigned char c : text) characters += (c & 0xC0) != 0x80;
  return characters >= width ? text + " " : text + std::string(width - characters, ' ');
}

// "3 of 4 chains: most chains": how many chains back a verdict, and what that agreement is called.
std::string of_chains(std::size_t count, std::size_t chains) {
  return std::to_string(count) + " of " + std::to_string(chains) + (chains == 1 ? " chain" : " chains") +
         (chains == 1 ? "" : ": " + agreement_label(agreement_of(count, chains)));
}

void print_document(const Attribution& a, const DisputedDocumentResult& d, std::ostream& out) {
  const std::size_t g_count = a.group_names.size();
  out << d.id;
  if (d.origin != "model") out << " (from " << d.origin << ")";
  out << ": " << (d.tokens_known ? std::to_string(d.tokens) + " tokens" : std::string("length unknown"));
  if (!d.parts.empty()) out << " in " << d.parts.size() << " segments, judged as one document";
  out << "\n";
  if (d.chains.empty()) {
    out << "  verdict: " << a.verdict_label(d.modal_verdict) << "\n\n";
    return;
  }
  const std::size_t chains = d.chains.size();
  out << "  " << padded("candidate", 24)
      << padded(chains == 1 ? "Hellinger distance" : "Hellinger distance, median (range)", 38)
      << (chains == 1 ? "p-value" : "p-value, median (range)") << "\n";
  for (std::size_t e = 0; e < d.chains.front().evidence.size(); ++e) {
    std::vector<double> distances, p_values;
    for (const auto& r : d.chains) {
      distances.push_back(r.evidence[e].distance);
      p_values.push_back(r.evidence[e].p_value);
    }
    out << "  " << padded(a.group_names[d.chains.front().evidence[e].group], 24)
        << padded(spread(spread_of(distances)), 38) << spread(spread_of(p_values)) << "\n";
  }
  // Chains giving the modal verdict; margins over the runner-up of the first of them
  // (on the chains with that same runner-up).
  std::size_t agreeing = 0;
  std::vector<double> p_margins, distance_margins;
  std::uint32_t runner_up = kNoCandidate;
  for (const auto& r : d.chains) {
    const std::uint32_t v = r.verdict.kind == VerdictKind::group ? r.verdict.best : static_cast<std::uint32_t>(g_count);
    if (v != d.modal_verdict) continue;
    ++agreeing;
    if (runner_up == kNoCandidate) runner_up = r.verdict.runner_up;
    if (r.verdict.runner_up != runner_up || runner_up == kNoCandidate) continue;
    p_margins.push_back(r.verdict.p_value_margin);
    distance_margins.push_back(r.verdict.distance_margin);
  }
  out << "  verdict: " << a.verdict_label(d.modal_verdict) << " (" << of_chains(agreeing, chains);
  const std::string p_range =
      d.p_value_min == d.p_value_max ? number(d.p_value_min) : number(d.p_value_min) + " to " + number(d.p_value_max);
  if (d.modal_verdict == g_count) {
    out << "; every candidate's p-value is at or below " << number(a.options.none_level) << ", the highest " << p_range
        << ")\n";
  } else {
    out << "; p-value " << p_range << ")\n";
    if (runner_up != kNoCandidate) {
      out << "  against the runner-up " << a.group_names[runner_up] << ": p-value higher by "
          << spread(spread_of(p_margins)) << ", centroid nearer by " << spread(spread_of(distance_margins)) << "\n";
    }
  }
  // The nearest-neighbour vote: chain 1's votes, and the leader on every chain.
  const auto& vote = d.chains.front().vote;
  std::string votes;
  for (std::size_t g = 0; g < g_count; ++g) {
    if (vote.votes[g] > 0)
      votes += (votes.empty() ? "" : ", ") + a.group_names[g] + " " + std::to_string(vote.votes[g]);
  }
  std::vector<std::size_t> leads(g_count, 0);
  for (const auto& r : d.chains) {
    if (r.vote.leader < g_count) ++leads[r.vote.leader];
  }
  const auto top = static_cast<std::size_t>(std::max_element(leads.begin(), leads.end()) - leads.begin());
  out << "  nearest " << vote.k << " known documents (chain 1): " << votes << "; most votes: " << a.group_names[top]
      << " (" << of_chains(leads[top], chains) << ")\n\n";
}

void print_report(const Attribution& a, std::ostream& out) {
  const std::size_t g_count = a.group_names.size();
  out << "Attributed " << a.documents.size() << " disputed " << (a.documents.size() == 1 ? "document" : "documents")
      << " against " << g_count << " groups over " << a.num_chains << (a.num_chains == 1 ? " chain" : " chains")
      << ". Known documents: ";
  std::size_t too_short = 0;
  for (std::size_t g = 0; g < g_count; ++g) {
    out << (g ? ", " : "") << a.group_names[g] << " " << a.group_sizes[g];
    too_short += a.known_too_short[g];
  }
  if (too_short > 0) {
    out << " (" << too_short << " known documents shorter than " << a.options.min_tokens << " tokens left out)";
  }
  out << ".\nConformal p-values against each group's centroid (Hellinger distance); 'none of the candidates' when "
         "every p-value is at or below "
      << number(a.options.none_level) << ". Seed " << a.options.calibration.seed << ".\n";
  for (const auto& note : a.notes) out << "Note: " << note << "\n";
  out << "\n";
  for (const auto& d : a.documents) print_document(a, d, out);

  out << "Calibration: each known document left out and judged against the rest\n";
  out << padded("chain", 7) << padded("accuracy", 10) << padded("called none", 13) << padded("chance accuracy", 17)
      << padded("permutation p", 15) << "recall by group\n";
  for (std::size_t c = 0; c < a.calibration.size(); ++c) {
    const auto& cal = a.calibration[c];
    std::string recall;
    for (std::size_t g = 0; g < g_count; ++g) {
      recall += (g ? ", " : "") + a.group_names[g] + " " + number(cal.recall[g]);
    }
    out << padded(std::to_string(c + 1), 7) << padded(number(cal.accuracy), 10) << padded(number(cal.none_rate), 13)
        << padded(number(cal.chance_accuracy), 17) << padded(number(cal.permutation_p_value), 15) << recall << "\n";
  }
  out << "(" << (a.calibration.empty() ? 0 : a.calibration.front().permutations)
      << " permutations of the known labels, Ojala & Garriga 2010; 'called none': known documents wrongly judged "
         "to belong to none of the groups.)\n\n";
  out << "Cautions\n";
  for (const auto caution : kAttributionCautions) out << "  " << caution << "\n";
}

void run_attribute(const AttributeArguments& args) {
  const Model model = read_model(args.model);
  std::unique_ptr<Corpus> corpus;
  if (!args.corpus.empty()) {
    corpus = std::make_unique<Corpus>(read_corpus(args.corpus));
    check_model_matches(model, *corpus, args.corpus);
  } else if (!args.candidates_column.empty()) {
    throw Error("--candidates-column " + args.candidates_column +
                " needs the corpus file the model was fitted on: add --corpus FILE");
  }
  std::unique_ptr<Corpus> folder;
  ExternalDocuments outside;
  if (!args.disputed_folder.empty()) {
    // Words are found as the model's corpus found them (its recorded tokenizer options).
    TokenizerOptions tokenizer;
    if (corpus) {
      const auto& options = corpus->build_record.value("options", nlohmann::json::object());
      tokenizer.keep_numbers = options.value("keep_numbers", tokenizer.keep_numbers);
      tokenizer.min_length = options.value("min_word_length", tokenizer.min_length);
    }
    folder = std::make_unique<Corpus>(read_text_folder(args.disputed_folder, tokenizer));
    outside.corpus = folder.get();
    outside.source = "folder " + args.disputed_folder;
  }
  AttributionOptions options;
  options.none_level = args.none_level;
  options.min_tokens = args.min_tokens;
  options.neighbours = args.neighbours;
  options.candidates_column = args.candidates_column;
  options.calibration.permutations = args.permutations;
  options.calibration.seed = args.seed;
  options.calibration.threads = std::max<std::size_t>(args.threads, 1);
  const Attribution attribution = attribute_disputed(model, corpus.get(), outside, options);
  if (!args.json.empty()) write_file_atomically(args.json, to_json(attribution).dump(2) + "\n");
  if (!args.csv.empty()) write_file_atomically(args.csv, to_csv(attribution));
  if (!args.quiet) {
    print_report(attribution, std::cout);
    for (const auto* path : {&args.json, &args.csv}) {
      if (!path->empty()) std::cout << "Wrote " << *path << "\n";
    }
  }
}

}  // namespace

void add_attribute_command(CLI::App& app) {
  auto args = std::make_shared<AttributeArguments>();
  auto* cmd = app.add_subcommand("attribute",
                                 "Judge which known group each disputed text resembles, or none of them, with "
                                 "calibrated p-values.\n"
                                 "  Example: loupe attribute letters.model --corpus letters.corpus --json "
                                 "attribution.json");
  cmd->add_option("MODEL", args->model, "The model file")->required()->check(CLI::ExistingFile);
  cmd->add_option("--corpus", args->corpus,
                  "The corpus file the model was fitted on (document lengths, segments, --candidates-column)")
      ->check(CLI::ExistingFile);
  cmd->add_option("--disputed-folder", args->disputed_folder,
                  "Also judge the .txt files of this folder (folded in with the model's topics)")
      ->check(CLI::ExistingDirectory);
  cmd->add_option("--candidates-column", args->candidates_column,
                  "A manifest column listing each disputed document's candidate groups, separated by ';' (empty: "
                  "all groups)");
  cmd->add_option("--none-level", args->none_level,
                  "Say 'none of the candidates' when every candidate's p-value is at or below this")
      ->capture_default_str();
  cmd->add_option("--min-tokens", args->min_tokens, "Documents with fewer modelled tokens are too short to judge")
      ->capture_default_str();
  cmd->add_option("--neighbours", args->neighbours, "Known documents in the nearest-neighbour vote")
      ->capture_default_str();
  cmd->add_option("--permutations", args->permutations,
                  "Permutations of the known labels for the test of calibration accuracy (0: none)")
      ->capture_default_str();
  cmd->add_option("--seed", args->seed, "Seed of the permutations and of folding in outside texts")
      ->capture_default_str();
  cmd->add_option("--threads", args->threads, "Threads (never changes the results)")->capture_default_str();
  cmd->add_option("--json", args->json, "Write everything (every chain, the calibration, the cautions) as JSON");
  cmd->add_option("--csv", args->csv,
                  "Write one CSV line per document, chain and candidate (the cautions as '#' lines on top)");
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] { run_attribute(*args); });
}

}  // namespace loupe::cli

// `loupe scan MODEL --corpus CORPUS [DOC ...]`: is a segmented text composite? Finds
// energy-distance change points along its segments on every chain of the model,
// scores each segment and each stretch between change points against the groups,
// and prints tables and the attribution cautions.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>

#include "analysis/attribution_cautions.h"
#include "analysis/chain_agreement.h"
#include "analysis/composite_scan.h"
#include "apps/commands.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "model/model_file.h"

namespace loupe::cli {
namespace {

struct ScanArguments {
  std::string model;
  std::string corpus;
  std::vector<std::string> documents;
  std::string json;
  std::string csv;
  CompositeScanOptions options;
  bool quiet = false;
};

std::string number(double value, int digits = 3) {
  if (!std::isfinite(value)) return "-";
  char text[32];
  std::snprintf(text, sizeof text, "%.*g", digits, value);
  return text;
}

std::string padded(const std::string& text, std::size_t width) {
  return text.size() >= width ? text + " " : text + std::string(width - text.size(), ' ');
}

// The verdict's group, or "none (nearest G)" naming the group whose centroid is nearest.
std::string group_or_none(const CompositeScan& scan, const SegmentEvidence& segment) {
  if (segment.verdict.kind == VerdictKind::group) return scan.group_names[segment.verdict.best];
  const auto nearest =
      std::min_element(segment.evidence.begin(), segment.evidence.end(),
                       [](const CandidateEvidence& a, const CandidateEvidence& b) { return a.distance < b.distance; });
  return nearest == segment.evidence.end() ? "none" : "none (nearest " + scan.group_names[nearest->group] + ")";
}

void print_text(const CompositeScan& scan, const TextScan& t, std::ostream& out) {
  const SegmentedText& text = t.text;
  const std::size_t chains = t.chains.size();
  std::size_t tokens = 0;
  for (const auto n : text.tokens) tokens += n;
  out << "Text " << text.id << ": " << text.num_segments() << " segments, " << tokens << " tokens\n\n";

  out << "Change points\n";
  out << padded("chain", 7) << padded("before segment", 16) << padded("first token after", 19)
      << padded("statistic Q", 13) << "p-value\n";
  for (const auto& c : t.chains) {
    const auto& found = c.change_points.change_points;
    if (found.empty()) {
      out << padded(std::to_string(c.chain + 1), 7) << "none";
      if (c.change_points.has_last_candidate) {
        const auto& last = c.change_points.last_candidate;
        out << " (strongest candidate before segment " << last.position + 1 << ", Q " << number(last.statistic)
            << ", p " << number(last.p_value) << ")";
      }
      out << "\n";
    }
    for (const auto& cp : found) {
      out << padded(std::to_string(c.chain + 1), 7) << padded(std::to_string(cp.position + 1), 16)
          << padded(std::to_string(text.first_tokens[cp.position]), 19) << padded(number(cp.statistic), 13)
          << number(cp.p_value) << "\n";
    }
  }
  out << "Agreement: " << t.chains_with_change << " of " << chains << (chains == 1 ? " chain finds" : " chains find")
      << " a change point";
  if (t.chains_with_change > 0) {
    out << "; the strongest one is before segment ";
    if (t.first_position_min == t.first_position_max) {
      out << t.first_position_min + 1 << " (token " << t.first_token_min << ")";
    } else {
      out << t.first_position_min + 1 << " to " << t.first_position_max + 1 << " (tokens " << t.first_token_min
          << " to " << t.first_token_max << ")";
    }
    if (t.fewest_change_points != t.most_change_points) {
      out << "; chains find " << t.fewest_change_points << " to " << t.most_change_points << " change points";
    }
  }
  out << ".\n";
  if (chains > 1) {
    const bool composite = 2 * t.chains_with_change > chains;
    const std::size_t backing = composite ? t.chains_with_change : chains - t.chains_with_change;
    out << "Across chains: " << (composite ? "composite (a change of topics)" : "no change of topics") << " on "
        << describe_backing(backing, chains) << " (" << agreement_label(agreement_of(backing, chains)) << ").\n";
  }
  out << "\n";

  const ChainScan& first = t.chains.front();
  if (first.segments.empty()) return;
  out << "Segments, chain 1 (best group: highest conformal p-value; \"none\" when every p-value is at or below "
      << number(scan.options.none_level) << ")\n";
  out << padded("segment", 9) << padded("first token", 13) << padded("tokens", 8) << padded("best group", 40)
      << padded("p-value", 9) << "chains agreeing\n";
  for (std::size_t i = 0; i < text.num_segments(); ++i) {
    std::size_t marking = 0;
    for (const auto& c : t.chains) {
      for (const auto& cp : c.change_points.change_points) marking += cp.position == i ? 1 : 0;
    }
    if (marking > 0) {
      out << "---- change point (" << marking << " of " << chains << (chains == 1 ? " chain" : " chains") << ") ----\n";
    }
    const Verdict& v = first.segments[i].verdict;
    std::size_t agreeing = 0;
    for (const auto& c : t.chains) agreeing += c.segments[i].verdict.best == v.best ? 1 : 0;
    out << padded(std::to_string(i + 1), 9) << padded(std::to_string(text.first_tokens[i]), 13)
        << padded(std::to_string(text.tokens[i]), 8) << padded(group_or_none(scan, first.segments[i]), 40)
        << padded(number(v.best_p_value), 9) << agreeing << "/" << chains << "\n";
  }
  out << "\nStretches between change points (the group whose centroid is nearest the stretch's mean profile)\n";
  out << padded("chain", 7) << padded("segments", 10) << padded("nearest group", 24) << padded("Hellinger", 11)
      << "p-value\n";
  for (const auto& c : t.chains) {
    for (const auto& s : c.stretches) {
      out << padded(std::to_string(c.chain + 1), 7)
          << padded(std::to_string(s.begin + 1) + "-" + std::to_string(s.end), 10)
          << padded(scan.group_names[s.nearest], 24) << padded(number(s.distance), 11) << number(s.p_value) << "\n";
    }
  }
  out << "\n";
}

void print_scan(const CompositeScan& scan, std::ostream& out) {
  const auto& o = scan.options.change_points;
  out << "Composite scan of " << scan.texts.size() << (scan.texts.size() == 1 ? " text" : " texts") << " over "
      << scan.num_chains << (scan.num_chains == 1 ? " chain" : " chains") << ".\n"
      << "Energy-distance change points (Matteson & James 2014) on Hellinger distances between segments (alpha = "
      << number(kEnergyDistanceExponent) << "), " << o.permutations << " permutations a step, level " << number(o.level)
      << ", at least " << o.min_segments << " segments a side, seed " << o.seed << ".\n";
  if (!scan.group_names.empty()) {
    out << "Segments are scored against " << scan.group_names.size() << " groups' known documents (";
    for (std::size_t g = 0; g < scan.group_names.size(); ++g) {
      out << (g ? ", " : "") << scan.group_names[g] << " " << scan.reference_sizes[g];
    }
    out << ").\n";
  }
  out << "\n";
  for (const auto& t : scan.texts) print_text(scan, t, out);
  if (!scan.texts_set_aside.empty()) {
    out << "Set aside: too few segments for the test (it needs " << 2 * o.min_segments << ")\n";
    for (const auto& [id, segments] : scan.texts_set_aside) {
      out << "  " << id << ": " << segments << (segments == 1 ? " segment" : " segments") << "\n";
    }
    out << "\n";
  }
  if (!scan.warnings.empty()) {
    out << "Warnings\n";
    for (const auto& w : scan.warnings) out << "  " << w << "\n";
    out << "\n";
  }
  out << "Cautions\n";
  for (const auto caution : kAttributionCautions) out << "  " << caution << "\n";
}

void run_scan(const ScanArguments& args) {
  const Model model = read_model(args.model);
  const Corpus corpus = read_corpus(args.corpus);
  check_model_matches(model, corpus, args.corpus);
  CompositeScan scan;
  try {
    scan = scan_composite_texts(model, corpus, args.documents, args.options);
  } catch (const Error& e) {
    throw Error(args.corpus + ": " + e.what());
  }
  if (!args.json.empty()) write_file_atomically(args.json, to_json(scan).dump(2) + "\n");
  if (!args.csv.empty()) write_file_atomically(args.csv, to_csv(scan));
  if (!args.quiet) {
    print_scan(scan, std::cout);
    for (const auto* path : {&args.json, &args.csv}) {
      if (!path->empty()) std::cout << "Wrote " << *path << "\n";
    }
  }
}

}  // namespace

void add_scan_command(CLI::App& app) {
  auto args = std::make_shared<ScanArguments>();
  auto* cmd = app.add_subcommand(
      "scan",
      "Look for places where a segmented text changes its topics (is it composite?), on every chain of a model.\n"
      "  Example: loupe scan letters.model --corpus letters.corpus dsp-02");
  auto& o = args->options.change_points;
  cmd->add_option("MODEL", args->model, "The model file")->required()->check(CLI::ExistingFile);
  cmd->add_option("DOC", args->documents,
                  "Texts to scan, by their id (default: every segmented disputed text in the corpus)");
  cmd->add_option("--corpus", args->corpus,
                  "The corpus file the model was fitted on, with texts cut into segments (`loupe ingest "
                  "--segment-words N`)")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->add_option("--level", o.level, "Keep a change point while its p-value is at or below this")
      ->capture_default_str();
  cmd->add_option("--permutations", o.permutations, "Permutations a step of the search")->capture_default_str();
  cmd->add_option("--min-segments", o.min_segments, "Segments on each side of a change point, at least")
      ->capture_default_str();
  cmd->add_option("--seed", o.seed, "Seed of the permutations")->capture_default_str();
  cmd->add_option("--threads", o.threads, "Threads for permutations (never changes the results)")
      ->capture_default_str();
  cmd->add_option("--json", args->json, "Write every chain's change points and segment scores as JSON");
  cmd->add_option("--csv", args->csv, "Write one CSV line per text, chain and segment");
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args] {
    args->options.change_points.threads = std::max<std::size_t>(args->options.change_points.threads, 1);
    run_scan(*args);
  });
}

}  // namespace loupe::cli

// Choosing the number of topics K: fits the model at each K of a list (several
// chains each, K values in parallel) and measures held-out perplexity, coherence,
// redundancy and stability across chains, then suggests a K with its reason, as a guide.
#pragma once

#include <atomic>
#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "corpus/corpus.h"
#include "model/lda_options.h"

namespace loupe {

struct TopicCountSweepOptions {
  std::vector<std::uint32_t> topic_counts;  // the K values, each at least 2
  FitOptions fit;                           // every fit's options; topic_count is set per K, chains >= 2
  // Every held_out_every-th document (the 10th, 20th, ...) is held out of the fits and scored by document
  // completion; interleaved, so that a corpus ordered by group loses a little of every group.
  std::size_t held_out_every = 10;
  std::size_t top_words = 10;         // words per topic for coherence
  double redundancy_threshold = 0.5;  // two topics of one chain closer than this (Hellinger) are redundant
  double stable_threshold = 0.8;      // a topic recurring with this similarity on the other chains is stable
  std::size_t parallel_fits = 1;      // K values fitted at once (never changes the results)
  // After each fit and each of its sweeps: (K values done, K values, share of all the work done, 0..1).
  std::function<void(std::size_t done, std::size_t total, double work_done)> on_progress;
  // Set (e.g. on Ctrl-C) to stop every fit after its current sweep; the sweep then throws FitInterrupted.
  const std::atomic<bool>* stop_requested = nullptr;
};

struct TopicCountResult {
  std::uint32_t topic_count = 0;
  double perplexity = 0;      // held-out document completion, mean over chains
  double perplexity_min = 0;  // best and worst chain
  double perplexity_max = 0;
  double mean_npmi = 0;           // mean over chains of the mean NPMI of the topics
  double mean_umass = 0;          // likewise for UMass
  double redundant_pairs = 0;     // pairs of near-identical topics, mean over chains
  std::size_t stable_topics = 0;  // topics of chain 1 stable across the chains
  double mean_stability = 0;      // mean over chain 1's topics
  double rhat = 0;                // Gelman-Rubin of the log-likelihood traces
};

struct TopicCountSweep {
  TopicCountSweepOptions options;  // as run (on_progress not kept)
  std::size_t training_documents = 0;
  std::size_t held_out_documents = 0;
  std::uint64_t held_out_tokens = 0;
  std::vector<TopicCountResult> results;  // ascending K
  std::uint32_t suggested = 0;            // the suggested K
  std::string reason;                     // why, in words, and that it is a guide, not a verdict
};

// Throws loupe::Error naming the value and what to do for an empty list, a K below 2 or above the corpus's
// token count, a repeated K, fewer than two chains (stability needs them), or too few documents to hold out.
void validate_sweep_options(const TopicCountSweepOptions& options, const Corpus& corpus);

// Parses "5,10,20" or "5:40:5" (from 5 to 40 in steps of 5), or a mix ("5:20:5,30,40"), ascending and
// without repeats. Throws loupe::Error naming `option` and quoting the bad item.
std::vector<std::uint32_t> parse_topic_counts(const std::string& text, const std::string& option = "--topics");

TopicCountSweep sweep_topic_counts(const Corpus& corpus, const TopicCountSweepOptions& options);

// The suggestion rule, on finished results (ascending K): among the K values whose topics nearly all recur
// across chains (at least 90% stable) and none of which nearly duplicates another (no redundant pair), the
// largest; beyond it K splits or scatters themes. When none qualifies, among the K values whose held-out
// perplexity is within 5% of the lowest, the one with the highest mean NPMI. Sets suggested and reason.
void suggest_topic_count(TopicCountSweep& sweep);

nlohmann::json to_json(const TopicCountSweep& sweep);

}  // namespace loupe

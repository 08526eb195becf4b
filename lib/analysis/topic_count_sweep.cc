#include "analysis/topic_count_sweep.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <cstdio>
#include <exception>
#include <mutex>
#include <set>
#include <thread>
#include <tuple>

#include "analysis/topic_alignment.h"
#include "analysis/topic_coherence.h"
#include "common/error.h"
#include "common/number_text.h"
#include "model/evaluation.h"
#include "model/fit.h"
#include "model/fold_in.h"
#include "model/parallel_runner.h"

namespace loupe {
namespace {

struct Split {
  std::vector<std::size_t> training, held_out;
};

Split split_documents(const Corpus& corpus, std::size_t every) {
  Split split;
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    (d % every == every - 1 ? split.held_out : split.training).push_back(d);
  }
  return split;
}

std::uint32_t parse_count(const std::string& item, const std::string& whole, const std::string& option) {
  std::size_t used = 0;
  long long value = -1;
  try {
    value = std::stoll(item, &used);
  } catch (const std::exception&) {
    used = 0;
  }
  if (item.empty() || used != item.size() || value < 0 || value > static_cast<long long>(kMaxTopics)) {
    throw Error(option + " " + whole + ": '" + item + "' is not a number of topics (a whole number from 2 to " +
                std::to_string(kMaxTopics) + "); write a list like 5,10,20 or a range like 5:40:5");
  }
  return static_cast<std::uint32_t>(value);
}

}  // namespace

std::vector<std::uint32_t> parse_topic_counts(const std::string& text, const std::string& option) {
  std::set<std::uint32_t> counts;
  std::size_t start = 0;
  while (start <= text.size()) {
    const std::size_t comma = std::min(text.find(',', start), text.size());
    const std::string item = text.substr(start, comma - start);
    const std::size_t colon = item.find(':');
    if (colon == std::string::npos) {
      counts.insert(parse_count(item, text, option));
    } else {
      const std::size_t second = item.find(':', colon + 1);
      const std::uint32_t from = parse_count(item.substr(0, colon), text, option);
      const std::uint32_t to = parse_count(
          item.substr(colon + 1, second == std::string::npos ? std::string::npos : second - colon - 1), text, option);
      const std::uint32_t step = second == std::string::npos ? 1 : parse_count(item.substr(second + 1), text, option);
      if (step == 0 || to < from) {
        throw Error(option + " " + text + ": the range '" + item +
                    "' needs FROM:TO:STEP with FROM <= TO and a step of at least 1, e.g. 5:40:5");
      }
      for (std::uint32_t k = from; k <= to; k += step) counts.insert(k);
    }
    start = comma + 1;
  }
  return {counts.begin(), counts.end()};
}

void validate_sweep_options(const TopicCountSweepOptions& options, const Corpus& corpus) {
  if (options.topic_counts.empty()) {
    throw Error("--topics: give the numbers of topics to try, e.g. --topics 5,10,20 or --topics 5:40:5");
  }
  std::set<std::uint32_t> seen;
  for (const auto k : options.topic_counts) {
    if (k < 2) {
      throw Error("--topics: K = " + std::to_string(k) +
                  " is too few; a topic model needs at least 2 topics. Start the list at 2 or more.");
    }
    if (k > corpus.num_tokens()) {
      throw Error("--topics: K = " + std::to_string(k) + " is above the corpus's " +
                  std::to_string(corpus.num_tokens()) + " tokens; every topic needs tokens. Try fewer topics.");
    }
    if (!seen.insert(k).second) throw Error("--topics: K = " + std::to_string(k) + " is listed twice");
  }
  if (options.fit.chains < 2) {
    throw Error("--chains " + std::to_string(options.fit.chains) +
                ": the sweep measures how stable topics are across chains, which needs at least 2; use --chains 2 "
                "or more");
  }
  if (options.held_out_every < 2) {
    throw Error("--held-out-every " + std::to_string(options.held_out_every) +
                ": hold out every 2nd document or fewer (10 holds out one in ten)");
  }
  if (options.top_words < 2) throw Error("--top-words: coherence needs at least 2 words a topic");
  if (!(options.redundancy_threshold > 0 && options.redundancy_threshold <= 1)) {
    throw Error("--redundant-below must be in (0, 1]");
  }
  const Split split = split_documents(corpus, options.held_out_every);
  std::size_t scored = 0;
  for (const auto d : split.held_out) scored += corpus.document_length(d) >= 2 ? 1 : 0;
  if (scored == 0 || split.training.empty()) {
    throw Error("the corpus has " + std::to_string(corpus.num_documents()) + " documents: too few to hold every " +
                std::to_string(options.held_out_every) +
                "th one out for scoring (held-out documents need 2 tokens or more). Add documents or lower "
                "--held-out-every.");
  }
}

TopicCountSweep sweep_topic_counts(const Corpus& corpus, const TopicCountSweepOptions& options) {
  validate_sweep_options(options, corpus);
  const Split split = split_documents(corpus, options.held_out_every);
  const Corpus training = corpus_of_documents(corpus, split.training);
  const Corpus held_out = corpus_of_documents(corpus, split.held_out);
  std::vector<std::uint32_t> counts = options.topic_counts;
  std::sort(counts.begin(), counts.end());
  for (const auto k : counts) {
    FitOptions fit = options.fit;
    fit.topic_count = k;
    validate_fit_options(fit, training);
  }

  TopicCountSweep sweep;
  sweep.options = options;
  sweep.options.on_progress = nullptr;
  sweep.options.stop_requested = nullptr;
  sweep.options.topic_counts = counts;
  sweep.training_documents = training.num_documents();
  sweep.held_out_documents = held_out.num_documents();
  sweep.held_out_tokens = held_out.num_tokens();
  sweep.results.resize(counts.size());

  // Progress: the work of a K is K x sweeps (a sweep's cost grows with K at worst linearly).
  double total_work = 0;
  for (const auto k : counts) total_work += static_cast<double>(k) * options.fit.sweeps;
  std::vector<std::atomic<std::uint32_t>> sweeps_done(counts.size());
  std::atomic<std::size_t> fits_done{0};
  std::mutex progress_mutex;
  const auto report = [&] {
    if (!options.on_progress) return;
    double work = 0;
    for (std::size_t i = 0; i < counts.size(); ++i) work += static_cast<double>(counts[i]) * sweeps_done[i].load();
    const std::lock_guard lock(progress_mutex);
    options.on_progress(fits_done.load(), counts.size(), std::min(1.0, work / total_work));
  };

  const auto measure = [&](std::size_t index) {
    const std::uint32_t k = counts[index];
    FitOptions fit = options.fit;
    fit.topic_count = k;
    FitControl control;
    control.stop_requested = options.stop_requested;
    control.on_progress = [&, index](const FitProgress& p) {
      sweeps_done[index] = p.sweep;
      report();
    };
    const Model model = fit_model(training, fit, control);
    TopicCountResult& r = sweep.results[index];
    r.topic_count = k;
    const std::size_t chains = model.chains.size();
    std::vector<double> perplexities;
    double npmi = 0, umass = 0, redundant = 0;
    FoldInOptions fold_in;
    fold_in.seed = fit.seed;
    const ParallelRunner runner(1);
    for (std::size_t c = 0; c < chains; ++c) {
      const auto& chain = model.chains[c];
      const TopicWordTable phi(chain.phi, k, static_cast<std::uint32_t>(model.vocabulary_size()));
      perplexities.push_back(document_completion_perplexity(phi, chain.alpha, held_out, fold_in, runner).perplexity);
      // A topic's top words among those the corpus holds (a word of the vocabulary absent from every
      // document has no co-occurrence to measure).
      std::vector<std::vector<WordId>> top_words(k);
      for (std::size_t t = 0; t < k; ++t) {
        for (const auto& [word, p] : model.top_words(c, t, model.vocabulary_size())) {
          if (word < corpus.word_frequency.size() && corpus.word_frequency[word] == 0) continue;
          top_words[t].push_back(word);
          if (top_words[t].size() == options.top_words) break;
        }
      }
      const TopicCoherence coherence = topic_coherence(corpus, top_words);
      npmi += coherence.mean_npmi;
      umass += coherence.mean_umass;
      redundant += static_cast<double>(redundant_topic_pairs(model, c, options.redundancy_threshold).size());
    }
    double sum = 0;
    for (const double p : perplexities) sum += p;
    r.perplexity = sum / static_cast<double>(chains);
    r.perplexity_min = *std::min_element(perplexities.begin(), perplexities.end());
    r.perplexity_max = *std::max_element(perplexities.begin(), perplexities.end());
    r.mean_npmi = npmi / static_cast<double>(chains);
    r.mean_umass = umass / static_cast<double>(chains);
    r.redundant_pairs = redundant / static_cast<double>(chains);
    AlignmentOptions alignment_options;
    alignment_options.stable_threshold = options.stable_threshold;
    const ChainAlignment alignment = align_chains(model, alignment_options);
    r.stable_topics = static_cast<std::size_t>(std::count(alignment.stable.begin(), alignment.stable.end(), true));
    double stability = 0;
    for (const double s : alignment.stability) stability += s;
    r.mean_stability = stability / static_cast<double>(k);
    r.rhat = model.rhat;
    ++fits_done;
    report();
  };

  // Largest K first, so that the longest fits start early; each K writes only its own result.
  std::atomic<std::size_t> next{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  const auto worker = [&] {
    for (;;) {
      const std::size_t i = next++;
      if (i >= counts.size()) return;
      {
        const std::lock_guard lock(failure_mutex);
        if (failure) return;
      }
      try {
        measure(counts.size() - 1 - i);
      } catch (...) {
        const std::lock_guard lock(failure_mutex);
        if (!failure) failure = std::current_exception();
      }
    }
  };
  const std::size_t workers = std::clamp<std::size_t>(options.parallel_fits, 1, counts.size());
  std::vector<std::thread> threads;
  for (std::size_t w = 1; w < workers; ++w) threads.emplace_back(worker);
  worker();
  for (auto& t : threads) t.join();
  if (failure) std::rethrow_exception(failure);
  suggest_topic_count(sweep);
  return sweep;
}

void suggest_topic_count(TopicCountSweep& sweep) {
  const auto& results = sweep.results;
  if (results.empty()) return;
  double best_perplexity = results.front().perplexity;
  std::uint32_t best_perplexity_k = results.front().topic_count;
  for (const auto& r : results) {
    if (r.perplexity < best_perplexity) {
      best_perplexity = r.perplexity;
      best_perplexity_k = r.topic_count;
    }
  }
  const auto qualifies = [](const TopicCountResult& r) {
    return r.redundant_pairs == 0 && static_cast<double>(r.stable_topics) >= 0.9 * r.topic_count;
  };
  const TopicCountResult* chosen = nullptr;
  for (const auto& r : results) {
    if (qualifies(r)) chosen = &r;
  }
  std::string why;
  if (chosen != nullptr) {
    why = "the largest K tried whose topics nearly all recur across chains (" + std::to_string(chosen->stable_topics) +
          " of " + std::to_string(chosen->topic_count) + " stable) and none of which nearly duplicates another";
    const TopicCountResult* above = chosen + 1 <= &results.back() ? chosen + 1 : nullptr;
    if (above != nullptr) {
      why += "; at K = " + std::to_string(above->topic_count) + ", " +
             (above->redundant_pairs > 0
                  ? fixed_decimals(above->redundant_pairs, 1) + " pairs of near-duplicate topics"
                  : std::to_string(above->topic_count - above->stable_topics) + " topics do not recur across chains");
    }
  } else {
    // None qualifies: among the K values whose held-out perplexity is within 5% of the lowest, the one whose
    // topics are most coherent (mean NPMI); ties to the smaller K.
    for (const auto& r : results) {
      if (r.perplexity > 1.05 * best_perplexity) continue;
      if (chosen == nullptr || r.mean_npmi > chosen->mean_npmi) chosen = &r;
    }
    why =
        "no K tried has topics that nearly all recur across chains (90% stable) with no near-duplicates, so "
        "among the K values whose held-out perplexity is within 5% of the lowest, the one with the most "
        "coherent topics (mean NPMI " +
        fixed_decimals(chosen->mean_npmi, 3) + "; " + std::to_string(chosen->stable_topics) + " of " +
        std::to_string(chosen->topic_count) + " topics stable, " + fixed_decimals(chosen->redundant_pairs, 1) +
        " near-duplicate pairs). More sweeps or more chains may settle the topics";
  }
  const double gap = 100.0 * (chosen->perplexity / best_perplexity - 1.0);
  why += chosen->topic_count == best_perplexity_k
             ? "; it also has the lowest held-out perplexity (" + fixed_decimals(best_perplexity, 1) + ")"
             : "; its held-out perplexity is " + fixed_decimals(gap, 1) + "% above the lowest (" +
                   fixed_decimals(best_perplexity, 1) + " at K = " + std::to_string(best_perplexity_k) + ")";
  sweep.suggested = chosen->topic_count;
  sweep.reason = "K = " + std::to_string(chosen->topic_count) + ": " + why +
                 ". A guide, not a verdict: read the topics at the neighbouring K values too, and choose the "
                 "number whose topics make sense for the question.";
}

nlohmann::json to_json(const TopicCountSweep& sweep) {
  const auto& o = sweep.options;
  auto rows = nlohmann::json::array();
  for (const auto& r : sweep.results) {
    rows.push_back({{"topics", r.topic_count},
                    {"perplexity", r.perplexity},
                    {"perplexity_min", r.perplexity_min},
                    {"perplexity_max", r.perplexity_max},
                    {"mean_npmi", r.mean_npmi},
                    {"mean_umass", r.mean_umass},
                    {"redundant_pairs", r.redundant_pairs},
                    {"stable_topics", r.stable_topics},
                    {"mean_stability", r.mean_stability},
                    {"rhat", std::isfinite(r.rhat) ? nlohmann::json(r.rhat) : nlohmann::json(nullptr)}});
  }
  return {{"topic_counts", o.topic_counts},
          {"chains", o.fit.chains},
          {"sweeps", o.fit.sweeps},
          {"burn_in", o.fit.burn_in},
          {"seed", o.fit.seed},
          {"held_out_every", o.held_out_every},
          {"training_documents", sweep.training_documents},
          {"held_out_documents", sweep.held_out_documents},
          {"held_out_tokens", sweep.held_out_tokens},
          {"top_words", o.top_words},
          {"redundancy_threshold", o.redundancy_threshold},
          {"stable_threshold", o.stable_threshold},
          {"results", rows},
          {"suggested", sweep.suggested},
          {"reason", sweep.reason}};
}

}  // namespace loupe

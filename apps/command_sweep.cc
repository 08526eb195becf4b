// `loupe sweep CORPUS --topics LIST`: a guide to the number of topics. Fits the
// model at every K of the list (several chains each, K values in parallel) and
// prints held-out perplexity, coherence, redundancy and stability, then a suggested K.
#include <algorithm>
#include <cmath>
#include <cstdio>
#include <iostream>
#include <memory>
#include <thread>

#include "analysis/topic_count_sweep.h"
#include "apps/commands.h"
#include "apps/interrupt_guard.h"
#include "apps/progress_bar.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "common/number_text.h"
#include "corpus/corpus_file.h"
#include "model/fit.h"

namespace loupe::cli {

namespace {

struct SweepArguments {
  std::string corpus;
  std::string topics;
  std::string format = "table";
  std::string output;  // also write the JSON here
  double alpha = 0;    // 0: 50/K at every K
  std::size_t parallel = 0;
  bool quiet = false;
  TopicCountSweepOptions options;
};

void print_table(const TopicCountSweep& sweep, std::ostream& out) {
  const auto& o = sweep.options;
  out << "Number of topics: " << sweep.results.size() << " values of K, " << o.fit.chains << " chains x "
      << o.fit.sweeps << " sweeps each (seed " << o.fit.seed << ").\n"
      << "Held out: every " << o.held_out_every << "th document (" << format_count(sweep.held_out_documents)
      << " documents, " << format_count(sweep.held_out_tokens) << " tokens), scored by document completion; "
      << format_count(sweep.training_documents) << " documents fitted.\n"
      << "Coherence of each topic's top " << o.top_words
      << " words from document co-occurrence in the whole corpus; redundant = pairs of one chain's topics closer "
         "than Hellinger "
      << o.redundancy_threshold << "; stable = chain 1's topics recurring on the other chains with similarity at "
      << "least " << o.stable_threshold << ".\n\n";
  out << "    K  perplexity (chains' range)      NPMI    UMass  redundant  stable     R-hat\n";
  for (const auto& r : sweep.results) {
    char row[160];
    const std::string perplexity = fixed_decimals(r.perplexity, 1) + " (" + fixed_decimals(r.perplexity_min, 1) +
                                   " to " + fixed_decimals(r.perplexity_max, 1) + ")";
    const std::string stable = std::to_string(r.stable_topics) + "/" + std::to_string(r.topic_count);
    std::snprintf(row, sizeof row, "%5u  %-30s %6s  %7s  %9s  %-7s  %6s%s\n", r.topic_count, perplexity.c_str(),
                  fixed_decimals(r.mean_npmi, 3).c_str(), fixed_decimals(r.mean_umass, 2).c_str(),
                  fixed_decimals(r.redundant_pairs, 1).c_str(), stable.c_str(), fixed_decimals(r.rhat, 3).c_str(),
                  r.topic_count == sweep.suggested ? "  <- suggested" : "");
    out << row;
  }
  out << "\nSuggested: " << sweep.reason << "\n";
  const bool unconverged = std::any_of(sweep.results.begin(), sweep.results.end(), [](const TopicCountResult& r) {
    return std::isfinite(r.rhat) && r.rhat >= 1.1;
  });
  if (unconverged) {
    out << "WARNING: R-hat is 1.1 or more at some K: those chains have not converged; sweep again with more "
           "--sweeps before trusting their rows.\n";
  }
}

void print_csv(const TopicCountSweep& sweep, std::ostream& out) {
  out << "topics,perplexity,perplexity_min,perplexity_max,mean_npmi,mean_umass,redundant_pairs,stable_topics,"
         "mean_stability,rhat,suggested,seed\n";
  for (const auto& r : sweep.results) {
    char row[256];
    std::snprintf(row, sizeof row, "%u,%.9g,%.9g,%.9g,%.9g,%.9g,%.9g,%zu,%.9g,%.9g,%s,%llu\n", r.topic_count,
                  r.perplexity, r.perplexity_min, r.perplexity_max, r.mean_npmi, r.mean_umass, r.redundant_pairs,
                  r.stable_topics, r.mean_stability, r.rhat, r.topic_count == sweep.suggested ? "yes" : "no",
                  static_cast<unsigned long long>(sweep.options.fit.seed));
    out << row;
  }
}

void run_sweep(const CLI::App& cmd, SweepArguments& args) {
  const InterruptGuard guard;  // Ctrl-C from here on stops the fits after their current sweep
  TopicCountSweepOptions options = args.options;
  // Unless given: burn-in the first 40% of the sweeps, and the samples spread over the rest.
  if (cmd.count("--burn-in") == 0) options.fit.burn_in = options.fit.sweeps * 2 / 5;
  if (cmd.count("--sample-lag") == 0 && options.fit.samples > 0 && options.fit.sweeps > options.fit.burn_in) {
    options.fit.sample_lag =
        std::clamp<std::uint32_t>((options.fit.sweeps - options.fit.burn_in) / options.fit.samples, 1, 10);
  }
  options.topic_counts = parse_topic_counts(args.topics);
  if (args.alpha > 0) options.fit.alpha = {args.alpha};
  const Corpus corpus = read_corpus(args.corpus);
  validate_sweep_options(options, corpus);
  const std::size_t cores = std::max(1U, std::thread::hardware_concurrency());
  options.parallel_fits = args.parallel > 0
                              ? args.parallel
                              : std::max<std::size_t>(1, cores / std::max<std::uint32_t>(1, options.fit.threads));

  ProgressBar bar("sweeping K", args.quiet);
  options.on_progress = [&](std::size_t done, std::size_t total, double work) {
    bar.update(work, 1.0, std::to_string(done) + " of " + std::to_string(total) + " K values done");
  };
  options.stop_requested = &InterruptGuard::stop_requested();
  TopicCountSweep sweep;
  try {
    sweep = sweep_topic_counts(corpus, options);
  } catch (const FitInterrupted&) {
    throw Error("the sweep was interrupted; nothing was written. Run it again to finish.");
  }
  bar.finish();

  nlohmann::json json = to_json(sweep);
  json["corpus"] = args.corpus;
  if (!args.output.empty()) write_file_atomically(args.output, json.dump(2) + "\n");
  if (args.format == "json") {
    std::cout << json.dump(2) << "\n";
  } else if (args.format == "csv") {
    print_csv(sweep, std::cout);
  } else {
    print_table(sweep, std::cout);
    if (!args.output.empty()) std::cout << "Wrote " << args.output << "\n";
  }
}

}  // namespace

void add_sweep_command(CLI::App& app) {
  auto args = std::make_shared<SweepArguments>();
  auto& o = args->options;
  o.fit.chains = 2;
  o.fit.sweeps = 500;
  o.fit.burn_in = 200;
  o.fit.samples = 5;
  o.fit.sample_lag = 10;
  o.fit.threads = 1;
  auto* cmd = app.add_subcommand("sweep",
                                 "Fit several numbers of topics and compare them, as a guide to choosing K.\n"
                                 "  Example: loupe sweep letters.corpus --topics 5:40:5");
  cmd->add_option("CORPUS", args->corpus, "The corpus file (from `loupe ingest`)")
      ->required()
      ->check(CLI::ExistingFile);
  cmd->add_option("--topics", args->topics,
                  "The numbers of topics to try: a list (5,10,20), a range FROM:TO:STEP (5:40:5) or both")
      ->required();
  cmd->add_option("--chains", o.fit.chains, "Chains at every K (at least 2: stability compares them)")
      ->capture_default_str();
  cmd->add_option("--sweeps", o.fit.sweeps, "Gibbs sweeps per chain")->capture_default_str();
  cmd->add_option("--burn-in", o.fit.burn_in, "Sweeps before samples are kept and R-hat computed (default: 40%)");
  cmd->add_option("--samples", o.fit.samples, "States averaged into each topic")->capture_default_str();
  cmd->add_option("--sample-lag", o.fit.sample_lag, "Sweeps between the averaged states")->capture_default_str();
  cmd->add_option("--alpha", args->alpha, "Document-topic prior per topic (default 50/K at every K)")
      ->check(CLI::PositiveNumber);
  cmd->add_option("--beta", o.fit.beta, "Topic-word prior")->capture_default_str();
  cmd->add_option("--seed", o.fit.seed, "Master random seed: the same seed gives the same sweep")
      ->capture_default_str();
  cmd->add_option("--threads", o.fit.threads, "Worker threads of each fit")->capture_default_str();
  cmd->add_option("--parallel", args->parallel,
                  "K values fitted at once (default: cores / threads); never changes the results");
  cmd->add_option("--held-out-every", o.held_out_every, "Hold out every Nth document for perplexity")
      ->capture_default_str();
  cmd->add_option("--top-words", o.top_words, "Top words per topic for coherence")->capture_default_str();
  cmd->add_option("--redundant-below", o.redundancy_threshold,
                  "Two topics of one chain closer than this Hellinger distance are redundant")
      ->capture_default_str()
      ->check(CLI::Range(0.0, 1.0));
  cmd->add_option("--stable-at", o.stable_threshold,
                  "A topic is stable when its mean matched similarity across chains is at least this")
      ->capture_default_str()
      ->check(CLI::Range(0.0, 1.0));
  cmd->add_option("--format", args->format, "table, csv or json")
      ->check(CLI::IsMember({"table", "csv", "json"}))
      ->capture_default_str();
  cmd->add_option("-o,--output", args->output, "Also write the results as JSON to this file");
  cmd->add_flag("-q,--quiet", args->quiet, "No progress bar");
  cmd->callback([cmd, args] { run_sweep(*cmd, *args); });
}

}  // namespace loupe::cli

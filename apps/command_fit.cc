// `loupe fit CORPUS -o MODEL`: fits the shared LDA model (R chains of collapsed
// Gibbs sampling) and writes the model file. Ctrl-C stops after the current
// sweep; the last checkpoint stays intact for --resume.
#include <atomic>
#include <cmath>
#include <cstdio>
#include <filesystem>
#include <functional>
#include <iostream>
#include <memory>
#include <sstream>
#include <thread>

#include "apps/commands.h"
#include "apps/interrupt_guard.h"
#include "apps/mpi_session.h"
#include "apps/progress_bar.h"
#include "common/error.h"
#include "common/number_text.h"
#include "common/process_group.h"
#include "corpus/corpus_file.h"
#include "model/checkpoint.h"
#include "model/count_merge.h"
#include "model/fit.h"
#include "model/gibbs_sampler.h"
#include "model/model_file.h"

namespace loupe::cli {

namespace {

struct FitArguments {
  std::string corpus;
  std::string output;
  std::string alpha;
  std::string sampler = "auto";
  std::string resume;
  bool quiet = false;
  FitOptions options;
};

std::vector<double> parse_alpha(const std::string& text) {
  std::vector<double> values;
  std::stringstream stream(text);
  std::string item;
  while (std::getline(stream, item, ',')) {
    try {
      std::size_t used = 0;
      values.push_back(std::stod(item, &used));
      if (used != item.size()) throw std::invalid_argument(item);
    } catch (const std::exception&) {
      throw Error("--alpha " + text + ": \"" + item +
                  "\" is not a number. Give one value, or one per topic separated by commas.");
    }
  }
  return values;
}

std::string fixed(double value, int decimals) { return fixed_decimals(value, decimals); }

std::string millions(double value) { return fixed(value / 1e6, 2) + "M"; }

// With --resume, every result-affecting option not given on the command line
// comes from the checkpoint; those given must agree with it (fit_model checks).
void take_options_from_checkpoint(const CLI::App& cmd, FitArguments& args) {
  const FitCheckpoint checkpoint = read_checkpoint(args.resume);
  const FitOptions& stored = checkpoint.options;
  FitOptions& o = args.options;
  auto unset = [&](const char* name) { return cmd.count(name) == 0; };
  if (unset("--topics")) o.topic_count = stored.topic_count;
  if (unset("--sweeps")) o.sweeps = stored.sweeps;
  if (unset("--burn-in")) o.burn_in = stored.burn_in;
  if (unset("--chains")) o.chains = stored.chains;
  if (unset("--seed")) o.seed = stored.seed;
  if (unset("--alpha")) o.alpha = stored.alpha;
  if (unset("--beta")) o.beta = stored.beta;
  if (unset("--tune-priors-every")) o.tune_priors_every = stored.tune_priors_every;
  if (unset("--asymmetric-alpha")) o.asymmetric_alpha = stored.asymmetric_alpha;
  if (unset("--samples")) o.samples = stored.samples;
  if (unset("--sample-lag")) o.sample_lag = stored.sample_lag;
  if (unset("--log-likelihood-every")) o.log_likelihood_every = stored.log_likelihood_every;
  if (unset("--sampler")) o.sampler = stored.sampler;
  if (unset("--mh-steps")) o.mh_steps = stored.mh_steps;
  if (unset("--checkpoint-every")) o.checkpoint_every = stored.checkpoint_every;
  if (unset("--checkpoint")) o.checkpoint_path = args.resume;
}

// The fit's progress on BAR: the sweep, tokens a second and log p(w,z) a token of a corpus of TOKENS tokens.
std::function<void(const FitProgress&)> progress_on(ProgressBar& bar, double tokens) {
  return [&bar, tokens](const FitProgress& p) {
    std::string detail = "sweep " + std::to_string(p.sweep) + "/" + std::to_string(p.sweeps) + ", " +
                         millions(p.tokens_per_second) + " tokens/s";
    if (std::isfinite(p.log_likelihood)) detail += ", log p(w,z)/token " + fixed(p.log_likelihood / tokens, 4);
    bar.update(p.sweep, p.sweeps, detail);
  };
}

// Under mpirun: every process reads its share of the documents and samples it;
// the counts are summed after every sweep; process 1 (rank 0) writes the model.
void run_shared_fit(FitArguments& args, ProcessGroup& group) {
  FitOptions& options = args.options;
  const bool main_process = group.rank() == 0;
  CorpusShare share;
  // Any process that cannot read its share, or a setting no process can fit with,
  // stops every process with the message (never one left waiting for the others).
  run_together(group, [&] {
    if (!args.resume.empty() || options.checkpoint_every > 0) {
      throw Error(
          "checkpoints (--checkpoint-every, --resume) are not available when the fit is spread over several "
          "processes (mpirun). Fit without them, or without mpirun.");
    }
    share = read_corpus_share(args.corpus, group.rank(), group.size(), /*whole_corpus=*/main_process);
    validate_fit_options(options, share.total_documents, share.total_tokens);
  });
  const double tokens = static_cast<double>(share.total_tokens);
  ProgressBar bar("fitting", args.quiet || !main_process);
  FitControl control;
  control.stop_requested = &InterruptGuard::stop_requested();
  control.on_progress = progress_on(bar, tokens);
  Model model;
  {
    InterruptGuard guard;
    model = fit_model_shared(share, group, options, control);
  }
  bar.finish();
  if (!main_process) return;
  write_model(model, args.output);
  if (args.quiet) return;

  const auto memory = estimate_fit_memory(share.corpus, options);
  const SamplerKind kind = resolve_sampler(options.sampler, options.topic_count);
  const double pools = kind == SamplerKind::metropolis_hastings ? 2.0 * tokens * options.chains : 0.0;
  const double summed = static_cast<double>(options.chains) *
                        static_cast<double>(SharedCountMerger::bytes_summed(
                            static_cast<std::uint32_t>(share.corpus.vocabulary_size()), options.topic_count));
  std::cout << "Fitted " << options.topic_count << " topics on " << format_count(share.total_documents)
            << " documents (" << format_count(share.total_tokens) << " tokens) spread over " << group.size()
            << " processes: " << options.chains << (options.chains == 1 ? " chain" : " chains") << " x "
            << options.sweeps << " sweeps in " << fixed(model.timing.seconds, 1) << " s, "
            << millions(model.timing.tokens_per_second) << " tokens/s with " << options.threads
            << (options.threads == 1 ? " thread" : " threads") << " a process.\n";
  std::cout << "Sampler: "
            << (kind == SamplerKind::exact
                    ? std::string("exact conditional")
                    : "Metropolis-Hastings, " + std::to_string(options.mh_steps) + " steps a token")
            << "; process 1 holds " << format_count(share.corpus.num_tokens()) << " tokens, memory "
            << format_bytes(
                   memory.token_state_bytes_per_token * static_cast<double>(share.corpus.num_tokens()) +
                   static_cast<double>(memory.count_table_bytes + memory.workspace_bytes + memory.estimate_bytes) +
                   pools)
            << "; each sweep sums " << format_bytes(summed) << " of counts across the processes.\n";
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    const auto& chain = model.chains[c];
    std::cout << "Chain " << c + 1 << ": log p(w,z) " << fixed(chain.trace.back().log_likelihood, 1) << " ("
              << fixed(chain.trace.back().log_likelihood / tokens, 4) << " a token) at sweep "
              << chain.trace.back().sweep << "\n";
  }
  if (std::isfinite(model.rhat)) {
    std::cout << "Gelman-Rubin R-hat of the log-likelihood traces after burn-in: " << fixed(model.rhat, 3) << "\n";
  }
  std::cout << "Wrote " << args.output << "\n";
}

void run_fit(const CLI::App& cmd, FitArguments& args) {
  FitOptions& options = args.options;
  if (!args.alpha.empty()) options.alpha = parse_alpha(args.alpha);
  options.sampler = args.sampler == "exact" ? SamplerKind::exact
                    : args.sampler == "mh"  ? SamplerKind::metropolis_hastings
                                            : SamplerKind::automatic;
  if (ProcessGroup* group = processes()) {
    if (cmd.count("--threads") == 0) options.threads = static_cast<std::uint32_t>(default_threads());
    run_shared_fit(args, *group);
    return;
  }
  if (!args.resume.empty()) take_options_from_checkpoint(cmd, args);
  if (options.checkpoint_every > 0 && options.checkpoint_path.empty())
    options.checkpoint_path = args.output + ".checkpoint";

  const Corpus corpus = read_corpus(args.corpus);
  validate_fit_options(options, corpus);
  const double tokens = static_cast<double>(corpus.num_tokens());

  ProgressBar bar("fitting", args.quiet);
  FitControl control;
  control.resume_from = args.resume;
  control.stop_requested = &InterruptGuard::stop_requested();
  control.on_progress = progress_on(bar, tokens);
  Model model;
  {
    InterruptGuard guard;
    model = fit_model(corpus, options, control);
  }
  bar.finish();
  write_model(model, args.output);
  // The model is safe: its checkpoint has done its job.
  bool removed_checkpoint = false;
  if (options.checkpoint_every > 0 || !args.resume.empty()) {
    std::error_code ignored;
    removed_checkpoint = std::filesystem::remove(options.checkpoint_path, ignored);
  }
  if (args.quiet) return;

  const auto memory = estimate_fit_memory(corpus, options);
  const SamplerKind kind = resolve_sampler(options.sampler, options.topic_count);
  std::cout << "Fitted " << options.topic_count << " topics on " << format_count(corpus.num_documents())
            << " documents (" << format_count(corpus.num_tokens()) << " tokens): " << options.chains
            << (options.chains == 1 ? " chain" : " chains") << " x " << options.sweeps << " sweeps in "
            << fixed(model.timing.seconds, 1) << " s, " << millions(model.timing.tokens_per_second) << " tokens/s on "
            << options.threads << (options.threads == 1 ? " thread" : " threads") << ".\n";
  std::cout << "Sampler: "
            << (kind == SamplerKind::exact
                    ? std::string("exact conditional")
                    : "Metropolis-Hastings, " + std::to_string(options.mh_steps) + " steps a token")
            << "; memory " << fixed(memory.token_state_bytes_per_token, 0) << " bytes a token + "
            << format_bytes(
                   static_cast<double>(memory.count_table_bytes + memory.workspace_bytes + memory.estimate_bytes))
            << " of count and estimate tables.\n";
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    const auto& chain = model.chains[c];
    std::cout << "Chain " << c + 1 << ": log p(w,z) " << fixed(chain.trace.back().log_likelihood, 1) << " ("
              << fixed(chain.trace.back().log_likelihood / tokens, 4) << " a token) at sweep "
              << chain.trace.back().sweep;
    if (options.tune_priors_every > 0) {
      double alpha_sum = 0;
      for (const double a : chain.alpha) alpha_sum += a;
      std::cout << "; tuned alpha sum " << fixed(alpha_sum, 3) << ", beta " << fixed(chain.beta, 4);
    }
    std::cout << "\n";
  }
  if (std::isfinite(model.rhat)) {
    std::cout << "Gelman-Rubin R-hat of the log-likelihood traces after burn-in: " << fixed(model.rhat, 3)
              << (model.rhat < 1.1 ? " (below 1.1: the chains agree)\n"
                                   : " (1.1 or more: run longer or check the chains)\n");
  }
  std::cout << "Wrote " << args.output
            << (removed_checkpoint ? " (and removed the checkpoint " + options.checkpoint_path + ")" : "") << "\n";
}

}  // namespace

void add_fit_command(CLI::App& app) {
  auto args = std::make_shared<FitArguments>();
  auto& o = args->options;
  o.threads = std::max(1U, std::thread::hardware_concurrency());
  o.chains = 4;  // several chains by default, so that every conclusion can be checked across them
  auto* cmd = app.add_subcommand("fit",
                                 "Fit one LDA topic model shared by all groups of a corpus.\n"
                                 "  Example: loupe fit letters.corpus -o letters.model --topics 30 --chains 4\n"
                                 "  On several machines (built with MPI): mpirun -np 4 loupe fit letters.corpus -o "
                                 "letters.model");
  auto* corpus_option = cmd->add_option("CORPUS", args->corpus, "The corpus file (from `loupe ingest`)")->required();
  // Under mpirun a missing file is reported by every process together (run_shared_fit).
  if (processes() == nullptr) corpus_option->check(CLI::ExistingFile);
  cmd->add_option("-o,--output", args->output, "The model file to write")->required();
  cmd->add_option("--topics", o.topic_count, "Number of topics K")->capture_default_str();
  cmd->add_option("--sweeps", o.sweeps, "Gibbs sweeps per chain")->capture_default_str();
  cmd->add_option("--burn-in", o.burn_in, "Sweeps before samples are kept, priors tuned and R-hat computed")
      ->capture_default_str();
  cmd->add_option("--chains", o.chains, "Independent chains, seeded from --seed")->capture_default_str();
  cmd->add_option("--threads", o.threads, "Worker threads (default: all cores)")->capture_default_str();
  cmd->add_option("--seed", o.seed, "Master random seed: the same seed reproduces the same model")
      ->capture_default_str();
  cmd->add_option("--alpha", args->alpha,
                  "Document-topic prior: one value for every topic, or K values separated by commas (default 50/K)");
  cmd->add_option("--beta", o.beta, "Topic-word prior")->capture_default_str();
  cmd->add_option("--tune-priors-every", o.tune_priors_every,
                  "Re-estimate alpha and beta every N sweeps after burn-in (0: keep them fixed)")
      ->capture_default_str();
  cmd->add_flag("--asymmetric-alpha", o.asymmetric_alpha, "With --tune-priors-every: learn one alpha per topic");
  cmd->add_option("--samples", o.samples, "States averaged into theta and phi, ending at the last sweep")
      ->capture_default_str();
  cmd->add_option("--sample-lag", o.sample_lag, "Sweeps between the averaged states")->capture_default_str();
  cmd->add_option("--log-likelihood-every", o.log_likelihood_every, "Trace log p(w, z) every N sweeps")
      ->capture_default_str();
  cmd->add_option("--sampler", args->sampler,
                  "Sampling kernel: exact, mh (Metropolis-Hastings, cost independent of K) or auto (exact up to " +
                      std::to_string(kExactKernelMaxTopics) + " topics)")
      ->check(CLI::IsMember({"auto", "exact", "mh"}))
      ->capture_default_str();
  cmd->add_option("--mh-steps", o.mh_steps, "Metropolis-Hastings proposals a token per sweep")->capture_default_str();
  cmd->add_option("--checkpoint", o.checkpoint_path, "Checkpoint file (default: MODEL.checkpoint)");
  cmd->add_option("--checkpoint-every", o.checkpoint_every, "Write a checkpoint every N sweeps (0: never)")
      ->capture_default_str();
  cmd->add_option("--resume", args->resume, "Continue an interrupted fit from its checkpoint (its settings are reused)")
      ->check(CLI::ExistingFile);
  cmd->add_flag("-q,--quiet", args->quiet, "No progress bar and no summary");
  cmd->callback([cmd, args] { run_fit(*cmd, *args); });
}

}  // namespace loupe::cli

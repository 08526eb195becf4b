#include "model/fit.h"

#include <algorithm>
#include <chrono>
#include <cmath>
#include <limits>
#include <memory>
#include <numeric>

#include "model/checkpoint.h"
#include "model/count_merge.h"
#include "model/evaluation.h"
#include "model/gibbs_sampler.h"
#include "model/prior_tuning.h"
#include "model/random.h"

namespace loupe {

namespace {

using Clock = std::chrono::steady_clock;

double seconds_since(Clock::time_point start) { return std::chrono::duration<double>(Clock::now() - start).count(); }

bool is_retained(const std::vector<std::uint32_t>& retained, std::uint32_t sweep) {
  return std::binary_search(retained.begin(), retained.end(), sweep);
}

bool traces_at(const FitOptions& options, std::uint32_t sweep) {
  return sweep % options.log_likelihood_every == 0 || sweep == options.sweeps;
}

bool tunes_at(const FitOptions& options, std::uint32_t sweep) {
  return options.tune_priors_every > 0 && sweep > options.burn_in && sweep < options.sweeps &&
         (sweep - options.burn_in) % options.tune_priors_every == 0;
}

// Adds the state after a retained sweep to the chain's running sums. The counts
// are those of all `total_tokens` tokens (more than corpus's when it is one share);
// phi is summed only with keep_phi (the process that writes the model).
void accumulate_sample(const Corpus& corpus, ChainProgress& chain, double total_tokens, bool keep_phi) {
  const auto& state = chain.state;
  auto& sums = chain.sums;
  const std::size_t k = state.counts.topic_count;
  const std::size_t v = state.counts.vocabulary_size;
  const std::size_t d_total = corpus.num_documents();
  if (sums.theta_sum.empty()) {
    sums.theta_sum.assign(d_total * k, 0.0F);
    if (keep_phi) sums.phi_sum.assign(v * k, 0.0F);
  }
  const double alpha_sum = state.alpha_sum();
  for (std::size_t d = 0; d < d_total; ++d) {
    const auto first = corpus.token_offsets[d];
    const auto last = corpus.token_offsets[d + 1];
    // theta_dk = (n_dk + a_k) / (N_d + A): the n_dk part, token by token.
    const auto weight = static_cast<float>(1.0 / (static_cast<double>(last - first) + alpha_sum));
    float* row = sums.theta_sum.data() + d * k;
    for (auto i = first; i < last; ++i) row[state.topics[i]] += weight;
  }
  // phi_kw = (n_wk + b) / (n_k + V b).
  const double beta = state.beta;
  std::vector<double> inverse_total(k);
  for (std::size_t t = 0; t < k; ++t)
    inverse_total[t] = 1.0 / (state.counts.topic_total[t] + static_cast<double>(v) * beta);
  for (std::size_t w = 0; keep_phi && w < v; ++w) {
    const std::uint32_t* counts = state.counts.word_topic.data() + w * k;
    float* row = sums.phi_sum.data() + w * k;
    for (std::size_t t = 0; t < k; ++t) row[t] += static_cast<float>((counts[t] + beta) * inverse_total[t]);
  }
  const double n = total_tokens;
  for (std::size_t t = 0; t < k; ++t) sums.share_sum[t] += state.counts.topic_total[t] / n;
  sums.sample_alpha.insert(sums.sample_alpha.end(), state.alpha.begin(), state.alpha.end());
  sums.sample_beta.push_back(beta);
  ++sums.samples_taken;
}

ChainEstimates finish_chain(const Corpus& corpus, const ChainProgress& chain) {
  const auto& sums = chain.sums;
  const std::size_t k = chain.state.counts.topic_count;
  const std::size_t v = chain.state.counts.vocabulary_size;
  const std::size_t d_total = corpus.num_documents();
  const double samples = sums.samples_taken;
  ChainEstimates out;
  out.seed = chain.seed;
  out.alpha = chain.state.alpha;
  out.beta = chain.state.beta;
  out.trace = sums.trace;
  out.phi.resize(sums.phi_sum.empty() ? 0 : k * v);
  for (std::size_t w = 0; !sums.phi_sum.empty() && w < v; ++w) {
    for (std::size_t t = 0; t < k; ++t) out.phi[t * v + w] = static_cast<float>(sums.phi_sum[w * k + t] / samples);
  }
  std::vector<double> sample_alpha_sum(sums.samples_taken);
  for (std::size_t s = 0; s < sums.samples_taken; ++s) {
    sample_alpha_sum[s] = std::accumulate(sums.sample_alpha.begin() + static_cast<std::ptrdiff_t>(s * k),
                                          sums.sample_alpha.begin() + static_cast<std::ptrdiff_t>((s + 1) * k), 0.0);
  }
  out.theta.resize(d_total * k);
  std::vector<double> prior_part(k);
  for (std::size_t d = 0; d < d_total; ++d) {
    const double length = static_cast<double>(corpus.document_length(d));
    std::fill(prior_part.begin(), prior_part.end(), 0.0);
    // The alpha part of theta_dk, sum over samples of a_k,s / (N_d + A_s).
    for (std::size_t s = 0; s < sums.samples_taken; ++s) {
      const double scale = 1.0 / (length + sample_alpha_sum[s]);
      for (std::size_t t = 0; t < k; ++t) prior_part[t] += sums.sample_alpha[s * k + t] * scale;
    }
    for (std::size_t t = 0; t < k; ++t) {
      out.theta[d * k + t] = static_cast<float>((sums.theta_sum[d * k + t] + prior_part[t]) / samples);
    }
  }
  out.topic_share.resize(k);
  for (std::size_t t = 0; t < k; ++t) out.topic_share[t] = sums.share_sum[t] / samples;
  return out;
}

double mean_latest_log_likelihood(const std::vector<ChainProgress>& chains) {
  double sum = 0;
  for (const auto& chain : chains) {
    if (chain.sums.trace.empty()) return std::numeric_limits<double>::quiet_NaN();
    sum += chain.sums.trace.back().log_likelihood;
  }
  return sum / static_cast<double>(chains.size());
}

double traces_rhat(const std::vector<ChainProgress>& chains, std::uint32_t burn_in) {
  std::vector<std::vector<double>> traces;
  for (const auto& chain : chains) {
    std::vector<double> values;
    for (const auto& point : chain.sums.trace) {
      if (point.sweep > burn_in) values.push_back(point.log_likelihood);
    }
    traces.push_back(std::move(values));
  }
  return gelman_rubin_rhat(traces);
}

}  // namespace

std::uint64_t chain_seed(std::uint64_t seed, std::uint32_t chain) { return derive_seed(seed, {0xC4A1, chain}); }

FitMemory estimate_fit_memory(const Corpus& corpus, const FitOptions& options) {
  FitMemory memory;
  const double r = options.chains;
  const double k = options.topic_count;
  const double v = static_cast<double>(corpus.vocabulary_size());
  const double d = static_cast<double>(corpus.num_documents());
  const double workers = std::min<double>(options.threads, r * std::max<double>(1, std::floor(options.threads / r)));
  const double pair = resolve_sampler(options.sampler, options.topic_count) == SamplerKind::metropolis_hastings ? 2 : 1;
  memory.token_state_bytes_per_token = sizeof(WordId) + r * static_cast<double>(SamplerState::kBytesPerToken);
  memory.count_table_bytes = static_cast<std::uint64_t>(r * (v * k + k) * sizeof(std::uint32_t));
  memory.workspace_bytes = static_cast<std::uint64_t>(workers * (pair * v * k + 2 * k) * sizeof(std::uint32_t));
  memory.estimate_bytes = static_cast<std::uint64_t>(r * (d * k + v * k) * sizeof(float));
  memory.total_bytes =
      static_cast<std::uint64_t>(memory.token_state_bytes_per_token * static_cast<double>(corpus.num_tokens())) +
      memory.count_table_bytes + memory.workspace_bytes + memory.estimate_bytes;
  return memory;
}

namespace {

// A fit spread over processes: this process's part of it (fit_model_shared).
struct Sharing {
  ProcessGroup* processes = nullptr;
  const CorpusShare* share = nullptr;
};

// Histograms as numbers, for all_gather: the count of histograms, then per
// histogram (lengths first) its size and its (value, count) pairs.
void encode_histogram(const CountHistogram& histogram, std::vector<std::uint64_t>& out) {
  out.push_back(histogram.size());
  for (const auto& [value, count] : histogram) {
    out.push_back(value);
    out.push_back(count);
  }
}

// The document histograms of every process's share, added in rank order.
DocumentCountHistograms shared_histograms(ProcessGroup& processes, const DocumentCountHistograms& mine) {
  std::vector<std::uint64_t> encoded{mine.topic_counts.size()};
  encode_histogram(mine.lengths, encoded);
  for (const auto& histogram : mine.topic_counts) encode_histogram(histogram, encoded);
  const std::vector<std::uint64_t> all = processes.all_gather(std::span<const std::uint64_t>(encoded));
  DocumentCountHistograms total;
  total.topic_counts.assign(mine.topic_counts.size(), {});
  std::size_t at = 0;
  auto decode = [&] {
    CountHistogram histogram(all[at++]);
    for (auto& [value, count] : histogram) {
      value = static_cast<std::uint32_t>(all[at++]);
      count = all[at++];
    }
    return histogram;
  };
  for (std::size_t rank = 0; rank < processes.size(); ++rank) {
    const std::size_t lists = all[at++];
    total.lengths = add_histograms(total.lengths, decode());
    for (std::size_t h = 0; h < lists; ++h) total.topic_counts[h] = add_histograms(total.topic_counts[h], decode());
  }
  return total;
}

Model fit_chains(const Corpus& corpus, const FitOptions& options, const FitControl& control, const Sharing* sharing) {
  ProcessGroup* const processes = sharing != nullptr ? sharing->processes : nullptr;
  const bool is_root = processes == nullptr || processes->rank() == 0;
  const std::uint64_t token_count = sharing != nullptr ? sharing->share->total_tokens : corpus.num_tokens();
  const auto total_tokens = static_cast<double>(token_count);
  if (sharing != nullptr) {
    validate_fit_options(options, sharing->share->total_documents, sharing->share->total_tokens);
    if (options.checkpoint_every > 0 || !control.resume_from.empty()) {
      throw Error(
          "cannot fit the model: checkpoints (--checkpoint-every, --resume) are not available when the fit is "
          "spread over several processes (mpirun). Fit without them, or without mpirun.");
    }
  } else {
    validate_fit_options(options, corpus);
  }
  const auto start = Clock::now();
  const std::uint64_t fingerprint = sharing == nullptr ? corpus.fingerprint() : sharing->share->fingerprint;
  const std::uint32_t k = options.topic_count;
  const std::size_t r = options.chains;
  const std::size_t threads = options.threads;
  const bool asymmetric = alpha_is_asymmetric(options);
  const auto retained = retained_sweeps(options);
  const SamplerKind kind = resolve_sampler(options.sampler, k);

  LocalCountMerger local_merger;
  std::unique_ptr<SharedCountMerger> shared_merger;
  if (processes != nullptr && control.merger == nullptr) {
    shared_merger = std::make_unique<SharedCountMerger>(*processes, kind == SamplerKind::metropolis_hastings);
  }
  CountMerger& merger = control.merger != nullptr ? *control.merger
                        : shared_merger           ? static_cast<CountMerger&>(*shared_merger)
                                                  : local_merger;
  // Each chain is split into shards so that all threads have work: with more
  // chains than threads every chain is one shard (exact sequential Gibbs).
  const std::size_t shards_per_chain = std::max<std::size_t>(1, threads / r);
  const GibbsSampler sampler(corpus, k, options.sampler, options.mh_steps, shards_per_chain,
                             sharing != nullptr ? sharing->share->first_document : 0);
  std::vector<ShardWorkspace> workspaces(threads);
  const ParallelRunner all_threads(threads);
  const ParallelRunner one_thread(1);

  std::vector<ChainProgress> chains(r);
  std::uint32_t first_sweep = 0;  // sweep 0 is the random initialisation
  double earlier_seconds = 0;
  if (!control.resume_from.empty()) {
    FitCheckpoint checkpoint = read_checkpoint(control.resume_from);
    if (checkpoint.corpus_fingerprint != fingerprint) {
      throw Error(control.resume_from +
                  ": this checkpoint was written for another corpus (its fingerprint differs). "
                  "Resume with the corpus the fit started on, or start a new fit without --resume.");
    }
    const std::string mismatch = checkpoint_option_mismatch(checkpoint.options, options);
    if (!mismatch.empty()) {
      throw Error(control.resume_from + ": cannot resume with different settings (" + mismatch +
                  "). Resume with the settings of the interrupted run.");
    }
    for (std::size_t c = 0; c < r; ++c) {
      if (checkpoint.chains[c].state.topics.size() != corpus.num_tokens()) {
        throw Error(control.resume_from +
                    ": the checkpoint's token count does not match the corpus. The file is damaged.");
      }
      const auto& sums = checkpoint.chains[c].sums;
      if (sums.samples_taken > 0 && (sums.theta_sum.size() != corpus.num_documents() * k ||
                                     sums.phi_sum.size() != corpus.vocabulary_size() * k)) {
        throw Error(control.resume_from +
                    ": the checkpoint's estimate tables do not match the corpus. The file is damaged.");
      }
    }
    chains = std::move(checkpoint.chains);
    first_sweep = checkpoint.sweeps_done + 1;
    earlier_seconds = checkpoint.seconds;
  }
  for (std::size_t c = 0; c < r; ++c) {
    auto& chain = chains[c];
    chain.seed = chain_seed(options.seed, static_cast<std::uint32_t>(c));
    chain.state.counts.reset(corpus, k);
    if (first_sweep == 0) {
      chain.state.topics.assign(corpus.num_tokens(), 0);
      chain.state.alpha = initial_alpha(options);
      chain.state.beta = options.beta;
      chain.sums.share_sum.assign(k, 0.0);
    } else {
      merger.merge(corpus, chain.state.topics, chain.state.counts, all_threads);
    }
  }

  // Chains share the threads: with at least as many chains as threads each
  // chain's per-chain work runs on one thread, chains side by side. Work that
  // talks to other processes runs chain after chain on this thread (every
  // process must make the same calls in the same order).
  auto for_each_chain = [&](const std::function<void(std::size_t, const ParallelRunner&)>& work) {
    if (processes != nullptr) {
      for (std::size_t c = 0; c < r; ++c) work(c, all_threads);
    } else if (r >= threads) {
      all_threads.run(r, [&](std::size_t c) { work(c, one_thread); });
    } else {
      for (std::size_t c = 0; c < r; ++c) work(c, all_threads);
    }
  };
  auto trace_value = [&](const ChainProgress& chain, const ParallelRunner& runner) {
    if (processes == nullptr) return log_joint_likelihood(corpus, chain.state, runner);
    double documents_part = log_topic_assignment_likelihood(corpus, chain.state, runner);
    processes->sum(std::span<double>(&documents_part, 1));
    return documents_part + log_word_likelihood(chain.state, runner);
  };
  auto tune = [&](ChainProgress& chain) {
    if (processes == nullptr) {
      tune_priors(corpus, chain.state, asymmetric);
    } else {
      tune_priors(shared_histograms(*processes, document_count_histograms(corpus, chain.state, asymmetric)),
                  chain.state, asymmetric);
    }
  };

  const std::size_t shards = sampler.shards().size();
  std::uint32_t last_checkpoint = first_sweep > 0 ? first_sweep - 1 : 0;
  bool have_checkpoint = first_sweep > 0;
  double sampling_seconds = 0;
  std::uint64_t token_updates = 0;
  for (std::uint32_t sweep = first_sweep; sweep <= options.sweeps; ++sweep) {
    const auto sweep_start = Clock::now();
    // Sample shards (all chains' shards share the threads), then merge counts.
    if (sweep == 0) {
      all_threads.run(r * shards, [&](std::size_t task) {
        sampler.initialize_shard(chains[task / shards].state, chains[task / shards].seed, task % shards);
      });
    } else {
      std::vector<std::unique_ptr<DocumentPrior>> priors;
      for (auto& chain : chains) priors.push_back(std::make_unique<DocumentPrior>(chain.state.alpha));
      all_threads.run_with_worker(r * shards, [&](std::size_t task, std::size_t worker) {
        auto& chain = chains[task / shards];
        sampler.sample_shard(chain.state, *priors[task / shards], chain.seed, sweep, task % shards, workspaces[worker]);
      });
    }
    for_each_chain([&](std::size_t c, const ParallelRunner& runner) {
      merger.merge(corpus, chains[c].state.topics, chains[c].state.counts, runner);
    });
    const double sweep_seconds = seconds_since(sweep_start);
    if (sweep > 0) {
      sampling_seconds += sweep_seconds;
      token_updates += r * token_count;
    }
    if (control.after_sweep) {
      for (std::size_t c = 0; c < r; ++c) control.after_sweep(static_cast<std::uint32_t>(c), sweep, chains[c].state);
    }
    if (sweep > 0) {
      // Trace, then keep a sample, then tune: a sample is averaged with the priors it was drawn under.
      for_each_chain([&](std::size_t c, const ParallelRunner& runner) {
        auto& chain = chains[c];
        if (traces_at(options, sweep)) chain.sums.trace.push_back({sweep, trace_value(chain, runner)});
        if (is_retained(retained, sweep)) accumulate_sample(corpus, chain, total_tokens, is_root);
        if (tunes_at(options, sweep)) tune(chain);
      });
    }
    bool wrote_checkpoint = false;
    if (options.checkpoint_every > 0 && sweep > 0 && sweep < options.sweeps && sweep % options.checkpoint_every == 0) {
      write_checkpoint(options.checkpoint_path, options, fingerprint, sweep, earlier_seconds + seconds_since(start),
                       chains);
      last_checkpoint = sweep;
      have_checkpoint = true;
      wrote_checkpoint = true;
    }
    if (control.on_progress) {
      FitProgress progress;
      progress.sweep = sweep;
      progress.sweeps = options.sweeps;
      progress.tokens_per_second = sweep_seconds > 0 ? static_cast<double>(r * token_count) / sweep_seconds : 0;
      progress.log_likelihood = mean_latest_log_likelihood(chains);
      progress.elapsed_seconds = earlier_seconds + seconds_since(start);
      const double done = sweep - first_sweep + 1;
      progress.remaining_seconds = seconds_since(start) / done * (options.sweeps - sweep);
      progress.checkpoint_written = wrote_checkpoint;
      control.on_progress(progress);
    }
    bool stop = control.stop_requested != nullptr && control.stop_requested->load() && sweep < options.sweeps;
    if (processes != nullptr && sweep < options.sweeps) {
      // Every process stops after the same sweep, or none does.
      std::uint32_t stops = stop ? 1 : 0;
      processes->sum(std::span<std::uint32_t>(&stops, 1));
      stop = stops > 0;
    }
    if (stop) {
      std::string message = "the fit was interrupted after sweep " + std::to_string(sweep) + " of " +
                            std::to_string(options.sweeps) + ". ";
      if (have_checkpoint) {
        message += "The last checkpoint (sweep " + std::to_string(last_checkpoint) + ") is in " +
                   options.checkpoint_path + "; continue with --resume " + options.checkpoint_path + ".";
      } else if (processes != nullptr) {
        message += "A fit spread over several processes cannot be resumed; start it again.";
      } else {
        message += "No checkpoint was written; use --checkpoint FILE --checkpoint-every N to be able to resume.";
      }
      throw FitInterrupted(message);
    }
  }

  Model model;
  model.options = options;
  if (sharing == nullptr) {
    record_corpus(model, corpus);
  } else if (is_root) {
    const CorpusShare& share = *sharing->share;
    model.corpus_fingerprint = share.fingerprint;
    model.num_tokens = share.total_tokens;
    model.vocabulary = corpus.vocabulary;
    model.groups = corpus.groups;
    for (const auto& doc : share.all_documents) {
      model.document_ids.push_back(doc.id);
      model.document_groups.push_back(doc.group);
      model.document_roles.push_back(doc.role);
    }
  }
  for (const auto& chain : chains) {
    model.chains.push_back(finish_chain(corpus, chain));
    // theta of every document, in corpus order: the shares are consecutive ranges in rank order.
    if (processes != nullptr) model.chains.back().theta = processes->gather_to_root(model.chains.back().theta);
  }
  model.rhat = traces_rhat(chains, options.burn_in);
  model.timing.seconds = earlier_seconds + seconds_since(start);
  model.timing.tokens_per_second = sampling_seconds > 0 ? static_cast<double>(token_updates) / sampling_seconds : 0;
  return model;
}

}  // namespace

Model fit_model(const Corpus& corpus, const FitOptions& options, const FitControl& control) {
  return fit_chains(corpus, options, control, nullptr);
}

Model fit_model_shared(const CorpusShare& share, ProcessGroup& processes, const FitOptions& options,
                       const FitControl& control) {
  if (processes.rank() == 0 && share.all_documents.size() != share.total_documents) {
    throw Error("fit_model_shared: rank 0 needs the share read with whole_corpus (read_corpus_share)");
  }
  const Sharing sharing{&processes, &share};
  return fit_chains(share.corpus, options, control, &sharing);
}

}  // namespace loupe

// Fitting: R chains of the sampler in lockstep, sweep by sweep ("sample
// shards, then merge counts"), with the log-likelihood trace, prior tuning,
// retained samples for theta and phi, checkpoints and resumption, and R-hat.
// The same corpus, options, seed and thread count give a bit-identical Model.
// Threads go to chains first: with at least as many chains as threads each
// chain is one shard (exact sequential Gibbs) and the thread count does not
// change the result; with fewer, each chain is split into threads / chains shards.
#pragma once

#include <atomic>
#include <cstdint>
#include <functional>
#include <string>

#include "common/error.h"
#include "common/process_group.h"
#include "corpus/corpus.h"
#include "corpus/corpus_file.h"
#include "model/count_merge.h"
#include "model/lda_options.h"
#include "model/model.h"
#include "model/sampler_state.h"

namespace loupe {

struct FitProgress {
  std::uint32_t sweep = 0;       // sweeps done by every chain
  std::uint32_t sweeps = 0;      // of this many
  double tokens_per_second = 0;  // token updates per second in the last sweep, all chains
  double log_likelihood = 0;     // latest trace value, mean over chains (NaN before the first)
  double elapsed_seconds = 0;
  double remaining_seconds = 0;     // estimate
  bool checkpoint_written = false;  // a checkpoint was written after this sweep
};

struct FitControl {
  std::function<void(const FitProgress&)> on_progress;  // after every sweep (from the fitting thread)
  const std::atomic<bool>* stop_requested = nullptr;    // set it (e.g. on Ctrl-C) to stop after the current sweep
  std::string resume_from;                              // a checkpoint file to continue from
  // Called after every sweep of every chain with its state (chain order): for tests.
  std::function<void(std::uint32_t chain, std::uint32_t sweep, const SamplerState& state)> after_sweep;
  CountMerger* merger = nullptr;  // null: LocalCountMerger
};

// Thrown when stop_requested ends a fit early; the message says where the last
// checkpoint is and how to resume.
class FitInterrupted : public Error {
 public:
  using Error::Error;
};

// Validates the options for the corpus (loupe::Error), fits and returns the model.
Model fit_model(const Corpus& corpus, const FitOptions& options, const FitControl& control = {});

// The same fit spread over processes (MPI ranks under mpirun; lib/distributed),
// every process calling it with its own share of the documents (read_corpus_share):
// each samples its share with its own threads, and after every sweep the
// topic-word counts are summed across the processes (SharedCountMerger;
// approximate distributed Gibbs, Newman et al. 2009). Document d keeps its random
// stream wherever it is sampled, so one process with the exact kernel gives the
// single-process model (Metropolis-Hastings pools are refilled in another order).
// The model is complete on rank 0, whose share must be read with whole_corpus:
// theta of every document in corpus order, phi, the whole corpus's fingerprint,
// the same file a single process writes. Elsewhere it holds priors, topic shares
// and traces only. Checkpoints and --resume are refused (loupe::Error).
Model fit_model_shared(const CorpusShare& share, ProcessGroup& processes, const FitOptions& options,
                       const FitControl& control = {});

// Memory a fit holds (sampler state and estimates), for reports.
struct FitMemory {
  double token_state_bytes_per_token = 0;  // word id + topic + pool entry, all chains
  std::uint64_t count_table_bytes = 0;     // V x K counts and K totals, all chains
  std::uint64_t workspace_bytes = 0;       // each worker's private copy of the counts
  std::uint64_t estimate_bytes = 0;        // running sums of theta and phi, all chains
  std::uint64_t total_bytes = 0;
};
FitMemory estimate_fit_memory(const Corpus& corpus, const FitOptions& options);

// The seed of chain `chain` (0-based) under master seed `seed`.
std::uint64_t chain_seed(std::uint64_t seed, std::uint32_t chain);

}  // namespace loupe

// Checkpoints (`loupe fit --checkpoint-every N`): everything a fit needs to go
// on after sweep S exactly as if it had never stopped: each chain's topics,
// priors, trace and running sums of the estimates. The counts are not stored;
// they are recounted from the topics. Binary, versioned, checksummed, atomic.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "model/lda_options.h"
#include "model/model.h"
#include "model/sampler_state.h"

namespace loupe {

inline constexpr std::uint32_t kCheckpointFormatVersion = 1;

// The running sums behind one chain's estimates.
//   theta_sum[d K + k] = sum over samples s of n_dk / (N_d + A_s)
//   phi_sum[w K + k]   = sum over samples s of (n_wk + b_s) / (n_k + V b_s)   (word-major)
//   share_sum[k]       = sum over samples s of n_k / N
//   sample_alpha       = alpha at each sample, samples_taken x K
struct ChainSums {
  std::vector<TracePoint> trace;
  std::uint32_t samples_taken = 0;
  std::vector<float> theta_sum;
  std::vector<float> phi_sum;
  std::vector<double> share_sum;
  std::vector<double> sample_alpha;
  std::vector<double> sample_beta;
};

struct ChainProgress {
  std::uint64_t seed = 0;
  SamplerState state;  // topics, alpha, beta; counts are rebuilt after reading
  ChainSums sums;
};

struct FitCheckpoint {
  FitOptions options;
  std::uint64_t corpus_fingerprint = 0;
  std::uint32_t sweeps_done = 0;
  double seconds = 0;  // fitting time spent before the checkpoint
  std::vector<ChainProgress> chains;
};

void write_checkpoint(const std::string& path, const FitOptions& options, std::uint64_t corpus_fingerprint,
                      std::uint32_t sweeps_done, double seconds, const std::vector<ChainProgress>& chains);

// Throws loupe::Error naming the file when it is missing, damaged or inconsistent.
FitCheckpoint read_checkpoint(const std::string& path);

// "" when a fit with `requested` may resume a checkpoint written with
// `stored`; otherwise the first option that differs, as "--sweeps: the
// checkpoint has 1000, this run asks for 2000". Threads and checkpoint
// settings may differ: they do not change the result.
std::string checkpoint_option_mismatch(const FitOptions& stored, const FitOptions& requested);

}  // namespace loupe

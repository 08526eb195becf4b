// The settings of one LDA fit (`loupe fit`): number of topics, sweeps, chains,
// threads, seed, priors and their tuning, estimates and checkpoints.
// validate_fit_options() turns every impossible setting into a loupe::Error.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

// Topics are stored as 16-bit indices, so K is at most this.
inline constexpr std::uint32_t kMaxTopics = 65535;

// Which sampling kernel (model/gibbs_sampler.h): automatic picks by K.
enum class SamplerKind : std::uint8_t { automatic = 0, exact = 1, metropolis_hastings = 2 };

struct FitOptions {
  std::uint32_t topic_count = 20;  // K
  std::uint32_t sweeps = 1000;     // Gibbs sweeps per chain, initialisation not counted
  std::uint32_t burn_in = 200;     // sweeps discarded before samples, tuning and R-hat
  std::uint32_t chains = 1;        // R independent chains
  std::uint32_t threads = 1;       // worker threads (changes speed, never the result)
  std::uint64_t seed = 1;          // master seed; chain seeds derive from it

  // Document-topic prior. Empty: symmetric 50/K (Griffiths & Steyvers 2004);
  // one value: symmetric, that value per topic; K values: asymmetric.
  std::vector<double> alpha;
  double beta = 0.01;                   // symmetric topic-word prior
  std::uint32_t tune_priors_every = 0;  // 0: fixed; N: Minka fixed point every N sweeps after burn-in
  bool asymmetric_alpha = false;        // tuning learns one alpha per topic

  // theta and phi average `samples` states taken every `sample_lag` sweeps,
  // the last at the final sweep: sweeps = 1000, samples = 10, lag = 10 keeps
  // sweeps 910, 920, ..., 1000.
  std::uint32_t samples = 10;
  std::uint32_t sample_lag = 10;
  std::uint32_t log_likelihood_every = 10;  // trace log p(w, z) every N sweeps (and the last)
  SamplerKind sampler = SamplerKind::automatic;
  std::uint32_t mh_steps = 2;  // Metropolis-Hastings cycles (document + word proposal) per token

  std::uint32_t checkpoint_every = 0;  // 0: none; N: write the state every N sweeps
  std::string checkpoint_path;         // where checkpoints go (required with checkpoint_every)
};

// Throws loupe::Error naming the option and what to do when an option is
// impossible on its own or for this corpus (K < 2, K above the token count, no
// sweeps, non-positive priors, an empty corpus, ...).
void validate_fit_options(const FitOptions& options, const Corpus& corpus);
// The same for a corpus of `documents` documents and `tokens` tokens (one that
// several processes share, none holding all of it).
void validate_fit_options(const FitOptions& options, std::size_t documents, std::uint64_t tokens);

// The starting alpha vector (K values) that the options describe.
std::vector<double> initial_alpha(const FitOptions& options);

// True when alpha has one value per topic: given as K values, or learned per topic.
bool alpha_is_asymmetric(const FitOptions& options);

// Sweep numbers (1-based) whose states are averaged into theta and phi, ascending.
std::vector<std::uint32_t> retained_sweeps(const FitOptions& options);

}  // namespace loupe

namespace loupe {
class BinaryWriter;
class BinaryReader;
// Field by field into model and checkpoint files (their versions cover the layout).
void write_fit_options(BinaryWriter& out, const FitOptions& options);
FitOptions read_fit_options(BinaryReader& in);
}  // namespace loupe

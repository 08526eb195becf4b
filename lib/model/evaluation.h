// How good and how converged a fit is: the joint log-likelihood log p(w, z)
// (Griffiths & Steyvers 2004), Gelman-Rubin R-hat across chains (Gelman &
// Rubin 1992), and document-completion perplexity on held-out documents
// (Wallach et al. 2009, "Evaluation methods for topic models").
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "corpus/corpus.h"
#include "model/fold_in.h"
#include "model/parallel_runner.h"
#include "model/sampler_state.h"

namespace loupe {

// log p(w, z) = log p(w | z) + log p(z) for the collapsed model:
//   log p(w|z) = sum_k [lgamma(V b) - lgamma(n_k + V b) + sum_w (lgamma(n_wk + b) - lgamma(b))]
//   log p(z)   = sum_d [lgamma(A) - lgamma(N_d + A) + sum_k (lgamma(n_dk + a_k) - lgamma(a_k))]
// Summed in a fixed order: the value does not depend on the thread count.
double log_joint_likelihood(const Corpus& corpus, const SamplerState& state, const ParallelRunner& runner);

// Its two parts, for a fit spread over processes: log p(z) over the documents of
// `corpus` (one share: sum it across the processes) and log p(w | z), which reads
// only the counts (the whole corpus's after a SharedCountMerger merge).
double log_topic_assignment_likelihood(const Corpus& corpus, const SamplerState& state, const ParallelRunner& runner);
double log_word_likelihood(const SamplerState& state, const ParallelRunner& runner);

// Potential scale reduction of R chains' traces (each n values, n >= 2, R >= 2):
//   W = mean within-chain variance, B = n * variance of the chain means,
//   R-hat = sqrt(((n - 1)/n W + B/n) / W).
// NaN when it cannot be computed (fewer than 2 chains or 2 values, W = 0).
double gelman_rubin_rhat(const std::vector<std::vector<double>>& traces);

struct HeldOutScore {
  double log_likelihood = 0;  // sum over held-out halves of log p(w | theta_hat, phi)
  std::uint64_t tokens = 0;   // tokens scored
  std::size_t documents = 0;  // documents scored (those with at least 2 tokens)
  double perplexity = 0;      // exp(-log_likelihood / tokens)
};

// Document completion (Wallach et al. 2009): each document's first half
// (floor(N/2) tokens) gives theta_hat by Gibbs fold-in with phi fixed; its second
// half is scored by sum_i log sum_k theta_hat_k phi_k,w_i. Deterministic for a seed.
HeldOutScore document_completion_perplexity(const TopicWordTable& phi, std::span<const double> alpha,
                                            const Corpus& corpus, std::span<const std::size_t> documents,
                                            const FoldInOptions& options, const ParallelRunner& runner);

// All documents of the corpus.
HeldOutScore document_completion_perplexity(const TopicWordTable& phi, std::span<const double> alpha,
                                            const Corpus& corpus, const FoldInOptions& options,
                                            const ParallelRunner& runner);

}  // namespace loupe

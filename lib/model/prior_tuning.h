// Learning the Dirichlet priors from the sampler's counts: Minka's fixed-point
// iteration (Minka 2000, "Estimating a Dirichlet distribution") in the
// histogram form of Wallach (2008, PhD thesis) as used in Wallach, Mimno &
// McCallum (2009), "Rethinking LDA: why priors matter".
#pragma once

#include <cstdint>
#include <span>
#include <utility>
#include <vector>

#include "corpus/corpus.h"
#include "model/sampler_state.h"

namespace loupe {

// How many cells hold each positive count, sorted by count. Example: counts
// (3, 0, 1, 3) -> {(1, 1), (3, 2)}. Zero counts add nothing to the fixed point.
using CountHistogram = std::vector<std::pair<std::uint32_t, std::uint64_t>>;
CountHistogram make_histogram(std::span<const std::uint32_t> values);

// psi(n + a) - psi(a) = sum_{f=0}^{n-1} 1 / (f + a), for a > 0.
double digamma_difference(std::uint32_t n, double a);
double digamma(double x);

// One prior per topic k over documents:
//   a_k <- a_k sum_n C_k(n) [psi(n + a_k) - psi(a_k)] / sum_n L(n) [psi(n + A) - psi(A)]
// with C_k the histogram of n_dk over documents, L that of document lengths, A = sum_k a_k.
std::vector<double> fit_asymmetric_dirichlet(const std::vector<CountHistogram>& per_component,
                                             const CountHistogram& totals, std::vector<double> start);

// One value a shared by `dimension` components:
//   a <- a sum_n C(n) [psi(n + a) - psi(a)] / (dimension sum_n L(n) [psi(n + dimension a) - psi(dimension a)])
double fit_symmetric_dirichlet(const CountHistogram& cells, const CountHistogram& totals, std::uint32_t dimension,
                               double start);

// Re-estimates state.alpha (per topic when `asymmetric_alpha`, else one shared
// value) and state.beta from the state's document-topic and topic-word counts.
void tune_priors(const Corpus& corpus, SamplerState& state, bool asymmetric_alpha);

// The document side of that estimate, in two steps for a fit spread over processes:
// each process makes the histograms of its share of the documents, the shares are
// added (add_histograms), and every process tunes from the sums.
struct DocumentCountHistograms {
  std::vector<CountHistogram> topic_counts;  // of n_dk: one per topic (asymmetric) or one pooled
  CountHistogram lengths;                    // of document lengths N_d
};
DocumentCountHistograms document_count_histograms(const Corpus& corpus, const SamplerState& state,
                                                  bool asymmetric_alpha);
// Example: {(1, 2), (3, 1)} + {(1, 1), (2, 4)} -> {(1, 3), (2, 4), (3, 1)}.
CountHistogram add_histograms(const CountHistogram& a, const CountHistogram& b);
// alpha from the histograms (those of every document), beta from state.counts.
void tune_priors(const DocumentCountHistograms& documents, SamplerState& state, bool asymmetric_alpha);

}  // namespace loupe

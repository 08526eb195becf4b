// Fold-in: topic proportions theta for new or held-out documents with the
// topics phi held fixed. Gibbs sampling of the new tokens' topics with
//   p(z_i = k) ~ (n_dk without i + alpha_k) phi_k,w_i
// and theta averaged over the samples after a burn-in. Used for disputed
// texts, segments and held-out evaluation.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "corpus/corpus.h"
#include "model/model.h"
#include "model/parallel_runner.h"

namespace loupe {

// phi copied word-major (V x K, float) so one token reads K contiguous values.
class TopicWordTable {
 public:
  TopicWordTable(std::span<const float> phi_topic_major, std::uint32_t topic_count, std::uint32_t vocabulary_size);
  TopicWordTable(std::span<const double> phi_topic_major, std::uint32_t topic_count, std::uint32_t vocabulary_size);
  std::uint32_t topic_count() const { return topic_count_; }
  std::uint32_t vocabulary_size() const { return vocabulary_size_; }
  const float* word(WordId w) const { return values_.data() + static_cast<std::size_t>(w) * topic_count_; }

 private:
  std::uint32_t topic_count_;
  std::uint32_t vocabulary_size_;
  std::vector<float> values_;
};

struct FoldInOptions {
  std::uint32_t sweeps = 60;   // Gibbs sweeps over the new document
  std::uint32_t burn_in = 20;  // sweeps before samples are averaged (one sample a sweep after)
  std::uint64_t seed = 1;
};

// theta (K values, summing to 1) for one bag of words; `document_seed` picks
// the random stream. An empty document gets alpha normalised.
std::vector<double> fold_in_document(const TopicWordTable& phi, std::span<const double> alpha,
                                     std::span<const WordId> words, const FoldInOptions& options,
                                     std::uint64_t document_seed);

// theta for documents `documents` of `corpus` (its word ids index phi's
// vocabulary), row i for documents[i]; document d uses derive_seed(seed, {d}).
std::vector<double> fold_in_documents(const TopicWordTable& phi, std::span<const double> alpha, const Corpus& corpus,
                                      std::span<const std::size_t> documents, const FoldInOptions& options,
                                      const ParallelRunner& runner);

// theta under chain `chain` of `model` (its phi and final alpha) for documents
// of any corpus: words are matched to the model's vocabulary by their text,
// and words the model does not know are left out. Row i is documents[i].
// Example: a disputed letter ingested later, scored against a fitted model.
std::vector<double> fold_in_with_model(const Model& model, std::size_t chain, const Corpus& corpus,
                                       std::span<const std::size_t> documents, const FoldInOptions& options,
                                       const ParallelRunner& runner);

}  // namespace loupe

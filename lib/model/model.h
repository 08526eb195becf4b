// A fitted LDA model: the options, the corpus it was fitted on (fingerprint,
// vocabulary, document ids and groups) and, per chain, the estimates phi and
// theta (float32 to keep files compact), the priors and the log-likelihood trace.
// `loupe topics` and `loupe export` need nothing but this.
#pragma once

#include <cstdint>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include "corpus/corpus.h"
#include "model/lda_options.h"

namespace loupe {

struct TracePoint {
  std::uint32_t sweep = 0;
  double log_likelihood = 0;  // log p(w, z) after that sweep
};

struct ChainEstimates {
  std::uint64_t seed = 0;
  std::vector<double> alpha;  // K, at the end (tuned or as given)
  double beta = 0;
  std::vector<float> phi;           // K x V: row k is p(word | topic k), averaged over the samples
  std::vector<float> theta;         // D x K: row d is p(topic | document d), averaged over the samples
  std::vector<double> topic_share;  // K: share of all tokens assigned to each topic (sums to 1)
  std::vector<TracePoint> trace;
};

struct Model {
  FitOptions options;  // as fitted (alpha holds the starting values)
  std::uint64_t corpus_fingerprint = 0;
  std::uint64_t num_tokens = 0;
  std::vector<std::string> vocabulary;
  std::vector<std::string> groups;
  std::vector<std::string> document_ids;
  std::vector<std::uint32_t> document_groups;  // index into groups, kNoGroup when none
  std::vector<DocumentRole> document_roles;
  std::vector<ChainEstimates> chains;
  double rhat = 0;  // Gelman-Rubin of the traces after burn-in; NaN for one chain
  // How long the fit took. Not stored in the model file, so that the same
  // corpus, options and seed give byte-identical files.
  struct Timing {
    double seconds = 0;            // wall time of the fit (all sessions when resumed)
    double tokens_per_second = 0;  // token updates per second over the sweeps of this session
  } timing;

  std::uint32_t topic_count() const { return options.topic_count; }
  std::size_t vocabulary_size() const { return vocabulary.size(); }
  std::size_t num_documents() const { return document_ids.size(); }
  std::span<const float> phi(std::size_t chain, std::size_t topic) const;
  std::span<const float> theta(std::size_t chain, std::size_t document) const;
  // The n most probable words of a topic, most probable first (ties by word id).
  std::vector<std::pair<WordId, float>> top_words(std::size_t chain, std::size_t topic, std::size_t n) const;
  // The group name of a document, "" when it has none.
  const std::string& group_name(std::size_t document) const;
};

// Copies what the model keeps from the corpus (fingerprint, vocabulary, ids, groups, roles).
void record_corpus(Model& model, const Corpus& corpus);

}  // namespace loupe

// Topic coherence from document co-occurrence: how often a topic's top words
// appear in the same documents of the corpus. NPMI (Bouma 2009; Lau, Newman &
// Baldwin 2014) and the UMass score (Mimno et al. 2011), both as means over word pairs.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

// Document counts for a chosen set of words: D(w), the documents containing w;
// D(w_i, w_j), the documents containing both; and N, the number of documents.
// The segments of one source document (same parent_id) count as one document;
// every other document, empty ones included, counts as one. Built in one pass
// over the tokens; memory is one int per vocabulary word plus an m x m table
// for m words of interest.
// Example: documents {apple banana}, {apple banana cherry}, {apple}, {cherry date},
// {banana} and words {apple, banana, cherry}: N = 5, D(apple) = 3,
// D(banana) = 3, D(cherry) = 2, D(apple, banana) = 2, D(apple, cherry) = 1.
class DocumentCooccurrence {
 public:
  // Throws loupe::Error for a word id outside the vocabulary. Repeated ids are fine.
  DocumentCooccurrence(const Corpus& corpus, std::span<const WordId> words);

  // N: documents, after joining segments by parent_id.
  std::uint64_t num_documents() const { return num_documents_; }
  // Whether w was among the words of interest.
  bool tracks(WordId w) const;
  // D(w) and D(a, b) (D(w, w) = D(w)); throw loupe::Error for a word not of interest.
  std::uint64_t document_count(WordId w) const;
  std::uint64_t pair_count(WordId a, WordId b) const;

 private:
  std::size_t slot(WordId w) const;

  std::vector<std::int32_t> index_;   // word id -> slot among the words of interest, -1 if none
  std::size_t m_ = 0;                 // number of distinct words of interest
  std::vector<std::uint64_t> pairs_;  // m x m, symmetric; the diagonal holds D(w)
  std::uint64_t num_documents_ = 0;
};

// Mean over all pairs i < j of NPMI(w_i, w_j) = log(P(w_i, w_j) / (P(w_i) P(w_j))) / -log P(w_i, w_j),
// with P = document counts / N. In [-1, 1]. Conventions: a pair that never
// co-occurs scores -1 (the limit as P(w_i, w_j) -> 0); a pair present in every
// document (P(w_i, w_j) = 1, where the formula is 0/0) scores 1.
// Example (the documents above): NPMI(apple, banana) = log((2/5) / (3/5 * 3/5)) / log(5/2) = 0.115,
// NPMI(apple, cherry) = NPMI(banana, cherry) = log(5/6) / log 5 = -0.113; the mean is -0.037.
// Throws loupe::Error with fewer than two words or a word not counted in the table.
double npmi_coherence(const DocumentCooccurrence& counts, std::span<const WordId> top_words);

// UMass coherence (Mimno et al. 2011) with top_words ordered most probable first:
// the MEAN over the M(M-1)/2 pairs m = 2..M, l = 1..m-1 of log((D(w_m, w_l) + 1) / D(w_l)),
// not the published sum, so that values compare across different M. At most log 2 > 0
// (only when every document holding w_l also holds w_m and D(w_l) = 1); usually negative.
// Example (the documents above, order apple, banana, cherry): the pairs give
// log(3/3), log(2/3), log(2/3); the mean is 2 log(2/3) / 3 = -0.270.
// Throws loupe::Error when D(w_l) = 0 for some l < M (a word absent from every
// document; cannot happen for the words of the corpus the model was fitted on),
// with fewer than two words, or a word not counted in the table.
double umass_coherence(const DocumentCooccurrence& counts, std::span<const WordId> top_words);

// Both scores for every topic and their means over topics (NaN with no topics).
struct TopicCoherence {
  std::vector<double> npmi, umass;  // one per topic, in input order
  double mean_npmi = 0, mean_umass = 0;
};

// Counts co-occurrence once over the union of all topics' words, then scores each topic.
// Example: topics {{apple, banana, cherry}, {apple, date}} on the documents above give
// npmi = {-0.037, -1}, umass = {-0.270, log(1/3) = -1.099}.
TopicCoherence topic_coherence(const Corpus& corpus, const std::vector<std::vector<WordId>>& top_words_per_topic);

}  // namespace loupe

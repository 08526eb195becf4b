// Corpora drawn from the LDA generative process (JMLR, 2003) with known topics:
// for simulation studies, the reference checks in tests/model and benchmarks.
// phi_k ~ Dirichlet(topic_word_prior), theta_d ~ Dirichlet(alpha), then each
// token draws z ~ theta_d and w ~ phi_z. The same spec and seed give the same corpus.
#pragma once

#include <cstdint>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

struct SyntheticCorpusSpec {
  std::uint32_t topic_count = 10;
  std::uint32_t vocabulary_size = 1000;
  std::uint32_t num_documents = 1000;
  std::uint32_t document_length = 100;  // mean length
  bool vary_length = false;             // lengths ~ round(Normal(mean, sqrt(mean))), at least 1
  double alpha = 0.1;                   // symmetric doc-topic prior used to draw theta
  // phi_k ~ Dirichlet(topic_word_prior * V * base_w), base = word_base
  // normalised (uniform when empty). Ignored when `topics` is given.
  double topic_word_prior = 0.05;
  std::vector<double> word_base;
  std::vector<double> topics;    // K x V fixed topics (rows sum to 1), optional
  std::uint32_t num_groups = 2;  // documents take groups round-robin ("group-1", ...)
  std::uint64_t seed = 1;
};

struct SyntheticCorpus {
  Corpus corpus;
  std::vector<double> phi;    // K x V, topic-major
  std::vector<double> theta;  // D x K
};

SyntheticCorpus draw_lda_corpus(const SyntheticCorpusSpec& spec);

// The "bars" topics of Griffiths & Steyvers (2004, PNAS): side x side words on a
// grid, 2 * side topics, each uniform over one row or one column. Topic r < side
// is row r; topic side + c is column c. Word id = row * side + column.
std::vector<double> bars_topics(std::uint32_t side);

// Zipf weights 1 / (rank + 1)^exponent for `size` words, a realistic word_base.
std::vector<double> zipf_weights(std::uint32_t size, double exponent);

// The documents [first, end) of `corpus` as a new corpus with the same
// vocabulary and groups (word frequencies recounted): train / held-out splits.
Corpus corpus_subset(const Corpus& corpus, std::size_t first, std::size_t end);

}  // namespace loupe

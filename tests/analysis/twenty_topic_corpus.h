// The drawn corpus with 20 known topics that the topic alignment and K sweep reference
// checks share: 1000 documents of 200 tokens over 600 words, from the LDA generative process.
#pragma once

#include "model/synthetic_corpus.h"

namespace loupe::testing {

inline SyntheticCorpus twenty_topic_corpus() {
  SyntheticCorpusSpec spec;
  spec.topic_count = 20;
  spec.vocabulary_size = 600;
  spec.num_documents = 1000;
  spec.document_length = 200;
  spec.alpha = 0.1;
  spec.topic_word_prior = 0.05;
  spec.seed = 20;
  return draw_lda_corpus(spec);
}

}  // namespace loupe::testing

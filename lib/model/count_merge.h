// "Sample shards, then merge counts": after every document shard has sampled
// against the counts of the previous sweep, a CountMerger rebuilds those counts
// from the new topics. LocalCountMerger does it within one process. A
// distributed merger (MPI) would count its own tokens, sum the tables across
// processes (all-reduce) and refill the pools from the rows; the sampler only
// reads TopicWordCounts and stays as it is.
#pragma once

#include <span>

#include "corpus/corpus.h"
#include "model/parallel_runner.h"
#include "model/sampler_state.h"

namespace loupe {

class CountMerger {
 public:
  virtual ~CountMerger() = default;
  // Overwrites word_topic, topic_total and word_pool of `counts` (sized by
  // TopicWordCounts::reset) from the topic of every token of `corpus`.
  virtual void merge(const Corpus& corpus, std::span<const Topic> topics, TopicWordCounts& counts,
                     const ParallelRunner& runner) = 0;
};

// One process: each task owns a range of words (balanced by tokens), scans the
// tokens and counts those of its words, so no two tasks write the same row.
// The pool of a word lists its tokens' topics in corpus order.
class LocalCountMerger final : public CountMerger {
 public:
  void merge(const Corpus& corpus, std::span<const Topic> topics, TopicWordCounts& counts,
             const ParallelRunner& runner) override;
};

}  // namespace loupe

// "Sample shards, then merge counts": after every document shard has sampled
// against the counts of the previous sweep, a CountMerger rebuilds those counts
// from the new topics. LocalCountMerger does it within one process.
// SharedCountMerger does it across processes that each hold a share of the
// documents (MPI under `mpirun`): each counts its own tokens, the tables are
// summed across processes (all-reduce) and the pools refilled from the rows; the
// sampler only reads TopicWordCounts and stays as it is.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "common/process_group.h"
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

// Processes that each hold a share of the documents (approximate distributed
// Gibbs, Newman et al. 2009): each counts the tokens of its share by word ranges
// as LocalCountMerger does, then the V x K table and the K totals are summed across
// the processes (all-reduce), so every process ends with the counts of the whole
// corpus. word_offsets become the whole corpus's; with `fill_pools` (the
// Metropolis-Hastings kernel reads pools, the exact kernel does not) each word's
// pool is refilled from its summed row, topic by topic: word 3 with row (1, 0, 2)
// gets the pool [0, 2, 2]. A uniform draw from it is a draw from the row, as before.
class SharedCountMerger final : public CountMerger {
 public:
  SharedCountMerger(ProcessGroup& processes, bool fill_pools) : processes_(processes), fill_pools_(fill_pools) {}
  void merge(const Corpus& corpus, std::span<const Topic> topics, TopicWordCounts& counts,
             const ParallelRunner& runner) override;
  // Bytes of counts each process contributes to one merge's sums (V x K + K values of 4 bytes).
  static std::uint64_t bytes_summed(std::uint32_t vocabulary_size, std::uint32_t topic_count);

 private:
  ProcessGroup& processes_;
  bool fill_pools_;
  const Corpus* counted_ = nullptr;            // the share the offsets below were counted for
  std::vector<std::uint64_t> local_offsets_;   // V + 1: this process's tokens per word, cumulative
  std::vector<std::uint64_t> global_offsets_;  // V + 1: every process's
};

}  // namespace loupe

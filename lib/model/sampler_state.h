// The state of one Gibbs chain: one topic per token (flat, 16-bit) and the
// topic-word counts that every document shard samples against during a sweep.
// Doc-topic counts are never stored: a document's counts are rebuilt from its
// tokens' topics when the sampler visits it.
#pragma once

#include <cstdint>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

using Topic = std::uint16_t;

// Read-only during a sweep; rebuilt from the topics by a CountMerger after it.
//   word_topic[w * K + k] = tokens of word w assigned topic k
//   topic_total[k]        = tokens assigned topic k
//   word_pool[word_offsets[w] .. word_offsets[w+1]) lists the topics of word w's
//   tokens, so a uniform draw from it is a draw from word_topic row w. Example:
//   word 3 has tokens with topics {2, 0, 2}: row 3 is (1, 0, 2), its pool [0, 2, 2].
struct TopicWordCounts {
  std::uint32_t topic_count = 0;
  std::uint32_t vocabulary_size = 0;
  std::vector<std::uint32_t> word_topic;
  std::vector<std::uint32_t> topic_total;
  std::vector<std::uint64_t> word_offsets;  // V + 1: cumulative token count per word
  std::vector<Topic> word_pool;

  // Sizes every table for K topics and the words of `corpus` (counts zero).
  void reset(const Corpus& corpus, std::uint32_t topics);
  std::uint32_t word_count(WordId w) const { return static_cast<std::uint32_t>(word_offsets[w + 1] - word_offsets[w]); }
  std::size_t bytes() const;
};

// One chain: the topic of every token (corpus order), its counts and priors.
struct SamplerState {
  std::vector<Topic> topics;
  TopicWordCounts counts;
  std::vector<double> alpha;  // K values
  double beta = 0.01;

  double alpha_sum() const;
  // Memory held per token by the token state (topic + pool entry), without the
  // corpus's own word ids (4 bytes) and without the K-sized tables.
  static constexpr std::size_t kBytesPerToken = 2 * sizeof(Topic);
};

// Throws std::logic_error when the counts disagree with the topics: every
// topic in range, each row and total recounted, pools matching rows. Used by
// the invariant test after every sweep; O(tokens + V K).
void check_sampler_invariants(const Corpus& corpus, const SamplerState& state);

}  // namespace loupe

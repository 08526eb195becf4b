#include "model/sampler_state.h"

#include <numeric>
#include <stdexcept>
#include <string>

namespace loupe {

void TopicWordCounts::reset(const Corpus& corpus, std::uint32_t topics) {
  topic_count = topics;
  vocabulary_size = static_cast<std::uint32_t>(corpus.vocabulary_size());
  word_topic.assign(static_cast<std::size_t>(vocabulary_size) * topics, 0);
  topic_total.assign(topics, 0);
  // Offsets from the tokens themselves, so they hold even where the corpus's
  // word_frequency table was filled by hand.
  word_offsets.assign(vocabulary_size + 1, 0);
  for (const auto w : corpus.tokens) ++word_offsets[w + 1];
  for (std::size_t w = 0; w < vocabulary_size; ++w) word_offsets[w + 1] += word_offsets[w];
  word_pool.assign(corpus.num_tokens(), 0);
}

std::size_t TopicWordCounts::bytes() const {
  return word_topic.size() * sizeof(word_topic[0]) + topic_total.size() * sizeof(topic_total[0]) +
         word_offsets.size() * sizeof(word_offsets[0]) + word_pool.size() * sizeof(word_pool[0]);
}

double SamplerState::alpha_sum() const { return std::accumulate(alpha.begin(), alpha.end(), 0.0); }

void check_sampler_invariants(const Corpus& corpus, const SamplerState& state) {
  const auto& c = state.counts;
  const std::size_t k = c.topic_count;
  auto fail = [](const std::string& what) { throw std::logic_error("sampler invariant broken: " + what); };
  if (state.topics.size() != corpus.num_tokens()) fail("one topic per token");
  if (c.word_topic.size() != k * c.vocabulary_size || c.topic_total.size() != k) fail("table sizes");
  std::vector<std::uint32_t> row_count(c.word_topic.size(), 0);
  std::vector<std::uint64_t> total(k, 0);
  for (std::size_t i = 0; i < state.topics.size(); ++i) {
    const auto z = state.topics[i];
    if (z >= k) fail("token " + std::to_string(i) + " has topic " + std::to_string(z) + " >= K");
    ++row_count[static_cast<std::size_t>(corpus.tokens[i]) * k + z];
    ++total[z];
  }
  if (row_count != c.word_topic) fail("word-topic counts differ from a recount of the topics");
  std::uint64_t sum = 0;
  for (std::size_t t = 0; t < k; ++t) {
    if (total[t] != c.topic_total[t]) fail("topic total " + std::to_string(t) + " differs from a recount");
    sum += c.topic_total[t];
  }
  if (sum != corpus.num_tokens()) fail("topic totals do not sum to the number of tokens");
  if (c.word_offsets.back() != corpus.num_tokens()) fail("word offsets do not cover the tokens");
  for (std::size_t w = 0; w < c.vocabulary_size; ++w) {
    std::vector<std::uint32_t> pool_row(k, 0);
    for (auto j = c.word_offsets[w]; j < c.word_offsets[w + 1]; ++j) ++pool_row[c.word_pool[j]];
    std::uint64_t row_sum = 0;
    for (std::size_t t = 0; t < k; ++t) {
      if (pool_row[t] != c.word_topic[w * k + t])
        fail("the pool of word " + std::to_string(w) + " differs from its row");
      row_sum += c.word_topic[w * k + t];
    }
    if (row_sum != c.word_count(static_cast<WordId>(w)))
      fail("row " + std::to_string(w) + " does not sum to the word's tokens");
  }
}

}  // namespace loupe

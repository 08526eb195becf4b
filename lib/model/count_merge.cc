#include "model/count_merge.h"

#include <algorithm>
#include <vector>

namespace loupe {

namespace {

// Word ranges [bounds[p], bounds[p+1]) holding about equal numbers of tokens.
std::vector<std::uint32_t> balanced_word_ranges(const std::vector<std::uint64_t>& word_offsets, std::size_t parts) {
  const auto v = static_cast<std::uint32_t>(word_offsets.size() - 1);
  const std::uint64_t n = word_offsets.back();
  std::vector<std::uint32_t> bounds{0};
  std::uint32_t w = 0;
  for (std::size_t p = 1; p < parts; ++p) {
    const std::uint64_t target = n * p / parts;
    while (w < v && word_offsets[w] < target) ++w;
    bounds.push_back(std::max(w, bounds.back()));
  }
  bounds.push_back(v);
  return bounds;
}

}  // namespace

void LocalCountMerger::merge(const Corpus& corpus, std::span<const Topic> topics, TopicWordCounts& counts,
                             const ParallelRunner& runner) {
  const std::size_t k = counts.topic_count;
  const std::size_t parts = std::max<std::size_t>(1, std::min<std::size_t>(runner.threads(), counts.vocabulary_size));
  const auto bounds = balanced_word_ranges(counts.word_offsets, parts);
  std::vector<std::vector<std::uint64_t>> partial_totals(parts, std::vector<std::uint64_t>(k, 0));
  const WordId* words = corpus.tokens.data();
  const Topic* z = topics.data();
  const std::size_t n = topics.size();

  runner.run(parts, [&](std::size_t part) {
    const std::uint32_t first = bounds[part];
    const std::uint32_t end = bounds[part + 1];
    if (first == end) return;
    std::uint32_t* rows = counts.word_topic.data();
    std::fill(rows + first * k, rows + end * k, 0U);
    // Write cursors into the pool, one per word of this range.
    std::vector<std::uint64_t> cursor(counts.word_offsets.begin() + first, counts.word_offsets.begin() + end);
    Topic* pool = counts.word_pool.data();
    auto& totals = partial_totals[part];
    if (parts == 1) {
      for (std::size_t i = 0; i < n; ++i) {
        const WordId w = words[i];
        const Topic t = z[i];
        ++rows[w * k + t];
        pool[cursor[w]++] = t;
        ++totals[t];
      }
    } else {
      const std::uint32_t span = end - first;
      for (std::size_t i = 0; i < n; ++i) {
        const WordId w = words[i];
        if (w - first >= span) continue;
        const Topic t = z[i];
        ++rows[w * k + t];
        pool[cursor[w - first]++] = t;
        ++totals[t];
      }
    }
  });
  for (std::size_t t = 0; t < k; ++t) {
    std::uint64_t sum = 0;
    for (const auto& totals : partial_totals) sum += totals[t];
    counts.topic_total[t] = static_cast<std::uint32_t>(sum);
  }
}

std::uint64_t SharedCountMerger::bytes_summed(std::uint32_t vocabulary_size, std::uint32_t topic_count) {
  return (static_cast<std::uint64_t>(vocabulary_size) + 1) * topic_count * sizeof(std::uint32_t);
}

void SharedCountMerger::merge(const Corpus& corpus, std::span<const Topic> topics, TopicWordCounts& counts,
                              const ParallelRunner& runner) {
  const std::size_t k = counts.topic_count;
  const std::uint32_t v = counts.vocabulary_size;
  const WordId* words = corpus.tokens.data();
  const Topic* z = topics.data();
  const std::size_t n = topics.size();
  if (counted_ != &corpus || local_offsets_.size() != static_cast<std::size_t>(v) + 1) {
    // Tokens per word, here and summed over the processes: once per share.
    std::vector<std::uint64_t> per_word(v, 0);
    for (std::size_t i = 0; i < n; ++i) ++per_word[words[i]];
    local_offsets_.assign(v + 1, 0);
    for (std::uint32_t w = 0; w < v; ++w) local_offsets_[w + 1] = local_offsets_[w] + per_word[w];
    processes_.sum(std::span<std::uint64_t>(per_word));
    global_offsets_.assign(v + 1, 0);
    for (std::uint32_t w = 0; w < v; ++w) global_offsets_[w + 1] = global_offsets_[w] + per_word[w];
    counted_ = &corpus;
  }
  // This share's counts, each task owning a range of words (no two write the same row).
  const std::size_t parts = std::max<std::size_t>(1, std::min<std::size_t>(runner.threads(), v));
  const auto bounds = balanced_word_ranges(local_offsets_, parts);
  std::vector<std::vector<std::uint64_t>> partial_totals(parts, std::vector<std::uint64_t>(k, 0));
  runner.run(parts, [&](std::size_t part) {
    const std::uint32_t first = bounds[part];
    const std::uint32_t end = bounds[part + 1];
    if (first == end) return;
    std::uint32_t* rows = counts.word_topic.data();
    std::fill(rows + first * k, rows + end * k, 0U);
    auto& totals = partial_totals[part];
    const std::uint32_t span = end - first;
    for (std::size_t i = 0; i < n; ++i) {
      const WordId w = words[i];
      if (w - first >= span) continue;
      ++rows[w * k + z[i]];
      ++totals[z[i]];
    }
  });
  for (std::size_t t = 0; t < k; ++t) {
    std::uint64_t sum = 0;
    for (const auto& totals : partial_totals) sum += totals[t];
    counts.topic_total[t] = static_cast<std::uint32_t>(sum);
  }
  // The whole corpus's counts on every process.
  processes_.sum(std::span<std::uint32_t>(counts.word_topic));
  processes_.sum(std::span<std::uint32_t>(counts.topic_total));
  counts.word_offsets = global_offsets_;
  if (!fill_pools_) {
    counts.word_pool.clear();
    counts.word_pool.shrink_to_fit();
    return;
  }
  counts.word_pool.resize(global_offsets_.back());
  const auto pool_bounds = balanced_word_ranges(global_offsets_, parts);
  runner.run(parts, [&](std::size_t part) {
    Topic* pool = counts.word_pool.data();
    for (std::uint32_t w = pool_bounds[part]; w < pool_bounds[part + 1]; ++w) {
      const std::uint32_t* row = counts.word_topic.data() + static_cast<std::size_t>(w) * k;
      std::uint64_t at = global_offsets_[w];
      for (std::size_t t = 0; t < k; ++t) {
        std::fill_n(pool + at, row[t], static_cast<Topic>(t));
        at += row[t];
      }
    }
  });
}

}  // namespace loupe

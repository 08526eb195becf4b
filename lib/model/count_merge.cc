#include "model/count_merge.h"

#include <algorithm>
#include <vector>

namespace loupe {

namespace {

// Word ranges [bounds[p], bounds[p+1]) holding about equal numbers of tokens.
std::vector<std::uint32_t> balanced_word_ranges(const TopicWordCounts& counts, std::size_t parts) {
  const std::uint32_t v = counts.vocabulary_size;
  const std::uint64_t n = counts.word_offsets.back();
  std::vector<std::uint32_t> bounds{0};
  std::uint32_t w = 0;
  for (std::size_t p = 1; p < parts; ++p) {
    const std::uint64_t target = n * p / parts;
    while (w < v && counts.word_offsets[w] < target) ++w;
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
  const auto bounds = balanced_word_ranges(counts, parts);
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

}  // namespace loupe

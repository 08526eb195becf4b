// Topic coherence from document co-occurrence counts (see topic_coherence.h).
#include "analysis/topic_coherence.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <string>
#include <unordered_map>

#include "common/error.h"

namespace loupe {

DocumentCooccurrence::DocumentCooccurrence(const Corpus& corpus, std::span<const WordId> words)
    : index_(corpus.vocabulary_size(), -1) {
  for (const WordId w : words) {
    if (w >= index_.size()) {
      throw Error("topic coherence: word id " + std::to_string(w) + " is outside the vocabulary of " +
                  std::to_string(index_.size()) + " words");
    }
    if (index_[w] < 0) index_[w] = static_cast<std::int32_t>(m_++);
  }
  pairs_.assign(m_ * m_, 0);

  // Unit of counting: a plain document, or all segments sharing a parent_id.
  const std::size_t n = corpus.num_documents();
  std::vector<std::size_t> unit_of(n);
  std::unordered_map<std::string, std::size_t> parent_unit;
  std::size_t units = 0;
  for (std::size_t d = 0; d < n; ++d) {
    const Document& document = corpus.documents[d];
    if (document.is_segment()) {
      const auto [it, inserted] = parent_unit.try_emplace(document.parent_id, units);
      if (inserted) ++units;
      unit_of[d] = it->second;
    } else {
      unit_of[d] = units++;
    }
  }
  num_documents_ = units;

  // Documents ordered by unit (counting sort), so that each unit is one run.
  std::vector<std::size_t> start(units + 1, 0);
  for (std::size_t d = 0; d < n; ++d) ++start[unit_of[d] + 1];
  for (std::size_t u = 0; u < units; ++u) start[u + 1] += start[u];
  std::vector<std::size_t> order(n);
  {
    std::vector<std::size_t> next(start.begin(), start.end() - 1);
    for (std::size_t d = 0; d < n; ++d) order[next[unit_of[d]]++] = d;
  }

  // Per unit: the distinct words of interest (last_seen marks them), then every pair.
  constexpr std::size_t kNever = std::numeric_limits<std::size_t>::max();
  std::vector<std::size_t> last_seen(m_, kNever);
  std::vector<std::size_t> present;
  present.reserve(m_);
  for (std::size_t u = 0; u < units; ++u) {
    present.clear();
    for (std::size_t i = start[u]; i < start[u + 1]; ++i) {
      for (const WordId w : corpus.document_tokens(order[i])) {
        const std::int32_t s = index_[w];
        if (s < 0) continue;
        const auto slot_of_word = static_cast<std::size_t>(s);
        if (last_seen[slot_of_word] == u) continue;
        last_seen[slot_of_word] = u;
        present.push_back(slot_of_word);
      }
    }
    for (std::size_t a = 0; a < present.size(); ++a) {
      const std::size_t sa = present[a];
      ++pairs_[sa * m_ + sa];
      for (std::size_t b = a + 1; b < present.size(); ++b) {
        const std::size_t sb = present[b];
        ++pairs_[std::min(sa, sb) * m_ + std::max(sa, sb)];
      }
    }
  }
  for (std::size_t i = 0; i < m_; ++i) {
    for (std::size_t j = i + 1; j < m_; ++j) pairs_[j * m_ + i] = pairs_[i * m_ + j];
  }
}

bool DocumentCooccurrence::tracks(WordId w) const { return w < index_.size() && index_[w] >= 0; }

std::size_t DocumentCooccurrence::slot(WordId w) const {
  if (!tracks(w)) {
    throw Error("topic coherence: word id " + std::to_string(w) + " was not among the words counted");
  }
  return static_cast<std::size_t>(index_[w]);
}

std::uint64_t DocumentCooccurrence::document_count(WordId w) const {
  const std::size_t s = slot(w);
  return pairs_[s * m_ + s];
}

std::uint64_t DocumentCooccurrence::pair_count(WordId a, WordId b) const { return pairs_[slot(a) * m_ + slot(b)]; }

namespace {

void require_pairs(std::span<const WordId> top_words) {
  if (top_words.size() < 2) throw Error("topic coherence needs at least two top words per topic");
}

double mean_over_topics(const std::vector<double>& values) {
  if (values.empty()) return std::numeric_limits<double>::quiet_NaN();
  double sum = 0;
  for (const double v : values) sum += v;
  return sum / static_cast<double>(values.size());
}

}  // namespace

double npmi_coherence(const DocumentCooccurrence& counts, std::span<const WordId> top_words) {
  require_pairs(top_words);
  const auto n = static_cast<double>(counts.num_documents());
  double sum = 0;
  std::size_t pairs = 0;
  for (std::size_t i = 0; i < top_words.size(); ++i) {
    for (std::size_t j = i + 1; j < top_words.size(); ++j, ++pairs) {
      const std::uint64_t joint = counts.pair_count(top_words[i], top_words[j]);
      if (joint == 0) {
        sum += -1.0;  // never together: the limit of NPMI as P(w_i, w_j) -> 0
        continue;
      }
      if (joint == counts.num_documents()) {
        sum += 1.0;  // together in every document: P(w_i, w_j) = P(w_i) = P(w_j) = 1, 0/0 taken as 1
        continue;
      }
      const double p_ij = static_cast<double>(joint) / n;
      const double p_i = static_cast<double>(counts.document_count(top_words[i])) / n;
      const double p_j = static_cast<double>(counts.document_count(top_words[j])) / n;
      sum += std::log(p_ij / (p_i * p_j)) / -std::log(p_ij);
    }
  }
  return sum / static_cast<double>(pairs);
}

double umass_coherence(const DocumentCooccurrence& counts, std::span<const WordId> top_words) {
  require_pairs(top_words);
  double sum = 0;
  std::size_t pairs = 0;
  for (std::size_t m = 1; m < top_words.size(); ++m) {
    for (std::size_t l = 0; l < m; ++l, ++pairs) {
      const std::uint64_t d_l = counts.document_count(top_words[l]);
      if (d_l == 0) {
        throw Error("UMass coherence: word id " + std::to_string(top_words[l]) +
                    " occurs in no document, so log((D(w_m, w_l) + 1) / D(w_l)) is undefined");
      }
      const std::uint64_t joint = counts.pair_count(top_words[m], top_words[l]);
      sum += std::log(static_cast<double>(joint + 1) / static_cast<double>(d_l));
    }
  }
  return sum / static_cast<double>(pairs);
}

TopicCoherence topic_coherence(const Corpus& corpus, const std::vector<std::vector<WordId>>& top_words_per_topic) {
  std::vector<WordId> all;
  for (const auto& topic : top_words_per_topic) all.insert(all.end(), topic.begin(), topic.end());
  const DocumentCooccurrence counts(corpus, all);
  TopicCoherence result;
  result.npmi.reserve(top_words_per_topic.size());
  result.umass.reserve(top_words_per_topic.size());
  for (const auto& topic : top_words_per_topic) {
    result.npmi.push_back(npmi_coherence(counts, topic));
    result.umass.push_back(umass_coherence(counts, topic));
  }
  result.mean_npmi = mean_over_topics(result.npmi);
  result.mean_umass = mean_over_topics(result.umass);
  return result;
}

}  // namespace loupe

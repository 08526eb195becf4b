#include "model/model.h"

#include <algorithm>
#include <numeric>

namespace loupe {

std::span<const float> Model::phi(std::size_t chain, std::size_t topic) const {
  const std::size_t v = vocabulary.size();
  return {chains[chain].phi.data() + topic * v, v};
}

std::span<const float> Model::theta(std::size_t chain, std::size_t document) const {
  const std::size_t k = topic_count();
  return {chains[chain].theta.data() + document * k, k};
}

std::vector<std::pair<WordId, float>> Model::top_words(std::size_t chain, std::size_t topic, std::size_t n) const {
  const auto row = phi(chain, topic);
  std::vector<WordId> order(row.size());
  std::iota(order.begin(), order.end(), WordId{0});
  n = std::min(n, order.size());
  std::partial_sort(order.begin(), order.begin() + static_cast<std::ptrdiff_t>(n), order.end(),
                    [&](WordId a, WordId b) { return row[a] != row[b] ? row[a] > row[b] : a < b; });
  std::vector<std::pair<WordId, float>> result;
  result.reserve(n);
  for (std::size_t i = 0; i < n; ++i) result.emplace_back(order[i], row[order[i]]);
  return result;
}

const std::string& Model::group_name(std::size_t document) const {
  static const std::string none;
  const auto g = document_groups[document];
  return g == kNoGroup || g >= groups.size() ? none : groups[g];
}

void record_corpus(Model& model, const Corpus& corpus) {
  model.corpus_fingerprint = corpus.fingerprint();
  model.num_tokens = corpus.num_tokens();
  model.vocabulary = corpus.vocabulary;
  model.groups = corpus.groups;
  model.document_ids.clear();
  model.document_groups.clear();
  model.document_roles.clear();
  for (const auto& doc : corpus.documents) {
    model.document_ids.push_back(doc.id);
    model.document_groups.push_back(doc.group);
    model.document_roles.push_back(doc.role);
  }
}

}  // namespace loupe

#include "model/fold_in.h"

#include <numeric>
#include <unordered_map>

#include "common/error.h"
#include "model/random.h"

namespace loupe {

namespace {
template <typename T>
std::vector<float> transpose(std::span<const T> phi, std::uint32_t k, std::uint32_t v) {
  if (phi.size() != static_cast<std::size_t>(k) * v) throw Error("topic-word table: phi must have K x V values");
  std::vector<float> out(phi.size());
  for (std::size_t t = 0; t < k; ++t) {
    for (std::size_t w = 0; w < v; ++w) out[w * k + t] = static_cast<float>(phi[t * v + w]);
  }
  return out;
}
}  // namespace

TopicWordTable::TopicWordTable(std::span<const float> phi, std::uint32_t k, std::uint32_t v)
    : topic_count_(k), vocabulary_size_(v), values_(transpose(phi, k, v)) {}
TopicWordTable::TopicWordTable(std::span<const double> phi, std::uint32_t k, std::uint32_t v)
    : topic_count_(k), vocabulary_size_(v), values_(transpose(phi, k, v)) {}

std::vector<double> fold_in_document(const TopicWordTable& phi, std::span<const double> alpha,
                                     std::span<const WordId> words, const FoldInOptions& options,
                                     std::uint64_t document_seed) {
  const std::size_t k = phi.topic_count();
  const double alpha_sum = std::accumulate(alpha.begin(), alpha.end(), 0.0);
  std::vector<double> theta(k, 0.0);
  const std::size_t n = words.size();
  for (const auto w : words) {
    if (w >= phi.vocabulary_size()) {
      throw Error("fold-in: word id " + std::to_string(w) + " is outside the model's vocabulary of " +
                  std::to_string(phi.vocabulary_size()) + " words");
    }
  }
  if (alpha.size() != k) throw Error("fold-in: alpha must have one value per topic");
  if (n == 0) {
    for (std::size_t t = 0; t < k; ++t) theta[t] = alpha[t] / alpha_sum;
    return theta;
  }
  Xoshiro256 rng(document_seed);
  std::vector<std::uint32_t> counts(k, 0);
  std::vector<std::uint32_t> z(n);
  std::vector<double> cumulative(k);
  auto draw = [&](WordId w) {
    const float* p = phi.word(w);
    double total = 0;
    for (std::size_t t = 0; t < k; ++t) {
      total += (static_cast<double>(counts[t]) + alpha[t]) * static_cast<double>(p[t]);
      cumulative[t] = total;
    }
    const double u = rng.uniform() * total;
    std::size_t t = 0;
    while (t + 1 < k && cumulative[t] <= u) ++t;
    return static_cast<std::uint32_t>(t);
  };
  // Initialise token by token with the counts so far (sequential fold-in).
  for (std::size_t i = 0; i < n; ++i) {
    z[i] = draw(words[i]);
    ++counts[z[i]];
  }
  std::uint32_t samples = 0;
  const std::uint32_t sweeps = std::max(options.sweeps, options.burn_in + 1);
  for (std::uint32_t sweep = 1; sweep <= sweeps; ++sweep) {
    for (std::size_t i = 0; i < n; ++i) {
      --counts[z[i]];
      z[i] = draw(words[i]);
      ++counts[z[i]];
    }
    if (sweep > options.burn_in) {
      // theta_k = (n_dk + alpha_k) / (N + sum alpha), averaged over samples.
      for (std::size_t t = 0; t < k; ++t) theta[t] += (counts[t] + alpha[t]) / (static_cast<double>(n) + alpha_sum);
      ++samples;
    }
  }
  for (auto& value : theta) value /= samples;
  return theta;
}

std::vector<double> fold_in_documents(const TopicWordTable& phi, std::span<const double> alpha, const Corpus& corpus,
                                      std::span<const std::size_t> documents, const FoldInOptions& options,
                                      const ParallelRunner& runner) {
  const std::size_t k = phi.topic_count();
  if (alpha.size() != k) throw Error("fold-in: alpha must have one value per topic");
  std::vector<double> theta(documents.size() * k);
  runner.run(documents.size(), [&](std::size_t i) {
    const std::size_t d = documents[i];
    const auto row = fold_in_document(phi, alpha, corpus.document_tokens(d), options, derive_seed(options.seed, {d}));
    std::copy(row.begin(), row.end(), theta.begin() + static_cast<std::ptrdiff_t>(i * k));
  });
  return theta;
}

std::vector<double> fold_in_with_model(const Model& model, std::size_t chain, const Corpus& corpus,
                                       std::span<const std::size_t> documents, const FoldInOptions& options,
                                       const ParallelRunner& runner) {
  if (chain >= model.chains.size()) {
    throw Error("fold-in: the model has " + std::to_string(model.chains.size()) + " chains, not " +
                std::to_string(chain + 1));
  }
  const std::uint32_t k = model.topic_count();
  const TopicWordTable phi(model.chains[chain].phi, k, static_cast<std::uint32_t>(model.vocabulary_size()));
  // The corpus's word ids in the model's vocabulary (or none).
  constexpr WordId kUnknown = static_cast<WordId>(-1);
  std::unordered_map<std::string_view, WordId> model_ids;
  for (std::size_t w = 0; w < model.vocabulary.size(); ++w)
    model_ids.emplace(model.vocabulary[w], static_cast<WordId>(w));
  std::vector<WordId> to_model(corpus.vocabulary_size(), kUnknown);
  for (std::size_t w = 0; w < corpus.vocabulary_size(); ++w) {
    const auto found = model_ids.find(corpus.vocabulary[w]);
    if (found != model_ids.end()) to_model[w] = found->second;
  }
  std::vector<double> theta(documents.size() * k);
  runner.run(documents.size(), [&](std::size_t i) {
    const std::size_t d = documents[i];
    std::vector<WordId> words;
    for (const auto w : corpus.document_tokens(d)) {
      if (to_model[w] != kUnknown) words.push_back(to_model[w]);
    }
    const auto row = fold_in_document(phi, model.chains[chain].alpha, words, options, derive_seed(options.seed, {d}));
    std::copy(row.begin(), row.end(), theta.begin() + static_cast<std::ptrdiff_t>(i * k));
  });
  return theta;
}

}  // namespace loupe

#include "model/synthetic_corpus.h"

#include <cmath>
#include <cstdio>
#include <string>

#include "common/error.h"
#include "model/alias_table.h"
#include "model/random.h"

namespace loupe {

namespace {

std::string numbered(const char* prefix, std::size_t i) {
  char buffer[32];
  std::snprintf(buffer, sizeof buffer, "%s%06zu", prefix, i);
  return buffer;
}

void draw_dirichlet(Xoshiro256& rng, const double* concentration, std::size_t n, double* out) {
  double total = 0;
  for (std::size_t i = 0; i < n; ++i) {
    out[i] = rng.gamma(concentration[i]);
    total += out[i];
  }
  if (total <= 0) {  // every draw underflowed: fall back to the largest concentration
    std::size_t best = 0;
    for (std::size_t i = 1; i < n; ++i) best = concentration[i] > concentration[best] ? i : best;
    out[best] = total = 1.0;
  }
  for (std::size_t i = 0; i < n; ++i) out[i] /= total;
}

void recount_frequencies(Corpus& corpus) {
  const std::size_t v = corpus.vocabulary_size();
  corpus.word_frequency.assign(v, 0);
  corpus.document_frequency.assign(v, 0);
  std::vector<std::size_t> last_seen(v, static_cast<std::size_t>(-1));
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    for (const auto w : corpus.document_tokens(d)) {
      ++corpus.word_frequency[w];
      if (last_seen[w] != d) {
        last_seen[w] = d;
        ++corpus.document_frequency[w];
      }
    }
  }
}

}  // namespace

SyntheticCorpus draw_lda_corpus(const SyntheticCorpusSpec& spec) {
  const std::size_t k = spec.topic_count;
  const std::size_t v = spec.vocabulary_size;
  if (k == 0 || v == 0) throw Error("draw_lda_corpus: topics and vocabulary must be non-empty");
  if (!spec.topics.empty() && spec.topics.size() != k * v) throw Error("draw_lda_corpus: topics must be K x V");
  Xoshiro256 rng(derive_seed(spec.seed, {0x5EED}));
  SyntheticCorpus out;
  if (!spec.topics.empty()) {
    out.phi = spec.topics;
  } else {
    std::vector<double> concentration(v, spec.topic_word_prior);
    if (!spec.word_base.empty()) {
      double total = 0;
      for (const double b : spec.word_base) total += b;
      for (std::size_t w = 0; w < v; ++w)
        concentration[w] = spec.topic_word_prior * static_cast<double>(v) * spec.word_base[w] / total;
    }
    out.phi.resize(k * v);
    for (std::size_t t = 0; t < k; ++t) draw_dirichlet(rng, concentration.data(), v, out.phi.data() + t * v);
  }
  std::vector<AliasTable> topic_words(k);
  for (std::size_t t = 0; t < k; ++t) topic_words[t].build({out.phi.data() + t * v, v});

  Corpus& corpus = out.corpus;
  for (std::size_t w = 0; w < v; ++w) corpus.vocabulary.push_back(numbered("w", w));
  for (std::uint32_t g = 0; g < spec.num_groups; ++g) corpus.groups.push_back("group-" + std::to_string(g + 1));
  const std::vector<double> alpha(k, spec.alpha);
  out.theta.resize(static_cast<std::size_t>(spec.num_documents) * k);
  std::vector<WordId> words;
  for (std::size_t d = 0; d < spec.num_documents; ++d) {
    double* theta = out.theta.data() + d * k;
    draw_dirichlet(rng, alpha.data(), k, theta);
    std::size_t length = spec.document_length;
    if (spec.vary_length) {
      const double mean = spec.document_length;
      length = static_cast<std::size_t>(std::max(1.0, std::round(mean + std::sqrt(mean) * rng.normal())));
    }
    const AliasTable doc_topics({theta, k});
    words.clear();
    for (std::size_t i = 0; i < length; ++i) words.push_back(topic_words[doc_topics.draw(rng)].draw(rng));
    Document doc;
    doc.id = numbered("doc", d);
    doc.group = spec.num_groups == 0 ? kNoGroup : static_cast<std::uint32_t>(d % spec.num_groups);
    corpus.add_document(std::move(doc), words);
  }
  recount_frequencies(corpus);
  return out;
}

std::vector<double> bars_topics(std::uint32_t side) {
  const std::size_t v = static_cast<std::size_t>(side) * side;
  std::vector<double> phi(2 * side * v, 0.0);
  for (std::uint32_t r = 0; r < side; ++r) {
    for (std::uint32_t c = 0; c < side; ++c) {
      phi[r * v + r * side + c] = 1.0 / side;           // row topic r
      phi[(side + c) * v + r * side + c] = 1.0 / side;  // column topic c
    }
  }
  return phi;
}

std::vector<double> zipf_weights(std::uint32_t size, double exponent) {
  std::vector<double> weights(size);
  for (std::uint32_t i = 0; i < size; ++i) weights[i] = 1.0 / std::pow(static_cast<double>(i) + 1.0, exponent);
  return weights;
}

Corpus corpus_subset(const Corpus& corpus, std::size_t first, std::size_t end) {
  std::vector<std::size_t> documents;
  for (std::size_t d = first; d < end; ++d) documents.push_back(d);
  return corpus_of_documents(corpus, documents);
}

}  // namespace loupe

// Helpers for the attribution tests: a small hand-made model over a corpus,
// drawn corpora whose groups prefer known topics (with an outsider group that
// is none of them), and a plain alternative conformal score to compare with.
#pragma once

#include <algorithm>
#include <cmath>
#include <random>
#include <string>
#include <vector>

#include "analysis/attribution.h"
#include "analysis/hellinger.h"
#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe::test {

// A Dirichlet draw (normalised gamma variates).
inline std::vector<double> dirichlet(const std::vector<double>& weights, std::mt19937_64& rng) {
  std::vector<double> x(weights.size());
  double sum = 0;
  for (std::size_t k = 0; k < weights.size(); ++k) {
    std::gamma_distribution<double> gamma(weights[k], 1.0);
    x[k] = std::max(gamma(rng), 1e-300);
    sum += x[k];
  }
  for (auto& v : x) v /= sum;
  return x;
}

// Document d gets `length` tokens (word ids cycling over the vocabulary); CSR rebuilt.
inline void set_length(Corpus& corpus, std::size_t document, std::size_t length) {
  std::vector<std::vector<WordId>> tokens;
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const auto t = corpus.document_tokens(d);
    tokens.emplace_back(t.begin(), t.end());
  }
  tokens[document].clear();
  for (std::size_t i = 0; i < length; ++i)
    tokens[document].push_back(static_cast<WordId>(i % corpus.vocabulary_size()));
  auto documents = corpus.documents;
  corpus.documents.clear();
  corpus.tokens.clear();
  corpus.token_offsets = {0};
  for (std::size_t d = 0; d < documents.size(); ++d) corpus.add_document(documents[d], tokens[d]);
}

struct SmallModel {
  Corpus corpus;
  Model model;
  std::size_t first_disputed = 0;
};

// 48 known documents alternating customs (even) / harbour (odd), 100 tokens each,
// then `disputed` documents "x0", "x1", ... of `disputed_length` tokens. theta is
// drawn by hand (no fit): customs near (0.6, 0.2, 0.1, 0.1), harbour near
// (0.1, 0.1, 0.2, 0.6); disputed texts near harbour's profile.
inline SmallModel small_model(std::size_t disputed, std::size_t disputed_length = 200, std::size_t chains = 2) {
  SmallModel s;
  const std::size_t vocabulary = 20, k = 4, known = 48;
  for (std::size_t w = 0; w < vocabulary; ++w) s.corpus.vocabulary.push_back("w" + std::to_string(w));
  s.corpus.word_frequency.assign(vocabulary, 1);
  s.corpus.document_frequency.assign(vocabulary, 1);
  s.corpus.groups = {"customs", "harbour"};
  auto add = [&](const std::string& id, std::uint32_t group, DocumentRole role, std::size_t length) {
    Document d;
    d.id = id;
    d.group = group;
    d.role = role;
    std::vector<WordId> words;
    for (std::size_t i = 0; i < length; ++i) words.push_back(static_cast<WordId>(i % vocabulary));
    s.corpus.add_document(std::move(d), words);
  };
  for (std::size_t d = 0; d < known; ++d) {
    add("d" + std::to_string(d), static_cast<std::uint32_t>(d % 2), DocumentRole::known, 100);
  }
  s.first_disputed = known;
  for (std::size_t d = 0; d < disputed; ++d)
    add("x" + std::to_string(d), kNoGroup, DocumentRole::disputed, disputed_length);

  record_corpus(s.model, s.corpus);
  s.model.options.topic_count = static_cast<std::uint32_t>(k);
  const std::vector<std::vector<double>> profiles{{0.6, 0.2, 0.1, 0.1}, {0.1, 0.1, 0.2, 0.6}};
  std::mt19937_64 rng(42);
  for (std::size_t c = 0; c < chains; ++c) {
    ChainEstimates chain;
    chain.seed = c + 1;
    chain.alpha.assign(k, 0.5);
    chain.beta = 0.01;
    chain.phi.assign(k * vocabulary, 1.0f / static_cast<float>(vocabulary));
    chain.topic_share.assign(k, 0.25);
    for (std::size_t d = 0; d < s.corpus.num_documents(); ++d) {
      const std::size_t g = d < known ? d % 2 : 1;
      std::vector<double> weights(k);
      for (std::size_t t = 0; t < k; ++t) weights[t] = 20 * profiles[g][t];
      for (const double v : dirichlet(weights, rng)) chain.theta.push_back(static_cast<float>(v));
    }
    s.model.chains.push_back(std::move(chain));
  }
  return s;
}

// ---------------------------------------------------------------------------
// Drawn corpora with group-specific topic preferences, like the demo's offices.

// Word i of a drawn vocabulary, made of letters so that ingestion keeps it
// ("w60" would be a number to the tokenizer): 0 -> "waa", 1 -> "wab", 27 -> "wbb".
inline std::string word_name(std::size_t i) {
  return std::string("w") + static_cast<char>('a' + (i / 26) % 26) + static_cast<char>('a' + i % 26);
}

struct DrawnStudySpec {
  std::size_t groups = 3;
  std::size_t known_per_group = 100;
  std::size_t disputed_per_group = 40;  // drawn from a known group, role disputed
  std::size_t outsiders = 40;           // drawn from a group that is none of them, role disputed
  // false: the outsider has two topics of its own (like the demo's railway company);
  // true: it has none, and borrows the second topic of groups 0 and 1 (2.4 each)
  // with the shared ones at 0.55: a mixture of two offices' business, no office's whole.
  bool outsider_borrows = false;
  std::size_t min_length = 150, max_length = 250;
  std::uint64_t seed = 1;
};

struct DrawnStudy {
  Corpus corpus;
  std::vector<int> truth;  // per document: its group 0..G-1, or -1 for an outsider
  std::size_t topic_count = 0;
};

// Topics: 2 per known group (weights 3.0 and 2.4 for it, 0.05 for the others), 2
// for the outsider, 4 shared (0.55; the outsider uses them at 0.35; see
// outsider_borrows for a harder outsider). Each topic
// puts 90% of its mass on its own 30 words (Dirichlet(1) within) and 10% on all
// words, so topics overlap as real ones do.
inline DrawnStudy draw_study(const DrawnStudySpec& spec) {
  const std::size_t shared = 4, own_words = 30;
  const std::size_t k = 2 * spec.groups + 2 + shared;
  const std::size_t vocabulary = k * own_words;
  std::mt19937_64 rng(spec.seed);
  std::vector<std::vector<double>> phi(k, std::vector<double>(vocabulary, 0.1 / static_cast<double>(vocabulary)));
  for (std::size_t t = 0; t < k; ++t) {
    const auto within = dirichlet(std::vector<double>(own_words, 1.0), rng);
    for (std::size_t w = 0; w < own_words; ++w) phi[t][t * own_words + w] += 0.9 * within[w];
  }
  // Group g < G: its topics 2g, 2g+1; the outsider (g = G): topics 2G, 2G+1.
  auto prior = [&](std::size_t g) {
    std::vector<double> a(k, 0.05);
    a[2 * g] = 3.0;
    a[2 * g + 1] = 2.4;
    for (std::size_t t = 2 * spec.groups + 2; t < k; ++t) a[t] = g == spec.groups ? 0.35 : 0.55;
    if (g == spec.groups && spec.outsider_borrows) {
      a[2 * g] = a[2 * g + 1] = 0.05;
      a[1] = a[3] = 2.4;
      for (std::size_t t = 2 * spec.groups + 2; t < k; ++t) a[t] = 0.55;
    }
    return a;
  };
  std::vector<std::discrete_distribution<std::size_t>> words_of;
  for (const auto& row : phi) words_of.emplace_back(row.begin(), row.end());
  DrawnStudy study;
  study.topic_count = k;
  auto& corpus = study.corpus;
  for (std::size_t w = 0; w < vocabulary; ++w) corpus.vocabulary.push_back(word_name(w));
  for (std::size_t g = 0; g < spec.groups; ++g)
    corpus.groups.push_back("office-" + std::string(1, static_cast<char>('a' + g)));
  corpus.word_frequency.assign(vocabulary, 0);
  corpus.document_frequency.assign(vocabulary, 0);
  std::uniform_int_distribution<std::size_t> length(spec.min_length, spec.max_length);
  auto add = [&](const std::string& id, std::size_t g, DocumentRole role) {
    const auto theta = dirichlet(prior(g), rng);
    std::discrete_distribution<std::size_t> topic(theta.begin(), theta.end());
    std::vector<WordId> words;
    const std::size_t n = length(rng);
    std::vector<bool> seen(vocabulary, false);
    for (std::size_t i = 0; i < n; ++i) {
      const auto w = static_cast<WordId>(words_of[topic(rng)](rng));
      words.push_back(w);
      ++corpus.word_frequency[w];
      if (!seen[w]) ++corpus.document_frequency[w];
      seen[w] = true;
    }
    Document d;
    d.id = id;
    d.group = role == DocumentRole::known ? static_cast<std::uint32_t>(g) : kNoGroup;
    d.role = role;
    corpus.add_document(std::move(d), words);
    study.truth.push_back(g == spec.groups ? -1 : static_cast<int>(g));
  };
  for (std::size_t g = 0; g < spec.groups; ++g) {
    for (std::size_t i = 0; i < spec.known_per_group; ++i)
      add("k" + std::to_string(g) + "-" + std::to_string(i), g, DocumentRole::known);
  }
  for (std::size_t g = 0; g < spec.groups; ++g) {
    for (std::size_t i = 0; i < spec.disputed_per_group; ++i)
      add("x" + std::to_string(g) + "-" + std::to_string(i), g, DocumentRole::disputed);
  }
  for (std::size_t i = 0; i < spec.outsiders; ++i) add("out-" + std::to_string(i), spec.groups, DocumentRole::disputed);
  return study;
}

// The plain alternative: a conformal score on the distance to the NEAREST known
// document of the group (leave-one-out: each known document's distance to its
// nearest other member), p = (1 + #{a_j >= d}) / (1 + n). Returns "none" (true)
// when every group's p-value is at or below the level.
inline bool nearest_document_score_says_none(const ConformalReference& reference, std::span<const double> theta,
                                             double level) {
  Eigen::RowVectorXd y(static_cast<Eigen::Index>(theta.size()));
  for (std::size_t t = 0; t < theta.size(); ++t) y(static_cast<Eigen::Index>(t)) = std::sqrt(theta[t] * 0.5);
  for (std::size_t g = 0; g < reference.num_groups(); ++g) {
    std::vector<std::size_t> members;
    for (std::size_t i = 0; i < reference.num_known(); ++i) {
      if (reference.known_group[i] == g) members.push_back(i);
    }
    std::vector<double> calibration;
    double d = 1e300;
    for (const auto i : members) {
      const auto yi = reference.embedding.row(static_cast<Eigen::Index>(i));
      d = std::min(d, (y - yi).norm());
      double nearest = 1e300;
      for (const auto j : members) {
        if (j != i) nearest = std::min(nearest, (yi - reference.embedding.row(static_cast<Eigen::Index>(j))).norm());
      }
      calibration.push_back(nearest);
    }
    std::size_t at_least = 0;
    for (const double a : calibration) at_least += a >= d * (1 - 1e-9);
    const double p = static_cast<double>(1 + at_least) / static_cast<double>(1 + members.size());
    if (p > level) return false;
  }
  return true;
}

}  // namespace loupe::test

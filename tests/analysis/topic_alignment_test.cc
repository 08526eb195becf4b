// Topic alignment across chains: a model whose second chain holds the first
// chain's topics in another order, the one-chain error, and a corpus drawn from
// the LDA generative process (JMLR, 2003) with 20 known topics, fitted with
// several chains: every true topic comes back stable at K = 20, and at K = 40
// the split topics show up as redundant pairs.
#include "analysis/topic_alignment.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <numeric>
#include <random>

#include "analysis/assignment.h"
#include "analysis/twenty_topic_corpus.h"
#include "common/error.h"
#include "model/fit.h"
#include "model/synthetic_corpus.h"

namespace loupe {
namespace {

// A model with `chains` chains over K topics and V words; chain c's topic
// order is permutation[c] of chain 0's (chain c topic permutation[c][k] = chain 0 topic k).
Model permuted_model(std::size_t k, std::size_t v, std::size_t documents,
                     const std::vector<std::vector<std::size_t>>& permutation) {
  std::mt19937_64 rng(5);
  std::gamma_distribution<double> gamma(0.2, 1.0);
  Model model;
  model.options.topic_count = static_cast<std::uint32_t>(k);
  for (std::size_t w = 0; w < v; ++w) model.vocabulary.push_back("w" + std::to_string(w));
  for (std::size_t d = 0; d < documents; ++d) model.document_ids.push_back("d" + std::to_string(d));
  std::vector<std::vector<float>> phi(k, std::vector<float>(v)), theta(documents, std::vector<float>(k));
  for (auto* rows : {&phi, &theta}) {
    for (auto& row : *rows) {
      double sum = 0;
      for (auto& x : row) sum += (x = static_cast<float>(gamma(rng) + 1e-6));
      for (auto& x : row) x = static_cast<float>(x / sum);
    }
  }
  for (const auto& order : permutation) {
    ChainEstimates chain;
    chain.phi.resize(k * v);
    chain.theta.resize(documents * k);
    for (std::size_t t = 0; t < k; ++t) {
      std::copy(phi[t].begin(), phi[t].end(), chain.phi.begin() + static_cast<std::ptrdiff_t>(order[t] * v));
      for (std::size_t d = 0; d < documents; ++d) chain.theta[d * k + order[t]] = theta[d][t];
    }
    model.chains.push_back(std::move(chain));
  }
  return model;
}

TEST(TopicAlignmentTest, RecoversAPermutationOfTopics) {
  const std::vector<std::size_t> identity = {0, 1, 2, 3, 4, 5};
  const std::vector<std::size_t> shuffled = {3, 5, 0, 1, 4, 2};
  const Model model = permuted_model(6, 40, 9, {identity, shuffled, identity});
  const auto alignment = align_chains(model);
  EXPECT_EQ(alignment.topic_of[1], shuffled);
  EXPECT_EQ(alignment.topic_of[2], identity);
  for (std::size_t t = 0; t < 6; ++t) {
    EXPECT_NEAR(alignment.stability[t], 1.0, 1e-3);  // float rows: H = sqrt(1 - BC) magnifies rounding
    EXPECT_TRUE(alignment.stable[t]);
    // Consensus equals chain 0, since every chain holds the same topics.
    for (std::size_t w = 0; w < 40; ++w) {
      EXPECT_NEAR(alignment.consensus_phi(static_cast<Eigen::Index>(t), static_cast<Eigen::Index>(w)),
                  model.phi(0, t)[w], 1e-7);
    }
    for (std::size_t d = 0; d < 9; ++d) {
      EXPECT_NEAR(alignment.consensus_theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(t)),
                  model.theta(0, d)[t], 1e-7);
    }
  }
  // Aligned from chain 1 as the reference: chain 0's topic of reference topic j is the inverse map.
  AlignmentOptions from_second;
  from_second.reference_chain = 1;
  const auto inverse = align_chains(model, from_second);
  for (std::size_t t = 0; t < 6; ++t) EXPECT_EQ(inverse.topic_of[0][shuffled[t]], t);
  EXPECT_TRUE(redundant_topic_pairs(model, 0, 0.05).empty());
}

TEST(TopicAlignmentTest, OneChainIsAClearError) {
  const Model model = permuted_model(3, 10, 2, {{0, 1, 2}});
  try {
    align_chains(model);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("--chains 2"), std::string::npos) << e.what();
  }
  AlignmentOptions bad;
  bad.reference_chain = 3;
  const Model two = permuted_model(3, 10, 2, {{0, 1, 2}, {0, 1, 2}});
  EXPECT_THROW(align_chains(two, bad), Error);
}

TEST(TopicAlignmentTest, DuplicatedTopicsAreRedundant) {
  Model model = permuted_model(4, 30, 3, {{0, 1, 2, 3}});
  // Topic 3 becomes a copy of topic 1: H = 0.
  auto& phi = model.chains[0].phi;
  std::copy(phi.begin() + 30, phi.begin() + 60, phi.begin() + 90);
  const auto pairs = redundant_topic_pairs(model, 0, 0.05);
  ASSERT_EQ(pairs.size(), 1u);
  EXPECT_EQ(pairs[0].topic_a, 1u);
  EXPECT_EQ(pairs[0].topic_b, 3u);
  EXPECT_NEAR(pairs[0].hellinger, 0.0, 1e-3);
}

Model fit_chains(const Corpus& corpus, std::uint32_t k, std::uint32_t chains) {
  FitOptions options;
  options.topic_count = k;
  options.chains = chains;
  options.threads = 2;
  options.sweeps = 800;
  options.burn_in = 200;
  options.alpha = {0.1};
  options.seed = 9;
  return fit_model(corpus, options);
}

// Named *Reference* (the known truth of a drawn corpus is its reference) so that the
// sanitizer run skips it: four fits are too slow there.
TEST(TopicAlignmentReferenceTest, EveryTrueTopicIsStableOnADrawnCorpus) {
  // Known truth: 20 topics drawn from the LDA generative process (synthetic_corpus.h).
  const auto drawn = testing::twenty_topic_corpus();
  const Model model = fit_chains(drawn.corpus, 20, 3);
  const auto alignment = align_chains(model);
  // Match the true topics to the reference chain's by Hellinger distance.
  const std::size_t v = drawn.corpus.vocabulary_size();
  TopicMatrix cost(20, 20);
  for (std::size_t a = 0; a < 20; ++a) {
    for (std::size_t b = 0; b < 20; ++b) {
      double bc = 0;
      const auto row = model.phi(0, b);
      for (std::size_t w = 0; w < v; ++w) bc += std::sqrt(drawn.phi[a * v + w] * row[w]);
      cost(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(b)) = std::sqrt(std::max(0.0, 1.0 - bc));
    }
  }
  const auto truth = solve_assignment(cost);
  for (std::size_t a = 0; a < 20; ++a) {
    const std::size_t topic = truth.column_of_row[a];
    EXPECT_LT(cost(static_cast<Eigen::Index>(a), static_cast<Eigen::Index>(topic)), 0.2) << "true topic " << a;
    EXPECT_GE(alignment.stability[topic], 0.9) << "true topic " << a << " (fitted topic " << topic << ")";
    EXPECT_TRUE(alignment.stable[topic]);
  }
  // Too many topics: the themes split, and the halves are close to each other.
  const Model forty = fit_chains(drawn.corpus, 40, 1);
  const auto at_twenty = redundant_topic_pairs(model, 0, 0.5);
  const auto at_forty = redundant_topic_pairs(forty, 0, 0.5);
  EXPECT_TRUE(at_twenty.empty()) << at_twenty.size() << " redundant pairs at K = 20, closest H "
                                 << at_twenty.front().hellinger;
  EXPECT_GE(at_forty.size(), 5u);
}

}  // namespace
}  // namespace loupe

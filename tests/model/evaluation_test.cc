// The joint log-likelihood, Gelman-Rubin R-hat and document-completion
// perplexity, each against a value computed another way.
#include <cmath>
#include <numeric>

#include <gtest/gtest.h>

#include "model/count_merge.h"
#include "model/evaluation.h"
#include "model/random.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

// log p(w, z) straight from the definition (Griffiths & Steyvers 2004, eq. 2
// and its document-topic counterpart), with dense count tables.
double dense_log_joint(const Corpus& corpus, const SamplerState& state) {
  const std::size_t k = state.alpha.size();
  const std::size_t v = corpus.vocabulary_size();
  std::vector<double> nwk(v * k, 0), nk(k, 0);
  double result = 0;
  const double alpha_sum = std::accumulate(state.alpha.begin(), state.alpha.end(), 0.0);
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    std::vector<double> ndk(k, 0);
    for (auto i = corpus.token_offsets[d]; i < corpus.token_offsets[d + 1]; ++i) {
      ndk[state.topics[i]] += 1;
      nwk[corpus.tokens[i] * k + state.topics[i]] += 1;
      nk[state.topics[i]] += 1;
    }
    result += std::lgamma(alpha_sum) - std::lgamma(static_cast<double>(corpus.document_length(d)) + alpha_sum);
    for (std::size_t t = 0; t < k; ++t) result += std::lgamma(ndk[t] + state.alpha[t]) - std::lgamma(state.alpha[t]);
  }
  for (std::size_t t = 0; t < k; ++t) {
    const double v_beta = static_cast<double>(v) * state.beta;
    result += std::lgamma(v_beta) - std::lgamma(nk[t] + v_beta);
    for (std::size_t w = 0; w < v; ++w) result += std::lgamma(nwk[w * k + t] + state.beta) - std::lgamma(state.beta);
  }
  return result;
}

Corpus drawn(std::uint32_t documents, std::uint64_t seed) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 5;
  spec.vocabulary_size = 60;
  spec.num_documents = documents;
  spec.document_length = 40;
  spec.vary_length = true;
  spec.seed = seed;
  return draw_lda_corpus(spec).corpus;
}

TEST(LogJointLikelihoodTest, MatchesTheDenseDefinition) {
  const Corpus corpus = drawn(700, 3);  // more than one block of 512 documents
  SamplerState state;
  state.alpha = {0.1, 0.4, 0.2, 1.5, 0.05};
  state.beta = 0.03;
  state.topics.resize(corpus.num_tokens());
  Xoshiro256 rng(5);
  for (auto& z : state.topics) z = static_cast<Topic>(rng.below(5));
  state.counts.reset(corpus, 5);
  LocalCountMerger merger;
  merger.merge(corpus, state.topics, state.counts, ParallelRunner(1));
  const double expected = dense_log_joint(corpus, state);
  const double one = log_joint_likelihood(corpus, state, ParallelRunner(1));
  const double two = log_joint_likelihood(corpus, state, ParallelRunner(2));
  EXPECT_NEAR(one, expected, 1e-9 * std::abs(expected));
  EXPECT_EQ(one, two);  // summed in a fixed order
}

TEST(GelmanRubinTest, HandComputedExample) {
  // Chains (1, 2, 3) and (2, 3, 4): n = 3, W = 1, B = 3 * 0.5 / 1 = 1.5,
  // var+ = 2/3 * 1 + 1.5 / 3 = 7/6, R-hat = sqrt(7/6) (worked by hand from
  // Gelman & Rubin 1992, Statistical Science 7(4)).
  EXPECT_NEAR(gelman_rubin_rhat({{1, 2, 3}, {2, 3, 4}}), std::sqrt(7.0 / 6.0), 1e-12);
}

TEST(GelmanRubinTest, FarApartChainsGiveALargeValueAndMixedOnesNearOne) {
  std::vector<std::vector<double>> apart{{0, 1, 0, 1, 0}, {10, 11, 10, 11, 10}};
  EXPECT_GT(gelman_rubin_rhat(apart), 5.0);
  Xoshiro256 rng(1);
  std::vector<std::vector<double>> mixed(4, std::vector<double>(2000));
  for (auto& chain : mixed) {
    for (auto& x : chain) x = rng.normal();
  }
  EXPECT_NEAR(gelman_rubin_rhat(mixed), 1.0, 0.01);
}

TEST(GelmanRubinTest, UndefinedCasesAreNaN) {
  EXPECT_TRUE(std::isnan(gelman_rubin_rhat({{1, 2, 3}})));          // one chain
  EXPECT_TRUE(std::isnan(gelman_rubin_rhat({{1}, {2}})));           // one value each
  EXPECT_TRUE(std::isnan(gelman_rubin_rhat({{1, 1}, {1, 1}})));     // no variance
  EXPECT_TRUE(std::isnan(gelman_rubin_rhat({{1, 2, 3}, {1, 2}})));  // unequal lengths
}

TEST(DocumentCompletionTest, IdenticalTopicsGiveTheWordDistributionsPerplexity) {
  // When every topic is the same distribution p, theta does not matter and
  // log p(second half) = sum log p_w exactly.
  const std::vector<double> p{0.5, 0.25, 0.125, 0.125};
  std::vector<double> phi;
  for (int t = 0; t < 3; ++t) phi.insert(phi.end(), p.begin(), p.end());
  const Corpus corpus = test::make_corpus({{0, 1, 2, 3, 0, 0, 1}, {3, 3, 2}, {1}}, 4);
  const TopicWordTable table(std::span<const double>(phi), 3, 4);
  const std::vector<double> alpha(3, 0.5);
  const auto score = document_completion_perplexity(table, alpha, corpus, FoldInOptions{}, ParallelRunner(1));
  // Second halves: doc 0 tokens 3.. = {3, 0, 0, 1}; doc 1 tokens 1.. = {3, 2}; doc 2 is too short.
  const double expected_ll = std::log(0.125) + 2 * std::log(0.5) + std::log(0.25) + std::log(0.125) + std::log(0.125);
  EXPECT_EQ(score.documents, 2U);
  EXPECT_EQ(score.tokens, 6U);
  EXPECT_NEAR(score.log_likelihood, expected_ll, 1e-6);
  EXPECT_NEAR(score.perplexity, std::exp(-expected_ll / 6), 1e-5);
}

TEST(DocumentCompletionTest, TrueTopicsScoreBetterThanScrambledOnesAndRunsAreRepeatable) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 4;
  spec.vocabulary_size = 50;
  spec.num_documents = 80;
  spec.document_length = 60;
  spec.alpha = 0.2;
  spec.seed = 9;
  const auto sample = draw_lda_corpus(spec);
  std::vector<double> scrambled(sample.phi.size());
  for (std::size_t t = 0; t < 4; ++t) {
    for (std::size_t w = 0; w < 50; ++w) scrambled[t * 50 + w] = sample.phi[t * 50 + (w * 7 + t) % 50];
  }
  const std::vector<double> alpha(4, 0.2);
  const TopicWordTable truth(std::span<const double>(sample.phi), 4, 50);
  const TopicWordTable wrong(std::span<const double>(scrambled), 4, 50);
  const auto good = document_completion_perplexity(truth, alpha, sample.corpus, FoldInOptions{}, ParallelRunner(1));
  const auto bad = document_completion_perplexity(wrong, alpha, sample.corpus, FoldInOptions{}, ParallelRunner(2));
  EXPECT_LT(good.perplexity, bad.perplexity);
  const auto again = document_completion_perplexity(truth, alpha, sample.corpus, FoldInOptions{}, ParallelRunner(2));
  EXPECT_EQ(good.log_likelihood, again.log_likelihood);
}

}  // namespace
}  // namespace loupe

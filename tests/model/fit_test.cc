// fit_model: reproducible from a seed, chains independent, estimates that are
// distributions, traces where they should be, tuning that moves the priors.
#include <algorithm>
#include <cmath>
#include <numeric>

#include <gtest/gtest.h>

#include "common/binary_io.h"
#include "model/fit.h"
#include "model/model_file.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

SyntheticCorpus drawn_sample() {
  SyntheticCorpusSpec spec;
  spec.topic_count = 5;
  spec.vocabulary_size = 100;
  spec.num_documents = 120;
  spec.document_length = 40;
  spec.vary_length = true;
  spec.alpha = 0.2;
  spec.seed = 41;
  return draw_lda_corpus(spec);
}

FitOptions base_options() {
  FitOptions options;
  options.topic_count = 5;
  options.sweeps = 40;
  options.burn_in = 10;
  options.samples = 5;
  options.sample_lag = 4;
  options.log_likelihood_every = 5;
  options.alpha = {0.2};
  options.seed = 99;
  return options;
}

bool same_estimates(const Model& a, const Model& b) {
  if (a.chains.size() != b.chains.size()) return false;
  for (std::size_t c = 0; c < a.chains.size(); ++c) {
    if (a.chains[c].phi != b.chains[c].phi || a.chains[c].theta != b.chains[c].theta) return false;
  }
  return true;
}

TEST(FitTest, TheSameSeedGivesByteIdenticalModelFiles) {
  const auto sample = drawn_sample();
  for (const auto kind : {SamplerKind::exact, SamplerKind::metropolis_hastings}) {
    auto options = base_options();
    options.sampler = kind;
    options.threads = 2;
    test::TempFolder folder;
    write_model(fit_model(sample.corpus, options), folder.file("a"));
    write_model(fit_model(sample.corpus, options), folder.file("b"));
    EXPECT_EQ(read_whole_file(folder.file("a")), read_whole_file(folder.file("b")));
  }
}

TEST(FitTest, AnotherSeedGivesAnotherChain) {
  const auto sample = drawn_sample();
  auto options = base_options();
  const Model a = fit_model(sample.corpus, options);
  options.seed = 100;
  const Model b = fit_model(sample.corpus, options);
  EXPECT_FALSE(same_estimates(a, b));
  EXPECT_NE(a.chains[0].seed, b.chains[0].seed);
}

TEST(FitTest, ChainsAreIndependentAndTheirSeedsDeriveFromTheMasterSeed) {
  const auto sample = drawn_sample();
  auto options = base_options();
  options.chains = 3;
  options.threads = 2;
  const Model model = fit_model(sample.corpus, options);
  ASSERT_EQ(model.chains.size(), 3U);
  for (std::uint32_t c = 0; c < 3; ++c) EXPECT_EQ(model.chains[c].seed, chain_seed(99, c));
  EXPECT_NE(model.chains[0].phi, model.chains[1].phi);
  // Chain 0 of a three-chain run is chain 0 of a one-chain run: chains share nothing.
  options.chains = 1;
  options.threads = 1;
  const Model alone = fit_model(sample.corpus, options);
  EXPECT_EQ(alone.chains[0].phi, model.chains[0].phi);
  EXPECT_TRUE(std::isfinite(model.rhat));
  EXPECT_TRUE(std::isnan(alone.rhat));  // R-hat needs two chains
}

TEST(FitTest, WithAsManyChainsAsThreadsTheThreadCountDoesNotMatter) {
  const auto sample = drawn_sample();
  auto options = base_options();
  options.chains = 2;
  options.sampler = SamplerKind::metropolis_hastings;
  options.threads = 1;
  const Model one = fit_model(sample.corpus, options);
  options.threads = 2;
  const Model two = fit_model(sample.corpus, options);
  EXPECT_TRUE(same_estimates(one, two));
}

TEST(FitTest, EstimatesAreDistributions) {
  const auto sample = drawn_sample();
  auto options = base_options();
  options.threads = 2;  // two shards
  const Model model = fit_model(sample.corpus, options);
  const auto& chain = model.chains[0];
  for (std::size_t t = 0; t < 5; ++t) {
    const auto row = model.phi(0, t);
    EXPECT_NEAR(std::accumulate(row.begin(), row.end(), 0.0), 1.0, 1e-4);
  }
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    const auto row = model.theta(0, d);
    EXPECT_NEAR(std::accumulate(row.begin(), row.end(), 0.0), 1.0, 1e-4);
    for (const float x : row) EXPECT_GT(x, 0.0F);
  }
  EXPECT_NEAR(std::accumulate(chain.topic_share.begin(), chain.topic_share.end(), 0.0), 1.0, 1e-9);
  // The trace: every 5 sweeps, the last at the final sweep.
  ASSERT_EQ(chain.trace.size(), 8U);
  EXPECT_EQ(chain.trace.front().sweep, 5U);
  EXPECT_EQ(chain.trace.back().sweep, 40U);
  EXPECT_GT(chain.trace.back().log_likelihood, chain.trace.front().log_likelihood);
  EXPECT_EQ(model.num_tokens, sample.corpus.num_tokens());
  EXPECT_EQ(model.corpus_fingerprint, sample.corpus.fingerprint());
}

TEST(FitTest, TopWordsFollowPhi) {
  const auto sample = drawn_sample();
  const Model model = fit_model(sample.corpus, base_options());
  const auto top = model.top_words(0, 2, 10);
  ASSERT_EQ(top.size(), 10U);
  for (std::size_t i = 1; i < top.size(); ++i) EXPECT_GE(top[i - 1].second, top[i].second);
  EXPECT_EQ(top[0].second, model.phi(0, 2)[top[0].first]);
  const auto row = model.phi(0, 2);
  EXPECT_EQ(*std::max_element(row.begin(), row.end()), top[0].second);
}

TEST(FitTest, TuningMovesThePriorsTowardTheData) {
  // Drawn with alpha = 0.2 and sparse topics; start far away (alpha = 5, beta = 1).
  const auto sample = drawn_sample();
  auto options = base_options();
  options.alpha = {5.0};
  options.beta = 1.0;
  options.sweeps = 80;
  options.burn_in = 20;
  options.tune_priors_every = 5;
  const Model symmetric = fit_model(sample.corpus, options);
  const auto& alpha = symmetric.chains[0].alpha;
  EXPECT_LT(alpha[0], 1.0);
  EXPECT_EQ(alpha[0], alpha[4]);
  EXPECT_LT(symmetric.chains[0].beta, 0.5);
  options.asymmetric_alpha = true;
  const Model asymmetric = fit_model(sample.corpus, options);
  const auto& per_topic = asymmetric.chains[0].alpha;
  EXPECT_NE(per_topic[0], per_topic[1]);
  for (const double a : per_topic) EXPECT_LT(a, 1.0);
  // The starting values are what the options record.
  EXPECT_EQ(asymmetric.options.alpha, std::vector<double>{5.0});
}

TEST(FitTest, MemoryEstimateCountsBytesPerToken) {
  const auto sample = drawn_sample();
  auto options = base_options();
  options.chains = 2;
  const auto memory = estimate_fit_memory(sample.corpus, options);
  EXPECT_EQ(memory.token_state_bytes_per_token, 4.0 + 2 * 4.0);  // word id + (topic + pool entry) per chain
  EXPECT_EQ(memory.count_table_bytes, 2U * (100U * 5U + 5U) * 4U);
}

}  // namespace
}  // namespace loupe

// Check 4 of the issue: after every sweep the counts sum to the token totals
// and every topic index is in range (check_sampler_invariants recounts
// everything from the topics), for both kernels, one or several shards,
// several chains, and with prior tuning.
#include <gtest/gtest.h>

#include "model/fit.h"
#include "model/gibbs_sampler.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

Corpus drawn_corpus() {
  SyntheticCorpusSpec spec;
  spec.topic_count = 6;
  spec.vocabulary_size = 80;
  spec.num_documents = 60;
  spec.document_length = 30;
  spec.vary_length = true;
  spec.seed = 11;
  Corpus corpus = draw_lda_corpus(spec).corpus;
  // An empty document and a one-token document must not upset anything.
  Document empty;
  empty.id = "empty";
  corpus.add_document(empty, {});
  Document single;
  single.id = "single";
  const WordId word = 3;
  corpus.add_document(single, std::span<const WordId>(&word, 1));
  return corpus;
}

struct Case {
  SamplerKind kind;
  std::uint32_t threads;
  std::uint32_t chains;
  std::uint32_t tune_every;
};

class InvariantTest : public ::testing::TestWithParam<Case> {};

TEST_P(InvariantTest, HoldAfterEverySweep) {
  const Corpus corpus = drawn_corpus();
  FitOptions options;
  options.topic_count = 7;
  options.sweeps = 25;
  options.burn_in = 5;
  options.samples = 3;
  options.sample_lag = 3;
  options.sampler = GetParam().kind;
  options.threads = GetParam().threads;
  options.chains = GetParam().chains;
  options.tune_priors_every = GetParam().tune_every;
  options.asymmetric_alpha = GetParam().tune_every > 0;
  std::size_t checks = 0;
  FitControl control;
  control.after_sweep = [&](std::uint32_t, std::uint32_t, const SamplerState& state) {
    EXPECT_NO_THROW(check_sampler_invariants(corpus, state));
    for (const double a : state.alpha) EXPECT_GT(a, 0.0);
    EXPECT_GT(state.beta, 0.0);
    ++checks;
  };
  fit_model(corpus, options, control);
  EXPECT_EQ(checks, (options.sweeps + 1) * options.chains);  // sweep 0 (initialisation) too
}

INSTANTIATE_TEST_SUITE_P(Kernels, InvariantTest,
                         ::testing::Values(Case{SamplerKind::exact, 1, 1, 0}, Case{SamplerKind::exact, 2, 1, 0},
                                           Case{SamplerKind::metropolis_hastings, 1, 1, 0},
                                           Case{SamplerKind::metropolis_hastings, 2, 1, 0},
                                           Case{SamplerKind::metropolis_hastings, 2, 3, 4},
                                           Case{SamplerKind::exact, 2, 2, 4}));

TEST(InvariantCheckTest, CatchesBrokenCounts) {
  const Corpus corpus = drawn_corpus();
  SamplerState state;
  state.topics.assign(corpus.num_tokens(), 1);
  state.counts.reset(corpus, 4);
  state.alpha.assign(4, 0.1);
  LocalCountMerger merger;
  merger.merge(corpus, state.topics, state.counts, ParallelRunner(1));
  EXPECT_NO_THROW(check_sampler_invariants(corpus, state));
  auto broken = state;
  ++broken.counts.word_topic[5];
  EXPECT_THROW(check_sampler_invariants(corpus, broken), std::logic_error);
  broken = state;
  broken.topics[0] = 9;  // out of range
  EXPECT_THROW(check_sampler_invariants(corpus, broken), std::logic_error);
  broken = state;
  ++broken.counts.topic_total[0];
  EXPECT_THROW(check_sampler_invariants(corpus, broken), std::logic_error);
}

TEST(CountMergerTest, SplittingTheWordsAcrossThreadsGivesTheSameCounts) {
  const Corpus corpus = drawn_corpus();
  SamplerState state;
  state.topics.resize(corpus.num_tokens());
  for (std::size_t i = 0; i < state.topics.size(); ++i) state.topics[i] = static_cast<Topic>((i * 7 + i / 3) % 5);
  TopicWordCounts one;
  TopicWordCounts three;
  one.reset(corpus, 5);
  three.reset(corpus, 5);
  LocalCountMerger merger;
  merger.merge(corpus, state.topics, one, ParallelRunner(1));
  merger.merge(corpus, state.topics, three, ParallelRunner(3));
  EXPECT_EQ(one.word_topic, three.word_topic);
  EXPECT_EQ(one.topic_total, three.topic_total);
  EXPECT_EQ(one.word_pool, three.word_pool);
}

TEST(DocumentShardTest, ShardsCoverEveryDocumentOnceInOrder) {
  const Corpus corpus = drawn_corpus();
  for (std::size_t count : {1, 2, 3, 7, 100}) {
    const auto shards = make_document_shards(corpus, count);
    ASSERT_EQ(shards.size(), count);
    std::size_t next = 0;
    for (const auto& shard : shards) {
      EXPECT_EQ(shard.first, next);
      EXPECT_LE(shard.first, shard.end);
      next = shard.end;
    }
    EXPECT_EQ(next, corpus.num_documents());
  }
}

}  // namespace
}  // namespace loupe

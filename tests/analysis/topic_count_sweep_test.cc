// Choosing the number of topics: the K list parser, the bad-input messages, the
// suggestion rule on hand-made results, a small sweep's bookkeeping, and (the
// reference check) a corpus drawn from the LDA generative process (JMLR, 2003)
// with 20 known topics, swept over K = 5..40.
#include "analysis/topic_count_sweep.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <atomic>
#include <string>
#include <vector>

#include "analysis/twenty_topic_corpus.h"
#include "common/error.h"
#include "model/synthetic_corpus.h"

namespace loupe {
namespace {

std::string error_of(const std::function<void()>& action) {
  try {
    action();
  } catch (const Error& e) {
    return e.what();
  }
  return "";
}

TEST(TopicCountSweepTest, ParsesListsAndRanges) {
  EXPECT_EQ(parse_topic_counts("5,10,20"), (std::vector<std::uint32_t>{5, 10, 20}));
  EXPECT_EQ(parse_topic_counts("5:20:5"), (std::vector<std::uint32_t>{5, 10, 15, 20}));
  EXPECT_EQ(parse_topic_counts("2:4"), (std::vector<std::uint32_t>{2, 3, 4}));
  // Mixed, out of order and repeated: ascending, once each.
  EXPECT_EQ(parse_topic_counts("30,5:15:5,10"), (std::vector<std::uint32_t>{5, 10, 15, 30}));
  // A range whose step overshoots the end stops before it.
  EXPECT_EQ(parse_topic_counts("5:12:5"), (std::vector<std::uint32_t>{5, 10}));
}

TEST(TopicCountSweepTest, BadListsNameTheItem) {
  const std::string word = error_of([] { parse_topic_counts("5,ten"); });
  EXPECT_NE(word.find("'ten'"), std::string::npos) << word;
  EXPECT_NE(word.find("--topics"), std::string::npos) << word;
  const std::string empty_item = error_of([] { parse_topic_counts("5,,10"); });
  EXPECT_NE(empty_item.find("''"), std::string::npos) << empty_item;
  const std::string backwards = error_of([] { parse_topic_counts("20:5:5"); });
  EXPECT_NE(backwards.find("'20:5:5'"), std::string::npos) << backwards;
  const std::string zero_step = error_of([] { parse_topic_counts("5:20:0"); });
  EXPECT_NE(zero_step.find("step"), std::string::npos) << zero_step;
  const std::string negative = error_of([] { parse_topic_counts("-3"); });
  EXPECT_NE(negative.find("'-3'"), std::string::npos) << negative;
  const std::string named = error_of([] { parse_topic_counts("x", "--sweep-topics"); });
  EXPECT_EQ(named.rfind("--sweep-topics", 0), 0u) << named;
}

SyntheticCorpus small_corpus(std::uint32_t documents = 60, std::uint32_t length = 30) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 4;
  spec.vocabulary_size = 80;
  spec.num_documents = documents;
  spec.document_length = length;
  spec.seed = 3;
  return draw_lda_corpus(spec);
}

TopicCountSweepOptions quick_options(std::vector<std::uint32_t> counts) {
  TopicCountSweepOptions options;
  options.topic_counts = std::move(counts);
  options.fit.chains = 2;
  options.fit.sweeps = 30;
  options.fit.burn_in = 10;
  options.fit.samples = 2;
  options.fit.sample_lag = 5;
  options.fit.seed = 4;
  return options;
}

TEST(TopicCountSweepTest, BadSettingsAreClearErrors) {
  const Corpus corpus = small_corpus().corpus;  // 60 documents x 30 tokens
  const auto message = [&](const TopicCountSweepOptions& o) {
    return error_of([&] { validate_sweep_options(o, corpus); });
  };
  EXPECT_NE(message(quick_options({})).find("give the numbers of topics"), std::string::npos);
  const std::string one = message(quick_options({1, 5}));
  EXPECT_NE(one.find("K = 1"), std::string::npos) << one;
  EXPECT_NE(one.find("at least 2"), std::string::npos) << one;
  const std::string too_many = message(quick_options({5, 5000}));
  EXPECT_NE(too_many.find("K = 5000"), std::string::npos) << too_many;
  EXPECT_NE(too_many.find("1800 tokens"), std::string::npos) << too_many;
  auto one_chain = quick_options({3, 5});
  one_chain.fit.chains = 1;
  const std::string chains = message(one_chain);
  EXPECT_NE(chains.find("--chains 1"), std::string::npos) << chains;
  EXPECT_NE(chains.find("at least 2"), std::string::npos) << chains;
  EXPECT_NE(message(quick_options({5, 5})).find("listed twice"), std::string::npos);
  // Nine documents: every 10th held out leaves none to score.
  const Corpus tiny = small_corpus(9, 30).corpus;
  const std::string few = error_of([&] { validate_sweep_options(quick_options({2, 3}), tiny); });
  EXPECT_NE(few.find("9 documents"), std::string::npos) << few;
  // The sweep itself checks before it fits.
  EXPECT_THROW(sweep_topic_counts(corpus, quick_options({1})), Error);
}

TopicCountResult result(std::uint32_t k, double perplexity, double npmi, double redundant, std::size_t stable) {
  TopicCountResult r;
  r.topic_count = k;
  r.perplexity = perplexity;
  r.mean_npmi = npmi;
  r.redundant_pairs = redundant;
  r.stable_topics = stable;
  return r;
}

TEST(TopicCountSweepTest, SuggestsTheLargestStableKWithoutDuplicates) {
  TopicCountSweep sweep;
  sweep.results = {result(5, 300, 0.10, 0, 5), result(10, 220, 0.18, 0, 10), result(15, 180, 0.25, 0, 14),
                   result(20, 160, 0.27, 2, 17), result(25, 158, 0.24, 4, 15)};
  suggest_topic_count(sweep);
  EXPECT_EQ(sweep.suggested, 15u);  // 14 of 15 is 93% stable; 20 has near-duplicates
  EXPECT_EQ(sweep.reason.rfind("K = 15: ", 0), 0u) << sweep.reason;
  EXPECT_NE(sweep.reason.find("14 of 15 stable"), std::string::npos) << sweep.reason;
  EXPECT_NE(sweep.reason.find("at K = 20, 2.0 pairs of near-duplicate topics"), std::string::npos) << sweep.reason;
  EXPECT_NE(sweep.reason.find("above the lowest (158.0 at K = 25)"), std::string::npos) << sweep.reason;
  EXPECT_NE(sweep.reason.find("not a verdict"), std::string::npos) << sweep.reason;
}

TEST(TopicCountSweepTest, WithoutAStableKSuggestsTheMostCoherentNearTheLowestPerplexity) {
  TopicCountSweep sweep;
  // No K is 90% stable without duplicates. Within 5% of the lowest perplexity (150): 20, 25 and 30; of
  // those, 20 has the highest NPMI. K = 10 is more coherent still but far worse on held-out documents.
  sweep.results = {result(10, 220, 0.30, 0, 6), result(20, 155, 0.28, 1, 16), result(25, 150, 0.26, 2, 18),
                   result(30, 151, 0.24, 5, 20)};
  suggest_topic_count(sweep);
  EXPECT_EQ(sweep.suggested, 20u);
  EXPECT_NE(sweep.reason.find("within 5% of the lowest"), std::string::npos) << sweep.reason;
  EXPECT_NE(sweep.reason.find("mean NPMI 0.280"), std::string::npos) << sweep.reason;
}

TEST(TopicCountSweepTest, ASmallSweepMeasuresEveryKAndRecordsItsSettings) {
  const Corpus corpus = small_corpus().corpus;
  auto options = quick_options({2, 4, 6});
  options.parallel_fits = 2;
  std::atomic<std::size_t> calls{0};
  double last_share = 0;
  options.on_progress = [&](std::size_t done, std::size_t total, double share) {
    ++calls;
    EXPECT_LE(done, total);
    EXPECT_EQ(total, 3u);
    EXPECT_GE(share, 0.0);
    EXPECT_LE(share, 1.0);
    last_share = share;
  };
  const TopicCountSweep sweep = sweep_topic_counts(corpus, options);
  ASSERT_EQ(sweep.results.size(), 3u);
  EXPECT_GT(calls.load(), 3u);
  EXPECT_DOUBLE_EQ(last_share, 1.0);
  EXPECT_EQ(sweep.held_out_documents, 6u);  // documents 10, 20, ..., 60 (the 10th of every ten)
  EXPECT_EQ(sweep.training_documents, 54u);
  EXPECT_EQ(sweep.held_out_tokens, 6u * 30u);
  for (std::size_t i = 0; i < 3; ++i) {
    const auto& r = sweep.results[i];
    EXPECT_EQ(r.topic_count, options.topic_counts[i]);
    EXPECT_GT(r.perplexity, 1.0);
    EXPECT_LE(r.perplexity, 80.0 * 1.5);  // no worse than guessing among the 80 words, with slack
    EXPECT_LE(r.perplexity_min, r.perplexity);
    EXPECT_GE(r.perplexity_max, r.perplexity);
    EXPECT_GE(r.mean_npmi, -1.0);
    EXPECT_LE(r.mean_npmi, 1.0);
    EXPECT_LE(r.mean_umass, 0.0 + 1e-9);  // log of a conditional frequency: at most 0 up to the smoothing
    EXPECT_LE(r.stable_topics, r.topic_count);
    EXPECT_GE(r.mean_stability, 0.0);
    EXPECT_LE(r.mean_stability, 1.0);
  }
  EXPECT_TRUE(std::count(options.topic_counts.begin(), options.topic_counts.end(), sweep.suggested) == 1);
  const auto json = to_json(sweep);
  EXPECT_EQ(json["seed"], 4u);
  EXPECT_EQ(json["chains"], 2u);
  EXPECT_EQ(json["suggested"], sweep.suggested);
  EXPECT_EQ(json["results"].size(), 3u);
  EXPECT_FALSE(json["results"][0].contains("seconds"));  // wall time would make reruns differ

  // Reproducible, and the number of K values fitted at once changes nothing.
  options.parallel_fits = 1;
  options.on_progress = nullptr;
  EXPECT_EQ(to_json(sweep_topic_counts(corpus, options)).dump(), json.dump());
}

// Known truth: a corpus drawn with 20 topics (model/synthetic_corpus.h), the same drawing as the topic
// alignment reference check. Named *Reference* so the sanitizer run skips it: 16 fits are slow there.
TEST(TopicCountSweepReferenceTest, SuggestsAKNearTheTrueTwentyAndFlagsSplitTopicsAtForty) {
  const SyntheticCorpus drawn = testing::twenty_topic_corpus();
  TopicCountSweepOptions options;
  options.topic_counts = parse_topic_counts("5:40:5");
  options.fit.chains = 2;
  options.fit.sweeps = 500;
  options.fit.burn_in = 200;
  options.fit.samples = 5;
  options.fit.alpha = {0.1};
  options.fit.seed = 9;
  options.parallel_fits = 2;
  const TopicCountSweep sweep = sweep_topic_counts(drawn.corpus, options);
  ASSERT_EQ(sweep.results.size(), 8u);
  for (const auto& r : sweep.results) {
    std::printf("K %2u: perplexity %.1f, NPMI %.3f, UMass %.2f, redundant %.1f, stable %zu\n", r.topic_count,
                r.perplexity, r.mean_npmi, r.mean_umass, r.redundant_pairs, r.stable_topics);
  }
  std::printf("%s\n", sweep.reason.c_str());
  EXPECT_GE(sweep.suggested, 15u) << sweep.reason;
  EXPECT_LE(sweep.suggested, 25u) << sweep.reason;
  const auto at = [&](std::uint32_t k) {
    return *std::find_if(sweep.results.begin(), sweep.results.end(),
                         [k](const TopicCountResult& r) { return r.topic_count == k; });
  };
  // Too many topics: the true themes split into halves close to each other.
  EXPECT_GE(at(40).redundant_pairs, 3.0);
  EXPECT_GT(at(40).redundant_pairs, at(20).redundant_pairs);
  // Too few: the merged themes are less coherent than the true ones.
  EXPECT_GT(at(20).mean_npmi, at(5).mean_npmi);
  // Held-out perplexity falls steeply up to the true K and little after it.
  EXPECT_LT(at(20).perplexity, 0.8 * at(10).perplexity);
  EXPECT_LT(at(40).perplexity, 1.1 * at(20).perplexity);
}

}  // namespace
}  // namespace loupe

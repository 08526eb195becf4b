// Bad input to a fit: each impossible setting is a loupe::Error whose message
// names the option (the list: K < 2, K above the token count, zero
// sweeps, non-positive priors, an empty corpus), plus the other limits.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/error.h"
#include "model/fit.h"
#include "model/lda_options.h"
#include "test_support.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;

Corpus small_corpus() { return test::make_corpus({{0, 1, 2, 3}, {2, 3, 4, 4}, {0, 4, 1}}, 5); }

FitOptions small_options() {
  FitOptions options;
  options.topic_count = 2;
  options.sweeps = 20;
  options.burn_in = 5;
  options.samples = 3;
  options.sample_lag = 2;
  return options;
}

std::string error_of(const FitOptions& options, const Corpus& corpus) {
  try {
    validate_fit_options(options, corpus);
  } catch (const Error& e) {
    return e.what();
  }
  return "";
}

TEST(FitOptionsTest, AcceptsSensibleSettings) { EXPECT_EQ(error_of(small_options(), small_corpus()), ""); }

TEST(FitOptionsTest, RejectsFewerThanTwoTopics) {
  auto options = small_options();
  options.topic_count = 1;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("--topics) is 1; it must be at least 2"));
}

TEST(FitOptionsTest, RejectsMoreTopicsThanTokens) {
  auto options = small_options();
  options.topic_count = 12;  // the corpus has 11 tokens
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("larger than the number of tokens in the corpus (11)"));
}

TEST(FitOptionsTest, RejectsMoreTopicsThanSixteenBitsHold) {
  auto options = small_options();
  options.topic_count = 70000;
  Corpus big = test::make_corpus({std::vector<WordId>(70001, 0)}, 1);
  EXPECT_THAT(error_of(options, big), HasSubstr("at most 65535"));
}

TEST(FitOptionsTest, RejectsZeroSweeps) {
  auto options = small_options();
  options.sweeps = 0;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("--sweeps) is 0"));
}

TEST(FitOptionsTest, RejectsBurnInAsLongAsTheRun) {
  auto options = small_options();
  options.burn_in = 20;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("--burn-in 20) must be smaller than the number of sweeps"));
}

TEST(FitOptionsTest, RejectsNonPositivePriors) {
  auto options = small_options();
  options.beta = 0;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("beta (--beta 0) must be a positive number"));
  options = small_options();
  options.beta = -0.5;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("beta (--beta -0.5)"));
  options = small_options();
  options.alpha = {0.0};
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("alpha (--alpha, value 1: 0) must be a positive number"));
  options = small_options();
  options.alpha = {0.5, -1.0};
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("value 2: -1"));
  options = small_options();
  options.alpha = {std::nan("")};
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("must be a positive number"));
}

TEST(FitOptionsTest, RejectsAnAlphaVectorOfTheWrongLength) {
  auto options = small_options();
  options.alpha = {0.1, 0.2, 0.3};
  EXPECT_THAT(error_of(options, small_corpus()),
              HasSubstr("--alpha has 3 values; give one value (symmetric) or one per topic (2)"));
}

TEST(FitOptionsTest, RejectsAnEmptyCorpus) {
  Corpus empty = test::make_corpus({}, 3);
  EXPECT_THAT(error_of(small_options(), empty), HasSubstr("the corpus is empty (it has 0 documents and 0 tokens)"));
  Corpus no_tokens = test::make_corpus({{}, {}}, 3);
  EXPECT_THAT(error_of(small_options(), no_tokens), HasSubstr("2 documents and 0 tokens"));
}

TEST(FitOptionsTest, RejectsSamplesThatDoNotFitAfterBurnIn) {
  auto options = small_options();
  options.samples = 10;  // sweeps 2, 4, ..., 20: the first falls inside the burn-in of 5
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("do not fit after the burn-in of 5 sweeps"));
}

TEST(FitOptionsTest, RejectsCheckpointsWithoutAFile) {
  auto options = small_options();
  options.checkpoint_every = 5;
  EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("--checkpoint-every needs a checkpoint file"));
}

TEST(FitOptionsTest, RejectsZeroChainsThreadsAndIntervals) {
  for (auto field : {&FitOptions::chains, &FitOptions::threads, &FitOptions::samples, &FitOptions::sample_lag,
                     &FitOptions::log_likelihood_every, &FitOptions::mh_steps}) {
    auto options = small_options();
    options.*field = 0;
    EXPECT_THAT(error_of(options, small_corpus()), HasSubstr("is 0; it must be at least 1"));
  }
}

TEST(FitOptionsTest, FitModelValidatesFirst) {
  auto options = small_options();
  options.topic_count = 1;
  EXPECT_THROW(fit_model(small_corpus(), options), Error);
}

TEST(FitOptionsTest, DefaultAlphaIsFiftyOverK) {
  // Griffiths & Steyvers (2004): alpha = 50 / K.
  auto options = small_options();
  options.topic_count = 25;
  EXPECT_EQ(initial_alpha(options), std::vector<double>(25, 2.0));
  options.alpha = {0.3};
  EXPECT_EQ(initial_alpha(options), std::vector<double>(25, 0.3));
  EXPECT_FALSE(alpha_is_asymmetric(options));
  options.asymmetric_alpha = true;
  EXPECT_TRUE(alpha_is_asymmetric(options));
}

TEST(FitOptionsTest, RetainedSweepsEndAtTheLastSweep) {
  auto options = small_options();
  EXPECT_EQ(retained_sweeps(options), (std::vector<std::uint32_t>{16, 18, 20}));
}

}  // namespace
}  // namespace loupe

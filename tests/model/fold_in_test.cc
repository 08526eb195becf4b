// Fold-in: theta of new documents with phi fixed.
#include <algorithm>

#include <gtest/gtest.h>

#include "common/error.h"
#include "model/fit.h"
#include "model/fold_in.h"
#include "model/random.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

TEST(FoldInTest, RecoversTheMixtureOfALongDocumentOverDistinctTopics) {
  // The bars of Griffiths & Steyvers (2004): a document drawn 60% from row 0
  // and 40% from column 2 has almost all its words' topics identified.
  const auto phi = bars_topics(5);
  Xoshiro256 rng(4);
  std::vector<WordId> words;
  for (int i = 0; i < 3000; ++i) {
    const bool row = rng.uniform() < 0.6;
    const std::uint32_t position = rng.below(5);
    words.push_back(row ? position : position * 5 + 2);  // row 0 is words 0-4; column 2 is 2, 7, ...
  }
  const TopicWordTable table(std::span<const double>(phi), 10, 25);
  const std::vector<double> alpha(10, 0.1);
  const auto theta = fold_in_document(table, alpha, words, FoldInOptions{}, 17);
  ASSERT_EQ(theta.size(), 10U);
  double sum = 0;
  for (const double t : theta) sum += t;
  EXPECT_NEAR(sum, 1.0, 1e-9);
  // Word 2 belongs to both, so the split is uncertain by a few percent.
  EXPECT_NEAR(theta[0], 0.6, 0.03);
  EXPECT_NEAR(theta[5 + 2], 0.4, 0.03);
  for (const int other : {1, 2, 3, 4, 5, 6, 8, 9}) EXPECT_LT(theta[other], 0.01);
}

TEST(FoldInTest, AnEmptyDocumentGetsThePriorMean) {
  const auto phi = bars_topics(2);  // 4 topics over 4 words
  const TopicWordTable table(std::span<const double>(phi), 4, 4);
  const auto theta = fold_in_document(table, std::vector<double>{1, 1, 2, 4}, {}, FoldInOptions{}, 1);
  EXPECT_EQ(theta, (std::vector<double>{0.125, 0.125, 0.25, 0.5}));
}

TEST(FoldInTest, RejectsWordsOutsideTheVocabularyAndWrongAlpha) {
  const auto phi = bars_topics(2);
  const TopicWordTable table(std::span<const double>(phi), 4, 4);
  const std::vector<WordId> words{1, 4};
  EXPECT_THROW(fold_in_document(table, std::vector<double>(4, 1.0), words, FoldInOptions{}, 1), Error);
  EXPECT_THROW(fold_in_document(table, std::vector<double>(3, 1.0), std::vector<WordId>{1}, FoldInOptions{}, 1), Error);
}

TEST(FoldInTest, ManyDocumentsAreRepeatableAndIndependentOfThreads) {
  const auto phi = bars_topics(3);
  const Corpus corpus = test::make_corpus({{0, 1, 2, 0, 1}, {3, 6, 3, 6}, {8, 8, 8, 5, 2}, {}}, 9);
  const TopicWordTable table(std::span<const double>(phi), 6, 9);
  const std::vector<double> alpha(6, 0.3);
  const std::vector<std::size_t> documents{0, 1, 2, 3};
  const auto one = fold_in_documents(table, alpha, corpus, documents, FoldInOptions{}, ParallelRunner(1));
  const auto two = fold_in_documents(table, alpha, corpus, documents, FoldInOptions{}, ParallelRunner(2));
  EXPECT_EQ(one, two);
  ASSERT_EQ(one.size(), 4U * 6U);
  // Words 0, 1, 2 are row 0 (topic 0); words 3, 6 are column 0 (topic 3).
  auto largest = [&](std::size_t row) {
    return std::max_element(one.begin() + static_cast<std::ptrdiff_t>(row * 6),
                            one.begin() + static_cast<std::ptrdiff_t>(row * 6 + 6)) -
           (one.begin() + static_cast<std::ptrdiff_t>(row * 6));
  };
  EXPECT_EQ(largest(0), 0);
  EXPECT_EQ(largest(1), 3);
  EXPECT_GT(one[0 * 6 + 0], 0.5);
  EXPECT_GT(one[1 * 6 + 3], 0.5);
}

TEST(FoldInTest, WithAModelMatchesWordsByTextAndDropsUnknownOnes) {
  // Fit the bars, then fold in a document from a corpus with its own
  // vocabulary order and a word the model never saw.
  SyntheticCorpusSpec spec;
  spec.topic_count = 10;
  spec.vocabulary_size = 25;
  spec.topics = bars_topics(5);
  spec.num_documents = 400;
  spec.seed = 3;
  const auto sample = draw_lda_corpus(spec);
  FitOptions options;
  options.topic_count = 10;
  options.sweeps = 60;
  options.burn_in = 20;
  options.samples = 2;
  options.sample_lag = 5;
  options.alpha = {0.5};
  const Model model = fit_model(sample.corpus, options);
  // The fitted topic that holds word "w000003" most: row 0 or column 3.
  Corpus other;
  other.vocabulary = {"never-seen", "w000003"};
  other.word_frequency = {1, 6};
  other.document_frequency = {1, 1};
  Document doc;
  doc.id = "disputed";
  other.add_document(doc, std::vector<WordId>{1, 0, 1, 1, 1, 1, 1});
  const std::vector<std::size_t> documents{0};
  const auto theta = fold_in_with_model(model, 0, other, documents, FoldInOptions{}, ParallelRunner(1));
  ASSERT_EQ(theta.size(), 10U);
  // Only the six tokens of word 3 count (the unknown word is dropped, N = 6),
  // and they all sit in the two bars through it: those get (6 + 2 x 0.5) / (6 + 10 x 0.5).
  std::vector<double> sorted = theta;
  std::sort(sorted.rbegin(), sorted.rend());
  EXPECT_NEAR(sorted[0] + sorted[1], 7.0 / 11.0, 0.01);
  const auto phi_of_word = [&](std::size_t t) { return model.phi(0, t)[3]; };
  const auto best = static_cast<std::size_t>(std::max_element(theta.begin(), theta.end()) - theta.begin());
  EXPECT_GT(phi_of_word(best), 0.1);
  EXPECT_THROW(fold_in_with_model(model, 1, other, documents, FoldInOptions{}, ParallelRunner(1)), Error);
}

}  // namespace
}  // namespace loupe

// Topic coherence: document co-occurrence counts, NPMI and UMass on a worked
// example, segments counted as one document, and a check against NumPy.
#include "analysis/topic_coherence.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <fstream>
#include <random>
#include <string>
#include <vector>

#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

constexpr WordId kApple = 0, kBanana = 1, kCherry = 2, kDate = 3;

// Sets word_frequency and document_frequency from the tokens (each Corpus
// document counted on its own, which is exact where there are no segments).
void fill_frequencies(Corpus& c) {
  c.word_frequency.assign(c.vocabulary_size(), 0);
  c.document_frequency.assign(c.vocabulary_size(), 0);
  for (std::size_t d = 0; d < c.num_documents(); ++d) {
    std::vector<bool> seen(c.vocabulary_size(), false);
    for (const WordId w : c.document_tokens(d)) {
      ++c.word_frequency[w];
      if (!seen[w]) ++c.document_frequency[w];
      seen[w] = true;
    }
  }
}

Document plain(const std::string& id) {
  Document d;
  d.id = id;
  return d;
}

// The five documents of the header's example:
//   d0: apple banana          d1: apple banana cherry banana
//   d2: apple apple           d3: cherry date           d4: banana
Corpus fruit_corpus() {
  Corpus c;
  c.vocabulary = {"apple", "banana", "cherry", "date"};
  c.add_document(plain("d0"), std::vector<WordId>{kApple, kBanana});
  c.add_document(plain("d1"), std::vector<WordId>{kApple, kBanana, kCherry, kBanana});
  c.add_document(plain("d2"), std::vector<WordId>{kApple, kApple});
  c.add_document(plain("d3"), std::vector<WordId>{kCherry, kDate});
  c.add_document(plain("d4"), std::vector<WordId>{kBanana});
  fill_frequencies(c);
  return c;
}

TEST(TopicCoherenceTest, CountsDocumentsNotTokens) {
  const Corpus c = fruit_corpus();
  const std::vector<WordId> words{kApple, kBanana, kCherry, kDate};
  const DocumentCooccurrence counts(c, words);
  EXPECT_EQ(counts.num_documents(), 5u);
  EXPECT_EQ(counts.document_count(kApple), 3u);       // d0 d1 d2 (twice in d2, counted once)
  EXPECT_EQ(counts.document_count(kBanana), 3u);      // d0 d1 d4
  EXPECT_EQ(counts.document_count(kCherry), 2u);      // d1 d3
  EXPECT_EQ(counts.document_count(kDate), 1u);        // d3
  EXPECT_EQ(counts.pair_count(kApple, kBanana), 2u);  // d0 d1
  EXPECT_EQ(counts.pair_count(kBanana, kApple), 2u);
  EXPECT_EQ(counts.pair_count(kApple, kCherry), 1u);   // d1
  EXPECT_EQ(counts.pair_count(kBanana, kCherry), 1u);  // d1
  EXPECT_EQ(counts.pair_count(kApple, kDate), 0u);
  EXPECT_EQ(counts.pair_count(kCherry, kDate), 1u);  // d3
}

TEST(TopicCoherenceTest, WorkedExampleNpmiAndUMass) {
  const Corpus c = fruit_corpus();
  const std::vector<WordId> topic{kApple, kBanana, kCherry};
  const DocumentCooccurrence counts(c, topic);
  // N = 5; D(apple) = 3, D(banana) = 3, D(cherry) = 2;
  // D(apple, banana) = 2, D(apple, cherry) = 1, D(banana, cherry) = 1.
  // NPMI(apple, banana)  = log((2/5) / ((3/5)(3/5))) / -log(2/5) = log(10/9) / log(5/2)
  // NPMI(apple, cherry)  = log((1/5) / ((3/5)(2/5))) / -log(1/5) = log(5/6) / log(5)
  // NPMI(banana, cherry) = log((1/5) / ((3/5)(2/5))) / -log(1/5) = log(5/6) / log(5)
  const double npmi_ab = std::log((2.0 / 5) / ((3.0 / 5) * (3.0 / 5))) / -std::log(2.0 / 5);
  const double npmi_ac = std::log((1.0 / 5) / ((3.0 / 5) * (2.0 / 5))) / -std::log(1.0 / 5);
  EXPECT_NEAR(npmi_ab, std::log(10.0 / 9) / std::log(5.0 / 2), 1e-15);
  EXPECT_NEAR(npmi_coherence(counts, topic), (npmi_ab + 2 * npmi_ac) / 3, 1e-12);
  // UMass, order apple, banana, cherry: pairs (m, l) = (banana, apple), (cherry, apple), (cherry, banana):
  // log((2 + 1) / 3) = 0, log((1 + 1) / 3), log((1 + 1) / 3); the mean over 3 pairs.
  const double umass = (std::log((2.0 + 1) / 3) + std::log((1.0 + 1) / 3) + std::log((1.0 + 1) / 3)) / 3;
  EXPECT_NEAR(umass_coherence(counts, topic), umass, 1e-12);
  EXPECT_NEAR(umass, 2 * std::log(2.0 / 3) / 3, 1e-15);
}

TEST(TopicCoherenceTest, ConvenienceScoresEveryTopicFromOneTable) {
  const Corpus c = fruit_corpus();
  const TopicCoherence result = topic_coherence(c, {{kApple, kBanana, kCherry}, {kApple, kDate}});
  ASSERT_EQ(result.npmi.size(), 2u);
  ASSERT_EQ(result.umass.size(), 2u);
  const double npmi0 = (std::log(10.0 / 9) / std::log(5.0 / 2) + 2 * std::log(5.0 / 6) / std::log(5.0)) / 3;
  const double umass0 = 2 * std::log(2.0 / 3) / 3;
  EXPECT_NEAR(result.npmi[0], npmi0, 1e-12);
  EXPECT_NEAR(result.umass[0], umass0, 1e-12);
  // apple and date never share a document: NPMI = -1; UMass = log((0 + 1) / D(apple)) = log(1/3).
  EXPECT_DOUBLE_EQ(result.npmi[1], -1.0);
  EXPECT_NEAR(result.umass[1], std::log(1.0 / 3), 1e-12);
  EXPECT_NEAR(result.mean_npmi, (npmi0 - 1) / 2, 1e-12);
  EXPECT_NEAR(result.mean_umass, (umass0 + std::log(1.0 / 3)) / 2, 1e-12);
}

TEST(TopicCoherenceTest, PairInEveryDocumentScoresOne) {
  Corpus c;
  c.vocabulary = {"x", "y"};
  c.add_document(plain("a"), std::vector<WordId>{0, 1});
  c.add_document(plain("b"), std::vector<WordId>{1, 0});
  fill_frequencies(c);
  const std::vector<WordId> topic{0, 1};
  const DocumentCooccurrence counts(c, topic);
  // P(x, y) = 1: the formula is 0/0; the convention is 1. UMass: log((2 + 1) / 2).
  EXPECT_DOUBLE_EQ(npmi_coherence(counts, topic), 1.0);
  EXPECT_NEAR(umass_coherence(counts, topic), std::log(3.0 / 2), 1e-15);
}

TEST(TopicCoherenceTest, SegmentsOfOneParentCountAsOneDocument) {
  Corpus c;
  c.vocabulary = {"x", "y", "z"};
  auto segment = [](const std::string& parent, std::uint32_t index, std::uint32_t count) {
    Document d;
    d.id = parent + "#" + std::to_string(index + 1);
    d.parent_id = parent;
    d.segment_index = index;
    d.segment_count = count;
    return d;
  };
  // Source "a" cut into three segments {x}, {y}, {x}, with a plain "b" = {x z}
  // standing between them; source "c" in two segments {z}, {y}.
  c.add_document(segment("a", 0, 3), std::vector<WordId>{0});
  c.add_document(plain("b"), std::vector<WordId>{0, 2});
  c.add_document(segment("a", 1, 3), std::vector<WordId>{1});
  c.add_document(segment("c", 0, 2), std::vector<WordId>{2});
  c.add_document(segment("a", 2, 3), std::vector<WordId>{0});
  c.add_document(segment("c", 1, 2), std::vector<WordId>{1});
  c.word_frequency = {3, 2, 2};
  c.document_frequency = {2, 2, 2};  // documents a, b, c
  const std::vector<WordId> words{0, 1, 2};
  const DocumentCooccurrence counts(c, words);
  EXPECT_EQ(counts.num_documents(), 3u);    // a, b, c
  EXPECT_EQ(counts.document_count(0), 2u);  // a, b
  EXPECT_EQ(counts.document_count(1), 2u);  // a, c
  EXPECT_EQ(counts.document_count(2), 2u);  // b, c
  EXPECT_EQ(counts.pair_count(0, 1), 1u);   // a: x and y in different segments
  EXPECT_EQ(counts.pair_count(0, 2), 1u);   // b
  EXPECT_EQ(counts.pair_count(1, 2), 1u);   // c
  // Every pair: N = 3, D(w) = 2, D(pair) = 1: NPMI = log((1/3) / (2/3)^2) / log 3 = log(3/4) / log 3.
  EXPECT_NEAR(npmi_coherence(counts, words), std::log(3.0 / 4) / std::log(3.0), 1e-12);
}

TEST(TopicCoherenceTest, RejectsBadInput) {
  const Corpus c = fruit_corpus();
  const std::vector<WordId> outside{kApple, 9};
  EXPECT_THROW(DocumentCooccurrence(c, outside), Error);
  const std::vector<WordId> counted{kApple, kBanana};
  const DocumentCooccurrence counts(c, counted);
  EXPECT_FALSE(counts.tracks(kCherry));
  EXPECT_THROW(static_cast<void>(counts.document_count(kCherry)), Error);
  const std::vector<WordId> one{kApple};
  EXPECT_THROW(static_cast<void>(npmi_coherence(counts, one)), Error);
  EXPECT_THROW(static_cast<void>(umass_coherence(counts, one)), Error);
  // A word in no document: UMass divides by D(w_l) = 0 and refuses.
  Corpus sparse = fruit_corpus();
  sparse.vocabulary.push_back("elderberry");
  fill_frequencies(sparse);
  const std::vector<WordId> absent_first{4, kApple};
  const DocumentCooccurrence sparse_counts(sparse, absent_first);
  EXPECT_DOUBLE_EQ(npmi_coherence(sparse_counts, absent_first), -1.0);
  EXPECT_THROW(static_cast<void>(umass_coherence(sparse_counts, absent_first)), Error);
}

// Outside reference: direct Python/NumPy computation from the same co-occurrence
// counts, tests/analysis/reference/coherence_reference.py (binary document x word
// matrix X, counts X^T X, then NPMI and UMass per topic).
TEST(TopicCoherenceReferenceTest, MatchesNumPy) {
  constexpr std::size_t kWords = 50, kDocuments = 200, kTopics = 6, kTopWords = 10;
  std::mt19937 rng(20240611);
  Corpus c;
  for (std::size_t w = 0; w < kWords; ++w) c.vocabulary.push_back("w" + std::to_string(w));
  // Zipf-like word weights, so that pair counts range from zero to many.
  std::vector<double> weights(kWords);
  for (std::size_t w = 0; w < kWords; ++w) weights[w] = 1.0 / static_cast<double>(w + 1);
  std::discrete_distribution<WordId> word(weights.begin(), weights.end());
  std::uniform_int_distribution<int> length(0, 25), segments(1, 3), coin(0, 3);
  std::ofstream corpus_file;
  testing::TempFolder folder("coherence");
  corpus_file.open(folder.file("corpus.txt"));
  std::size_t source = 0;
  while (c.num_documents() < kDocuments) {
    // One source in four is cut into 1-3 segments, written under its parent's name.
    const bool cut = coin(rng) == 0;
    const int pieces = cut ? segments(rng) : 1;
    const std::string name = "s" + std::to_string(source++);
    for (int piece = 0; piece < pieces; ++piece) {
      Document d = plain(cut ? name + "#" + std::to_string(piece + 1) : name);
      if (cut) {
        d.parent_id = name;
        d.segment_index = static_cast<std::uint32_t>(piece);
        d.segment_count = static_cast<std::uint32_t>(pieces);
      }
      std::vector<WordId> tokens(static_cast<std::size_t>(length(rng)));
      for (auto& t : tokens) t = word(rng);
      corpus_file << name;
      for (const WordId t : tokens) corpus_file << " " << t;
      corpus_file << "\n";
      c.add_document(std::move(d), tokens);
    }
  }
  corpus_file.close();
  fill_frequencies(c);
  // Topics: distinct words in random order, drawn among words that occur (UMass needs D(w) > 0).
  std::vector<WordId> occurring;
  for (WordId w = 0; w < kWords; ++w) {
    if (c.word_frequency[w] > 0) occurring.push_back(w);
  }
  ASSERT_GE(occurring.size(), kTopWords);
  std::vector<std::vector<WordId>> topics;
  std::ofstream topics_file(folder.file("topics.txt"));
  for (std::size_t k = 0; k < kTopics; ++k) {
    std::shuffle(occurring.begin(), occurring.end(), rng);
    topics.emplace_back(occurring.begin(), occurring.begin() + kTopWords);
    for (std::size_t i = 0; i < kTopWords; ++i) topics_file << (i ? " " : "") << topics.back()[i];
    topics_file << "\n";
  }
  topics_file.close();

  const auto reference =
      testing::run_python("coherence_reference.py", testing::shell_quote(folder.file("corpus.txt")) + " " +
                                                        testing::shell_quote(folder.file("topics.txt")));
  ASSERT_EQ(reference.exit_code, 0) << reference.text;
  const TopicCoherence result = topic_coherence(c, topics);
  for (std::size_t k = 0; k < kTopics; ++k) {
    EXPECT_NEAR(result.npmi[k], reference.at("npmi_" + std::to_string(k)), 1e-9) << "topic " << k;
    EXPECT_NEAR(result.umass[k], reference.at("umass_" + std::to_string(k)), 1e-9) << "topic " << k;
  }
}

}  // namespace
}  // namespace loupe

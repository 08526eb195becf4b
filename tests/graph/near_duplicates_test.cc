#include "graph/near_duplicates.h"

#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_builder.h"
#include "graph_test_support.h"
#include "model/random.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

// Random documents over a large vocabulary, and copies of some of them with
// a few words replaced, inserted or deleted.
struct PlantedCopies {
  std::vector<std::vector<WordId>> documents;
  std::vector<std::pair<std::uint32_t, std::uint32_t>> copies;  // (original, copy)
};

PlantedCopies planted_copies(std::size_t originals, std::size_t copies, std::size_t edits, std::uint64_t seed) {
  Xoshiro256 random(seed);
  PlantedCopies planted;
  const std::uint32_t vocabulary = 5000;
  for (std::size_t d = 0; d < originals; ++d) {
    std::vector<WordId> doc(150 + random.below(100));
    for (auto& w : doc) w = random.below(vocabulary);
    planted.documents.push_back(doc);
  }
  for (std::size_t c = 0; c < copies; ++c) {
    const auto original = static_cast<std::uint32_t>(c * 3);
    std::vector<WordId> doc = planted.documents[original];
    for (std::size_t e = 0; e < edits; ++e) {
      const std::size_t at = random.below(static_cast<std::uint32_t>(doc.size()));
      switch (e % 3) {
        case 0:
          doc[at] = random.below(vocabulary);
          break;
        case 1:
          doc.insert(doc.begin() + static_cast<std::ptrdiff_t>(at), random.below(vocabulary));
          break;
        default:
          doc.erase(doc.begin() + static_cast<std::ptrdiff_t>(at));
          break;
      }
    }
    planted.copies.emplace_back(original, static_cast<std::uint32_t>(planted.documents.size()));
    planted.documents.push_back(doc);
  }
  return planted;
}

TEST(NearDuplicatesTest, ShinglesAndJaccardByHand) {
  // Tokens (1 2 3 1 2) -> 2-word shingles {12, 23, 31} (12 twice); (1 2) -> {12}; (7) -> {7}.
  const Corpus corpus = test::corpus_from_tokens({{1, 2, 3, 1, 2}, {1, 2}, {7}, {}}, 10);
  const ShingleSets sets = word_shingles(corpus, 2);
  EXPECT_EQ(sets.of(0).size(), 3u);
  EXPECT_EQ(sets.of(1).size(), 1u);
  ASSERT_EQ(sets.of(2).size(), 1u);
  EXPECT_TRUE(sets.of(3).empty());
  const std::vector<WordId> seven = {7};
  EXPECT_EQ(sets.of(2)[0], shingle_hash(seven));
  EXPECT_DOUBLE_EQ(jaccard_similarity(sets.of(0), sets.of(1)), 1.0 / 3.0);
  EXPECT_DOUBLE_EQ(jaccard_similarity(sets.of(0), sets.of(2)), 0.0);
  EXPECT_DOUBLE_EQ(jaccard_similarity(sets.of(3), sets.of(3)), 0.0);
  // Word order matters: (2 1) shares no 2-word shingle with (1 2).
  const std::vector<WordId> a = {1, 2}, b = {2, 1};
  EXPECT_NE(shingle_hash(a), shingle_hash(b));
  EXPECT_THROW(word_shingles(corpus, 0), Error);
}

TEST(NearDuplicatesTest, BandingFollowsTheSCurve) {
  const Banding banding = choose_banding(128, 0.8);
  EXPECT_EQ(banding.bands, 25u);
  EXPECT_EQ(banding.rows, 5u);
  EXPECT_GE(candidate_probability(0.8, banding), 0.999);
  // 1 - (1 - 0.8^6)^21 = 0.9983 < 0.999, so 6 rows would be too many.
  EXPECT_LT(candidate_probability(0.8, Banding{21, 6}), 0.999);
  EXPECT_NEAR(candidate_probability(0.5, Banding{1, 1}), 0.5, 1e-15);
  EXPECT_NEAR(candidate_probability(0.3, banding), 1.0 - std::pow(1.0 - std::pow(0.3, 5), 25), 1e-15);
}

TEST(NearDuplicatesTest, FindsPlantedCopiesWithExactJaccard) {
  const PlantedCopies planted = planted_copies(400, 40, 4, 5);
  const Corpus corpus = test::corpus_from_tokens(planted.documents, 5000);
  NearDuplicateOptions options;
  options.threshold = 0.8;
  options.threads = 2;
  const NearDuplicateResult result = find_near_duplicates(corpus, options);
  const ShingleSets sets = word_shingles(corpus, options.shingle_words);
  // Brute force over every pair: which pairs truly reach the threshold.
  std::set<std::pair<std::uint32_t, std::uint32_t>> truth;
  for (std::uint32_t i = 0; i < corpus.num_documents(); ++i)
    for (std::uint32_t j = i + 1; j < corpus.num_documents(); ++j)
      if (jaccard_similarity(sets.of(i), sets.of(j)) >= 0.8) truth.emplace(i, j);
  EXPECT_GE(truth.size(), 40u);
  std::set<std::pair<std::uint32_t, std::uint32_t>> found;
  for (const auto& p : result.pairs) {
    EXPECT_DOUBLE_EQ(p.jaccard, jaccard_similarity(sets.of(p.first), sets.of(p.second)));
    EXPECT_NEAR(p.estimate, p.jaccard, 0.2);
    EXPECT_TRUE(std::isnan(p.topic_distance));
    found.emplace(p.first, p.second);
  }
  EXPECT_EQ(found, truth);
  for (const auto& [original, copy] : planted.copies) EXPECT_EQ(result.cluster_of[original], result.cluster_of[copy]);
  EXPECT_EQ(result.clusters.size(), 40u);
  EXPECT_EQ(result.banding.rows, 5u);
  EXPECT_GT(result.candidates, 0u);
  // Highest similarity first.
  for (std::size_t i = 1; i < result.pairs.size(); ++i) EXPECT_GE(result.pairs[i - 1].jaccard, result.pairs[i].jaccard);
}

TEST(NearDuplicatesTest, ResultDoesNotDependOnThreadsAndSeedIsRecorded) {
  const PlantedCopies planted = planted_copies(200, 20, 6, 8);
  const Corpus corpus = test::corpus_from_tokens(planted.documents, 5000);
  NearDuplicateOptions options;
  options.threshold = 0.6;
  options.seed = 31;
  options.threads = 1;
  const auto one = find_near_duplicates(corpus, options);
  options.threads = 3;
  const auto three = find_near_duplicates(corpus, options);
  ASSERT_EQ(one.pairs.size(), three.pairs.size());
  for (std::size_t i = 0; i < one.pairs.size(); ++i) {
    EXPECT_EQ(one.pairs[i].first, three.pairs[i].first);
    EXPECT_EQ(one.pairs[i].estimate, three.pairs[i].estimate);
  }
  const auto json = near_duplicates_json(one, corpus);
  EXPECT_EQ(json["settings"]["seed"], 31);
  EXPECT_EQ(json["pairs"].size(), one.pairs.size());
  const std::string csv = near_duplicates_csv(one, corpus);
  EXPECT_EQ(csv.substr(0, csv.find('\n')),
            "first,second,first_group,second_group,jaccard,minhash_estimate,shared_shingles,topic_distance,cluster");
}

TEST(NearDuplicatesTest, TopicDistancesTellCopiesFromKin) {
  const PlantedCopies planted = planted_copies(30, 3, 2, 9);
  const Corpus corpus = test::corpus_from_tokens(planted.documents, 5000);
  NearDuplicateResult result = find_near_duplicates(corpus, NearDuplicateOptions{});
  ASSERT_FALSE(result.pairs.empty());
  ProfileMatrix theta = test::random_profiles(corpus.num_documents(), 4, 1.0, 3);
  add_topic_distances(result, theta);
  for (const auto& p : result.pairs) EXPECT_NEAR(p.topic_distance, hellinger_between(theta, p.first, p.second), 1e-15);
  EXPECT_THROW(add_topic_distances(result, test::random_profiles(5, 4, 1.0, 3)), Error);
}

TEST(NearDuplicatesTest, BadOptionsAreRefused) {
  const Corpus corpus = test::corpus_from_tokens({{1, 2, 3}, {1, 2, 3}}, 5);
  for (const double bad : {0.0, -1.0, 1.01, std::nan("")}) {
    NearDuplicateOptions options;
    options.threshold = bad;
    try {
      find_near_duplicates(corpus, options);
      FAIL() << "threshold " << bad << " accepted";
    } catch (const Error& e) {
      EXPECT_NE(std::string(e.what()).find("(0, 1]"), std::string::npos) << e.what();
    }
  }
  NearDuplicateOptions options;
  options.num_hashes = 0;
  EXPECT_THROW(find_near_duplicates(corpus, options), Error);
  options.num_hashes = 8;
  options.rows_per_band = 9;
  EXPECT_THROW(find_near_duplicates(corpus, options), Error);
  // Threshold 1 keeps exact copies only.
  options = NearDuplicateOptions{};
  options.threshold = 1.0;
  const auto exact = find_near_duplicates(corpus, options);
  ASSERT_EQ(exact.pairs.size(), 1u);
  EXPECT_DOUBLE_EQ(exact.pairs[0].jaccard, 1.0);
}

// The demo corpus plants one near copy: demo/truth.json names dsp-06 as a copy
// of gr-1901-007 with small edits. It must be found, and be the closest pair.
TEST(NearDuplicatesTest, FindsTheDemoCorpusNearCopy) {
  const std::string demo = std::string(LOUPE_SOURCE_DIR) + "/demo/harbour-letters";
  const IngestOptions ingest;
  IngestReport report;
  const Corpus corpus = build_corpus(demo, ingest, &report);
  const auto truth = nlohmann::json::parse(read_whole_file(std::string(LOUPE_SOURCE_DIR) + "/demo/truth.json"));
  const std::string copy = truth["near_copy"]["id"];
  const std::string original = truth["near_copy"]["original_id"];
  std::string copy_id, original_id;
  for (const auto& doc : corpus.documents) {
    if (doc.id.size() >= copy.size() && doc.id.compare(doc.id.size() - copy.size(), copy.size(), copy) == 0)
      copy_id = doc.id;
    if (doc.id.size() >= original.size() &&
        doc.id.compare(doc.id.size() - original.size(), original.size(), original) == 0)
      original_id = doc.id;
  }
  ASSERT_FALSE(copy_id.empty());
  ASSERT_FALSE(original_id.empty());
  const NearDuplicateResult result = find_near_duplicates(corpus, NearDuplicateOptions{});
  ASSERT_FALSE(result.pairs.empty()) << "no near-duplicates found in the demo corpus";
  const auto& best = result.pairs.front();
  const std::set<std::string> best_ids = {corpus.documents[best.first].id, corpus.documents[best.second].id};
  EXPECT_EQ(best_ids, (std::set<std::string>{copy_id, original_id}));
  EXPECT_EQ(result.pairs.size(), 1u) << "other pairs above the default threshold";
}

}  // namespace
}  // namespace loupe

// Group comparison on a fitted model: every chain, disputed documents left
// out, strata from a metadata column, and `loupe compare` end to end.
#include "analysis/group_comparison.h"

#include <gtest/gtest.h>

#include <fstream>
#include <random>

#include "analysis_test_support.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "model/fit.h"
#include "model/model_file.h"

namespace loupe {
namespace {

// 4 topics of 10 words each over 40 words; a document of group g (g < 3) takes
// 70% of its 60 tokens from topic g and the rest from any word. Every 10th
// document is disputed; a "decade" column alternates 1840 / 1850.
Corpus planted_corpus() {
  Corpus corpus;
  for (int w = 0; w < 40; ++w) corpus.vocabulary.push_back("w" + std::to_string(w));
  corpus.groups = {"harbour", "customs", "parish"};
  corpus.metadata_columns = {"decade", "box"};
  corpus.word_frequency.assign(40, 0);
  corpus.document_frequency.assign(40, 0);
  std::mt19937_64 rng(5);
  std::uniform_real_distribution<double> uniform(0, 1);
  std::uniform_int_distribution<WordId> any(0, 39), within(0, 9);
  for (int d = 0; d < 90; ++d) {
    Document doc;
    doc.id = "doc" + std::to_string(d);
    doc.group = static_cast<std::uint32_t>(d % 3);
    doc.role = d % 10 == 9 ? DocumentRole::disputed : DocumentRole::known;
    doc.metadata = {d % 2 == 0 ? "1840" : "1850", "B" + std::to_string(d % 5)};
    std::vector<WordId> words;
    std::vector<bool> seen(40, false);
    for (int t = 0; t < 60; ++t) {
      const WordId w = uniform(rng) < 0.7 ? static_cast<WordId>(10 * (d % 3)) + within(rng) : any(rng);
      words.push_back(w);
      ++corpus.word_frequency[w];
      if (!seen[w]) ++corpus.document_frequency[w];
      seen[w] = true;
    }
    corpus.add_document(std::move(doc), words);
  }
  return corpus;
}

const Corpus& corpus() {
  static const Corpus c = planted_corpus();
  return c;
}

const Model& model() {
  static const Model m = [] {
    FitOptions options;
    options.topic_count = 4;
    options.sweeps = 150;
    options.alpha = {0.5};
    options.burn_in = 100;
    options.chains = 2;
    options.samples = 4;
    options.sample_lag = 10;
    options.seed = 3;
    return fit_model(corpus(), options);
  }();
  return m;
}

GroupComparisonOptions with(std::size_t permutations) {
  GroupComparisonOptions options;
  options.tests.permutation.permutations = permutations;
  options.tests.permutation.seed = 9;
  options.tests.bootstrap_replicates = 99;
  return options;
}

TEST(GroupComparisonTest, EveryTestOnEveryChainWithDisputedLeftOut) {
  const auto comparison = compare_groups(model(), &corpus(), with(199));
  ASSERT_EQ(comparison.chains.size(), 2u);
  EXPECT_EQ(comparison.disputed_left_out, 9u);
  EXPECT_EQ(comparison.documents_compared, 81u);
  for (int chain = 0; chain < 2; ++chain) {
    const auto& records = comparison.chains[static_cast<std::size_t>(chain)].records;
    ASSERT_EQ(records[0].method, "PERMANOVA");
    EXPECT_EQ(records[0].chain, chain);
    EXPECT_EQ(records[0].sample_size, 81u);
    EXPECT_EQ(records[0].num_groups, 3u);
    EXPECT_DOUBLE_EQ(records[0].p_value, 0.005);  // planted differences: the smallest p with 199 permutations
    EXPECT_GT(records[0].effect_size, 0.3);
    // Each group has a topic far more common in it than in the rest.
    for (const std::string group : {"harbour", "customs", "parish"}) {
      double best = 0;
      for (const auto& r : records) {
        if (r.method == "distinctive topic" && r.comparison == group + " vs rest" && r.adjusted_p_value <= 0.05) {
          best = std::max(best, r.statistic);
        }
      }
      EXPECT_GT(best, 0.3) << group << ", chain " << chain;
    }
  }
  // Across chains: every test, each over both chains, with its conclusion on both.
  ASSERT_TRUE(comparison.topics_aligned);
  ASSERT_FALSE(comparison.summaries.empty());
  EXPECT_EQ(comparison.summaries[0].method, "PERMANOVA");
  EXPECT_EQ(comparison.summaries[0].chains, 2u);
  EXPECT_EQ(comparison.summaries[0].significance.conclusion, "p <= 0.05");
  EXPECT_EQ(comparison.summaries[0].significance.agreement, ChainAgreement::all);
  // Topics are aligned to chain 1's, so each group's planted topic has one number on both chains: its
  // distinctive-topic test is significant with a large difference on both.
  for (const std::string group : {"harbour", "customs", "parish"}) {
    const ChainSummary* planted = nullptr;
    for (const auto& s : comparison.summaries) {
      if (s.method == "distinctive topic" && s.comparison == group + " vs rest" &&
          (planted == nullptr || s.statistic.median > planted->statistic.median)) {
        planted = &s;
      }
    }
    ASSERT_NE(planted, nullptr) << group;
    EXPECT_EQ(planted->chains, 2u);
    EXPECT_GT(planted->statistic.min, 0.3) << group;  // the smaller of the two chains' differences
    EXPECT_EQ(planted->significance.conclusion, "p <= 0.05") << group;
    EXPECT_EQ(planted->significance.backing, 2u) << group;
  }
  const auto json = to_json(comparison);
  EXPECT_EQ(json["across_chains"][0]["agreement"], "all chains");
  EXPECT_EQ(json["topics_aligned"], true);
  EXPECT_EQ(json["chains"].size(), 2u);
  EXPECT_EQ(json["disputed_left_out"], 9);
}

TEST(GroupComparisonTest, WithoutAlignmentOnlyTestsWithoutATopicAreSummarised) {
  auto options = with(0);
  options.align_topics = false;
  const auto comparison = compare_groups(model(), nullptr, options);
  EXPECT_FALSE(comparison.topics_aligned);
  ASSERT_FALSE(comparison.summaries.empty());
  for (const auto& s : comparison.summaries) EXPECT_LT(s.topic, 0) << s.method;
  // Chain 1 is the reference: aligning never renumbers its topics.
  const auto aligned = compare_groups(model(), nullptr, with(0));
  ASSERT_EQ(aligned.chains[0].records.size(), comparison.chains[0].records.size());
  for (std::size_t i = 0; i < aligned.chains[0].records.size(); ++i) {
    EXPECT_EQ(aligned.chains[0].records[i].topic, comparison.chains[0].records[i].topic);
    EXPECT_EQ(aligned.chains[0].records[i].statistic, comparison.chains[0].records[i].statistic);
  }
}

TEST(GroupComparisonTest, IncludingDisputedDocumentsCountsThem) {
  auto options = with(0);
  options.include_disputed = true;
  const auto comparison = compare_groups(model(), nullptr, options);
  EXPECT_EQ(comparison.documents_compared, 90u);
  EXPECT_EQ(comparison.chains[0].records[0].sample_size, 90u);
}

TEST(GroupComparisonTest, StrataComeFromTheCorpusMetadata) {
  auto options = with(99);
  options.strata_column = "decade";
  const auto comparison = compare_groups(model(), &corpus(), options);
  EXPECT_EQ(comparison.chains[0].records[0].strata, "decade");
  options.strata_column = "archive";
  try {
    compare_groups(model(), &corpus(), options);
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_STREQ(error.what(), "no metadata column 'archive'; the corpus has: decade, box (choose one of these)");
  }
  EXPECT_THROW(compare_groups(model(), nullptr, options), Error);  // strata need the corpus
  auto weighted = with(9);
  weighted.tests.weight_by_length = true;
  EXPECT_THROW(compare_groups(model(), nullptr, weighted), Error);
  EXPECT_NO_THROW(compare_groups(model(), &corpus(), weighted));
}

TEST(GroupComparisonTest, CompareCommandEndToEnd) {
  testing::TempFolder folder("analysis");
  write_corpus(corpus(), folder.file("letters.corpus"));
  write_model(model(), folder.file("letters.model"));
  const std::string base =
      testing::shell_quote(LOUPE_CLI) + " compare " + testing::shell_quote(folder.file("letters.model")) +
      " --corpus " + testing::shell_quote(folder.file("letters.corpus")) + " --permutations 99 --bootstrap 49 --seed 4";
  const auto run =
      testing::run_reference(base + " --strata decade --json " + testing::shell_quote(folder.file("out.json")) +
                             " --csv " + testing::shell_quote(folder.file("out.csv")));
  ASSERT_EQ(run.exit_code, 0) << run.text;
  EXPECT_NE(run.text.find("Compared 81 documents in 3 groups over 2 chains; 9 disputed documents left out."),
            std::string::npos)
      << run.text;
  EXPECT_NE(run.text.find("permutations within strata of 'decade'"), std::string::npos) << run.text;
  EXPECT_NE(run.text.find("PERMANOVA"), std::string::npos);
  // Each conclusion with its agreement across chains; distinctive topics with the chains that find them.
  EXPECT_NE(run.text.find("conclusion across chains"), std::string::npos) << run.text;
  EXPECT_NE(run.text.find("p <= 0.05 in both chains"), std::string::npos) << run.text;
  EXPECT_NE(run.text.find("Distinctive topics: more common in a group than in the rest (q <= 0.05), topics "
                          "numbered as chain 1's"),
            std::string::npos)
      << run.text;
  EXPECT_NE(run.text.find("distinctive in"), std::string::npos) << run.text;
  std::ifstream json_file(folder.file("out.json"));
  const auto json = nlohmann::json::parse(json_file);
  EXPECT_EQ(json["chains"].size(), 2u);
  EXPECT_EQ(json["chains"][1]["records"][0]["seed"], 4);
  std::ifstream csv_file(folder.file("out.csv"));
  std::string header;
  std::getline(csv_file, header);
  EXPECT_EQ(header, csv_header());

  const auto missing = testing::run_reference(base + " --strata shelf");
  EXPECT_EQ(missing.exit_code, 1);
  EXPECT_NE(missing.text.find("no metadata column 'shelf'; the corpus has: decade, box"), std::string::npos)
      << missing.text;
  const auto no_corpus =
      testing::run_reference(testing::shell_quote(LOUPE_CLI) + " compare " +
                             testing::shell_quote(folder.file("letters.model")) + " --strata decade");
  EXPECT_EQ(no_corpus.exit_code, 1);
  EXPECT_NE(no_corpus.text.find("add --corpus FILE"), std::string::npos) << no_corpus.text;
}

}  // namespace
}  // namespace loupe

// Comparing groups with a fitted model: the tests of analysis/group_tests.h on
// every chain's document-topic shares (topics aligned to chain 1's), and each
// test's median, range and agreement across chains. Disputed documents are left out of group tests unless asked for.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analysis/group_tests.h"
#include "analysis/test_record.h"
#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe {

struct GroupComparisonOptions {
  GroupTestOptions tests;         // one seed for every chain, so chains differ by the model alone
  bool include_disputed = false;  // disputed documents with a group join their group
  std::string strata_column;      // a corpus metadata column; "" = free permutations
  // With two or more chains, number every chain's topics as chain 1's (analysis/topic_alignment.h), so that
  // a per-topic test means the same topic on every chain and can be summarised across chains.
  bool align_topics = true;
  double level = 0.05;  // a test's conclusion on a chain: p (adjusted p when it has one) <= level
};

struct GroupComparison {
  std::vector<GroupTestResults> chains;  // one per chain, in chain order
  // Across chains: every test when topics are aligned; otherwise those that do
  // not name a topic (topic numbers are chain-specific until aligned).
  std::vector<ChainSummary> summaries;
  bool topics_aligned = false;  // topic k of every chain is matched to topic k of chain 1
  std::size_t documents_compared = 0;
  std::size_t disputed_left_out = 0;
  std::size_t without_group = 0;
  std::string strata_column;

  // Every chain's records, chain by chain.
  std::vector<TestRecord> all_records() const;
};

// The inputs of one chain: theta of the chain (float -> double), group labels
// (kLeftOut for no group, and for disputed documents unless included), strata
// and lengths from `corpus` when given. `corpus` must be the model's corpus
// (check it with check_model_matches) and is required for a strata column or
// length weighting; without it those throw loupe::Error saying so.
GroupedDocuments grouped_documents(const Model& model, std::size_t chain, const Corpus* corpus,
                                   const GroupComparisonOptions& options);

// Runs every test on every chain. Throws loupe::Error for the bad inputs the
// tests name (one group, a single-document group, strata allowing no
// permutation, a missing metadata column).
GroupComparison compare_groups(const Model& model, const Corpus* corpus, const GroupComparisonOptions& options);

nlohmann::json to_json(const GroupComparison& comparison);

}  // namespace loupe

// Distinctive topics: for each topic and group, the group's mean share minus
// the mean share of all other groups' documents, with a bootstrap interval, a
// two-sided permutation p-value and Benjamini-Hochberg q-values across all pairs.
#pragma once

#include <cstddef>
#include <vector>

#include "analysis/grouped_documents.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

struct DistinctiveTopicOptions {
  PermutationOptions permutation;
  std::size_t bootstrap_replicates = 999;  // the interval resamples within each group
  bool weight_by_length = false;
  double level = 0.95;
};

// One record per (group, topic), group by group, topics in order:
// statistic = effect size = difference in mean share ("A vs rest", topic k),
// p from permuted labels (|diff*| >= |diff|), q = BH across all G x K records.
std::vector<TestRecord> distinctive_topics(const GroupedDocuments& data, const DistinctiveTopicOptions& options);
std::vector<TestRecord> distinctive_topics(const IncludedDocuments& documents, const DistinctiveTopicOptions& options);

}  // namespace loupe

// ANOSIM (Clarke 1993): do distances between groups rank higher than distances
// within groups? R = (mean rank between - mean rank within) / (M / 2) over the
// M = N(N-1)/2 Hellinger distances. It needs all M distances, hence a size limit.
#pragma once

#include <cstddef>

#include "analysis/grouped_documents.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

// 2000 documents: about 2 million distances (16 MB) and a few seconds for 999 permutations.
inline constexpr std::size_t kAnosimDefaultMaxDocuments = 2000;

struct AnosimResult {
  TestRecord record;  // statistic = effect size = R, in [-1, 1]
  double mean_rank_between = 0;
  double mean_rank_within = 0;
};

// Ties share their average rank. Throws loupe::Error when more than
// max_documents documents take part, saying how to raise the limit.
AnosimResult anosim(const GroupedDocuments& data, const PermutationOptions& options,
                    std::size_t max_documents = kAnosimDefaultMaxDocuments);
AnosimResult anosim(const IncludedDocuments& documents, const PermutationOptions& options,
                    std::size_t max_documents = kAnosimDefaultMaxDocuments);

// Ranks 1..M of values, ties given their average rank (R's rank(), ties = "average").
// Example: {0.3, 0.1, 0.3} -> {2.5, 1, 2.5}.
std::vector<double> average_ranks(const std::vector<double>& values);

}  // namespace loupe

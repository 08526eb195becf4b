// PERMANOVA (Anderson 2001) on Hellinger distances between documents: do the
// groups' centroids differ? Computed exactly in the square-root embedding
// (analysis/hellinger.h): O(N K) per permutation and no N x N matrix.
#pragma once

#include <string>
#include <vector>

#include "analysis/grouped_documents.h"
#include "analysis/multiple_testing.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

struct PermanovaResult {
  TestRecord record;  // statistic = pseudo-F, effect size = R²
  double ss_between = 0;
  double ss_within = 0;
  double ss_total = 0;
};

// All groups at once. Throws loupe::Error for one group, a group with a single
// document, or strata that allow no permutation (see select_documents).
PermanovaResult permanova(const GroupedDocuments& data, const PermutationOptions& options);

// On documents already selected; `method` and `comparison` label the record.
PermanovaResult permanova(const IncludedDocuments& documents, const PermutationOptions& options,
                          const std::string& method, const std::string& comparison);

// Every pair of groups, each tested on its two groups' documents only, in the
// order (0,1), (0,2), ..., (1,2), ...; adjusted p-values across the pairs.
std::vector<PermanovaResult> pairwise_permanova(const GroupedDocuments& data, const PermutationOptions& options,
                                                Adjustment adjustment);
std::vector<PermanovaResult> pairwise_permanova(const IncludedDocuments& documents, const PermutationOptions& options,
                                                Adjustment adjustment);

}  // namespace loupe

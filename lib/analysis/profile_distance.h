// Distance between two groups' mean topic profiles (Hellinger and
// Jensen-Shannon) with a permutation null: the labels of the two groups'
// documents are permuted (within strata when given) and the distance recomputed.
#pragma once

#include <vector>

#include "analysis/grouped_documents.h"
#include "analysis/multiple_testing.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

// For every pair (0,1), (0,2), ..., (1,2), ...: two records, "Hellinger
// distance" then "Jensen-Shannon distance" (analysis/hellinger.h), each with
// its permutation p-value and an adjusted p-value across the pairs.
std::vector<TestRecord> profile_distances(const GroupedDocuments& data, const PermutationOptions& options,
                                          bool weight_by_length,
                                          Adjustment adjustment = Adjustment::benjamini_hochberg);
std::vector<TestRecord> profile_distances(const IncludedDocuments& documents, const PermutationOptions& options,
                                          bool weight_by_length,
                                          Adjustment adjustment = Adjustment::benjamini_hochberg);

}  // namespace loupe

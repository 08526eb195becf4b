// Every group test on one set of document-topic shares (one chain): profiles,
// PERMANOVA with PERMDISP beside it, ANOSIM, pairwise PERMANOVA, profile
// distances and distinctive topics, as one list of records.
#pragma once

#include <cstddef>
#include <vector>

#include "analysis/anosim.h"
#include "analysis/group_profiles.h"
#include "analysis/grouped_documents.h"
#include "analysis/multiple_testing.h"
#include "analysis/permdisp.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

struct GroupTestOptions {
  PermutationOptions permutation;
  std::size_t bootstrap_replicates = 999;
  bool weight_by_length = false;  // for profiles, profile distances and distinctive topics
  double level = 0.95;
  Adjustment pairwise_adjustment = Adjustment::benjamini_hochberg;
  std::size_t anosim_max_documents = kAnosimDefaultMaxDocuments;  // above it ANOSIM is skipped, with a note
  double dispersion_warning_level = kDispersionWarningLevel;
};

struct GroupTestResults {
  int chain = 0;
  GroupProfiles profiles;
  // PERMANOVA (carrying PERMDISP's warning when dispersions differ), PERMDISP,
  // ANOSIM, pairwise PERMANOVA (only with more than two groups: with two it is
  // PERMANOVA itself), profile distances, distinctive topics.
  std::vector<TestRecord> records;
  std::vector<double> mean_distance_to_centroid;  // per group, from PERMDISP
};

// Throws loupe::Error for the bad inputs select_documents names, and for strata
// that allow no permutation of the whole set.
GroupTestResults run_group_tests(const GroupedDocuments& data, const GroupTestOptions& options, int chain = 0);

}  // namespace loupe

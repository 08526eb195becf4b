// PERMDISP (Anderson 2006): are the groups equally spread? The distance of
// each document to its group's centroid in the square-root embedding (so the
// Hellinger distance to the centroid), then a one-way ANOVA F on those distances.
#pragma once

#include <string>
#include <vector>

#include "analysis/grouped_documents.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"

namespace loupe {

// Below this p-value PERMDISP warns that PERMANOVA mixes location and spread.
inline constexpr double kDispersionWarningLevel = 0.05;

struct PermdispResult {
  TestRecord record;  // statistic = F; effect size = spread ratio: largest / smallest mean distance to centroid
  std::vector<std::string> group_names;
  std::vector<double> mean_distance_to_centroid;  // per group, Hellinger units
  bool dispersions_differ = false;                // p < warning level
};

// Centres are group centroids (vegan's betadisper(type = "centroid"), which in
// this Euclidean embedding is exact; vegan's default is the spatial median).
// Permutations follow vegan's permutest.betadisper: the residuals z_i - zbar_g
// are permuted over the group labels and F is recomputed on them, comparing
// with F of the observed distances. When p < warning_level the record carries
// a plain-language warning.
PermdispResult permdisp(const GroupedDocuments& data, const PermutationOptions& options,
                        double warning_level = kDispersionWarningLevel);
PermdispResult permdisp(const IncludedDocuments& documents, const PermutationOptions& options,
                        double warning_level = kDispersionWarningLevel);

// The warning PERMANOVA's record carries when dispersions differ; "" otherwise.
std::string dispersion_warning(const PermdispResult& permdisp);

}  // namespace loupe

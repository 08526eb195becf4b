// Group topic profiles: each group's mean document-topic share with bootstrap
// percentile intervals (documents resampled with replacement within each
// group), optionally weighting documents by their length in tokens.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <utility>
#include <vector>

#include <nlohmann/json.hpp>

#include "analysis/grouped_documents.h"

namespace loupe {

struct ProfileOptions {
  std::size_t bootstrap_replicates = 999;
  std::uint64_t seed = 1;
  bool weight_by_length = false;  // mean = sum_i L_i theta_i / sum_i L_i
  double level = 0.95;            // of the intervals
  std::size_t threads = 2;
};

struct GroupProfile {
  std::string group;
  std::size_t documents = 0;
  double total_weight = 0;            // documents, or tokens when weighted
  std::vector<double> mean;           // K
  std::vector<double> interval_low;   // K
  std::vector<double> interval_high;  // K
};

struct GroupProfiles {
  std::vector<GroupProfile> groups;
  std::size_t replicates = 0;
  std::uint64_t seed = 0;
  bool weighted = false;
  double level = 0.95;
  int chain = 0;
};

// Every group with documents; a group needs at least two (else loupe::Error).
GroupProfiles group_profiles(const GroupedDocuments& data, const ProfileOptions& options);
GroupProfiles group_profiles(const IncludedDocuments& documents, const ProfileOptions& options);

nlohmann::json to_json(const GroupProfiles& profiles);
// One line per group and topic:
// group,topic,documents,total_weight,mean,interval_low,interval_high,level,weighted,replicates,seed,chain.
std::string to_csv(const GroupProfiles& profiles);

// Building blocks shared with distinctive_topics.

// Rows [w_i theta_i, w_i], w_i = L_i when weighted, else 1: group sums of these
// give weighted means. Throws loupe::Error when weighting without lengths.
TopicMatrix weighted_rows(const IncludedDocuments& documents, bool weight_by_length);

// Replicate r (stream (seed, bootstrap, r)) draws n_g rows with replacement from
// each group g and sums them: result[(r * G + g) * cols + c]. Thread-independent.
std::vector<double> bootstrap_group_sums(const TopicMatrix& rows, const IncludedDocuments& documents,
                                         std::size_t replicates, std::uint64_t seed, std::size_t threads);

// Percentile interval at `level` (quantiles of type 7, as R's default); sorts `sample`.
// Example: sample 1..101, level 0.9 -> (6, 96).
std::pair<double, double> percentile_interval(std::vector<double>& sample, double level);

}  // namespace loupe

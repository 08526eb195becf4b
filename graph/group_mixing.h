// Do texts cluster by group on the similarity graph? Two statistics, each with
// a permutation p-value (group labels shuffled, optionally within strata):
// the modularity of the group partition, and the mean share of a document's
// neighbours that belong to its own group.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "common/process_group.h"
#include "graph/document_graph.h"

namespace loupe {

struct GroupMixingOptions {
  std::size_t permutations = 999;
  std::uint64_t seed = 1;
  // Optional stratum per document (e.g. decade): labels are shuffled only
  // within a stratum. Empty: one stratum.
  std::vector<std::uint32_t> strata;
  std::string strata_name;  // for the record, e.g. the metadata column
  std::size_t threads = 0;  // 0: all hardware threads. Never changes the result.
  // Several processes (MPI ranks) share the permutations, each a contiguous range,
  // and gather the statistics: every process gets the single-process result. Null: this process alone.
  ProcessGroup* processes = nullptr;
};

// One record per test, in the shape permutation-test libraries report.
struct PermutationTest {
  std::string method;           // "group modularity permutation test"
  std::string statistic_name;   // "modularity Q", "mean same-group neighbour share"
  std::size_t sample_size = 0;  // documents with a group
  std::size_t groups = 0;
  double statistic = 0;
  double null_mean = 0;  // mean of the statistic over the permutations
  double null_sd = 0;
  double effect = 0;   // statistic - null_mean
  double p_value = 1;  // (1 + b) / (1 + P), b = permutations with a statistic >= the observed one
  std::size_t permutations = 0;
  std::uint64_t seed = 0;
  std::string strata;  // "" when unrestricted
  // The statistic of every permutation, in permutation order (the same for any thread count); for drawing
  // the null distribution. Not part of to_json().
  std::vector<double> null_statistics;

  nlohmann::json to_json() const;
};

struct GroupMixingResult {
  PermutationTest modularity;
  PermutationTest same_group_share;
  // Per document: share of its neighbours (with a group) in its own group;
  // NaN for documents without a group or without such neighbours.
  std::vector<double> document_share;
  std::vector<double> group_share;  // mean of document_share within each group (NaN when none)
};

// Documents without a group (label kNoGroup) keep a community of their own in
// the modularity and are never shuffled. Throws loupe::Error when fewer than 2
// groups have documents, when no document has a neighbour, or when the strata
// do not match the graph. The random stream of permutation p is
// Xoshiro256(derive_seed(seed, {p})), so results do not depend on threads and
// permutations can be split across processes.
GroupMixingResult test_group_mixing(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group,
                                    const GroupMixingOptions& options);

// The two statistics for one labelling (used by the test; exposed for checks).
double group_modularity(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group);
double mean_same_group_share(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group,
                             std::vector<double>* document_share = nullptr);

}  // namespace loupe

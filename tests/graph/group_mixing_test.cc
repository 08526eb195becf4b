#include "graph/group_mixing.h"

#include <cmath>

#include <gtest/gtest.h>

#include "common/error.h"
#include "graph_test_support.h"

namespace loupe {
namespace {

// kNN graph (k = 5, either rule) of profiles in `groups` clusters.
WeightedAdjacency clustered_graph(std::size_t n, std::size_t groups, std::uint64_t seed) {
  const ProfileMatrix theta = test::clustered_profiles(n, groups, 3, seed);
  return weighted_adjacency(n, neighbour_edges(nearest_neighbours(theta, 5), NeighbourRule::either));
}

std::vector<std::uint32_t> cyclic_groups(std::size_t n, std::uint32_t groups) {
  std::vector<std::uint32_t> g(n);
  for (std::size_t d = 0; d < n; ++d) g[d] = static_cast<std::uint32_t>(d % groups);
  return g;
}

TEST(GroupMixingTest, SharesByHand) {
  // Path 0-1-2-3 with groups a a b b: shares 1, 1/2, 1/2, 1 -> mean 0.75.
  const auto graph = weighted_adjacency(4, {{0, 1, 0.0}, {1, 2, 0.0}, {2, 3, 0.0}});
  std::vector<double> shares;
  EXPECT_DOUBLE_EQ(mean_same_group_share(graph, {0, 0, 1, 1}, &shares), 0.75);
  EXPECT_EQ(shares, (std::vector<double>{1.0, 0.5, 0.5, 1.0}));
  // A document without a group is left out, and so are neighbours without one.
  EXPECT_DOUBLE_EQ(mean_same_group_share(graph, {0, kNoGroup, 1, 1}, &shares), 1.0);
  EXPECT_TRUE(std::isnan(shares[0]));  // its only neighbour has no group
  EXPECT_TRUE(std::isnan(shares[1]));
  // Group modularity: m = 3, L_a = L_b = 1, d_a = d_b = 3: Q = 2 (1/3 - 1/4) = 1/6.
  EXPECT_NEAR(group_modularity(graph, {0, 0, 1, 1}), 1.0 / 6.0, 1e-12);
}

TEST(GroupMixingTest, ClusteredGroupsGiveTheSmallestPossibleP) {
  const std::size_t n = 240;
  const auto graph = clustered_graph(n, 3, 11);
  GroupMixingOptions options;
  options.permutations = 199;
  options.seed = 77;
  const auto result = test_group_mixing(graph, cyclic_groups(n, 3), options);
  EXPECT_DOUBLE_EQ(result.modularity.p_value, 1.0 / 200.0);
  EXPECT_DOUBLE_EQ(result.same_group_share.p_value, 1.0 / 200.0);
  EXPECT_GT(result.same_group_share.statistic, 0.9);
  EXPECT_NEAR(result.same_group_share.null_mean, 1.0 / 3.0, 0.05);
  EXPECT_GT(result.modularity.effect, 0.3);
  EXPECT_EQ(result.modularity.seed, 77u);
  EXPECT_EQ(result.modularity.permutations, 199u);
  EXPECT_EQ(result.modularity.sample_size, n);
  EXPECT_EQ(result.modularity.groups, 3u);
  ASSERT_EQ(result.group_share.size(), 3u);
  for (const double s : result.group_share) EXPECT_GT(s, 0.8);
}

TEST(GroupMixingTest, LabelsUnrelatedToTheGraphAreNotSignificant) {
  // The graph clusters by d % 3, the labels by d / 120: unrelated. Over several
  // seeds the p-values must spread out, not pile up near 0.
  const std::size_t n = 240;
  const auto graph = clustered_graph(n, 3, 12);
  std::vector<std::uint32_t> labels(n);
  for (std::size_t d = 0; d < n; ++d) labels[d] = static_cast<std::uint32_t>(d / 120);
  std::size_t small = 0;
  for (std::uint64_t seed = 1; seed <= 5; ++seed) {
    GroupMixingOptions options;
    options.permutations = 199;
    options.seed = seed;
    const auto result = test_group_mixing(graph, labels, options);
    if (result.same_group_share.p_value < 0.05) ++small;
    EXPECT_LT(std::abs(result.same_group_share.effect), 0.1);
  }
  EXPECT_LE(small, 1u);
}

TEST(GroupMixingTest, ResultDoesNotDependOnThreads) {
  const std::size_t n = 150;
  const auto graph = clustered_graph(n, 3, 13);
  std::vector<std::uint32_t> labels(n);
  for (std::size_t d = 0; d < n; ++d) labels[d] = static_cast<std::uint32_t>((d * 7 + d / 5) % 3);
  GroupMixingOptions options;
  options.permutations = 99;
  options.seed = 5;
  options.threads = 1;
  const auto one = test_group_mixing(graph, labels, options);
  options.threads = 3;
  const auto three = test_group_mixing(graph, labels, options);
  EXPECT_EQ(one.modularity.p_value, three.modularity.p_value);
  EXPECT_EQ(one.modularity.null_mean, three.modularity.null_mean);
  EXPECT_EQ(one.same_group_share.null_sd, three.same_group_share.null_sd);
  options.seed = 6;
  const auto other = test_group_mixing(graph, labels, options);
  EXPECT_NE(one.modularity.null_mean, other.modularity.null_mean);
}

TEST(GroupMixingTest, StrataRestrictThePermutations) {
  // Each stratum holds one group only: shuffling within strata changes
  // nothing, so every permutation ties the observed value and p = 1.
  const std::size_t n = 120;
  const auto graph = clustered_graph(n, 2, 14);
  std::vector<std::uint32_t> labels(n);
  for (std::size_t d = 0; d < n; ++d) labels[d] = static_cast<std::uint32_t>((d / 3) % 2);
  GroupMixingOptions options;
  options.permutations = 49;
  options.strata = labels;
  options.strata_name = "decade";
  const auto result = test_group_mixing(graph, labels, options);
  EXPECT_DOUBLE_EQ(result.modularity.p_value, 1.0);
  EXPECT_DOUBLE_EQ(result.same_group_share.p_value, 1.0);
  EXPECT_NEAR(result.modularity.effect, 0.0, 1e-12);
  EXPECT_EQ(result.modularity.to_json()["strata"], "decade");
  EXPECT_EQ(result.modularity.to_json()["seed"], 1);
}

TEST(GroupMixingTest, RefusesOneGroupAndMismatchedInput) {
  const auto graph = clustered_graph(30, 2, 15);
  GroupMixingOptions options;
  options.permutations = 9;
  EXPECT_THROW(test_group_mixing(graph, std::vector<std::uint32_t>(30, 0), options), Error);
  EXPECT_THROW(test_group_mixing(graph, std::vector<std::uint32_t>(29, 0), options), Error);
  options.strata = std::vector<std::uint32_t>(3, 0);
  EXPECT_THROW(test_group_mixing(graph, cyclic_groups(30, 2), options), Error);
  const auto no_edges = weighted_adjacency(4, {});
  EXPECT_THROW(test_group_mixing(no_edges, cyclic_groups(4, 2), GroupMixingOptions{}), Error);
}

}  // namespace
}  // namespace loupe

// The permuted statistics the group-mixing tests keep for drawing their null distributions
// (PermutationTest::null_statistics): one a permutation, the same for any thread count, and the values
// whose mean and p-value the test reports.
#include <gtest/gtest.h>

#include <cmath>

#include "graph/group_mixing.h"
#include "graph_test_support.h"

namespace loupe {
namespace {

TEST(GroupMixingNullTest, KeepsEveryPermutedStatisticIndependentOfThreads) {
  const std::size_t n = 120;
  const ProfileMatrix theta = test::clustered_profiles(n, 3, 3, 21);
  const auto graph = weighted_adjacency(n, neighbour_edges(nearest_neighbours(theta, 5), NeighbourRule::either));
  std::vector<std::uint32_t> labels(n);
  for (std::size_t d = 0; d < n; ++d) labels[d] = static_cast<std::uint32_t>((d * 5 + d / 7) % 3);
  GroupMixingOptions options;
  options.permutations = 199;
  options.seed = 4;
  options.threads = 1;
  const auto one = test_group_mixing(graph, labels, options);
  options.threads = 3;
  const auto three = test_group_mixing(graph, labels, options);
  for (const auto* pair : {&one.modularity, &one.same_group_share}) {
    const auto& null = pair->null_statistics;
    ASSERT_EQ(null.size(), 199u) << pair->method;
    double sum = 0;
    std::size_t at_least = 0;
    for (const double v : null) {
      sum += v;
      at_least += v >= pair->statistic - 1e-12 * std::max(1.0, std::abs(pair->statistic)) ? 1 : 0;
    }
    EXPECT_NEAR(sum / 199.0, pair->null_mean, 1e-12) << pair->method;
    EXPECT_DOUBLE_EQ(pair->p_value, (1.0 + static_cast<double>(at_least)) / 200.0) << pair->method;
  }
  EXPECT_EQ(one.modularity.null_statistics, three.modularity.null_statistics);
  EXPECT_EQ(one.same_group_share.null_statistics, three.same_group_share.null_statistics);
  EXPECT_FALSE(one.modularity.to_json().contains("null_statistics"));
}

}  // namespace
}  // namespace loupe

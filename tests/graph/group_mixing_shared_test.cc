// The group-mixing test with its permutations shared among processes
// (GroupMixingOptions::processes), processes simulated by threads: every process
// gets the single-process result bit for bit. The MPI version is in tests/distributed.
#include <gtest/gtest.h>

#include "graph/group_mixing.h"
#include "graph_test_support.h"
#include "support/thread_process_group.h"

namespace loupe {
namespace {

TEST(GroupMixingShared, EveryProcessGetsTheSingleProcessResult) {
  const std::size_t n = 120;
  const ProfileMatrix theta = test::clustered_profiles(n, 3, 3, 21);
  const auto graph = weighted_adjacency(n, neighbour_edges(nearest_neighbours(theta, 5), NeighbourRule::either));
  std::vector<std::uint32_t> labels(n);
  for (std::size_t d = 0; d < n; ++d) labels[d] = static_cast<std::uint32_t>((d * 7 + d / 5) % 3);
  GroupMixingOptions options;
  options.permutations = 101;
  options.seed = 5;
  options.threads = 2;
  const auto alone = test_group_mixing(graph, labels, options);
  std::vector<GroupMixingResult> shared(3);
  testing::run_as_processes(3, [&](ProcessGroup& group) {
    GroupMixingOptions mine = options;
    mine.processes = &group;
    shared[group.rank()] = test_group_mixing(graph, labels, mine);
  });
  for (const auto& result : shared) {
    EXPECT_EQ(result.modularity.null_statistics, alone.modularity.null_statistics);
    EXPECT_EQ(result.same_group_share.null_statistics, alone.same_group_share.null_statistics);
    EXPECT_EQ(result.modularity.p_value, alone.modularity.p_value);
    EXPECT_EQ(result.modularity.null_mean, alone.modularity.null_mean);
    EXPECT_EQ(result.same_group_share.null_sd, alone.same_group_share.null_sd);
    EXPECT_EQ(result.modularity.to_json().dump(), alone.modularity.to_json().dump());
  }
}

}  // namespace
}  // namespace loupe

#include "graph/louvain.h"

#include <cmath>
#include <set>

#include <gtest/gtest.h>

#include "common/error.h"
#include "graph_test_support.h"
#include "model/random.h"

namespace loupe {
namespace {

// Unit-weight edges (distance 0 gives weight 1).
WeightedAdjacency unit_graph(std::size_t n, const std::vector<std::pair<std::uint32_t, std::uint32_t>>& pairs) {
  std::vector<DistanceEdge> edges;
  for (const auto& [a, b] : pairs) edges.push_back({a, b, 0.0});
  return weighted_adjacency(n, edges);
}

WeightedAdjacency two_triangles() { return unit_graph(6, {{0, 1}, {1, 2}, {0, 2}, {3, 4}, {4, 5}, {3, 5}, {2, 3}}); }

// `cliques` cliques of `size` vertices, plus `bridges` random edges between
// cliques, all of weight 1: the planted partition is the obvious answer.
WeightedAdjacency planted_cliques(std::size_t cliques, std::size_t size, std::size_t bridges, std::uint64_t seed) {
  std::vector<std::pair<std::uint32_t, std::uint32_t>> pairs;
  for (std::size_t c = 0; c < cliques; ++c)
    for (std::size_t i = 0; i < size; ++i)
      for (std::size_t j = i + 1; j < size; ++j)
        pairs.emplace_back(static_cast<std::uint32_t>(c * size + i), static_cast<std::uint32_t>(c * size + j));
  Xoshiro256 random(seed);
  const auto n = static_cast<std::uint32_t>(cliques * size);
  std::set<std::pair<std::uint32_t, std::uint32_t>> used;
  while (used.size() < bridges) {
    std::uint32_t a = random.below(n);
    std::uint32_t b = random.below(n);
    if (a / size == b / size) continue;
    if (a > b) std::swap(a, b);
    if (used.insert({a, b}).second) pairs.emplace_back(a, b);
  }
  return unit_graph(n, pairs);
}

TEST(ModularityTest, TwoTrianglesByHand) {
  const auto graph = two_triangles();
  // Q = 2 * (3/7 - (7/14)^2) = 0.357142857 (worked by hand; header example).
  EXPECT_NEAR(modularity(graph, {0, 0, 0, 1, 1, 1}), 2.0 * (3.0 / 7.0 - 0.25), 1e-12);
  // Everything in one community: Q = 1 - 1 = 0.
  EXPECT_NEAR(modularity(graph, {0, 0, 0, 0, 0, 0}), 0.0, 1e-12);
  // Singletons: Q = -sum (d_i / 2m)^2 = -(4*4 + 2*9) / 196.
  EXPECT_NEAR(modularity(graph, {0, 1, 2, 3, 4, 5}), -(4.0 * 4.0 + 2.0 * 9.0) / 196.0, 1e-12);
  // Resolution 2 doubles the penalty term: 2 * (3/7 - 2 * 0.25).
  EXPECT_NEAR(modularity(graph, {0, 0, 0, 1, 1, 1}, 2.0), 2.0 * (3.0 / 7.0 - 0.5), 1e-12);
}

TEST(ModularityTest, GraphWithoutEdgesHasNoModularity) {
  const auto graph = unit_graph(4, {});
  EXPECT_TRUE(std::isnan(modularity(graph, {0, 1, 2, 3})));
  EXPECT_THROW(modularity(graph, {0, 1}), Error);
}

TEST(LouvainTest, FindsTheTwoTriangles) {
  const auto result = louvain_communities(two_triangles());
  EXPECT_EQ(result.num_communities, 2u);
  EXPECT_EQ(result.community, (std::vector<std::uint32_t>{0, 0, 0, 1, 1, 1}));
  EXPECT_NEAR(result.modularity, 2.0 * (3.0 / 7.0 - 0.25), 1e-12);
}

TEST(LouvainTest, RecoversPlantedCliquesAndIsDeterministicForASeed) {
  const auto graph = planted_cliques(12, 15, 60, 3);
  LouvainOptions options;
  options.seed = 2024;
  const auto first = louvain_communities(graph, options);
  const auto again = louvain_communities(graph, options);
  EXPECT_EQ(first.community, again.community);
  EXPECT_EQ(first.seed, 2024u);
  EXPECT_EQ(first.num_communities, 12u);
  std::vector<std::uint32_t> planted(graph.num_vertices());
  for (std::size_t v = 0; v < planted.size(); ++v) planted[v] = static_cast<std::uint32_t>(v / 15);
  EXPECT_EQ(first.community, planted);
  EXPECT_NEAR(first.modularity, modularity(graph, planted), 1e-12);
}

TEST(LouvainTest, AggregationMergesCliquesOnARing) {
  // A ring of 30 five-cliques joined by single edges. Merging neighbouring
  // cliques in pairs has higher modularity than one community per clique
  // (the resolution limit, Fortunato & Barthelemy 2007; by hand: 0.8879 >
  // 0.8758), which only the aggregation levels can find.
  std::vector<std::pair<std::uint32_t, std::uint32_t>> pairs;
  const std::uint32_t cliques = 30, size = 5;
  for (std::uint32_t c = 0; c < cliques; ++c) {
    for (std::uint32_t i = 0; i < size; ++i)
      for (std::uint32_t j = i + 1; j < size; ++j) pairs.emplace_back(c * size + i, c * size + j);
    pairs.emplace_back(c * size, ((c + 1) % cliques) * size + 1);
  }
  const auto graph = unit_graph(cliques * size, pairs);
  std::vector<std::uint32_t> planted(cliques * size);
  for (std::size_t v = 0; v < planted.size(); ++v) planted[v] = static_cast<std::uint32_t>(v / size);
  const double planted_q = modularity(graph, planted);
  for (std::uint64_t seed = 1; seed <= 5; ++seed) {
    LouvainOptions options;
    options.seed = seed;
    const auto result = louvain_communities(graph, options);
    EXPECT_GT(result.modularity, planted_q + 0.005) << "seed " << seed;
    EXPECT_GE(result.levels, 2u) << "seed " << seed;
    EXPECT_NEAR(result.modularity, modularity(graph, result.community), 1e-12);
  }
}

TEST(LouvainTest, IsolatedVerticesStayAlone) {
  const auto graph = unit_graph(5, {{0, 1}, {1, 2}});
  const auto result = louvain_communities(graph);
  EXPECT_NE(result.community[3], result.community[4]);
  EXPECT_NE(result.community[3], result.community[0]);
  EXPECT_EQ(result.community[0], result.community[2]);
  const auto empty = louvain_communities(unit_graph(3, {}));
  EXPECT_EQ(empty.num_communities, 3u);
  EXPECT_TRUE(std::isnan(empty.modularity));
}

TEST(LouvainTest, RenumberLabelsInOrderOfFirstAppearance) {
  std::vector<std::uint32_t> labels = {7, 7, 2, 9, 2};
  EXPECT_EQ(renumber_labels(labels), 3u);
  EXPECT_EQ(labels, (std::vector<std::uint32_t>{0, 0, 1, 2, 1}));
}

}  // namespace
}  // namespace loupe

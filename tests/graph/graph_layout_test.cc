#include "graph/graph_layout.h"

#include <cmath>

#include <gtest/gtest.h>

#include "graph/louvain.h"
#include "graph_test_support.h"

namespace loupe {
namespace {

DocumentGraph two_cluster_graph() {
  const std::size_t n = 60;
  const ProfileMatrix theta = test::clustered_profiles(n, 2, 3, 21);
  const auto edges = neighbour_edges(nearest_neighbours(theta, 4), NeighbourRule::mutual);
  return make_document_graph(test::numbered_documents(n, 2), edges, top_topics(theta), "k = 4 (mutual)");
}

TEST(GraphLayoutTest, FruchtermanReingoldIsDeterministicAndInsideTheBox) {
  DocumentGraph a = two_cluster_graph();
  DocumentGraph b = two_cluster_graph();
  LayoutOptions options;
  options.seed = 9;
  layout_document_graph(a, options);
  layout_document_graph(b, options);
  for (std::size_t v = 0; v < boost::num_vertices(a); ++v) {
    EXPECT_EQ(a[v].x, b[v].x);
    EXPECT_EQ(a[v].y, b[v].y);
    EXPECT_TRUE(std::isfinite(a[v].x) && std::isfinite(a[v].y));
    EXPECT_LE(std::abs(a[v].x), options.side / 2 + 1e-9);
    EXPECT_LE(std::abs(a[v].y), options.side / 2 + 1e-9);
  }
  options.seed = 10;
  layout_document_graph(b, options);
  bool moved = false;
  for (std::size_t v = 0; v < boost::num_vertices(a); ++v) moved = moved || a[v].x != b[v].x;
  EXPECT_TRUE(moved);
}

TEST(GraphLayoutTest, NeighboursEndUpCloserThanStrangers) {
  DocumentGraph graph = two_cluster_graph();
  layout_document_graph(graph);
  const auto distance = [&](std::size_t u, std::size_t v) {
    return std::hypot(graph[u].x - graph[v].x, graph[u].y - graph[v].y);
  };
  double linked = 0;
  std::size_t linked_count = 0;
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    linked += distance(boost::source(e, graph), boost::target(e, graph));
    ++linked_count;
  }
  double all = 0;
  std::size_t all_count = 0;
  for (std::size_t u = 0; u < boost::num_vertices(graph); ++u)
    for (std::size_t v = u + 1; v < boost::num_vertices(graph); ++v) {
      all += distance(u, v);
      ++all_count;
    }
  ASSERT_GT(linked_count, 0u);
  EXPECT_LT(linked / static_cast<double>(linked_count), 0.5 * all / static_cast<double>(all_count));
}

TEST(GraphLayoutTest, SummaryGraphCountsMembersAndLinks) {
  DocumentGraph graph = two_cluster_graph();
  std::vector<std::uint32_t> labels(boost::num_vertices(graph));
  for (std::size_t v = 0; v < labels.size(); ++v) labels[v] = static_cast<std::uint32_t>(v % 2);
  SummaryGraph summary = summary_graph(graph, labels, {"g0", "g1"});
  ASSERT_EQ(boost::num_vertices(summary), 2u);
  EXPECT_EQ(summary[0].name, "g0");
  EXPECT_EQ(summary[0].documents, 30u);
  EXPECT_EQ(summary[0].main_group, "g0");
  EXPECT_DOUBLE_EQ(summary[0].main_group_share, 1.0);
  // The clusters follow d % 2, and mutual 4-NN edges stay inside them.
  std::size_t crossing = 0;
  for (const auto e : boost::make_iterator_range(boost::edges(graph)))
    crossing += labels[boost::source(e, graph)] != labels[boost::target(e, graph)];
  std::size_t summary_edges = 0;
  for (const auto e : boost::make_iterator_range(boost::edges(summary))) summary_edges += summary[e].edges;
  EXPECT_EQ(summary_edges, crossing);
  layout_summary_graph(summary);
  EXPECT_TRUE(std::isfinite(summary[1].x));
}

}  // namespace
}  // namespace loupe

#include "graph/graph_layout.h"

#include <algorithm>
#include <map>

#include <boost/graph/fruchterman_reingold.hpp>
#include <boost/graph/random_layout.hpp>
#include <boost/graph/topology.hpp>
#include <boost/random/linear_congruential.hpp>

#include "common/error.h"

namespace loupe {

namespace {

template <typename Graph>
void fruchterman_reingold(Graph& graph, const LayoutOptions& options) {
  using Topology = boost::square_topology<boost::minstd_rand>;
  const std::size_t n = boost::num_vertices(graph);
  if (n == 0) return;
  // minstd_rand takes a 32-bit seed; 0 is not allowed, so fold and offset.
  boost::minstd_rand generator(static_cast<std::uint32_t>((options.seed ^ (options.seed >> 32)) % 2147483646u) + 1u);
  Topology topology(generator, options.side / 2.0);
  std::vector<Topology::point_type> position(n);
  auto position_map = boost::make_iterator_property_map(position.begin(), boost::get(boost::vertex_index, graph));
  boost::random_graph_layout(graph, position_map, topology);
  if (n > 1) {
    boost::fruchterman_reingold_force_directed_layout(
        graph, position_map, topology,
        boost::cooling(
            boost::linear_cooling<double>(static_cast<std::size_t>(std::max<std::size_t>(1, options.iterations)))));
  }
  for (std::size_t v = 0; v < n; ++v) {
    graph[v].x = position[v][0];
    graph[v].y = position[v][1];
  }
}

}  // namespace

void layout_document_graph(DocumentGraph& graph, const LayoutOptions& options) { fruchterman_reingold(graph, options); }

void layout_summary_graph(SummaryGraph& graph, const LayoutOptions& options) { fruchterman_reingold(graph, options); }

SummaryGraph summary_graph(const DocumentGraph& graph, const std::vector<std::uint32_t>& labels,
                           const std::vector<std::string>& names) {
  const std::size_t n = boost::num_vertices(graph);
  if (labels.size() != n) {
    throw Error("summary_graph: " + std::to_string(labels.size()) + " labels for " + std::to_string(n) + " documents.");
  }
  std::uint32_t count = 0;
  for (const auto label : labels) count = std::max(count, label + 1);
  SummaryGraph summary(count);
  std::vector<std::map<std::string, std::size_t>> groups(count);
  for (std::size_t v = 0; v < n; ++v) {
    ++summary[labels[v]].documents;
    if (!graph[v].group.empty()) ++groups[labels[v]][graph[v].group];
  }
  for (std::uint32_t l = 0; l < count; ++l) {
    SummaryVertex& s = summary[l];
    s.label = l;
    s.name = l < names.size() ? names[l] : "community " + std::to_string(l);
    std::size_t best = 0;
    for (const auto& [group, size] : groups[l]) {
      if (size > best) {
        best = size;
        s.main_group = group;
      }
    }
    s.main_group_share = s.documents == 0 ? 0.0 : static_cast<double>(best) / static_cast<double>(s.documents);
  }
  std::map<std::pair<std::uint32_t, std::uint32_t>, SummaryEdge> links;
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    std::uint32_t a = labels[boost::source(e, graph)];
    std::uint32_t b = labels[boost::target(e, graph)];
    if (a == b) continue;
    if (a > b) std::swap(a, b);
    SummaryEdge& link = links[{a, b}];
    link.weight += graph[e].weight;
    ++link.edges;
  }
  for (const auto& [pair, link] : links) boost::add_edge(pair.first, pair.second, link, summary);
  return summary;
}

}  // namespace loupe

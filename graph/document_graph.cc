#include "graph/document_graph.h"

#include <boost/graph/connected_components.hpp>

#include "common/error.h"

namespace loupe {

DocumentGraph make_document_graph(const DocumentTable& table, const std::vector<DistanceEdge>& edges,
                                  const std::vector<std::uint32_t>& top_topic, const std::string& construction) {
  const std::size_t n = table.size();
  if (!top_topic.empty() && top_topic.size() != n) {
    throw Error("make_document_graph: " + std::to_string(top_topic.size()) + " top topics for " + std::to_string(n) +
                " documents.");
  }
  DocumentGraph graph(n);
  graph[boost::graph_bundle].metadata_columns = table.metadata_columns;
  graph[boost::graph_bundle].construction = construction;
  for (std::size_t d = 0; d < n; ++d) {
    DocumentVertex& v = graph[d];
    const DocumentInfo& info = table.documents[d];
    v.id = info.id;
    v.group = info.group;
    v.role = role_name(info.role);
    v.metadata = info.metadata;
    v.top_topic = top_topic.empty() ? 0 : top_topic[d];
  }
  for (const auto& e : edges) {
    if (e.source >= n || e.target >= n || e.source == e.target) {
      throw Error("make_document_graph: edge (" + std::to_string(e.source) + ", " + std::to_string(e.target) +
                  ") does not join two different documents of " + std::to_string(n) + ".");
    }
    boost::add_edge(e.source, e.target, SimilarityEdge{e.distance, 1.0 - e.distance}, graph);
  }
  return graph;
}

std::size_t label_components(DocumentGraph& graph) {
  std::vector<int> component(boost::num_vertices(graph));
  const int count = boost::connected_components(graph, component.data());
  for (std::size_t v = 0; v < component.size(); ++v) graph[v].component = static_cast<std::uint32_t>(component[v]);
  return static_cast<std::size_t>(count);
}

double WeightedAdjacency::degree(std::size_t v) const {
  double sum = 2.0 * self_weight[v];
  for (std::uint64_t e = offset[v]; e < offset[v + 1]; ++e) sum += weight[e];
  return sum;
}

double WeightedAdjacency::total_weight() const {
  double sum = 0;
  for (const double w : weight) sum += w;
  sum *= 0.5;
  for (const double w : self_weight) sum += w;
  return sum;
}

WeightedAdjacency weighted_adjacency(std::size_t n, const std::vector<DistanceEdge>& edges) {
  WeightedAdjacency flat;
  flat.offset.assign(n + 1, 0);
  for (const auto& e : edges) {
    ++flat.offset[e.source + 1];
    ++flat.offset[e.target + 1];
  }
  for (std::size_t v = 0; v < n; ++v) flat.offset[v + 1] += flat.offset[v];
  flat.neighbour.resize(2 * edges.size());
  flat.weight.resize(2 * edges.size());
  flat.self_weight.assign(n, 0.0);
  std::vector<std::uint64_t> next(flat.offset.begin(), flat.offset.end() - 1);
  for (const auto& e : edges) {
    const double w = 1.0 - e.distance;
    flat.neighbour[next[e.source]] = e.target;
    flat.weight[next[e.source]++] = w;
    flat.neighbour[next[e.target]] = e.source;
    flat.weight[next[e.target]++] = w;
  }
  return flat;
}

WeightedAdjacency weighted_adjacency(const DocumentGraph& graph) {
  std::vector<DistanceEdge> edges;
  edges.reserve(boost::num_edges(graph));
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    const auto s = static_cast<std::uint32_t>(boost::source(e, graph));
    const auto t = static_cast<std::uint32_t>(boost::target(e, graph));
    edges.push_back({std::min(s, t), std::max(s, t), graph[e].distance});
  }
  return weighted_adjacency(boost::num_vertices(graph), edges);
}

}  // namespace loupe

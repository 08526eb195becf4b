// The document similarity graph: a Boost.Graph adjacency list whose vertices
// carry each document's id, group, role and metadata, and whose edges carry the
// Hellinger distance and the weight 1 - H. Plus a flat (CSR) copy for hot loops.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include <boost/graph/adjacency_list.hpp>

#include "graph/document_profiles.h"
#include "graph/hellinger_neighbours.h"

namespace loupe {

inline constexpr std::uint32_t kUnassigned = 0xFFFFFFFFu;

struct DocumentVertex {
  std::string id;
  std::string group;  // "" when none
  std::string role;   // "known" or "disputed"
  std::vector<std::string> metadata;
  std::uint32_t top_topic = 0;
  std::uint32_t component = kUnassigned;
  std::uint32_t community = kUnassigned;
  double x = 0;  // layout position (0 until a layout is run)
  double y = 0;
};

struct SimilarityEdge {
  double distance = 0;  // Hellinger distance H in [0, 1]
  double weight = 0;    // similarity 1 - H
};

struct DocumentGraphInfo {
  std::vector<std::string> metadata_columns;
  std::string construction;  // e.g. "k = 10 nearest neighbours (either)", "Hellinger distance <= 0.3"
};

using DocumentGraph = boost::adjacency_list<boost::vecS, boost::vecS, boost::undirectedS, DocumentVertex,
                                            SimilarityEdge, DocumentGraphInfo>;

// One vertex per document of `table` (in order), one edge per DistanceEdge.
// top_topic may be empty (then 0 everywhere) or hold one entry per document.
DocumentGraph make_document_graph(const DocumentTable& table, const std::vector<DistanceEdge>& edges,
                                  const std::vector<std::uint32_t>& top_topic, const std::string& construction);

// Labels each vertex with its connected component (Boost.Graph's
// connected_components; numbered by lowest vertex), stores them in the
// vertices and returns the number of components.
std::size_t label_components(DocumentGraph& graph);

// The graph as flat arrays: vertex v's neighbours are neighbour[offset[v] ..
// offset[v+1]) with weights alongside; each undirected edge is listed from
// both ends. Self-loops (from aggregation) are kept apart in self_weight.
struct WeightedAdjacency {
  std::vector<std::uint64_t> offset{0};
  std::vector<std::uint32_t> neighbour;
  std::vector<double> weight;
  std::vector<double> self_weight;  // per vertex; 0 for a document graph

  std::size_t num_vertices() const { return offset.size() - 1; }
  // Weighted degree: sum of incident weights, a self-loop counted twice.
  double degree(std::size_t v) const;
  // m: the total weight of all edges (each undirected edge once).
  double total_weight() const;
};

WeightedAdjacency weighted_adjacency(const DocumentGraph& graph);

// Builds the flat graph from undirected edges over n vertices (no self-loops).
WeightedAdjacency weighted_adjacency(std::size_t n, const std::vector<DistanceEdge>& edges);

}  // namespace loupe

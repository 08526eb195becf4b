// Positions for drawing: Fruchterman-Reingold (Boost.Graph) for graphs up to a
// few thousand documents, and for larger graphs a summary graph with one
// vertex per community (or group) that is small enough to lay out.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include <boost/graph/adjacency_list.hpp>

#include "graph/document_graph.h"

namespace loupe {

struct LayoutOptions {
  std::uint64_t seed = 1;        // the random start; the same seed gives the same drawing
  std::size_t iterations = 100;  // cooling steps
  double side = 1000.0;          // positions lie in [-side/2, side/2]^2
};

// The most documents `loupe graph` lays out one by one (common practice for
// force-directed layouts, whose cost and legibility degrade beyond this).
inline constexpr std::size_t kMaxLayoutDocuments = 5000;

// Sets x and y of every vertex.
void layout_document_graph(DocumentGraph& graph, const LayoutOptions& options = {});

struct SummaryVertex {
  std::string name;         // "community 3", or the group name
  std::uint32_t label = 0;  // the community or group label
  std::size_t documents = 0;
  std::string main_group;  // the most common group among its documents ("" when none)
  double main_group_share = 0;
  double x = 0;
  double y = 0;
};

struct SummaryEdge {
  double weight = 0;      // total weight of the document edges between the two
  std::size_t edges = 0;  // how many document edges
};

using SummaryGraph = boost::adjacency_list<boost::vecS, boost::vecS, boost::undirectedS, SummaryVertex, SummaryEdge>;

// One vertex per distinct label (labels[v] for document v, numbered 0..L-1),
// edges summing the document edges between labels. `names[l]` names label l
// (when shorter, "community l" is used).
SummaryGraph summary_graph(const DocumentGraph& graph, const std::vector<std::uint32_t>& labels,
                           const std::vector<std::string>& names = {});

void layout_summary_graph(SummaryGraph& graph, const LayoutOptions& options = {});

}  // namespace loupe

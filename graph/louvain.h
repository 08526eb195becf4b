// Communities in a weighted graph: modularity (Newman 2006) and the Louvain
// method (Blondel et al. 2008): local moves of single vertices, then
// aggregation of communities into vertices, repeated while modularity rises.
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#include "graph/document_graph.h"

namespace loupe {

// Q = sum_c [ L_c / m - resolution * (d_c / 2m)^2 ]: L_c is the weight of the
// edges inside community c, d_c the sum of its vertices' weighted degrees and m
// the total edge weight (Newman 2006; with weights and resolution as networkx
// defines it). Example: two triangles joined by one edge, each triangle a
// community, unit weights: Q = 2 * (3/7 - (7/14)^2) = 0.3571.
// NaN for a graph without edge weight. Labels may be any values < num_vertices.
double modularity(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& community, double resolution = 1.0);

struct LouvainOptions {
  std::uint64_t seed = 1;   // the order vertices are visited in (a seeded shuffle per level and pass)
  double resolution = 1.0;  // > 1 favours smaller communities
  // A level ends when a full pass raises modularity by less than this; the
  // method stops when a level raises it by less than this.
  double min_gain = 1e-7;
};

struct LouvainResult {
  std::vector<std::uint32_t> community;  // per vertex, numbered 0.. by lowest vertex
  std::size_t num_communities = 0;
  double modularity = 0;
  std::size_t levels = 0;  // aggregation levels that improved the partition
  std::uint64_t seed = 0;
};

// Deterministic for a seed: the same graph and seed give the same partition.
// Isolated vertices stay communities of their own.
LouvainResult louvain_communities(const WeightedAdjacency& graph, const LouvainOptions& options = {});

// Renumbers labels 0, 1, ... in order of first appearance; returns the count.
std::size_t renumber_labels(std::vector<std::uint32_t>& labels);

}  // namespace loupe

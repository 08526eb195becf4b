// Nearest documents by Hellinger distance between topic profiles, exactly and
// without an N x N matrix: the distances come block by block from one matrix
// product of square-root profiles, and only the best candidates are kept.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <vector>

#include "graph/document_profiles.h"

namespace loupe {

// Called now and then with work done out of total (blocks of the distance matrix).
using WorkProgress = std::function<void(std::size_t done, std::size_t total)>;

struct NeighbourOptions {
  // Rows (and columns) of one block of the distance matrix. Memory: the
  // profiles twice (N x K doubles and floats), threads x block_size^2 x 4
  // bytes, and per thread the best k + max(8, k/2) candidates of every
  // document (8 bytes each); never N x N.
  std::size_t block_size = 512;
  std::size_t threads = 0;  // 0: all hardware threads. Changes speed, never the result.
  WorkProgress progress;    // may be called from any worker, one call at a time
};

// k nearest neighbours of every document, nearest first; ties by lower index.
// Example: for profiles a=(1,0), b=(0.9,0.1), c=(0,1) and k=1:
// a -> b (H 0.2265), b -> a, c -> b (H 0.8269).
struct NeighbourTable {
  std::size_t k = 0;
  std::vector<std::uint32_t> neighbour;  // N*k: document d's neighbours at [d*k, (d+1)*k)
  std::vector<double> distance;          // N*k: their Hellinger distances

  std::size_t num_documents() const { return k == 0 ? 0 : neighbour.size() / k; }
  std::span<const std::uint32_t> neighbours_of(std::size_t d) const { return {neighbour.data() + d * k, k}; }
  std::span<const double> distances_of(std::size_t d) const { return {distance.data() + d * k, k}; }
};

// An undirected pair of documents (source < target) and their Hellinger distance.
struct DistanceEdge {
  std::uint32_t source = 0;
  std::uint32_t target = 0;
  double distance = 0;
};

// Exact k nearest neighbours, self excluded. Throws loupe::Error when k is 0
// or at least the number of documents, or when theta is not a set of
// distributions (check_profiles).
NeighbourTable nearest_neighbours(const ProfileMatrix& theta, std::size_t k, const NeighbourOptions& options = {});

// Every pair with Hellinger distance <= max_distance, sorted by (source,
// target). Throws loupe::Error when max_distance is outside (0, 1].
std::vector<DistanceEdge> pairs_within_distance(const ProfileMatrix& theta, double max_distance,
                                                const NeighbourOptions& options = {});

// Edges of a kNN graph: `either` joins i and j when one is among the other's
// k nearest; `mutual` only when each is among the other's. Sorted by (source, target).
enum class NeighbourRule { either, mutual };
std::vector<DistanceEdge> neighbour_edges(const NeighbourTable& table, NeighbourRule rule);

// H(theta_i, theta_j) = ||sqrt theta_i - sqrt theta_j||_2 / sqrt 2, computed
// directly (no cancellation); equals sqrt(1 - sqrt theta_i . sqrt theta_j)
// for rows that sum to 1.
double hellinger_between(const ProfileMatrix& theta, std::size_t i, std::size_t j);

}  // namespace loupe

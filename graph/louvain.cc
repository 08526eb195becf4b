#include "graph/louvain.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <numeric>
#include <tuple>

#include "common/error.h"
#include "model/random.h"

namespace loupe {

std::size_t renumber_labels(std::vector<std::uint32_t>& labels) {
  std::vector<std::uint32_t> map(labels.size() + 1, kUnassigned);
  std::uint32_t next = 0;
  for (auto& label : labels) {
    if (label >= map.size()) map.resize(static_cast<std::size_t>(label) + 1, kUnassigned);
    if (map[label] == kUnassigned) map[label] = next++;
    label = map[label];
  }
  return next;
}

double modularity(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& community, double resolution) {
  const std::size_t n = graph.num_vertices();
  if (community.size() != n) {
    throw Error("modularity: " + std::to_string(community.size()) + " labels for " + std::to_string(n) + " vertices.");
  }
  const double m = graph.total_weight();
  if (!(m > 0)) return std::numeric_limits<double>::quiet_NaN();
  std::vector<double> inside(n, 0.0);
  std::vector<double> degree_sum(n, 0.0);
  for (std::size_t v = 0; v < n; ++v) {
    const std::uint32_t c = community[v];
    if (c >= n) throw Error("modularity: label " + std::to_string(c) + " is not below the number of vertices.");
    inside[c] += graph.self_weight[v];
    for (std::uint64_t e = graph.offset[v]; e < graph.offset[v + 1]; ++e) {
      if (community[graph.neighbour[e]] == c) inside[c] += 0.5 * graph.weight[e];
    }
    degree_sum[c] += graph.degree(v);
  }
  // Q = sum_c [ L_c / m - resolution * (d_c / 2m)^2 ] (Newman 2006).
  double q = 0;
  for (std::size_t c = 0; c < n; ++c) {
    const double share = degree_sum[c] / (2.0 * m);
    q += inside[c] / m - resolution * share * share;
  }
  return q;
}

namespace {

// One level of local moves. Returns true when any vertex moved; `labels` holds
// the communities found (not renumbered).
bool move_vertices(const WeightedAdjacency& graph, double m, const LouvainOptions& options, std::uint64_t level_seed,
                   std::vector<std::uint32_t>& labels) {
  const std::size_t n = graph.num_vertices();
  labels.resize(n);
  std::iota(labels.begin(), labels.end(), 0u);
  std::vector<double> degree(n);
  for (std::size_t v = 0; v < n; ++v) degree[v] = graph.degree(v);
  std::vector<double> total = degree;  // total degree of each community
  std::vector<std::uint32_t> order(n);
  std::iota(order.begin(), order.end(), 0u);
  Xoshiro256 random(level_seed);
  for (std::size_t i = n; i > 1; --i) std::swap(order[i - 1], order[random.below(static_cast<std::uint32_t>(i))]);

  std::vector<double> weight_to(n, 0.0);
  std::vector<char> seen(n, 0);
  std::vector<std::uint32_t> touched;
  const double gamma = options.resolution;
  bool moved_any = false;
  for (;;) {
    double pass_gain = 0;
    std::size_t moves = 0;
    for (const std::uint32_t v : order) {
      const std::uint32_t current = labels[v];
      touched.clear();
      for (std::uint64_t e = graph.offset[v]; e < graph.offset[v + 1]; ++e) {
        const std::uint32_t c = labels[graph.neighbour[e]];
        if (!seen[c]) {
          seen[c] = 1;
          touched.push_back(c);
        }
        weight_to[c] += graph.weight[e];
      }
      const double k = degree[v];
      total[current] -= k;
      // Gain of joining community c, up to terms common to every c:
      // k_{v,c} - resolution * tot_c * k_v / 2m (Blondel et al. 2008, eq. 2).
      const double stay = weight_to[current] - gamma * total[current] * k / (2.0 * m);
      std::uint32_t best = current;
      double best_gain = stay;
      for (const std::uint32_t c : touched) {
        const double gain = weight_to[c] - gamma * total[c] * k / (2.0 * m);
        if (gain - best_gain > 1e-12 * m) {
          best = c;
          best_gain = gain;
        }
      }
      total[best] += k;
      if (best != current) {
        labels[v] = best;
        pass_gain += (best_gain - stay) / m;
        ++moves;
      }
      for (const std::uint32_t c : touched) {
        weight_to[c] = 0.0;
        seen[c] = 0;
      }
    }
    if (moves > 0) moved_any = true;
    if (moves == 0 || pass_gain < options.min_gain) break;
  }
  return moved_any;
}

// Each community becomes one vertex; edges inside it become its self-loop.
WeightedAdjacency aggregate(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& labels,
                            std::size_t communities) {
  std::vector<std::tuple<std::uint32_t, std::uint32_t, double>> links;
  WeightedAdjacency merged;
  merged.self_weight.assign(communities, 0.0);
  for (std::size_t v = 0; v < graph.num_vertices(); ++v) {
    const std::uint32_t c = labels[v];
    merged.self_weight[c] += graph.self_weight[v];
    for (std::uint64_t e = graph.offset[v]; e < graph.offset[v + 1]; ++e) {
      const std::uint32_t other = labels[graph.neighbour[e]];
      if (other == c) {
        merged.self_weight[c] += 0.5 * graph.weight[e];
      } else {
        links.emplace_back(c, other, graph.weight[e]);
      }
    }
  }
  std::sort(links.begin(), links.end());
  merged.offset.assign(communities + 1, 0);
  for (std::size_t i = 0; i < links.size();) {
    const auto [a, b, w0] = links[i];
    double w = 0;
    std::size_t j = i;
    for (; j < links.size() && std::get<0>(links[j]) == a && std::get<1>(links[j]) == b; ++j)
      w += std::get<2>(links[j]);
    merged.neighbour.push_back(b);
    merged.weight.push_back(w);
    ++merged.offset[a + 1];
    i = j;
  }
  for (std::size_t c = 0; c < communities; ++c) merged.offset[c + 1] += merged.offset[c];
  return merged;
}

}  // namespace

LouvainResult louvain_communities(const WeightedAdjacency& graph, const LouvainOptions& options) {
  if (!(options.resolution > 0)) throw Error("the Louvain resolution must be positive.");
  const std::size_t n = graph.num_vertices();
  LouvainResult result;
  result.seed = options.seed;
  result.community.resize(n);
  std::iota(result.community.begin(), result.community.end(), 0u);
  result.num_communities = n;
  const double m = graph.total_weight();
  if (!(m > 0)) {
    result.modularity = std::numeric_limits<double>::quiet_NaN();
    return result;
  }
  double q = modularity(graph, result.community, options.resolution);
  WeightedAdjacency level_graph = graph;
  std::vector<std::uint32_t> labels;
  for (std::uint64_t level = 0;; ++level) {
    if (!move_vertices(level_graph, m, options, derive_seed(options.seed, {level}), labels)) break;
    const std::size_t communities = renumber_labels(labels);
    for (auto& c : result.community) c = labels[c];
    ++result.levels;
    const double new_q = modularity(graph, result.community, options.resolution);
    const bool improved_enough = new_q - q > options.min_gain;
    q = new_q;
    if (!improved_enough || communities == level_graph.num_vertices()) break;
    level_graph = aggregate(level_graph, labels, communities);
  }
  result.num_communities = renumber_labels(result.community);
  result.modularity = modularity(graph, result.community, options.resolution);
  return result;
}

}  // namespace loupe

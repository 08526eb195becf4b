// Speed of the similarity graph: exact k nearest neighbours by Hellinger
// distance (blocked product of square-root profiles) and the graph analysis
// on the result. Target: N = 100,000 documents, K = 100 topics, k = 10 in
// under a minute on 2 cores, at least as fast as scikit-learn's brute-force
// NearestNeighbors on the same profiles (bench/graph_knn_vs_sklearn.py runs both).
//
// Profiles: Dirichlet(0.1) rows from a fixed seed, or the raw float64 N x K
// file named by LOUPE_GRAPH_THETA="PATH:N:K" (written by the comparison script).
#include <benchmark/benchmark.h>

#include <cstdlib>
#include <fstream>
#include <string>

#include "graph/group_mixing.h"
#include "graph/hellinger_neighbours.h"
#include "graph/louvain.h"
#include "model/random.h"

namespace {

using loupe::ProfileMatrix;

ProfileMatrix dirichlet_profiles(std::size_t n, std::size_t k, double alpha, std::uint64_t seed) {
  loupe::Xoshiro256 random(seed);
  ProfileMatrix theta(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(k));
  for (Eigen::Index d = 0; d < theta.rows(); ++d) {
    double sum = 0;
    for (Eigen::Index t = 0; t < theta.cols(); ++t) sum += theta(d, t) = random.gamma(alpha) + 1e-300;
    theta.row(d) /= sum;
  }
  return theta;
}

// The profiles from LOUPE_GRAPH_THETA when it names N x K, else generated.
ProfileMatrix profiles(std::size_t n, std::size_t k) {
  if (const char* spec = std::getenv("LOUPE_GRAPH_THETA")) {
    const std::string text(spec);
    const auto second = text.rfind(':');
    const auto first = text.rfind(':', second - 1);
    const std::string path = text.substr(0, first);
    if (std::stoul(text.substr(first + 1, second - first - 1)) == n && std::stoul(text.substr(second + 1)) == k) {
      ProfileMatrix theta(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(k));
      std::ifstream in(path, std::ios::binary);
      in.read(reinterpret_cast<char*>(theta.data()), static_cast<std::streamsize>(n * k * sizeof(double)));
      if (in) return theta;
    }
  }
  return dirichlet_profiles(n, k, 0.1, 20240601);
}

void BM_NearestNeighbours(benchmark::State& state) {
  const auto n = static_cast<std::size_t>(state.range(0));
  const auto k = static_cast<std::size_t>(state.range(1));
  const auto neighbours = static_cast<std::size_t>(state.range(2));
  const ProfileMatrix theta = profiles(n, k);
  loupe::NeighbourOptions options;
  options.threads = static_cast<std::size_t>(state.range(3));
  for (auto _ : state) {
    auto table = loupe::nearest_neighbours(theta, neighbours, options);
    benchmark::DoNotOptimize(table.neighbour.data());
  }
  state.counters["documents_per_second"] =
      benchmark::Counter(static_cast<double>(n), benchmark::Counter::kIsIterationInvariantRate);
}
// Args: N, K, k, threads.
BENCHMARK(BM_NearestNeighbours)->Args({10000, 100, 10, 2})->Unit(benchmark::kSecond)->UseRealTime();
BENCHMARK(BM_NearestNeighbours)->Args({100000, 100, 10, 2})->Iterations(1)->Unit(benchmark::kSecond)->UseRealTime();

void BM_PairsWithinDistance(benchmark::State& state) {
  const auto n = static_cast<std::size_t>(state.range(0));
  const ProfileMatrix theta = profiles(n, 100);
  loupe::NeighbourOptions options;
  options.threads = 2;
  std::size_t edges = 0;
  for (auto _ : state) edges = loupe::pairs_within_distance(theta, 0.3, options).size();
  state.counters["edges"] = static_cast<double>(edges);
}
BENCHMARK(BM_PairsWithinDistance)->Arg(20000)->Unit(benchmark::kSecond)->UseRealTime();

// Louvain and the group tests on a 10-NN graph of 20,000 documents.
void BM_GraphAnalysis(benchmark::State& state) {
  const std::size_t n = 20000;
  const ProfileMatrix theta = profiles(n, 100);
  const auto edges = loupe::neighbour_edges(loupe::nearest_neighbours(theta, 10), loupe::NeighbourRule::either);
  const auto graph = loupe::weighted_adjacency(n, edges);
  std::vector<std::uint32_t> groups(n);
  for (std::size_t d = 0; d < n; ++d) groups[d] = static_cast<std::uint32_t>(d % 5);
  for (auto _ : state) {
    const auto louvain = loupe::louvain_communities(graph);
    loupe::GroupMixingOptions options;
    options.permutations = 999;
    options.threads = 2;
    const auto mixing = loupe::test_group_mixing(graph, groups, options);
    benchmark::DoNotOptimize(louvain.modularity + mixing.modularity.p_value);
  }
}
BENCHMARK(BM_GraphAnalysis)->Unit(benchmark::kSecond)->UseRealTime()->Iterations(1);

}  // namespace

BENCHMARK_MAIN();

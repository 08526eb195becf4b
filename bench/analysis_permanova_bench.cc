// PERMANOVA speed on Hellinger distances in the square-root embedding:
// N = 2000, K = 50, 999 permutations and N = 100,000, K = 100, 9,999
// permutations, on 2 threads (target: the large case under a minute).
// With LOUPE_PERMANOVA_INPUT=DIR set, instead runs once on DIR/theta.csv and
// DIR/groups.txt and prints "pseudo_f=... p=... seconds=..." (used by
// bench/analysis_permanova_peers.sh to compare with scikit-bio and vegan).
#include <benchmark/benchmark.h>

#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <fstream>
#include <random>
#include <sstream>
#include <string>

#include "analysis/permanova.h"

namespace {

// Dirichlet(concentration * profile_g) documents in `groups` groups, with a mild difference in profile.
loupe::GroupedDocuments drawn_documents(std::size_t n, std::size_t topics, std::size_t groups, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  loupe::GroupedDocuments data;
  data.theta.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(topics));
  for (std::size_t i = 0; i < n; ++i) {
    const std::size_t g = i % groups;
    double sum = 0;
    for (std::size_t k = 0; k < topics; ++k) {
      const double weight = 1.0 + 0.05 * static_cast<double>(g) * static_cast<double>(k % 3);
      std::gamma_distribution<double> gamma(0.5 * weight, 1.0);
      const double x = std::max(gamma(rng), 1e-300);
      data.theta(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k)) = x;
      sum += x;
    }
    data.theta.row(static_cast<Eigen::Index>(i)) /= sum;
    data.groups.push_back(static_cast<int>(g));
  }
  return data;
}

void BM_Permanova(benchmark::State& state) {
  const auto n = static_cast<std::size_t>(state.range(0));
  const auto topics = static_cast<std::size_t>(state.range(1));
  loupe::PermutationOptions options;
  options.permutations = static_cast<std::size_t>(state.range(2));
  options.threads = 2;
  options.seed = 1;
  const auto data = drawn_documents(n, topics, 4, 7);
  double f = 0;
  for (auto _ : state) {
    const auto result = loupe::permanova(data, options);
    f = result.record.statistic;
    benchmark::DoNotOptimize(f);
  }
  state.counters["pseudo_F"] = f;
  state.counters["doc_permutations_per_s"] =
      benchmark::Counter(static_cast<double>(n) * static_cast<double>(options.permutations),
                         benchmark::Counter::kIsIterationInvariantRate);
}
BENCHMARK(BM_Permanova)->Args({2000, 50, 999})->Unit(benchmark::kMillisecond)->UseRealTime();
BENCHMARK(BM_Permanova)->Args({100000, 100, 9999})->Unit(benchmark::kSecond)->UseRealTime()->Iterations(1);

int run_on_files(const std::string& folder, std::size_t permutations) {
  loupe::GroupedDocuments data;
  std::vector<std::vector<double>> rows;
  std::ifstream theta(folder + "/theta.csv");
  for (std::string line; std::getline(theta, line);) {
    std::vector<double> row;
    std::stringstream fields(line);
    for (std::string field; std::getline(fields, field, ',');) row.push_back(std::stod(field));
    rows.push_back(std::move(row));
  }
  std::ifstream groups(folder + "/groups.txt");
  for (int g; groups >> g;) data.groups.push_back(g);
  if (rows.empty() || rows.size() != data.groups.size()) {
    std::fprintf(stderr, "cannot read %s/theta.csv and groups.txt (one group per row)\n", folder.c_str());
    return 1;
  }
  data.theta.resize(static_cast<Eigen::Index>(rows.size()), static_cast<Eigen::Index>(rows[0].size()));
  for (std::size_t i = 0; i < rows.size(); ++i) {
    for (std::size_t k = 0; k < rows[i].size(); ++k) {
      data.theta(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k)) = rows[i][k];
    }
  }
  loupe::PermutationOptions options;
  options.permutations = permutations;
  options.threads = 2;
  const auto start = std::chrono::steady_clock::now();
  const auto result = loupe::permanova(data, options);
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  std::printf("pseudo_f=%.17g\np=%.6g\nseconds=%.6g\n", result.record.statistic, result.record.p_value, seconds);
  return 0;
}

}  // namespace

int main(int argc, char** argv) {
  if (const char* folder = std::getenv("LOUPE_PERMANOVA_INPUT")) {
    const char* permutations = std::getenv("LOUPE_PERMANOVA_PERMUTATIONS");
    return run_on_files(folder, permutations ? std::strtoull(permutations, nullptr, 10) : 999);
  }
  benchmark::Initialize(&argc, argv);
  if (benchmark::ReportUnrecognizedArguments(argc, argv)) return 1;
  benchmark::RunSpecifiedBenchmarks();
  benchmark::Shutdown();
  return 0;
}

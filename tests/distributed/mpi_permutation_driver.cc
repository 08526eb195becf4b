// Runs every permutation test of `loupe compare` (run_group_tests: PERMANOVA,
// PERMDISP, ANOSIM, pairwise PERMANOVA, profile distances, distinctive topics) and
// the group-mixing test of `loupe graph` on fixed made-up topic shares, and writes
// the records as JSON. Alone it runs in one process; under mpirun the processes
// share the permutations. distributed_test.cc compares the two files byte for byte.
//   mpi_permutation_driver OUT.json
#include <cmath>
#include <cstdio>
#include <fstream>
#include <memory>
#include <optional>
#include <string>

#include <nlohmann/json.hpp>

#include "analysis/group_tests.h"
#include "analysis/permutation.h"
#include "common/error.h"
#include "distributed/mpi_process_group.h"
#include "graph/document_graph.h"
#include "graph/group_mixing.h"
#include "graph/hellinger_neighbours.h"

namespace loupe {
namespace {

// D documents in 3 groups whose topic shares lean to their own topic, and two strata.
GroupedDocuments made_up_documents(std::size_t documents, std::size_t topics, std::uint64_t seed) {
  GroupedDocuments data;
  data.theta.resize(static_cast<Eigen::Index>(documents), static_cast<Eigen::Index>(topics));
  RandomStream random(seed);
  for (std::size_t d = 0; d < documents; ++d) {
    const int group = static_cast<int>(d % 3);
    double total = 0;
    for (std::size_t k = 0; k < topics; ++k) {
      const double value = random.uniform() + (static_cast<int>(k) == group ? 0.4 : 0.0) + 0.01;
      data.theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(k)) = value;
      total += value;
    }
    data.theta.row(static_cast<Eigen::Index>(d)) /= total;
    data.groups.push_back(group);
    data.strata.push_back(static_cast<int>((d / 10) % 2));
    data.lengths.push_back(50.0 + static_cast<double>(d % 7) * 10.0);
  }
  data.group_names = {"first", "second", "third"};
  data.strata_name = "box";
  return data;
}

nlohmann::json group_tests(const GroupedDocuments& data, ProcessGroup* processes, bool stratified) {
  GroupTestOptions options;
  options.permutation.permutations = 199;
  options.permutation.seed = 41;
  options.permutation.threads = 2;
  options.permutation.keep_null_distribution = true;
  options.permutation.processes = processes;
  options.bootstrap_replicates = 99;
  GroupedDocuments input = data;
  if (!stratified) input.strata.clear();
  const auto results = run_group_tests(input, options);
  return to_json(results.records);
}

nlohmann::json group_mixing(const GroupedDocuments& data, ProcessGroup* processes) {
  const auto table = nearest_neighbours(data.theta, 5);
  const auto adjacency = weighted_adjacency(data.theta.rows(), neighbour_edges(table, NeighbourRule::either));
  std::vector<std::uint32_t> groups(data.groups.begin(), data.groups.end());
  GroupMixingOptions options;
  options.permutations = 299;
  options.seed = 7;
  options.threads = 2;
  options.processes = processes;
  const auto result = test_group_mixing(adjacency, groups, options);
  nlohmann::json json = nlohmann::json::array();
  for (const auto* test : {&result.modularity, &result.same_group_share}) {
    auto record = test->to_json();
    record["null_statistics"] = test->null_statistics;
    json.push_back(record);
  }
  return json;
}

int run(const std::string& output) {
  std::optional<MpiEnvironment> environment;
  std::unique_ptr<MpiProcessGroup> processes;
  if (launched_by_mpi()) {
    environment.emplace(nullptr, nullptr);
    processes = std::make_unique<MpiProcessGroup>();
  }
  const GroupedDocuments data = made_up_documents(90, 6, 2009);
  // Six documents in two groups: 20 arrangements, so complete enumeration.
  GroupedDocuments small = made_up_documents(6, 4, 5);
  for (auto& g : small.groups) g = g == 2 ? 1 : g;
  small.strata.clear();
  nlohmann::json results;
  results["free"] = group_tests(data, processes.get(), false);
  results["within strata"] = group_tests(data, processes.get(), true);
  results["complete enumeration"] = group_tests(small, processes.get(), false);
  results["group mixing"] = group_mixing(data, processes.get());
  if (processes == nullptr || processes->rank() == 0) {
    std::printf("permutations shared among %zu process%s\n", processes ? processes->size() : 1,
                processes && processes->size() > 1 ? "es" : "");
    std::ofstream out(output);
    out << results.dump(1) << "\n";
    if (!out) throw Error("cannot write " + output);
  }
  return 0;
}

}  // namespace
}  // namespace loupe

int main(int argc, char** argv) {
  if (argc != 2) {
    std::fprintf(stderr, "usage: %s OUT.json\n", argv[0]);
    return 2;
  }
  try {
    return loupe::run(argv[1]);
  } catch (const std::exception& e) {
    std::fprintf(stderr, "mpi_permutation_driver: %s\n", e.what());
    return 1;
  }
}

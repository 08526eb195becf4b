// Permutation tests shared among processes (PermutationOptions::processes), with
// processes simulated by threads (support/thread_process_group.h): every process
// must get the single-process records bit for bit. The MPI version of this check
// is tests/distributed (mpi_permutation_driver).
#include <gtest/gtest.h>

#include "analysis/group_tests.h"
#include "analysis/permutation.h"
#include "support/thread_process_group.h"

namespace loupe {
namespace {

GroupedDocuments made_up_documents(std::size_t documents, std::size_t topics) {
  GroupedDocuments data;
  data.theta.resize(static_cast<Eigen::Index>(documents), static_cast<Eigen::Index>(topics));
  RandomStream random(99);
  for (std::size_t d = 0; d < documents; ++d) {
    double total = 0;
    for (std::size_t k = 0; k < topics; ++k) {
      const double value = random.uniform() + (k == d % 3 ? 0.3 : 0.0) + 0.01;
      data.theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(k)) = value;
      total += value;
    }
    data.theta.row(static_cast<Eigen::Index>(d)) /= total;
    data.groups.push_back(static_cast<int>(d % 3));
    data.strata.push_back(static_cast<int>((d / 6) % 2));
  }
  data.strata_name = "box";
  return data;
}

std::string all_tests(const GroupedDocuments& data, ProcessGroup* processes) {
  GroupTestOptions options;
  options.permutation.permutations = 99;
  options.permutation.threads = 2;
  options.permutation.keep_null_distribution = true;
  options.permutation.processes = processes;
  options.bootstrap_replicates = 49;
  return to_json(run_group_tests(data, options).records).dump();
}

TEST(SharedPermutations, EveryProcessGetsTheSingleProcessRecords) {
  const GroupedDocuments data = made_up_documents(48, 4);
  const std::string expected = all_tests(data, nullptr);
  for (const std::size_t processes : {2, 3, 5}) {
    std::vector<std::string> got(processes);
    testing::run_as_processes(processes, [&](ProcessGroup& group) { got[group.rank()] = all_tests(data, &group); });
    for (std::size_t r = 0; r < processes; ++r) EXPECT_EQ(got[r], expected) << processes << " processes, rank " << r;
  }
}

TEST(SharedPermutations, MoreProcessesThanBatches) {
  // 6 documents in groups of 2 and 4: 14 arrangements besides the observed one, all enumerated in one
  // batch, so most of the 7 processes have none.
  GroupedDocuments data = made_up_documents(6, 3);
  for (auto& g : data.groups) g = g == 2 ? 1 : g;
  data.strata.clear();
  const std::string expected = all_tests(data, nullptr);
  std::vector<std::string> got(7);
  testing::run_as_processes(7, [&](ProcessGroup& group) { got[group.rank()] = all_tests(data, &group); });
  for (const auto& records : got) EXPECT_EQ(records, expected);
}

}  // namespace
}  // namespace loupe

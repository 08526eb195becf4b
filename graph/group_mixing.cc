#include "graph/group_mixing.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <thread>

#include "common/error.h"
#include "graph/louvain.h"
#include "model/parallel_runner.h"
#include "model/random.h"

namespace loupe {

namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

// Group labels as a partition: documents without a group become singletons.
std::vector<std::uint32_t> group_partition(const std::vector<std::uint32_t>& group) {
  std::vector<std::uint32_t> labels(group.size());
  std::uint32_t max_group = 0;
  for (const auto g : group)
    if (g != kNoGroup) max_group = std::max(max_group, g);
  std::uint32_t next_single = max_group + 1;
  for (std::size_t v = 0; v < group.size(); ++v) labels[v] = group[v] == kNoGroup ? next_single++ : group[v];
  renumber_labels(labels);
  return labels;
}

}  // namespace

double group_modularity(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group) {
  return modularity(graph, group_partition(group));
}

double mean_same_group_share(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group,
                             std::vector<double>* document_share) {
  const std::size_t n = graph.num_vertices();
  if (document_share) document_share->assign(n, kNaN);
  double sum = 0;
  std::size_t counted = 0;
  for (std::size_t v = 0; v < n; ++v) {
    if (group[v] == kNoGroup) continue;
    std::size_t same = 0;
    std::size_t grouped = 0;
    for (std::uint64_t e = graph.offset[v]; e < graph.offset[v + 1]; ++e) {
      const std::uint32_t g = group[graph.neighbour[e]];
      if (g == kNoGroup) continue;
      ++grouped;
      if (g == group[v]) ++same;
    }
    if (grouped == 0) continue;
    const double share = static_cast<double>(same) / static_cast<double>(grouped);
    if (document_share) (*document_share)[v] = share;
    sum += share;
    ++counted;
  }
  return counted == 0 ? kNaN : sum / static_cast<double>(counted);
}

nlohmann::json PermutationTest::to_json() const {
  return {{"method", method},
          {"statistic_name", statistic_name},
          {"sample_size", sample_size},
          {"groups", groups},
          {"statistic", statistic},
          {"null_mean", null_mean},
          {"null_sd", null_sd},
          {"effect", effect},
          {"p_value", p_value},
          {"permutations", permutations},
          {"seed", seed},
          {"strata", strata.empty() ? nlohmann::json(nullptr) : nlohmann::json(strata)}};
}

GroupMixingResult test_group_mixing(const WeightedAdjacency& graph, const std::vector<std::uint32_t>& group,
                                    const GroupMixingOptions& options) {
  const std::size_t n = graph.num_vertices();
  if (group.size() != n) {
    throw Error("group mixing: " + std::to_string(group.size()) + " group labels for " + std::to_string(n) +
                " documents.");
  }
  if (!options.strata.empty() && options.strata.size() != n) {
    throw Error("group mixing: " + std::to_string(options.strata.size()) + " strata for " + std::to_string(n) +
                " documents.");
  }
  std::map<std::uint32_t, std::size_t> group_sizes;
  for (const auto g : group)
    if (g != kNoGroup) ++group_sizes[g];
  if (group_sizes.size() < 2) {
    throw Error("group mixing needs documents from at least 2 groups; found " + std::to_string(group_sizes.size()) +
                ". Ingest a corpus with one sub-folder (or manifest group) per collection.");
  }
  if (graph.neighbour.empty()) {
    throw Error("group mixing: the graph has no edges. Use more neighbours or a larger distance threshold.");
  }

  // The grouped documents of each stratum: the positions whose labels are shuffled.
  std::map<std::uint32_t, std::vector<std::uint32_t>> strata_members;
  std::size_t sample_size = 0;
  for (std::size_t v = 0; v < n; ++v) {
    if (group[v] == kNoGroup) continue;
    ++sample_size;
    strata_members[options.strata.empty() ? 0u : options.strata[v]].push_back(static_cast<std::uint32_t>(v));
  }

  GroupMixingResult result;
  const double observed_q = group_modularity(graph, group);
  const double observed_share = mean_same_group_share(graph, group, &result.document_share);

  const std::size_t permutations = options.permutations;
  // This process's permutations [mine.begin, mine.end): all of them unless processes share them.
  const IndexRange mine = options.processes != nullptr
                              ? share_of(permutations, options.processes->rank(), options.processes->size())
                              : IndexRange{0, permutations};
  std::vector<double> null_q(mine.end - mine.begin);
  std::vector<double> null_share(mine.end - mine.begin);
  std::size_t threads = options.threads;
  if (threads == 0) threads = std::max(1u, std::thread::hardware_concurrency());
  std::vector<std::vector<std::uint32_t>> scratch(threads, group);
  ParallelRunner(threads).run_with_worker(mine.end - mine.begin, [&](std::size_t slot, std::size_t worker) {
    const std::size_t p = mine.begin + slot;
    std::vector<std::uint32_t>& labels = scratch[worker];
    labels = group;
    Xoshiro256 random(derive_seed(options.seed, {static_cast<std::uint64_t>(p)}));
    for (const auto& [stratum, members] : strata_members) {
      // Fisher-Yates over the labels at this stratum's positions.
      for (std::size_t i = members.size(); i > 1; --i) {
        const std::size_t j = random.below(static_cast<std::uint32_t>(i));
        std::swap(labels[members[i - 1]], labels[members[j]]);
      }
    }
    null_q[slot] = group_modularity(graph, labels);
    null_share[slot] = mean_same_group_share(graph, labels);
  });
  if (options.processes != nullptr) {
    // Every permutation's statistics, in permutation order, on every process.
    null_q = options.processes->all_gather(std::span<const double>(null_q));
    null_share = options.processes->all_gather(std::span<const double>(null_share));
  }

  const auto summarise = [&](PermutationTest& test, double observed, const std::vector<double>& null) {
    test.sample_size = sample_size;
    test.groups = group_sizes.size();
    test.statistic = observed;
    test.permutations = permutations;
    test.seed = options.seed;
    test.strata = options.strata_name;
    double sum = 0;
    double sum_sq = 0;
    std::size_t at_least = 0;
    // A small tolerance so that permutations tying the observed value count as
    // "at least as extreme" despite rounding (common practice).
    const double tolerance = 1e-12 * std::max(1.0, std::abs(observed));
    for (const double value : null) {
      sum += value;
      sum_sq += value * value;
      if (value >= observed - tolerance) ++at_least;
    }
    const double count = static_cast<double>(std::max<std::size_t>(1, null.size()));
    test.null_mean = null.empty() ? kNaN : sum / count;
    test.null_sd = null.size() < 2 ? kNaN : std::sqrt(std::max(0.0, (sum_sq - sum * sum / count) / (count - 1.0)));
    test.effect = observed - test.null_mean;
    // p = (1 + b) / (1 + P) (Phipson & Smyth 2010, cited from memory).
    test.p_value = (1.0 + static_cast<double>(at_least)) / (1.0 + static_cast<double>(null.size()));
    test.null_statistics = null;
  };
  result.modularity.method = "group modularity permutation test";
  result.modularity.statistic_name = "modularity Q of the group partition";
  summarise(result.modularity, observed_q, null_q);
  result.same_group_share.method = "same-group neighbour share permutation test";
  result.same_group_share.statistic_name = "mean share of neighbours in the document's own group";
  summarise(result.same_group_share, observed_share, null_share);

  std::uint32_t max_group = 0;
  for (const auto& [g, size] : group_sizes) max_group = std::max(max_group, g);
  std::vector<double> sums(max_group + 1, 0.0);
  std::vector<std::size_t> counts(max_group + 1, 0);
  for (std::size_t v = 0; v < n; ++v) {
    if (group[v] == kNoGroup || std::isnan(result.document_share[v])) continue;
    sums[group[v]] += result.document_share[v];
    ++counts[group[v]];
  }
  result.group_share.resize(max_group + 1);
  for (std::size_t g = 0; g <= max_group; ++g) {
    result.group_share[g] = counts[g] == 0 ? kNaN : sums[g] / static_cast<double>(counts[g]);
  }
  return result;
}

}  // namespace loupe

#include "analysis/anosim.h"

#include <algorithm>
#include <numeric>

#include "common/error.h"

namespace loupe {

std::vector<double> average_ranks(const std::vector<double>& values) {
  const std::size_t m = values.size();
  std::vector<std::size_t> order(m);
  std::iota(order.begin(), order.end(), std::size_t{0});
  std::sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return values[a] < values[b]; });
  std::vector<double> ranks(m);
  for (std::size_t start = 0; start < m;) {
    std::size_t end = start + 1;
    while (end < m && values[order[end]] == values[order[start]]) ++end;
    // Ranks start+1 .. end share their mean (start + 1 + end) / 2.
    const double shared = 0.5 * static_cast<double>(start + 1 + end);
    for (std::size_t j = start; j < end; ++j) ranks[order[j]] = shared;
    start = end;
  }
  return ranks;
}

AnosimResult anosim(const IncludedDocuments& documents, const PermutationOptions& options, std::size_t max_documents) {
  const std::size_t n = documents.size();
  if (n > max_documents) {
    throw Error("ANOSIM ranks all N(N-1)/2 distances between documents and is limited to " +
                std::to_string(max_documents) + " documents, but " + std::to_string(n) +
                " take part; raise the ANOSIM document limit (memory grows as 12 N^2 bytes) or rely on PERMANOVA");
  }
  const std::size_t groups = documents.num_groups();
  const std::vector<double> ranks = average_ranks(condensed_hellinger_distances(documents.theta));
  const double pairs = static_cast<double>(ranks.size());
  double within_pairs = 0;
  for (const auto size : documents.group_sizes) within_pairs += 0.5 * static_cast<double>(size * (size - 1));
  const double between_pairs = pairs - within_pairs;
  const double rank_total = 0.5 * pairs * (pairs + 1);  // 1 + 2 + ... + M

  // R = (rbar_B - rbar_W) / (M / 2) (Clarke 1993, eq. 1); rank sums within groups decide it.
  auto statistic_of = [&](double within_rank_sum) {
    const double mean_within = within_rank_sum / within_pairs;
    const double mean_between = (rank_total - within_rank_sum) / between_pairs;
    return (mean_between - mean_within) / (0.5 * pairs);
  };
  // Sums over the condensed rows i < j for `batch` labelings at once; each row of ranks is read once a batch.
  auto within_rank_sums = [&](const int* labels, std::size_t batch, double* sums) {
    std::fill(sums, sums + batch, 0.0);
    std::size_t row_start = 0;
    for (std::size_t i = 0; i + 1 < n; ++i) {
      const double* row = ranks.data() + row_start;  // row[j - i - 1] = rank of pair (i, j)
      for (std::size_t b = 0; b < batch; ++b) {
        const int* labeling = labels + b * n;
        const int label = labeling[i];
        double sum = 0;
        for (std::size_t j = i + 1; j < n; ++j) sum += labeling[j] == label ? row[j - i - 1] : 0.0;
        sums[b] += sum;
      }
      row_start += n - i - 1;
    }
  };
  double observed_sum = 0;
  within_rank_sums(documents.groups.data(), 1, &observed_sum);
  const double r_statistic = statistic_of(observed_sum);

  AnosimResult result;
  result.mean_rank_within = observed_sum / within_pairs;
  result.mean_rank_between = (rank_total - observed_sum) / between_pairs;
  auto& r = result.record;
  r.method = "ANOSIM";
  r.statistic_name = "R";
  r.comparison = "all groups";
  r.sample_size = n;
  r.num_groups = groups;
  r.statistic = r_statistic;
  r.effect_size_name = "R";
  r.effect_size = r_statistic;
  r.strata = documents.strata_name;
  r.seed = options.seed;
  if (options.permutations == 0) return result;

  const LabelPermuter permuter(documents.groups, documents.strata, options, documents.strata_name);
  const std::vector<double> observed{r_statistic};
  std::vector<double> permuted;
  const auto exceedances = count_exceedances(
      permuter, observed, Tail::upper, options.threads,
      [&]() -> BatchEvaluator {
        return [&, sums = std::vector<double>()](const int* labels, std::size_t batch, double* statistics) mutable {
          sums.resize(batch);
          within_rank_sums(labels, batch, sums.data());
          for (std::size_t b = 0; b < batch; ++b) statistics[b] = statistic_of(sums[b]);
        };
      },
      8, options.keep_null_distribution ? &permuted : nullptr);
  if (options.keep_null_distribution) r.null_distribution = null_distribution_of(permuted, 1, 0, r_statistic);
  r.p_value = permutation_p_value(exceedances[0], permuter.count());
  r.permutations = permuter.count();
  r.complete_enumeration = permuter.complete();
  return result;
}

AnosimResult anosim(const GroupedDocuments& data, const PermutationOptions& options, std::size_t max_documents) {
  return anosim(select_documents(data, "ANOSIM"), options, max_documents);
}

}  // namespace loupe

#include "analysis/distinctive_topics.h"

#include <algorithm>

#include "analysis/group_profiles.h"
#include "analysis/group_sums.h"
#include "analysis/multiple_testing.h"
#include "common/error.h"

namespace loupe {
namespace {

// diff_gk = S_gk / W_g - (T_k - S_gk) / (W - W_g), from group sums [S_g, W_g] and totals [T, W].
void differences(const double* sums, const double* totals, std::size_t groups, std::size_t topics, double* out) {
  const std::size_t cols = topics + 1;
  for (std::size_t g = 0; g < groups; ++g) {
    const double* s = sums + g * cols;
    const double inside = s[topics];
    const double outside = totals[topics] - inside;
    for (std::size_t k = 0; k < topics; ++k) out[g * topics + k] = s[k] / inside - (totals[k] - s[k]) / outside;
  }
}

}  // namespace

std::vector<TestRecord> distinctive_topics(const IncludedDocuments& documents, const DistinctiveTopicOptions& options) {
  if (!(options.level > 0 && options.level < 1)) {
    throw Error("the interval level must lie between 0 and 1 (e.g. 0.95); got " + std::to_string(options.level));
  }
  const std::size_t n = documents.size();
  const std::size_t groups = documents.num_groups();
  const std::size_t topics = documents.topic_count();
  const std::size_t cols = topics + 1;
  const std::size_t m = groups * topics;
  const TopicMatrix rows = weighted_rows(documents, options.weight_by_length);
  std::vector<double> sums(groups * cols, 0.0), totals(cols, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    double* sum = sums.data() + static_cast<std::size_t>(documents.groups[i]) * cols;
    for (std::size_t c = 0; c < cols; ++c) {
      const double v = rows(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(c));
      sum[c] += v;
      totals[c] += v;
    }
  }
  std::vector<double> observed(m);
  differences(sums.data(), totals.data(), groups, topics, observed.data());

  // Bootstrap: resample within each group; the rest's mean comes from the other groups' resamples.
  const std::size_t replicates = options.bootstrap_replicates;
  const auto boot =
      bootstrap_group_sums(rows, documents, replicates, options.permutation.seed, options.permutation.threads);
  std::vector<double> boot_differences(replicates * m), boot_totals(cols);
  for (std::size_t r = 0; r < replicates; ++r) {
    const double* replicate = boot.data() + r * groups * cols;
    std::fill(boot_totals.begin(), boot_totals.end(), 0.0);
    for (std::size_t g = 0; g < groups; ++g) {
      for (std::size_t c = 0; c < cols; ++c) boot_totals[c] += replicate[g * cols + c];
    }
    differences(replicate, boot_totals.data(), groups, topics, boot_differences.data() + r * m);
  }

  std::vector<std::uint64_t> exceedances(m, 0);
  std::size_t permutations = 0;
  bool complete = false;
  std::string warning;
  std::vector<double> permuted;
  const bool keep_null = options.permutation.keep_null_distribution;
  if (options.permutation.permutations > 0) {
    try {
      const LabelPermuter permuter(documents.groups, documents.strata, options.permutation, documents.strata_name);
      const int largest = static_cast<int>(
          std::max_element(documents.group_sizes.begin(), documents.group_sizes.end()) - documents.group_sizes.begin());
      const RowTable table{rows.data(), n, cols};
      exceedances = count_exceedances(
          permuter, observed, Tail::two_sided, options.permutation.threads,
          [&]() -> BatchEvaluator {
            return [&, batch_sums = std::vector<double>()](const int* labels, std::size_t batch,
                                                           double* statistics) mutable {
              batch_sums.resize(batch * groups * cols);
              accumulate_group_sums(table, labels, batch, groups, totals.data(), largest, batch_sums.data());
              for (std::size_t b = 0; b < batch; ++b) {
                differences(batch_sums.data() + b * groups * cols, totals.data(), groups, topics, statistics + b * m);
              }
            };
          },
          16, keep_null ? &permuted : nullptr);
      permutations = permuter.count();
      complete = permuter.complete();
    } catch (const Error& error) {
      warning = error.what();
    }
  }

  std::vector<TestRecord> records(m);
  std::vector<double> p(m), sample(replicates);
  for (std::size_t g = 0; g < groups; ++g) {
    for (std::size_t k = 0; k < topics; ++k) {
      const std::size_t j = g * topics + k;
      auto& r = records[j];
      r.method = "distinctive topic";
      r.statistic_name = "difference in mean share";
      r.comparison = documents.group_names[g] + " vs rest";
      r.topic = static_cast<int>(k);
      r.sample_size = n;
      r.num_groups = groups;
      r.statistic = observed[j];
      r.effect_size_name = "difference in mean share";
      r.effect_size = observed[j];
      for (std::size_t b = 0; b < replicates; ++b) sample[b] = boot_differences[b * m + j];
      std::tie(r.interval_low, r.interval_high) = percentile_interval(sample, options.level);
      r.p_value = permutations > 0 ? permutation_p_value(exceedances[j], permutations) : kNotAvailable;
      r.permutations = permutations;
      r.complete_enumeration = complete;
      r.strata = documents.strata_name;
      r.seed = options.permutation.seed;
      r.warning = warning;
      if (keep_null && permutations > 0) r.null_distribution = null_distribution_of(permuted, m, j, observed[j]);
      p[j] = r.p_value;
    }
  }
  // Benjamini & Hochberg (1995) across all topic-group pairs.
  const auto q = benjamini_hochberg(p);
  for (std::size_t j = 0; j < m; ++j) {
    records[j].adjusted_p_value = q[j];
    records[j].adjustment = "BH";
  }
  return records;
}

std::vector<TestRecord> distinctive_topics(const GroupedDocuments& data, const DistinctiveTopicOptions& options) {
  return distinctive_topics(select_documents(data, "distinctive topics"), options);
}

}  // namespace loupe

#include "analysis/profile_distance.h"

#include <algorithm>
#include <span>

#include "analysis/group_profiles.h"
#include "analysis/group_sums.h"
#include "analysis/hellinger.h"
#include "common/error.h"

namespace loupe {
namespace {

// Hellinger and Jensen-Shannon distance between the means of groups 0 and 1
// from their sums [sum w theta, sum w]; `scratch` holds 2 K doubles.
void distances_from_sums(const double* sums, std::size_t topics, double* scratch, double* out) {
  const std::size_t cols = topics + 1;
  for (std::size_t k = 0; k < topics; ++k) {
    scratch[k] = sums[k] / sums[topics];
    scratch[topics + k] = sums[cols + k] / sums[cols + topics];
  }
  const std::span<const double> p(scratch, topics), q(scratch + topics, topics);
  out[0] = hellinger_distance(p, q);
  out[1] = jensen_shannon_distance(p, q);
}

std::vector<TestRecord> pair_distances(const IncludedDocuments& pair, const PermutationOptions& options,
                                       bool weight_by_length, const std::string& comparison) {
  const std::size_t n = pair.size();
  const std::size_t topics = pair.topic_count();
  const std::size_t cols = topics + 1;
  const TopicMatrix rows = weighted_rows(pair, weight_by_length);
  std::vector<double> sums(2 * cols, 0.0), scratch(2 * topics);
  for (std::size_t i = 0; i < n; ++i) {
    double* sum = sums.data() + static_cast<std::size_t>(pair.groups[i]) * cols;
    for (std::size_t c = 0; c < cols; ++c) sum[c] += rows(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(c));
  }
  std::vector<double> observed(2);
  distances_from_sums(sums.data(), topics, scratch.data(), observed.data());

  std::vector<TestRecord> records(2);
  const char* names[2] = {"Hellinger distance", "Jensen-Shannon distance"};
  for (std::size_t s = 0; s < 2; ++s) {
    auto& r = records[s];
    r.method = "profile distance";
    r.statistic_name = names[s];
    r.comparison = comparison;
    r.sample_size = n;
    r.num_groups = 2;
    r.statistic = observed[s];
    r.effect_size_name = std::string(names[s]) + " between mean profiles";
    r.effect_size = observed[s];
    r.strata = pair.strata_name;
    r.seed = options.seed;
  }
  if (options.permutations == 0) return records;
  std::vector<std::uint64_t> exceedances;
  std::size_t permutations = 0;
  bool complete = false;
  std::vector<double> permuted;
  try {
    const LabelPermuter permuter(pair.groups, pair.strata, options, pair.strata_name);
    std::vector<double> totals(cols, 0.0);
    for (std::size_t c = 0; c < cols; ++c) totals[c] = sums[c] + sums[cols + c];
    const int largest = pair.group_sizes[0] >= pair.group_sizes[1] ? 0 : 1;
    const RowTable table{rows.data(), n, cols};
    exceedances = count_exceedances(
        permuter, observed, Tail::upper, options.threads,
        [&]() -> BatchEvaluator {
          return [&, batch_sums = std::vector<double>(), work = std::vector<double>(2 * topics)](
                     const int* labels, std::size_t batch, double* statistics) mutable {
            batch_sums.resize(batch * 2 * cols);
            accumulate_group_sums(table, labels, batch, 2, totals.data(), largest, batch_sums.data());
            for (std::size_t b = 0; b < batch; ++b) {
              distances_from_sums(batch_sums.data() + b * 2 * cols, topics, work.data(), statistics + 2 * b);
            }
          };
        },
        16, options.keep_null_distribution ? &permuted : nullptr);
    permutations = permuter.count();
    complete = permuter.complete();
  } catch (const Error& error) {
    for (auto& r : records) r.warning = error.what();
    return records;
  }
  for (std::size_t s = 0; s < 2; ++s) {
    records[s].p_value = permutation_p_value(exceedances[s], permutations);
    records[s].permutations = permutations;
    records[s].complete_enumeration = complete;
    if (options.keep_null_distribution)
      records[s].null_distribution = null_distribution_of(permuted, 2, s, observed[s]);
  }
  return records;
}

}  // namespace

std::vector<TestRecord> profile_distances(const IncludedDocuments& documents, const PermutationOptions& options,
                                          bool weight_by_length, Adjustment adjustment) {
  std::vector<TestRecord> records;
  const int groups = static_cast<int>(documents.num_groups());
  for (int g = 0; g < groups; ++g) {
    for (int h = g + 1; h < groups; ++h) {
      for (auto& r :
           pair_distances(select_pair(documents, g, h), options, weight_by_length, pair_name(documents, g, h))) {
        records.push_back(std::move(r));
      }
    }
  }
  // Adjust each distance's p-values across the pairs.
  for (std::size_t s = 0; s < 2; ++s) {
    std::vector<double> p;
    for (std::size_t i = s; i < records.size(); i += 2) p.push_back(records[i].p_value);
    const auto adjusted = adjust_p_values(p, adjustment);
    for (std::size_t i = s, j = 0; i < records.size(); i += 2, ++j) {
      records[i].adjusted_p_value = adjusted[j];
      records[i].adjustment = adjustment_name(adjustment);
    }
  }
  return records;
}

std::vector<TestRecord> profile_distances(const GroupedDocuments& data, const PermutationOptions& options,
                                          bool weight_by_length, Adjustment adjustment) {
  return profile_distances(select_documents(data, "profile distance"), options, weight_by_length, adjustment);
}

}  // namespace loupe

#include "analysis/permanova.h"

#include <algorithm>
#include <limits>

#include "analysis/group_sums.h"
#include "common/error.h"

namespace loupe {
namespace {

// pseudo-F = (SS_A / (G - 1)) / (SS_W / (N - G)), SS_W = SS_T - SS_A (Anderson 2001, eq. 4).
double pseudo_f(double ss_between, double ss_total, std::size_t n, std::size_t groups) {
  const double ss_within = ss_total - ss_between;
  return (ss_between / static_cast<double>(groups - 1)) / (ss_within / static_cast<double>(n - groups));
}

}  // namespace

PermanovaResult permanova(const IncludedDocuments& documents, const PermutationOptions& options,
                          const std::string& method, const std::string& comparison) {
  const std::size_t n = documents.size();
  const std::size_t groups = documents.num_groups();
  const std::size_t topics = documents.topic_count();
  // Centred embedding c_i = y_i - ybar, y_i = sqrt(theta_i) / sqrt 2: ||y_i - y_j|| is the Hellinger distance.
  TopicMatrix centred = sqrt_embedding(documents.theta);
  const Eigen::RowVectorXd mean = centred.colwise().mean();
  centred.rowwise() -= mean;
  // SS_T = sum_i ||c_i||^2 = (1/N) sum_{i<j} d_ij^2 (Anderson 2001, eq. 1, in the embedding).
  const double ss_total = centred.squaredNorm();
  std::vector<double> inverse_size(groups);
  for (std::size_t g = 0; g < groups; ++g) inverse_size[g] = 1.0 / static_cast<double>(documents.group_sizes[g]);

  // SS_A = sum_g n_g ||cbar_g||^2 = sum_g ||S_g||^2 / n_g with S_g the group sum of centred rows.
  auto ss_between_of = [&](const double* sums) {
    double ss = 0;
    for (std::size_t g = 0; g < groups; ++g) {
      double squared = 0;
      for (std::size_t k = 0; k < topics; ++k) squared += sums[g * topics + k] * sums[g * topics + k];
      ss += squared * inverse_size[g];
    }
    return ss;
  };
  std::vector<double> observed_sums(groups * topics, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    double* sum = observed_sums.data() + static_cast<std::size_t>(documents.groups[i]) * topics;
    for (std::size_t k = 0; k < topics; ++k)
      sum[k] += centred(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k));
  }
  const double ss_between = ss_between_of(observed_sums.data());
  const double f = pseudo_f(ss_between, ss_total, n, groups);

  PermanovaResult result;
  result.ss_between = ss_between;
  result.ss_total = ss_total;
  result.ss_within = ss_total - ss_between;
  auto& r = result.record;
  r.method = method;
  r.statistic_name = "pseudo-F";
  r.comparison = comparison;
  r.sample_size = n;
  r.num_groups = groups;
  r.statistic = f;
  r.effect_size_name = "R²";
  // R^2 = SS_A / SS_T (Anderson 2001; vegan's adonis2 reports the same).
  r.effect_size = ss_total > 0 ? ss_between / ss_total : std::numeric_limits<double>::quiet_NaN();
  r.strata = documents.strata_name;
  r.seed = options.seed;
  if (options.permutations == 0) return result;

  const LabelPermuter permuter(documents.groups, documents.strata, options, documents.strata_name);
  const Eigen::RowVectorXd totals = centred.colwise().sum();
  const std::vector<double> column_totals(totals.data(), totals.data() + totals.size());
  const int largest = static_cast<int>(std::max_element(documents.group_sizes.begin(), documents.group_sizes.end()) -
                                       documents.group_sizes.begin());
  const RowTable table{centred.data(), n, topics};
  const std::vector<double> observed{f};
  std::vector<double> permuted;
  const auto exceedances = count_exceedances(
      permuter, observed, Tail::upper, options.threads,
      [&]() -> BatchEvaluator {
        return [&, sums = std::vector<double>()](const int* labels, std::size_t batch, double* statistics) mutable {
          sums.resize(batch * groups * topics);
          accumulate_group_sums(table, labels, batch, groups, column_totals.data(), largest, sums.data());
          for (std::size_t b = 0; b < batch; ++b) {
            statistics[b] = pseudo_f(ss_between_of(sums.data() + b * groups * topics), ss_total, n, groups);
          }
        };
      },
      16, options.keep_null_distribution ? &permuted : nullptr);
  if (options.keep_null_distribution) r.null_distribution = null_distribution_of(permuted, 1, 0, f);

  r.p_value = permutation_p_value(exceedances[0], permuter.count());
  r.permutations = permuter.count();
  r.complete_enumeration = permuter.complete();
  return result;
}

PermanovaResult permanova(const GroupedDocuments& data, const PermutationOptions& options) {
  return permanova(select_documents(data, "PERMANOVA"), options, "PERMANOVA", "all groups");
}

std::vector<PermanovaResult> pairwise_permanova(const IncludedDocuments& documents, const PermutationOptions& options,
                                                Adjustment adjustment) {
  std::vector<PermanovaResult> results;
  const int groups = static_cast<int>(documents.num_groups());
  for (int g = 0; g < groups; ++g) {
    for (int h = g + 1; h < groups; ++h) {
      const auto pair = select_pair(documents, g, h);
      const auto name = pair_name(documents, g, h);
      try {
        results.push_back(permanova(pair, options, "pairwise PERMANOVA", name));
      } catch (const Error& error) {
        // This pair's strata allow no permutation: report the statistic, no p-value.
        auto statistics_only = options;
        statistics_only.permutations = 0;
        results.push_back(permanova(pair, statistics_only, "pairwise PERMANOVA", name));
        results.back().record.warning = error.what();
      }
    }
  }
  std::vector<double> p;
  p.reserve(results.size());
  for (const auto& r : results) p.push_back(r.record.p_value);
  const auto adjusted = adjust_p_values(p, adjustment);
  for (std::size_t i = 0; i < results.size(); ++i) {
    results[i].record.adjusted_p_value = adjusted[i];
    results[i].record.adjustment = adjustment_name(adjustment);
  }
  return results;
}

std::vector<PermanovaResult> pairwise_permanova(const GroupedDocuments& data, const PermutationOptions& options,
                                                Adjustment adjustment) {
  return pairwise_permanova(select_documents(data, "pairwise PERMANOVA"), options, adjustment);
}

}  // namespace loupe

#include "analysis/permdisp.h"

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <limits>

namespace loupe {
namespace {

// One-way ANOVA F from group sums of x: SSB = sum_g S_g^2 / n_g - S^2 / N, SSW = SST - SSB.
double anova_f(const std::vector<double>& group_sums, const std::vector<double>& inverse_size, double total,
               double sum_of_squares, std::size_t n) {
  const std::size_t groups = group_sums.size();
  double between = -total * total / static_cast<double>(n);
  for (std::size_t g = 0; g < groups; ++g) between += group_sums[g] * group_sums[g] * inverse_size[g];
  const double within = sum_of_squares - total * total / static_cast<double>(n) - between;
  return (between / static_cast<double>(groups - 1)) / (within / static_cast<double>(n - groups));
}

}  // namespace

PermdispResult permdisp(const IncludedDocuments& documents, const PermutationOptions& options, double warning_level) {
  const std::size_t n = documents.size();
  const std::size_t groups = documents.num_groups();
  const TopicMatrix y = sqrt_embedding(documents.theta);
  TopicMatrix centroids = TopicMatrix::Zero(static_cast<Eigen::Index>(groups), y.cols());
  for (std::size_t i = 0; i < n; ++i) centroids.row(documents.groups[i]) += y.row(static_cast<Eigen::Index>(i));
  std::vector<double> inverse_size(groups);
  for (std::size_t g = 0; g < groups; ++g) {
    inverse_size[g] = 1.0 / static_cast<double>(documents.group_sizes[g]);
    centroids.row(static_cast<Eigen::Index>(g)) *= inverse_size[g];
  }
  // z_i = ||y_i - c_g(i)||: the Hellinger distance of document i to its group centroid (Anderson 2006).
  std::vector<double> distance(n);
  std::vector<double> group_sums(groups, 0.0);
  for (std::size_t i = 0; i < n; ++i) {
    distance[i] = (y.row(static_cast<Eigen::Index>(i)) - centroids.row(documents.groups[i])).norm();
    group_sums[static_cast<std::size_t>(documents.groups[i])] += distance[i];
  }
  double total = 0, squares = 0;
  for (const double z : distance) {
    total += z;
    squares += z * z;
  }
  const double f = anova_f(group_sums, inverse_size, total, squares, n);

  PermdispResult result;
  result.group_names = documents.group_names;
  for (std::size_t g = 0; g < groups; ++g) result.mean_distance_to_centroid.push_back(group_sums[g] * inverse_size[g]);
  const auto [smallest, largest] =
      std::minmax_element(result.mean_distance_to_centroid.begin(), result.mean_distance_to_centroid.end());
  auto& r = result.record;
  r.method = "PERMDISP";
  r.statistic_name = "F";
  r.comparison = "all groups";
  r.sample_size = n;
  r.num_groups = groups;
  r.statistic = f;
  r.effect_size_name = "spread ratio (largest / smallest mean distance to centroid)";
  r.effect_size = *smallest > 0 ? *largest / *smallest : std::numeric_limits<double>::quiet_NaN();
  r.strata = documents.strata_name;
  r.seed = options.seed;
  if (options.permutations == 0) return result;

  // Residuals from the group means, permuted over the labels (vegan's permutest.betadisper).
  std::vector<double> residual(n);
  double residual_total = 0, residual_squares = 0;
  for (std::size_t i = 0; i < n; ++i) {
    const auto g = static_cast<std::size_t>(documents.groups[i]);
    residual[i] = distance[i] - group_sums[g] * inverse_size[g];
    residual_total += residual[i];
    residual_squares += residual[i] * residual[i];
  }
  const LabelPermuter permuter(documents.groups, documents.strata, options, documents.strata_name);
  const std::vector<double> observed{f};
  std::vector<double> permuted;
  const auto exceedances = count_exceedances(
      permuter, observed, Tail::upper, options.threads,
      [&]() -> BatchEvaluator {
        return
            [&, sums = std::vector<double>(groups)](const int* labels, std::size_t batch, double* statistics) mutable {
              for (std::size_t b = 0; b < batch; ++b) {
                std::fill(sums.begin(), sums.end(), 0.0);
                const int* labeling = labels + b * n;
                for (std::size_t i = 0; i < n; ++i) sums[static_cast<std::size_t>(labeling[i])] += residual[i];
                statistics[b] = anova_f(sums, inverse_size, residual_total, residual_squares, n);
              }
            };
      },
      64, options.keep_null_distribution ? &permuted : nullptr);
  if (options.keep_null_distribution) r.null_distribution = null_distribution_of(permuted, 1, 0, f);
  r.p_value = permutation_p_value(exceedances[0], permuter.count());
  r.permutations = permuter.count();
  r.complete_enumeration = permuter.complete();
  result.dispersions_differ = r.p_value < warning_level;
  if (result.dispersions_differ) {
    char text[320];
    std::snprintf(text, sizeof text,
                  "dispersions differ between groups (PERMDISP p = %.3g, largest/smallest spread %.2f): "
                  "PERMANOVA then mixes differences in location with differences in spread",
                  r.p_value, r.effect_size);
    r.warning = text;
  }
  return result;
}

PermdispResult permdisp(const GroupedDocuments& data, const PermutationOptions& options, double warning_level) {
  return permdisp(select_documents(data, "PERMDISP"), options, warning_level);
}

std::string dispersion_warning(const PermdispResult& permdisp) {
  return permdisp.dispersions_differ ? permdisp.record.warning : std::string();
}

}  // namespace loupe

#include "analysis/group_profiles.h"

#include <algorithm>
#include <cmath>

#include "analysis/permutation.h"
#include "analysis/test_record.h"
#include "common/error.h"

namespace loupe {

TopicMatrix weighted_rows(const IncludedDocuments& documents, bool weight_by_length) {
  if (weight_by_length && documents.lengths.empty()) {
    throw Error("weighting by document length needs the length of every document; none were given");
  }
  const auto n = static_cast<Eigen::Index>(documents.size());
  const auto k = documents.theta.cols();
  TopicMatrix rows(n, k + 1);
  for (Eigen::Index i = 0; i < n; ++i) {
    const double w = weight_by_length ? documents.lengths[static_cast<std::size_t>(i)] : 1.0;
    rows.row(i).head(k) = w * documents.theta.row(i);
    rows(i, k) = w;
  }
  return rows;
}

std::vector<double> bootstrap_group_sums(const TopicMatrix& rows, const IncludedDocuments& documents,
                                         std::size_t replicates, std::uint64_t seed, std::size_t threads) {
  const std::size_t groups = documents.num_groups();
  const auto cols = static_cast<std::size_t>(rows.cols());
  std::vector<std::vector<std::size_t>> members(groups);
  for (std::size_t i = 0; i < documents.size(); ++i)
    members[static_cast<std::size_t>(documents.groups[i])].push_back(i);
  std::vector<double> sums(replicates * groups * cols, 0.0);
  run_in_parallel(replicates, threads, 8, [&](std::size_t begin, std::size_t end) {
    for (std::size_t r = begin; r < end; ++r) {
      RandomStream stream(stream_seed(seed, StreamPurpose::bootstrap, r));
      for (std::size_t g = 0; g < groups; ++g) {
        double* sum = sums.data() + (r * groups + g) * cols;
        const auto& group = members[g];
        const auto size = static_cast<std::uint32_t>(group.size());
        for (std::size_t draw = 0; draw < group.size(); ++draw) {
          const double* row = rows.data() + group[stream.below(size)] * cols;
          for (std::size_t c = 0; c < cols; ++c) sum[c] += row[c];
        }
      }
    }
  });
  return sums;
}

std::pair<double, double> percentile_interval(std::vector<double>& sample, double level) {
  if (sample.empty()) return {kNotAvailable, kNotAvailable};
  std::sort(sample.begin(), sample.end());
  // Type 7: Q(p) = x_(floor(h)) + (h - floor(h)) (x_(floor(h)+1) - x_(floor(h))), h = (n - 1) p (Hyndman & Fan 1996).
  auto quantile = [&](double p) {
    const double h = static_cast<double>(sample.size() - 1) * p;
    const auto low = static_cast<std::size_t>(std::floor(h));
    const std::size_t high = std::min(low + 1, sample.size() - 1);
    return sample[low] + (h - static_cast<double>(low)) * (sample[high] - sample[low]);
  };
  const double tail = 0.5 * (1.0 - level);
  return {quantile(tail), quantile(1.0 - tail)};
}

GroupProfiles group_profiles(const IncludedDocuments& documents, const ProfileOptions& options) {
  if (!(options.level > 0 && options.level < 1)) {
    throw Error("the interval level must lie between 0 and 1 (e.g. 0.95); got " + std::to_string(options.level));
  }
  const std::size_t groups = documents.num_groups();
  const std::size_t topics = documents.topic_count();
  const std::size_t cols = topics + 1;
  const TopicMatrix rows = weighted_rows(documents, options.weight_by_length);
  std::vector<double> observed(groups * cols, 0.0);
  for (std::size_t i = 0; i < documents.size(); ++i) {
    double* sum = observed.data() + static_cast<std::size_t>(documents.groups[i]) * cols;
    for (std::size_t c = 0; c < cols; ++c) sum[c] += rows(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(c));
  }
  const std::size_t replicates = options.bootstrap_replicates;
  const auto boot = bootstrap_group_sums(rows, documents, replicates, options.seed, options.threads);

  GroupProfiles profiles;
  profiles.replicates = replicates;
  profiles.seed = options.seed;
  profiles.weighted = options.weight_by_length;
  profiles.level = options.level;
  std::vector<double> sample(replicates);
  for (std::size_t g = 0; g < groups; ++g) {
    GroupProfile profile;
    profile.group = documents.group_names[g];
    profile.documents = documents.group_sizes[g];
    const double* sum = observed.data() + g * cols;
    profile.total_weight = sum[topics];
    for (std::size_t k = 0; k < topics; ++k) {
      // Mean share: sum_i w_i theta_ik / sum_i w_i.
      profile.mean.push_back(sum[k] / sum[topics]);
      for (std::size_t r = 0; r < replicates; ++r) {
        const double* replicate = boot.data() + (r * groups + g) * cols;
        sample[r] = replicate[k] / replicate[topics];
      }
      const auto [low, high] = percentile_interval(sample, options.level);
      profile.interval_low.push_back(low);
      profile.interval_high.push_back(high);
    }
    profiles.groups.push_back(std::move(profile));
  }
  return profiles;
}

GroupProfiles group_profiles(const GroupedDocuments& data, const ProfileOptions& options) {
  return group_profiles(select_documents(data, "group profiles", {1, 2}), options);
}

nlohmann::json to_json(const GroupProfiles& profiles) {
  auto groups = nlohmann::json::array();
  auto numbers = [](const std::vector<double>& values) {
    auto array = nlohmann::json::array();
    for (const double v : values) array.push_back(std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr));
    return array;
  };
  for (const auto& g : profiles.groups) {
    groups.push_back({{"group", g.group},
                      {"documents", g.documents},
                      {"total_weight", g.total_weight},
                      {"mean", numbers(g.mean)},
                      {"interval_low", numbers(g.interval_low)},
                      {"interval_high", numbers(g.interval_high)}});
  }
  return {{"groups", groups},
          {"level", profiles.level},
          {"weighted_by_length", profiles.weighted},
          {"bootstrap_replicates", profiles.replicates},
          {"seed", profiles.seed},
          {"chain", profiles.chain + 1}};
}

std::string to_csv(const GroupProfiles& profiles) {
  std::string out =
      "group,topic,documents,total_weight,mean,interval_low,interval_high,level,weighted,replicates,seed,chain\n";
  for (const auto& g : profiles.groups) {
    for (std::size_t k = 0; k < g.mean.size(); ++k) {
      out += csv_field(g.group) + "," + std::to_string(k + 1) + "," + std::to_string(g.documents) + "," +
             format_number(g.total_weight) + "," + format_number(g.mean[k]) + "," + format_number(g.interval_low[k]) +
             "," + format_number(g.interval_high[k]) + "," + format_number(profiles.level) + "," +
             (profiles.weighted ? "true" : "false") + "," + std::to_string(profiles.replicates) + "," +
             std::to_string(profiles.seed) + "," + std::to_string(profiles.chain + 1) + "\n";
    }
  }
  return out;
}

}  // namespace loupe

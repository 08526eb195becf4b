// PERMDISP: distances to centroids, the ANOVA F, the warning when spreads differ.
#include "analysis/permdisp.h"

#include <gtest/gtest.h>

#include "analysis/hellinger.h"
#include "analysis_test_support.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

PermutationOptions with(std::size_t permutations, std::size_t threads = 2) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = 3;
  options.threads = threads;
  return options;
}

TEST(PermdispTest, MeanDistancesAndFFollowTheDefinition) {
  const auto data = draw_documents({9, 11}, {tilted_profile(5, 0), tilted_profile(5, 1)}, {4, 20}, 2);
  const auto result = permdisp(data, with(199));
  // Direct computation: centroid of each group's sqrt(theta)/sqrt(2), distances, one-way ANOVA.
  const TopicMatrix y = sqrt_embedding(data.theta);
  std::vector<Eigen::RowVectorXd> centroid(2, Eigen::RowVectorXd::Zero(5));
  std::vector<double> size(2, 0), mean(2, 0);
  for (std::size_t i = 0; i < 20; ++i) {
    centroid[data.groups[i]] += y.row(static_cast<Eigen::Index>(i));
    size[data.groups[i]] += 1;
  }
  for (int g = 0; g < 2; ++g) centroid[g] /= size[g];
  std::vector<double> z(20);
  for (std::size_t i = 0; i < 20; ++i) {
    z[i] = (y.row(static_cast<Eigen::Index>(i)) - centroid[data.groups[i]]).norm();
    mean[data.groups[i]] += z[i] / size[data.groups[i]];
  }
  double grand = 0;
  for (const double v : z) grand += v / 20;
  double between = 0, within = 0;
  for (std::size_t i = 0; i < 20; ++i) within += (z[i] - mean[data.groups[i]]) * (z[i] - mean[data.groups[i]]);
  for (int g = 0; g < 2; ++g) between += size[g] * (mean[g] - grand) * (mean[g] - grand);
  const double f = between / (within / 18);
  EXPECT_NEAR(result.record.statistic, f, 1e-10 * f);
  EXPECT_NEAR(result.mean_distance_to_centroid[0], mean[0], 1e-12);
  EXPECT_NEAR(result.mean_distance_to_centroid[1], mean[1], 1e-12);
  EXPECT_NEAR(result.record.effect_size, std::max(mean[0], mean[1]) / std::min(mean[0], mean[1]), 1e-12);
  EXPECT_EQ(result.record.method, "PERMDISP");
}

TEST(PermdispTest, WarnsWhenSpreadsDifferAndNotOtherwise) {
  // Same centre, very different concentration: group A is far more spread out.
  const auto spread = draw_documents({30, 30}, {tilted_profile(6, 0.5), tilted_profile(6, 0.5)}, {2, 200}, 5);
  const auto differ = permdisp(spread, with(499));
  EXPECT_TRUE(differ.dispersions_differ);
  EXPECT_DOUBLE_EQ(differ.record.p_value, 0.002);
  EXPECT_NE(differ.record.warning.find("PERMANOVA then mixes differences in location with differences in spread"),
            std::string::npos);
  EXPECT_EQ(dispersion_warning(differ), differ.record.warning);
  // Group B holds copies of group A's documents: equal spreads, F = 0.
  auto same = draw_documents({30, 30}, {tilted_profile(6, 0.5), tilted_profile(6, 0.5)}, {20, 20}, 5);
  same.theta.bottomRows(30) = same.theta.topRows(30);
  const auto alike = permdisp(same, with(499));
  EXPECT_NEAR(alike.record.statistic, 0.0, 1e-12);
  EXPECT_FALSE(alike.dispersions_differ);
  EXPECT_TRUE(alike.record.warning.empty());
  EXPECT_EQ(dispersion_warning(alike), "");
}

TEST(PermdispTest, PValueDoesNotDependOnThreadCount) {
  const auto data =
      draw_documents({12, 15, 9}, {tilted_profile(4, 0), tilted_profile(4, 0), tilted_profile(4, 0)}, {5, 8, 6}, 7);
  EXPECT_EQ(permdisp(data, with(999, 1)).record.p_value, permdisp(data, with(999, 3)).record.p_value);
}

}  // namespace
}  // namespace loupe

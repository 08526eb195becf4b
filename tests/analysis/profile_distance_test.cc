// Distances between groups' mean profiles with their permutation null.
#include "analysis/profile_distance.h"

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
  options.seed = 13;
  options.threads = threads;
  return options;
}

TEST(ProfileDistanceTest, DistancesOfTheMeanProfiles) {
  GroupedDocuments data;
  data.theta.resize(4, 2);
  data.theta << 1, 0, 0.6, 0.4, 0.2, 0.8, 0, 1;
  data.groups = {0, 0, 1, 1};
  data.lengths = {1, 3, 1, 1};
  const auto records = profile_distances(data, with(99), false);
  ASSERT_EQ(records.size(), 2u);
  const std::vector<double> a{0.8, 0.2}, b{0.1, 0.9};
  EXPECT_EQ(records[0].statistic_name, "Hellinger distance");
  EXPECT_EQ(records[1].statistic_name, "Jensen-Shannon distance");
  EXPECT_DOUBLE_EQ(records[0].statistic, hellinger_distance(a, b));
  EXPECT_DOUBLE_EQ(records[1].statistic, jensen_shannon_distance(a, b));
  // 4 documents, 2 + 2: 6 arrangements, complete enumeration of the other 5.
  EXPECT_TRUE(records[0].complete_enumeration);
  EXPECT_EQ(records[0].permutations, 5u);
  // Only the swap of the two groups is as far apart: p = (1 + 1) / 6.
  EXPECT_DOUBLE_EQ(records[0].p_value, 2.0 / 6.0);
  const auto weighted = profile_distances(data, with(99), true);
  const std::vector<double> aw{0.7, 0.3};  // (1 * 1 + 3 * 0.6) / 4 = 0.7
  EXPECT_DOUBLE_EQ(weighted[0].statistic, hellinger_distance(aw, b));
}

TEST(ProfileDistanceTest, PlantedDifferenceIsSignificantAndNullIsNot) {
  const auto strong = draw_documents({30, 30, 30}, {tilted_profile(5, 0), tilted_profile(5, 0), tilted_profile(5, 3)},
                                     {10, 10, 10}, 21);
  const auto records = profile_distances(strong, with(499), false);
  ASSERT_EQ(records.size(), 6u);  // 3 pairs x 2 distances
  EXPECT_EQ(records[0].comparison, "A vs B");
  EXPECT_EQ(records[2].comparison, "A vs C");
  EXPECT_GT(records[0].p_value, 0.01);          // A and B share their profile
  EXPECT_DOUBLE_EQ(records[2].p_value, 0.002);  // A and C differ
  EXPECT_DOUBLE_EQ(records[3].p_value, 0.002);
  EXPECT_DOUBLE_EQ(records[4].p_value, 0.002);  // B vs C
  EXPECT_EQ(records[2].adjustment, "BH");
  // Same p-values for any thread count.
  const auto one = profile_distances(strong, with(499, 1), false);
  for (std::size_t i = 0; i < records.size(); ++i) EXPECT_EQ(one[i].p_value, records[i].p_value);
}

}  // namespace
}  // namespace loupe

// All group tests for one chain: the records, their order, PERMDISP's warning
// beside PERMANOVA, ANOSIM above its limit.
#include "analysis/group_tests.h"

#include <gtest/gtest.h>

#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

GroupTestOptions with(std::size_t permutations) {
  GroupTestOptions options;
  options.permutation.permutations = permutations;
  options.permutation.seed = 77;
  options.bootstrap_replicates = 99;
  return options;
}

TEST(GroupTestsTest, EveryTestOnceInAFixedOrder) {
  const auto data =
      draw_documents({20, 25, 15}, {tilted_profile(4, 0), tilted_profile(4, 1), tilted_profile(4, 2)}, {6, 6, 6}, 3);
  const auto results = run_group_tests(data, with(99), 4);
  std::vector<std::string> methods;
  for (const auto& r : results.records) {
    if (methods.empty() || methods.back() != r.method) methods.push_back(r.method);
    EXPECT_EQ(r.chain, 4);
    EXPECT_EQ(r.seed, 77u);
  }
  EXPECT_EQ(methods, (std::vector<std::string>{"PERMANOVA", "PERMDISP", "ANOSIM", "pairwise PERMANOVA",
                                               "profile distance", "distinctive topic"}));
  EXPECT_EQ(results.records.size(), 3u + 3u + 6u + 12u);
  EXPECT_EQ(results.profiles.groups.size(), 3u);
  EXPECT_EQ(results.profiles.chain, 4);
  EXPECT_EQ(results.mean_distance_to_centroid.size(), 3u);
}

TEST(GroupTestsTest, PermanovaCarriesTheDispersionWarning) {
  // Same centre, different spread.
  const auto data = draw_documents({30, 30}, {tilted_profile(6, 0.5), tilted_profile(6, 0.5)}, {2, 200}, 5);
  const auto results = run_group_tests(data, with(199), 0);
  ASSERT_EQ(results.records[0].method, "PERMANOVA");
  EXPECT_NE(results.records[0].warning.find("dispersions differ between groups"), std::string::npos);
  EXPECT_EQ(results.records[0].warning, results.records[1].warning);
}

TEST(GroupTestsTest, AnosimAboveItsLimitIsSkippedWithANote) {
  const auto data = draw_documents({20, 20}, {tilted_profile(4, 0), tilted_profile(4, 1)}, {6, 6}, 3);
  auto options = with(49);
  options.anosim_max_documents = 39;
  const auto results = run_group_tests(data, options, 0);
  ASSERT_EQ(results.records[2].method, "ANOSIM");
  EXPECT_TRUE(std::isnan(results.records[2].statistic));
  EXPECT_NE(results.records[2].warning.find("exceed the ANOSIM limit of 39"), std::string::npos);
}

TEST(GroupTestsTest, OneGroupIsRefused) {
  auto data = draw_documents({20, 20}, {tilted_profile(4, 0), tilted_profile(4, 1)}, {6, 6}, 3);
  for (auto& g : data.groups) g = 0;
  EXPECT_THROW(run_group_tests(data, with(9), 0), Error);
}

}  // namespace
}  // namespace loupe

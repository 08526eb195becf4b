// Distinctive topics: differences in mean share, intervals, p- and q-values.
#include "analysis/distinctive_topics.h"

#include <gtest/gtest.h>

#include "analysis/multiple_testing.h"
#include "analysis_test_support.h"

namespace loupe {
namespace {

using testing::draw_documents;

DistinctiveTopicOptions with(std::size_t permutations, std::size_t replicates, std::uint64_t seed = 2) {
  DistinctiveTopicOptions options;
  options.permutation.permutations = permutations;
  options.permutation.seed = seed;
  options.bootstrap_replicates = replicates;
  return options;
}

TEST(DistinctiveTopicsTest, DifferenceAgainstTheOtherGroups) {
  GroupedDocuments data;
  data.theta.resize(6, 2);
  data.theta << 1, 0, 0.8, 0.2, 0.5, 0.5, 0.3, 0.7, 0, 1, 0.2, 0.8;
  data.groups = {0, 0, 1, 1, 2, 2};
  const auto records = distinctive_topics(data, with(99, 99));
  ASSERT_EQ(records.size(), 6u);  // 3 groups x 2 topics
  // Group 0, topic 0: mean 0.9 against the mean of the four others (0.5 + 0.3 + 0 + 0.2) / 4 = 0.25.
  EXPECT_EQ(records[0].comparison, "group 0 vs rest");
  EXPECT_EQ(records[0].topic, 0);
  EXPECT_NEAR(records[0].statistic, 0.65, 1e-15);
  EXPECT_NEAR(records[1].statistic, -0.65, 1e-15);
  // Group 1, topic 0: 0.4 against (1 + 0.8 + 0 + 0.2) / 4 = 0.5.
  EXPECT_NEAR(records[2].statistic, -0.1, 1e-15);
  for (const auto& r : records) {
    EXPECT_EQ(r.adjustment, "BH");
    EXPECT_GE(r.adjusted_p_value, r.p_value);
    EXPECT_LE(r.interval_low, r.interval_high);
  }
}

TEST(DistinctiveTopicsTest, FindsThePlantedTopicAndOnlyIt) {
  // Topic 0 is twice as common in group A; the other five topics share the rest equally.
  const std::vector<double> a{0.3, 0.14, 0.14, 0.14, 0.14, 0.14}, b{0.15, 0.17, 0.17, 0.17, 0.17, 0.17};
  const auto data = draw_documents({60, 60}, {a, b}, {20, 20}, 4);
  const auto records = distinctive_topics(data, with(999, 499));
  ASSERT_EQ(records.size(), 12u);
  EXPECT_DOUBLE_EQ(records[0].p_value, 0.001);
  EXPECT_LE(records[0].adjusted_p_value, 0.012);  // BH: 12 * 0.001 / rank (1 or 2)
  EXPECT_GT(records[0].interval_low, 0.1);
  EXPECT_LT(records[0].interval_high, 0.2);
  EXPECT_NEAR(records[6].statistic, -records[0].statistic, 1e-12);  // B vs rest mirrors A vs rest
  EXPECT_DOUBLE_EQ(records[6].p_value, records[0].p_value);
  // The q-values are BH over all 12 topic-group p-values.
  std::vector<double> p;
  for (const auto& r : records) p.push_back(r.p_value);
  const auto q = benjamini_hochberg(p);
  for (std::size_t j = 0; j < records.size(); ++j) EXPECT_DOUBLE_EQ(records[j].adjusted_p_value, q[j]);
}

TEST(DistinctiveTopicsTest, IntervalsCoverTheTrueDifference) {
  // Known profiles, so the true difference A - B of each topic is known; 100
  // corpora of 30 + 30 documents, 4 topics: 400 nominal-95% intervals (A vs
  // rest). Tolerance: coverage in [0.90, 0.985] (about 3 standard errors).
  const std::vector<double> a{0.4, 0.3, 0.2, 0.1}, b{0.25, 0.25, 0.25, 0.25};
  int covered = 0;
  for (std::uint64_t s = 0; s < 100; ++s) {
    const auto data = draw_documents({30, 30}, {a, b}, {8, 8}, 900 + s);
    const auto records = distinctive_topics(data, with(0, 499, s));
    for (std::size_t k = 0; k < 4; ++k) {
      const double truth = a[k] - b[k];
      covered += records[k].interval_low <= truth && truth <= records[k].interval_high;
      EXPECT_TRUE(std::isnan(records[k].p_value));  // no permutations asked for
    }
  }
  EXPECT_GE(covered, 360);
  EXPECT_LE(covered, 394);
}

TEST(DistinctiveTopicsTest, NullTopicsHaveUniformishPValues) {
  // Identical profiles: under a valid test, p <= 0.1 for about 10% of the
  // 2 x 8 x 30 p-values (the two groups mirror each other, so 240 independent-ish);
  // binomial(240, 0.1) lies in [9, 42] with probability > 99.9% (R: qbinom(c(5e-4, 1 - 5e-4), 240, 0.1) = 10, 40).
  const std::vector<double> same(8, 0.125);
  int small = 0;
  for (std::uint64_t s = 0; s < 30; ++s) {
    const auto data = draw_documents({15, 20}, {same, same}, {4, 4}, 70 + s);
    const auto records = distinctive_topics(data, with(199, 9, s));
    for (std::size_t k = 0; k < 8; ++k) small += records[k].p_value <= 0.1;
  }
  EXPECT_GE(small, 9);
  EXPECT_LE(small, 42);
}

}  // namespace
}  // namespace loupe

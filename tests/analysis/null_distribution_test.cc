// The null distributions kept for reports (TestRecord::null_distribution): the histogram itself, that keeping
// it changes no statistic or p-value and no result of another thread count, that PERMANOVA's histogram is
// that of the statistics of its permutations computed one by one, and that every group test fills it.
#include <gtest/gtest.h>

#include <cmath>
#include <limits>
#include <numeric>
#include <set>

#include "analysis/group_tests.h"
#include "analysis/permanova.h"
#include "analysis/test_record.h"
#include "analysis_test_support.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

PermutationOptions with(std::size_t permutations, bool keep, std::size_t threads = 2) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = 17;
  options.threads = threads;
  options.keep_null_distribution = keep;
  return options;
}

std::uint64_t total(const NullDistribution& h) { return std::accumulate(h.counts.begin(), h.counts.end(), 0ull); }

TEST(NullDistributionTest, HistogramCoversThePermutedValuesAndTheObservedOne) {
  // The example of test_record.h: {0, 1, 2, 3} and observed 4 in 2 bins -> [0, 4], {2, 2}.
  const std::vector<double> values{0, 1, 2, 3};
  auto h = null_distribution_of(values, 1, 0, 4.0, 2);
  EXPECT_EQ(h.low, 0.0);
  EXPECT_EQ(h.high, 4.0);
  EXPECT_EQ(h.counts, (std::vector<std::uint64_t>{2, 2}));
  // The observed value below every permuted one widens the range downwards; the top value is in the last bin.
  h = null_distribution_of(values, 1, 0, -3.0, 3);
  EXPECT_EQ(h.low, -3.0);
  EXPECT_EQ(h.high, 3.0);
  EXPECT_EQ(h.counts, (std::vector<std::uint64_t>{0, 1, 3}));
  // A column of a table with two values a permutation; NaN is left out.
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const std::vector<double> table{0.1, 5, nan, 6, 0.3, 7};
  h = null_distribution_of(table, 2, 1, 6.0);
  EXPECT_EQ(h.counts.size(), kNullDistributionBins);
  EXPECT_EQ(h.low, 5.0);
  EXPECT_EQ(h.high, 7.0);
  EXPECT_EQ(total(h), 3u);
  EXPECT_EQ(total(null_distribution_of(table, 2, 0, 0.2)), 2u);
  // Every value the same: a range of width 1 around it.
  h = null_distribution_of(std::vector<double>{2, 2}, 1, 0, 2.0);
  EXPECT_EQ(h.low, 1.5);
  EXPECT_EQ(h.high, 2.5);
  EXPECT_EQ(total(h), 2u);
  // Nothing finite: nothing to draw.
  EXPECT_TRUE(null_distribution_of(std::vector<double>{nan}, 1, 0, nan).counts.empty());
}

TEST(NullDistributionTest, PermanovaHistogramIsThatOfItsPermutationsComputedOneByOne) {
  // 3 + 4 documents: the 34 labelings other than the observed one are all enumerated.
  const auto data = draw_documents({3, 4}, {tilted_profile(5, 0), tilted_profile(5, 1)}, {4, 4}, 8);
  const auto result = permanova(data, with(999, true));
  ASSERT_TRUE(result.record.complete_enumeration);
  std::vector<double> permuted;
  for (int mask = 0; mask < 128; ++mask) {
    if (__builtin_popcount(static_cast<unsigned>(mask)) != 3 || mask == 0b0000111) continue;  // observed: 0 0 0 1 1 1 1
    GroupedDocuments relabelled = data;
    for (int i = 0; i < 7; ++i) relabelled.groups[static_cast<std::size_t>(i)] = (mask >> i) & 1 ? 0 : 1;
    permuted.push_back(permanova(relabelled, with(0, false)).record.statistic);
  }
  ASSERT_EQ(permuted.size(), 34u);
  const auto expected = null_distribution_of(permuted, 1, 0, result.record.statistic);
  const auto& kept = result.record.null_distribution;
  EXPECT_NEAR(kept.low, expected.low, 1e-9 * std::abs(expected.low));
  EXPECT_NEAR(kept.high, expected.high, 1e-9 * std::abs(expected.high));
  EXPECT_EQ(kept.counts, expected.counts);
  EXPECT_EQ(total(kept), 34u);
}

TEST(NullDistributionTest, KeepingItChangesNoResultAndNoThreadCountChangesIt) {
  const auto data = draw_documents({20, 25, 30}, {tilted_profile(6, 0), tilted_profile(6, 0.3), tilted_profile(6, 0.6)},
                                   {5, 5, 5}, 3);
  const auto plain = permanova(data, with(499, false));
  const auto one = permanova(data, with(499, true, 1));
  const auto three = permanova(data, with(499, true, 3));
  EXPECT_TRUE(plain.record.null_distribution.counts.empty());
  EXPECT_FALSE(to_json(plain.record).contains("null_distribution"));
  EXPECT_EQ(one.record.statistic, plain.record.statistic);
  EXPECT_EQ(one.record.p_value, plain.record.p_value);
  EXPECT_EQ(one.record.null_distribution.counts, three.record.null_distribution.counts);
  EXPECT_EQ(one.record.null_distribution.low, three.record.null_distribution.low);
  EXPECT_EQ(one.record.null_distribution.high, three.record.null_distribution.high);
  EXPECT_EQ(total(one.record.null_distribution), 499u);
  const auto json = to_json(one.record);
  ASSERT_TRUE(json.contains("null_distribution"));
  EXPECT_EQ(json["null_distribution"]["counts"].size(), kNullDistributionBins);
}

TEST(NullDistributionTest, EveryGroupTestWithPermutationsKeepsOne) {
  const auto data = draw_documents({12, 14, 16}, {tilted_profile(5, 0), tilted_profile(5, 0.8), tilted_profile(5, 1.6)},
                                   {5, 5, 5}, 4);
  GroupTestOptions options;
  options.permutation = with(99, true);
  options.bootstrap_replicates = 19;
  const auto kept = run_group_tests(data, options);
  options.permutation.keep_null_distribution = false;
  const auto plain = run_group_tests(data, options);
  ASSERT_EQ(kept.records.size(), plain.records.size());
  std::set<std::string> methods;
  for (std::size_t i = 0; i < kept.records.size(); ++i) {
    const auto& r = kept.records[i];
    EXPECT_EQ(r.p_value, plain.records[i].p_value) << r.method << " " << r.comparison;
    EXPECT_TRUE(plain.records[i].null_distribution.counts.empty());
    ASSERT_GT(r.permutations, 0u) << r.method;
    EXPECT_EQ(total(r.null_distribution), r.permutations) << r.method << " " << r.comparison;
    EXPECT_LE(r.null_distribution.low, r.statistic) << r.method;
    EXPECT_GE(r.null_distribution.high, r.statistic) << r.method;
    methods.insert(r.method);
  }
  EXPECT_EQ(methods, (std::set<std::string>{"PERMANOVA", "PERMDISP", "ANOSIM", "pairwise PERMANOVA", "profile distance",
                                            "distinctive topic"}));
}

}  // namespace
}  // namespace loupe

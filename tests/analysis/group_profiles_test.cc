// Group profiles: means, length weighting, percentile intervals, coverage of
// the bootstrap intervals on drawn data with known group profiles.
#include "analysis/group_profiles.h"

#include <gtest/gtest.h>

#include <cstdio>
#include <numeric>

#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

ProfileOptions with(std::size_t replicates, bool weighted = false, std::size_t threads = 2) {
  ProfileOptions options;
  options.bootstrap_replicates = replicates;
  options.weight_by_length = weighted;
  options.seed = 6;
  options.threads = threads;
  return options;
}

TEST(PercentileIntervalTest, TypeSevenQuantiles) {
  std::vector<double> sample(101);
  std::iota(sample.begin(), sample.end(), 1.0);
  std::reverse(sample.begin(), sample.end());
  // R: quantile(1:101, c(0.05, 0.95)) = 6, 96 (type 7; h = 100 p + 1).
  const auto [low, high] = percentile_interval(sample, 0.9);
  EXPECT_DOUBLE_EQ(low, 6.0);
  EXPECT_DOUBLE_EQ(high, 96.0);
  std::vector<double> four{4, 1, 3, 2};
  // R: quantile(1:4, c(0.025, 0.975)) = 1.075, 3.925.
  const auto [l4, h4] = percentile_interval(four, 0.95);
  EXPECT_NEAR(l4, 1.075, 1e-12);
  EXPECT_NEAR(h4, 3.925, 1e-12);
}

TEST(GroupProfilesTest, MeansPlainAndWeightedByLength) {
  GroupedDocuments data;
  data.theta.resize(4, 2);
  data.theta << 1, 0, 0, 1, 0.5, 0.5, 0.25, 0.75;
  data.groups = {0, 0, 1, 1};
  data.group_names = {"letters", "ledgers"};
  data.lengths = {100, 300, 10, 30};
  const auto plain = group_profiles(data, with(99));
  ASSERT_EQ(plain.groups.size(), 2u);
  EXPECT_EQ(plain.groups[0].group, "letters");
  EXPECT_DOUBLE_EQ(plain.groups[0].mean[0], 0.5);
  EXPECT_DOUBLE_EQ(plain.groups[1].mean[1], 0.625);
  const auto weighted = group_profiles(data, with(99, true));
  // (100 * 1 + 300 * 0) / 400 = 0.25; (10 * 0.5 + 30 * 0.75) / 40 = 0.6875.
  EXPECT_DOUBLE_EQ(weighted.groups[0].mean[0], 0.25);
  EXPECT_DOUBLE_EQ(weighted.groups[1].mean[1], 0.6875);
  EXPECT_DOUBLE_EQ(weighted.groups[0].total_weight, 400);
  for (const auto& g : weighted.groups) {
    for (std::size_t k = 0; k < 2; ++k) {
      EXPECT_LE(g.interval_low[k], g.mean[k]);
      EXPECT_GE(g.interval_high[k], g.mean[k]);
    }
  }
  data.lengths.clear();
  EXPECT_THROW(group_profiles(data, with(9, true)), Error);
}

TEST(GroupProfilesTest, SameIntervalsForAnyThreadCount) {
  const auto data = draw_documents({25, 30}, {tilted_profile(5, 0), tilted_profile(5, 1)}, {5, 5}, 3);
  const auto one = group_profiles(data, with(301, false, 1));
  const auto three = group_profiles(data, with(301, false, 3));
  EXPECT_EQ(one.groups[1].interval_low, three.groups[1].interval_low);
  EXPECT_EQ(one.groups[0].interval_high, three.groups[0].interval_high);
  EXPECT_EQ(to_json(one).dump(), to_json(three).dump());
}

TEST(GroupProfilesTest, SingleDocumentGroupIsAClearError) {
  auto data = draw_documents({5, 1}, {tilted_profile(3, 0), tilted_profile(3, 1)}, {5, 5}, 3);
  try {
    group_profiles(data, with(9));
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_NE(std::string(error.what()).find("group 'B' has a single document"), std::string::npos) << error.what();
  }
}

// Coverage: 150 drawn corpora, two groups of 100 documents from Dirichlet(10 p_g)
// with known p_g (the true mean share), 5 topics: 1500 nominal-95% intervals,
// plain and weighted by length (lengths independent of theta, so the weighted
// mean's target is p_g too). The percentile bootstrap is a little liberal at
// small n (its standard error divides by n, not n - 1, and shares are skewed):
// an independent NumPy simulation of the same design gives 0.928 at n = 40.
// Tolerance: coverage in [0.925, 0.97] at n = 100 (about 3 standard errors
// around the 0.945 expected there).
TEST(GroupProfilesTest, BootstrapIntervalsCoverTrueMeansAtTheirNominalRate) {
  const std::vector<std::vector<double>> truth{tilted_profile(5, 0.5), tilted_profile(5, 2.5)};
  for (const bool weighted : {false, true}) {
    int covered = 0, total = 0;
    for (std::uint64_t s = 0; s < 150; ++s) {
      const auto data = draw_documents({100, 100}, truth, {10, 10}, 500 + s);
      auto options = with(499, weighted);
      options.seed = s;
      const auto profiles = group_profiles(data, options);
      for (std::size_t g = 0; g < 2; ++g) {
        for (std::size_t k = 0; k < 5; ++k) {
          covered +=
              profiles.groups[g].interval_low[k] <= truth[g][k] && truth[g][k] <= profiles.groups[g].interval_high[k];
          ++total;
        }
      }
    }
    const double coverage = static_cast<double>(covered) / total;
    std::printf("bootstrap coverage (%s): %.4f\n", weighted ? "weighted" : "plain", coverage);
    EXPECT_GE(coverage, 0.925) << (weighted ? "weighted" : "plain");
    EXPECT_LE(coverage, 0.97) << (weighted ? "weighted" : "plain");
  }
}

TEST(GroupProfilesTest, CsvHasOneLinePerGroupAndTopic) {
  const auto data = draw_documents({4, 4}, {tilted_profile(3, 0), tilted_profile(3, 1)}, {5, 5}, 3);
  const auto csv = to_csv(group_profiles(data, with(19)));
  EXPECT_EQ(std::count(csv.begin(), csv.end(), '\n'), 7);  // header + 2 groups x 3 topics
  EXPECT_EQ(csv.rfind("group,topic,documents,", 0), 0u);
  EXPECT_NE(csv.find("\nB,2,4,4,"), std::string::npos);
}

}  // namespace
}  // namespace loupe

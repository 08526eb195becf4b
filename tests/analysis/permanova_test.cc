// PERMANOVA and pairwise PERMANOVA: the embedding formulas against Anderson's
// distance formulas, left-out documents, thread independence, complete
// enumeration by brute force, calibration under the null, and bad input.
#include "analysis/permanova.h"

#include <gtest/gtest.h>

#include <algorithm>

#include "analysis/hellinger.h"
#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

PermutationOptions with(std::size_t permutations, std::uint64_t seed = 11, std::size_t threads = 2) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = seed;
  options.threads = threads;
  return options;
}

GroupedDocuments three_groups(std::uint64_t seed, double tilt_step) {
  return draw_documents({8, 10, 12},
                        {tilted_profile(6, 0), tilted_profile(6, tilt_step), tilted_profile(6, 2 * tilt_step)},
                        {5, 5, 5}, seed);
}

// Anderson (2001), eqs. 1-3: SS_T = (1/N) sum_{i<j} d_ij^2, SS_W = sum_g (1/n_g) sum_{i<j in g} d_ij^2.
TEST(PermanovaTest, SumsOfSquaresEqualAndersonsDistanceFormulas) {
  const auto data = three_groups(3, 1.0);
  const auto n = static_cast<std::size_t>(data.theta.rows());
  double total = 0;
  std::vector<double> within(3, 0.0), sizes(3, 0.0);
  for (const int g : data.groups) sizes[static_cast<std::size_t>(g)] += 1;
  for (std::size_t i = 0; i < n; ++i) {
    for (std::size_t j = i + 1; j < n; ++j) {
      const auto ri = data.theta.row(static_cast<Eigen::Index>(i));
      const auto rj = data.theta.row(static_cast<Eigen::Index>(j));
      const std::vector<double> p(ri.begin(), ri.end()), q(rj.begin(), rj.end());
      const double d = hellinger_distance(p, q);
      total += d * d;
      if (data.groups[i] == data.groups[j]) within[static_cast<std::size_t>(data.groups[i])] += d * d;
    }
  }
  const double ss_total = total / static_cast<double>(n);
  double ss_within = 0;
  for (std::size_t g = 0; g < 3; ++g) ss_within += within[g] / sizes[g];
  const auto result = permanova(data, with(99));
  EXPECT_NEAR(result.ss_total, ss_total, 1e-12 * ss_total);
  EXPECT_NEAR(result.ss_within, ss_within, 1e-12 * ss_total);
  const double f = ((ss_total - ss_within) / 2) / (ss_within / static_cast<double>(n - 3));
  EXPECT_NEAR(result.record.statistic, f, 1e-10 * f);
  EXPECT_NEAR(result.record.effect_size, (ss_total - ss_within) / ss_total, 1e-12);
  EXPECT_EQ(result.record.sample_size, n);
  EXPECT_EQ(result.record.num_groups, 3u);
  EXPECT_EQ(result.record.method, "PERMANOVA");
  EXPECT_EQ(result.record.statistic_name, "pseudo-F");
  EXPECT_EQ(result.record.permutations, 99u);
  EXPECT_EQ(result.record.seed, 11u);
}

TEST(PermanovaTest, LeftOutDocumentsChangeNothing) {
  const auto data = three_groups(4, 0.3);
  GroupedDocuments with_disputed = data;
  // Two disputed documents appended and one inserted at the front, all labelled -1.
  const auto k = data.theta.cols();
  with_disputed.theta.resize(data.theta.rows() + 3, k);
  with_disputed.theta.row(0) = TopicMatrix::Constant(1, k, 1.0 / static_cast<double>(k));
  with_disputed.theta.middleRows(1, data.theta.rows()) = data.theta;
  with_disputed.theta.row(data.theta.rows() + 1) = data.theta.row(0);
  with_disputed.theta.row(data.theta.rows() + 2) = data.theta.row(3);
  with_disputed.groups.insert(with_disputed.groups.begin(), kLeftOut);
  with_disputed.groups.push_back(kLeftOut);
  with_disputed.groups.push_back(kLeftOut);
  with_disputed.lengths.clear();
  const auto a = permanova(data, with(199));
  const auto b = permanova(with_disputed, with(199));
  EXPECT_DOUBLE_EQ(a.record.statistic, b.record.statistic);
  EXPECT_EQ(a.record.p_value, b.record.p_value);
  EXPECT_EQ(b.record.sample_size, static_cast<std::size_t>(data.theta.rows()));
}

TEST(PermanovaTest, PValueDoesNotDependOnThreadCount) {
  const auto data = three_groups(5, 0.4);
  const auto one = permanova(data, with(999, 21, 1));
  const auto two = permanova(data, with(999, 21, 2));
  const auto three = permanova(data, with(999, 21, 3));
  EXPECT_EQ(one.record.p_value, two.record.p_value);
  EXPECT_EQ(one.record.p_value, three.record.p_value);
  EXPECT_GT(one.record.p_value, 0.001);  // a weak effect: the test is not trivially at its floor
}

TEST(PermanovaTest, DetectsPlantedDifferenceAndStaysQuietWithout) {
  const auto strong = three_groups(6, 3.0);
  EXPECT_DOUBLE_EQ(permanova(strong, with(999)).record.p_value, 0.001);
  // Calibration under the null: 200 corpora with identical group profiles and
  // 99 permutations each; the share of p <= 0.05 is binomial(200, 0.05) under a
  // valid test, which lies in [1, 21] with probability > 99.9% (R: qbinom(c(5e-4, 1 - 5e-4), 200, 0.05) = 2, 21).
  int rejections = 0;
  for (std::uint64_t s = 0; s < 200; ++s) {
    const auto null = draw_documents({6, 7}, {tilted_profile(4, 0.5), tilted_profile(4, 0.5)}, {3, 3}, 1000 + s);
    rejections += permanova(null, with(99, s)).record.p_value <= 0.05;
  }
  EXPECT_GE(rejections, 1);
  EXPECT_LE(rejections, 21);
}

TEST(PermanovaTest, CompleteEnumerationMatchesBruteForce) {
  // 3 + 4 documents: 35 distinct labelings, all enumerated.
  const auto data = draw_documents({3, 4}, {tilted_profile(5, 0), tilted_profile(5, 1)}, {4, 4}, 8);
  const auto result = permanova(data, with(999));
  ASSERT_TRUE(result.record.complete_enumeration);
  EXPECT_EQ(result.record.permutations, 34u);
  // Brute force: every choice of 3 documents for group 0.
  int at_least = 0, arrangements = 0;
  for (int mask = 0; mask < 128; ++mask) {
    if (__builtin_popcount(static_cast<unsigned>(mask)) != 3) continue;
    GroupedDocuments relabelled = data;
    for (int i = 0; i < 7; ++i) relabelled.groups[static_cast<std::size_t>(i)] = (mask >> i) & 1 ? 0 : 1;
    const double f = permanova(relabelled, with(0)).record.statistic;
    ++arrangements;
    at_least += f >= result.record.statistic * (1 - 1e-12);
  }
  EXPECT_EQ(arrangements, 35);
  EXPECT_DOUBLE_EQ(result.record.p_value, at_least / 35.0);
}

TEST(PermanovaTest, RestrictedPermutationsRecordTheirStrata) {
  auto data = three_groups(9, 0.5);
  data.strata_name = "decade";
  for (std::size_t i = 0; i < data.groups.size(); ++i) data.strata.push_back(static_cast<int>(i % 2) + 1830);
  const auto result = permanova(data, with(199));
  EXPECT_EQ(result.record.strata, "decade");
  EXPECT_FALSE(std::isnan(result.record.p_value));
  // The statistic does not depend on the strata, only its null does.
  EXPECT_DOUBLE_EQ(result.record.statistic, permanova(three_groups(9, 0.5), with(0)).record.statistic);
}

TEST(PermanovaTest, PairwiseCoversEveryPairWithAdjustedPValues) {
  const auto data = three_groups(10, 2.0);
  const auto pairs = pairwise_permanova(data, with(199), Adjustment::holm);
  ASSERT_EQ(pairs.size(), 3u);
  EXPECT_EQ(pairs[0].record.comparison, "A vs B");
  EXPECT_EQ(pairs[1].record.comparison, "A vs C");
  EXPECT_EQ(pairs[2].record.comparison, "B vs C");
  for (const auto& p : pairs) {
    EXPECT_EQ(p.record.method, "pairwise PERMANOVA");
    EXPECT_EQ(p.record.num_groups, 2u);
    EXPECT_EQ(p.record.adjustment, "Holm");
    EXPECT_GE(p.record.adjusted_p_value, p.record.p_value);
  }
  EXPECT_EQ(pairs[0].record.sample_size, 18u);
  EXPECT_EQ(pairs[2].record.sample_size, 22u);
  // A vs C is the most distinct pair (profiles furthest apart).
  EXPECT_GT(pairs[1].record.statistic, pairs[0].record.statistic);
}

TEST(PermanovaTest, OnlyOneGroupIsAClearError) {
  auto data = three_groups(1, 1.0);
  for (auto& g : data.groups) g = g == 1 ? 1 : kLeftOut;
  try {
    permanova(data, with(99));
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    const std::string message = error.what();
    EXPECT_NE(message.find("needs at least 2"), std::string::npos) << message;
    EXPECT_NE(message.find("only one group has documents ('B', 10 documents)"), std::string::npos) << message;
  }
}

TEST(PermanovaTest, GroupWithASingleDocumentIsAClearError) {
  auto data = three_groups(1, 1.0);
  std::size_t kept = 0;
  for (auto& g : data.groups) {
    if (g == 2 && kept++ > 0) g = kLeftOut;
  }
  try {
    permanova(data, with(99));
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_NE(std::string(error.what()).find("group 'C' has a single document"), std::string::npos) << error.what();
  }
}

TEST(PermanovaTest, StrataWithoutPossiblePermutationIsAClearError) {
  auto data = three_groups(1, 1.0);
  data.strata.assign(data.groups.begin(), data.groups.end());  // each group its own box
  data.strata_name = "box";
  EXPECT_THROW(
      {
        try {
          permanova(data, with(99));
        } catch (const Error& error) {
          EXPECT_NE(std::string(error.what()).find("within the strata of 'box'"), std::string::npos);
          throw;
        }
      },
      Error);
}

TEST(PermanovaTest, RowsThatAreNotDistributionsAreRejected) {
  auto data = three_groups(1, 1.0);
  data.theta(3, 0) += 0.5;
  try {
    permanova(data, with(9));
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_NE(std::string(error.what()).find("document 3: topic shares sum to"), std::string::npos) << error.what();
  }
}

}  // namespace
}  // namespace loupe

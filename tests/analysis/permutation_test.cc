// Tests of the permutation machinery: random streams, arrangements, complete
// enumeration, restricted permutations and the p-value formula.
#include "analysis/permutation.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <cmath>
#include <map>
#include <set>

#include "common/error.h"

namespace loupe {
namespace {

PermutationOptions with(std::size_t permutations, std::uint64_t seed = 5) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = seed;
  return options;
}

TEST(RandomStreamTest, BelowIsUniform) {
  // Chi-square goodness of fit for 7 cells, 70000 draws: the 99.9% point of
  // chi-square with 6 degrees of freedom is 22.46 (R: qchisq(0.999, 6)).
  RandomStream stream(stream_seed(1, StreamPurpose::permutation, 0));
  std::vector<double> counts(7, 0);
  for (int i = 0; i < 70000; ++i) ++counts[stream.below(7)];
  double chi2 = 0;
  for (const double c : counts) chi2 += (c - 10000) * (c - 10000) / 10000;
  EXPECT_LT(chi2, 22.46);
}

TEST(RandomStreamTest, StreamsDifferBySeedPurposeAndIndex) {
  std::set<std::uint64_t> seeds;
  for (std::uint64_t index = 0; index < 1000; ++index) {
    seeds.insert(stream_seed(42, StreamPurpose::permutation, index));
    seeds.insert(stream_seed(42, StreamPurpose::bootstrap, index));
    seeds.insert(stream_seed(43, StreamPurpose::permutation, index));
  }
  EXPECT_EQ(seeds.size(), 3000u);
  EXPECT_EQ(stream_seed(42, StreamPurpose::permutation, 7), stream_seed(42, StreamPurpose::permutation, 7));
}

TEST(ArrangementsTest, CountsDistinctLabelings) {
  const std::vector<int> labels{0, 0, 1, 1};
  EXPECT_EQ(distinct_arrangements(labels, {}), 6u);  // 4! / (2! 2!)
  const std::vector<int> three{0, 1, 2, 0, 1, 2, 0};
  EXPECT_EQ(distinct_arrangements(three, {}), 210u);  // 7! / (3! 2! 2!) = 5040 / 24
  // Within strata: {0,0,1} in stratum 0 (3 ways) and {0,1,1,1} in stratum 1 (4 ways).
  const std::vector<int> l{0, 0, 1, 0, 1, 1, 1};
  const std::vector<int> s{0, 0, 0, 1, 1, 1, 1};
  EXPECT_EQ(distinct_arrangements(l, s), 12u);
  // 200 documents in two halves: C(200, 100) > 2^64 saturates.
  std::vector<int> big(200, 0);
  std::fill(big.begin() + 100, big.end(), 1);
  EXPECT_EQ(distinct_arrangements(big, {}), std::numeric_limits<std::uint64_t>::max());
}

TEST(LabelPermuterTest, CompleteEnumerationVisitsEveryOtherArrangementOnce) {
  const std::vector<int> labels{1, 0, 2, 0, 1, 0};  // 6! / (3! 2! 1!) = 60 arrangements
  const LabelPermuter permuter(labels, {}, with(999), "");
  ASSERT_TRUE(permuter.complete());
  EXPECT_EQ(permuter.count(), 59u);
  std::set<std::vector<int>> seen;
  std::vector<int> out(labels.size());
  for (std::size_t i = 0; i < permuter.count(); ++i) {
    permuter.permuted(i, out);
    std::vector<int> sorted = out, original = labels;
    std::sort(sorted.begin(), sorted.end());
    std::sort(original.begin(), original.end());
    EXPECT_EQ(sorted, original);
    EXPECT_NE(out, labels);
    EXPECT_TRUE(seen.insert(out).second);
    EXPECT_LT(permuter.rank(out), permuter.arrangements());
  }
  EXPECT_EQ(seen.size(), 59u);
}

TEST(LabelPermuterTest, RankAndUnrankAreInverse) {
  const std::vector<int> labels{0, 1, 1, 0, 2, 1, 0, 0};
  const std::vector<int> strata{0, 0, 0, 1, 1, 1, 1, 0};
  const LabelPermuter permuter(labels, strata, with(100000), "box");
  ASSERT_TRUE(permuter.complete());
  std::vector<int> out(labels.size());
  for (std::uint64_t r = 0; r < permuter.arrangements(); ++r) {
    permuter.unrank(r, out);
    EXPECT_EQ(permuter.rank(out), r);
  }
}

TEST(LabelPermuterTest, RandomPermutationsStayWithinStrata) {
  std::vector<int> labels, strata;
  for (int i = 0; i < 60; ++i) {
    labels.push_back(i % 3);
    strata.push_back(i / 20);
  }
  const LabelPermuter permuter(labels, strata, with(200), "decade");
  ASSERT_FALSE(permuter.complete());
  EXPECT_EQ(permuter.count(), 200u);
  std::vector<int> out(labels.size());
  std::size_t changed = 0;
  for (std::size_t p = 0; p < permuter.count(); ++p) {
    permuter.permuted(p, out);
    std::map<std::pair<int, int>, int> counts, expected;
    for (std::size_t i = 0; i < labels.size(); ++i) {
      ++counts[{strata[i], out[i]}];
      ++expected[{strata[i], labels[i]}];
    }
    EXPECT_EQ(counts, expected);
    changed += out != labels;
  }
  EXPECT_EQ(changed, 200u);
}

TEST(LabelPermuterTest, RandomArrangementsAreEquallyLikely) {
  // {0,0,1,1,1} has 10 arrangements; 30000 permutations give ~3000 each.
  // Chi-square with 9 degrees of freedom, 99.9% point 27.88 (R: qchisq(0.999, 9)).
  const std::vector<int> labels{0, 0, 1, 1, 1};
  PermutationOptions options = with(30000);
  options.complete_enumeration = false;
  const LabelPermuter permuter(labels, {}, options, "");
  std::map<std::vector<int>, double> counts;
  std::vector<int> out(labels.size());
  for (std::size_t p = 0; p < permuter.count(); ++p) {
    permuter.permuted(p, out);
    ++counts[out];
  }
  ASSERT_EQ(counts.size(), 10u);
  double chi2 = 0;
  for (const auto& [labeling, c] : counts) chi2 += (c - 3000) * (c - 3000) / 3000;
  EXPECT_LT(chi2, 27.88);
}

TEST(LabelPermuterTest, SamePermutationForSameSeedAndIndex) {
  std::vector<int> labels(50);
  for (std::size_t i = 0; i < labels.size(); ++i) labels[i] = static_cast<int>(i % 2);
  const LabelPermuter a(labels, {}, with(10, 9), ""), b(labels, {}, with(1000, 9), ""), c(labels, {}, with(10, 10), "");
  std::vector<int> x(50), y(50), z(50);
  a.permuted(7, x);
  b.permuted(7, y);
  c.permuted(7, z);
  EXPECT_EQ(x, y);  // the stream depends on (seed, index) only
  EXPECT_NE(x, z);
}

TEST(LabelPermuterTest, ConfoundedStrataAreRefusedWithTheColumnName) {
  // Every box holds one group only: nothing can be exchanged.
  const std::vector<int> labels{0, 0, 1, 1, 2, 2};
  const std::vector<int> strata{0, 0, 1, 1, 2, 2};
  try {
    const LabelPermuter permuter(labels, strata, with(99), "archive box");
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_NE(std::string(error.what()).find("no permutation is possible within the strata of 'archive box'"),
              std::string::npos)
        << error.what();
  }
}

TEST(PermutationPValueTest, OnePlusExceedancesOverOnePlusPermutations) {
  EXPECT_DOUBLE_EQ(permutation_p_value(0, 999), 0.001);
  EXPECT_DOUBLE_EQ(permutation_p_value(999, 999), 1.0);
  EXPECT_DOUBLE_EQ(permutation_p_value(49, 99), 0.5);
  EXPECT_TRUE(std::isnan(permutation_p_value(0, 0)));
  EXPECT_TRUE(at_least_as_extreme(1.0, 1.0 + 1e-12, Tail::upper));  // rounding-level ties count
  EXPECT_FALSE(at_least_as_extreme(0.99, 1.0, Tail::upper));
  EXPECT_TRUE(at_least_as_extreme(-2.0, 1.5, Tail::two_sided));
  EXPECT_FALSE(at_least_as_extreme(-2.0, 1.5, Tail::upper));
}

TEST(CountExceedancesTest, SameCountsForAnyNumberOfThreads) {
  std::vector<int> labels(40);
  for (std::size_t i = 0; i < labels.size(); ++i) labels[i] = static_cast<int>(i % 2);
  const LabelPermuter permuter(labels, {}, with(501), "");
  // Statistic: how many of the first 20 documents carry label 1 (observed 10).
  auto factory = [&]() -> BatchEvaluator {
    return [&](const int* l, std::size_t batch, double* statistics) {
      for (std::size_t b = 0; b < batch; ++b) {
        double s = 0;
        for (std::size_t i = 0; i < 20; ++i) s += l[b * 40 + i];
        statistics[b] = s;
      }
    };
  };
  const std::vector<double> observed{12.0};
  const auto one = count_exceedances(permuter, observed, Tail::upper, 1, factory, 7);
  const auto two = count_exceedances(permuter, observed, Tail::upper, 2, factory, 16);
  const auto five = count_exceedances(permuter, observed, Tail::upper, 5, factory, 3);
  EXPECT_EQ(one, two);
  EXPECT_EQ(one, five);
  // P(X >= 12) for the hypergeometric(40, 20, 20) is 0.1715 (R: phyper(11, 20, 20, 20, lower.tail = FALSE));
  // 501 draws put b/P within 0.06 of it with probability > 99.9%.
  EXPECT_NEAR(static_cast<double>(one[0]) / 501.0, 0.1715, 0.06);
}

}  // namespace
}  // namespace loupe

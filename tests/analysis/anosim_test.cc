// ANOSIM: average ranks, R against a direct computation, the size limit.
#include "analysis/anosim.h"

#include <gtest/gtest.h>

#include "analysis/hellinger.h"
#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::tilted_profile;

PermutationOptions with(std::size_t permutations, std::size_t threads = 2) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = 4;
  options.threads = threads;
  return options;
}

TEST(AverageRanksTest, TiesShareTheirMeanRank) {
  EXPECT_EQ(average_ranks({0.3, 0.1, 0.3}), (std::vector<double>{2.5, 1, 2.5}));
  EXPECT_EQ(average_ranks({5, 4, 3, 2, 1}), (std::vector<double>{5, 4, 3, 2, 1}));
  EXPECT_EQ(average_ranks({1, 1, 1, 0}), (std::vector<double>{3, 3, 3, 1}));
}

TEST(AnosimTest, RMatchesTheDefinition) {
  const auto data =
      draw_documents({7, 9, 6}, {tilted_profile(5, 0), tilted_profile(5, 3), tilted_profile(5, 6)}, {20, 20, 20}, 12);
  const std::size_t n = 22;
  const auto ranks = average_ranks(condensed_hellinger_distances(data.theta));
  double within = 0, between = 0, nw = 0, nb = 0;
  std::size_t idx = 0;
  for (std::size_t i = 0; i < n; ++i) {
    for (std::size_t j = i + 1; j < n; ++j, ++idx) {
      if (data.groups[i] == data.groups[j]) {
        within += ranks[idx];
        nw += 1;
      } else {
        between += ranks[idx];
        nb += 1;
      }
    }
  }
  // Clarke (1993): R = (rbar_B - rbar_W) / (M / 2).
  const double r = (between / nb - within / nw) / (0.25 * static_cast<double>(n * (n - 1)));
  const auto result = anosim(data, with(199));
  EXPECT_NEAR(result.record.statistic, r, 1e-12);
  EXPECT_NEAR(result.mean_rank_within, within / nw, 1e-9);
  EXPECT_GT(result.record.statistic, 0.2);
  EXPECT_LE(result.record.p_value, 0.01);
  EXPECT_EQ(result.record.p_value, anosim(data, with(199, 1)).record.p_value);
}

TEST(AnosimTest, RefusesMoreDocumentsThanTheLimitAndSaysHowToRaiseIt) {
  const auto data = draw_documents({20, 20}, {tilted_profile(4, 0), tilted_profile(4, 1)}, {5, 5}, 1);
  try {
    anosim(data, with(9), 30);
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    const std::string message = error.what();
    EXPECT_NE(message.find("limited to 30 documents, but 40 take part"), std::string::npos) << message;
    EXPECT_NE(message.find("raise the ANOSIM document limit"), std::string::npos) << message;
  }
  EXPECT_NO_THROW(anosim(data, with(9), 40));
}

}  // namespace
}  // namespace loupe

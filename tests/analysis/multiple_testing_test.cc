// Benjamini-Hochberg and Holm adjustments.
#include "analysis/multiple_testing.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>
#include <random>

#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

TEST(MultipleTestingTest, WorkedExamples) {
  const std::vector<double> p{0.01, 0.04, 0.03};
  // BH: sorted 0.01, 0.03, 0.04 -> 3*0.01/1 = 0.03, min(3*0.03/2, 0.04) = 0.04, 3*0.04/3 = 0.04.
  const auto bh = benjamini_hochberg(p);
  EXPECT_DOUBLE_EQ(bh[0], 0.03);
  EXPECT_DOUBLE_EQ(bh[1], 0.04);
  EXPECT_DOUBLE_EQ(bh[2], 0.04);
  // Holm: 3*0.01 = 0.03, max(0.03, 2*0.03) = 0.06, max(0.06, 1*0.04) = 0.06.
  const auto h = holm(p);
  EXPECT_DOUBLE_EQ(h[0], 0.03);
  EXPECT_DOUBLE_EQ(h[1], 0.06);
  EXPECT_DOUBLE_EQ(h[2], 0.06);
  EXPECT_DOUBLE_EQ(holm(std::vector<double>{0.6, 0.7})[1], 1.0);  // capped at 1
}

TEST(MultipleTestingTest, NaNIsKeptAndNotCounted) {
  const std::vector<double> p{0.02, std::nan(""), 0.04};
  const auto bh = benjamini_hochberg(p);
  EXPECT_DOUBLE_EQ(bh[0], 0.04);
  EXPECT_TRUE(std::isnan(bh[1]));
  EXPECT_DOUBLE_EQ(bh[2], 0.04);
}

TEST(MultipleTestingTest, ParsesNamesAndRejectsOthers) {
  EXPECT_EQ(parse_adjustment("BH"), Adjustment::benjamini_hochberg);
  EXPECT_EQ(parse_adjustment("holm"), Adjustment::holm);
  EXPECT_EQ(parse_adjustment("None"), Adjustment::none);
  EXPECT_THROW(parse_adjustment("bonferroni"), Error);
}

// Outside reference: R's p.adjust(method = "BH") and p.adjust(method = "holm")
// (tests/analysis/reference/p_adjust.R), on 200 p-values with ties and an NA.
TEST(MultipleTestingReferenceTest, MatchesRsPAdjust) {
  std::mt19937_64 rng(8);
  std::uniform_real_distribution<double> uniform(0, 1);
  std::vector<double> p;
  for (int i = 0; i < 200; ++i) p.push_back(i % 10 == 0 ? 0.05 : std::pow(uniform(rng), 3));
  p[17] = std::nan("");
  testing::TempFolder folder("analysis");
  {
    std::ofstream out(folder.file("p.txt"));
    for (const double v : p) out << (std::isnan(v) ? std::string("NA") : testing::exact(v)) << "\n";
  }
  const auto reference = testing::run_r("p_adjust.R", testing::shell_quote(folder.file("p.txt")));
  ASSERT_EQ(reference.exit_code, 0) << reference.text;
  const auto bh = benjamini_hochberg(p);
  const auto h = holm(p);
  for (std::size_t i = 0; i < p.size(); ++i) {
    if (i == 17) {
      EXPECT_TRUE(std::isnan(bh[i]));
      continue;
    }
    EXPECT_NEAR(bh[i], reference.at("bh_" + std::to_string(i)), 1e-15) << i;
    EXPECT_NEAR(h[i], reference.at("holm_" + std::to_string(i)), 1e-15) << i;
  }
}

}  // namespace
}  // namespace loupe

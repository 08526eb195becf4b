// Numbers as text: fixed decimals, rounding, and the placeholder for values that are not finite.
#include "common/number_text.h"

#include <gtest/gtest.h>

#include <cmath>
#include <limits>

namespace loupe {
namespace {

TEST(NumberTextTest, FixedDecimalsRoundsAndNamesMissingValues) {
  EXPECT_EQ(fixed_decimals(0.28743, 3), "0.287");
  EXPECT_EQ(fixed_decimals(154.96, 1), "155.0");
  EXPECT_EQ(fixed_decimals(-0.5, 0), "-0");  // printf rounds half to even
  EXPECT_EQ(fixed_decimals(std::numeric_limits<double>::quiet_NaN(), 2), "n/a");
  EXPECT_EQ(fixed_decimals(INFINITY, 2, "-"), "-");
}

}  // namespace
}  // namespace loupe

// Strata from a metadata column, and the message for a column that does not exist.
#include "analysis/strata.h"

#include <gtest/gtest.h>

#include "common/error.h"

namespace loupe {
namespace {

TEST(StrataTest, DistinctValuesBecomeStrata) {
  const std::vector<std::string> columns{"year", "box"};
  const std::vector<std::vector<std::string>> rows{{"1841", "B2"}, {"1842", "B1"}, {"1841", "B2"}, {"1850", ""}};
  const auto strata = strata_from_metadata("box", columns, rows);
  EXPECT_EQ(strata.column, "box");
  EXPECT_EQ(strata.values, (std::vector<std::string>{"B1", "B2"}));
  EXPECT_EQ(strata.labels, (std::vector<int>{1, 0, 1, -1}));
}

TEST(StrataTest, MissingColumnNamesItAndTheAvailableOnes) {
  const std::vector<std::string> columns{"year", "box"};
  const std::vector<std::vector<std::string>> rows{{"1841", "B2"}};
  try {
    strata_from_metadata("decade", columns, rows);
    FAIL() << "expected loupe::Error";
  } catch (const Error& error) {
    EXPECT_STREQ(error.what(), "no metadata column 'decade'; the corpus has: year, box (choose one of these)");
  }
  EXPECT_THROW(find_metadata_column("decade", std::vector<std::string>{}), Error);
}

}  // namespace
}  // namespace loupe

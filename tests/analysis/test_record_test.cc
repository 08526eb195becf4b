// Test records: JSON with nulls, CSV quoting and numbers, summaries across chains.
#include "analysis/test_record.h"

#include <gtest/gtest.h>

#include <cmath>

#include "common/error.h"

namespace loupe {
namespace {

TestRecord sample_record(int chain, double statistic, double p) {
  TestRecord r;
  r.method = "PERMANOVA";
  r.statistic_name = "pseudo-F";
  r.comparison = "all groups";
  r.sample_size = 120;
  r.num_groups = 3;
  r.statistic = statistic;
  r.effect_size_name = "R²";
  r.effect_size = statistic / 100;
  r.p_value = p;
  r.permutations = 999;
  r.strata = "decade";
  r.seed = 18446744073709551615ULL;
  r.chain = chain;
  return r;
}

TEST(TestRecordTest, JsonHasEveryFieldAndNullForMissingNumbers) {
  const auto json = to_json(sample_record(2, 4.5, 0.001));
  EXPECT_EQ(json["method"], "PERMANOVA");
  EXPECT_EQ(json["sample_size"], 120);
  EXPECT_EQ(json["groups"], 3);
  EXPECT_EQ(json["statistic"], 4.5);
  EXPECT_EQ(json["p_value"], 0.001);
  EXPECT_TRUE(json["interval_low"].is_null());
  EXPECT_TRUE(json["adjusted_p_value"].is_null());
  EXPECT_TRUE(json["topic"].is_null());
  EXPECT_EQ(json["seed"].get<std::uint64_t>(), 18446744073709551615ULL);
  EXPECT_EQ(json["chain"], 3);  // files number chains from 1; index 2 is the third
  EXPECT_EQ(json["strata"], "decade");
}

TEST(TestRecordTest, CsvQuotesTextAndWritesShortestNumbers) {
  auto r = sample_record(0, 0.1, 0.25);
  r.comparison = "Letters, \"private\" vs rest";
  const std::string row = csv_row(r);
  EXPECT_EQ(row,
            "PERMANOVA,pseudo-F,\"Letters, \"\"private\"\" vs rest\",,120,3,0.1,R²,0.001,,,0.25,,,999,false,decade,"
            "18446744073709551615,1,");  // chain index 0 is written as chain 1
  // Same number of fields as the header (the quoted comma does not count).
  const std::string header = csv_header();
  EXPECT_EQ(std::count(header.begin(), header.end(), ','), 19);
  EXPECT_EQ(format_number(1e-12), "1e-12");
  EXPECT_EQ(format_number(std::nan("")), "");
  const double third = 1.0 / 3.0;
  EXPECT_EQ(std::stod(format_number(third)), third);
}

TEST(ChainSummaryTest, MedianAndRangeAcrossChains) {
  const std::vector<TestRecord> records{sample_record(0, 5, 0.01), sample_record(1, 3, 0.03), sample_record(2, 4, 0.02),
                                        sample_record(3, 9, 0.001)};
  const auto summary = summarize_chains(records);
  EXPECT_EQ(summary.chains, 4u);
  EXPECT_DOUBLE_EQ(summary.statistic.median, 4.5);
  EXPECT_DOUBLE_EQ(summary.statistic.min, 3);
  EXPECT_DOUBLE_EQ(summary.statistic.max, 9);
  EXPECT_DOUBLE_EQ(summary.p_value.median, 0.015);
  EXPECT_DOUBLE_EQ(summary.effect_size.max, 0.09);
  EXPECT_TRUE(std::isnan(summary.adjusted_p_value.median));
  const auto json = to_json(summary);
  EXPECT_EQ(json["statistic"]["median"], 4.5);
  EXPECT_TRUE(json["adjusted_p_value"]["median"].is_null());
  // p = 0.01, 0.03, 0.02, 0.001: significant at 0.05 on all four chains, at 0.015 on two (split).
  EXPECT_EQ(summary.significance.conclusion, "p <= 0.05");
  EXPECT_EQ(summary.significance.agreement, ChainAgreement::all);
  EXPECT_EQ(json["agreement"], "all chains");
  EXPECT_EQ(json["chains_agreeing"], 4);
  const auto strict = summarize_chains(records, 0.015);
  EXPECT_EQ(strict.significance.conclusion, "p <= 0.015");  // chains 1 and 4; the tie goes to chain 1's
  EXPECT_EQ(strict.significance.backing, 2u);
  EXPECT_EQ(strict.significance.agreement, ChainAgreement::split);
  const auto three_of_four = summarize_chains(records, 0.025);
  EXPECT_EQ(three_of_four.significance.conclusion, "p <= 0.025");
  EXPECT_EQ(three_of_four.significance.agreement, ChainAgreement::most);
}

TEST(ChainSummaryTest, GroupsByTestAndRefusesMixtures) {
  auto other = sample_record(0, 1, 0.5);
  other.method = "PERMDISP";
  const std::vector<TestRecord> records{sample_record(0, 5, 0.01), other, sample_record(1, 7, 0.02)};
  const auto summaries = summarize_by_test(records);
  ASSERT_EQ(summaries.size(), 2u);
  EXPECT_EQ(summaries[0].method, "PERMANOVA");
  EXPECT_EQ(summaries[0].chains, 2u);
  EXPECT_DOUBLE_EQ(summaries[0].statistic.median, 6);
  EXPECT_EQ(summaries[1].method, "PERMDISP");
  EXPECT_THROW(summarize_chains(records), Error);
  const std::vector<TestRecord> twice{sample_record(1, 5, 0.01), sample_record(1, 6, 0.01)};
  EXPECT_THROW(summarize_chains(twice), Error);
}

}  // namespace
}  // namespace loupe

// Agreement of a conclusion across chains: all, most, split; the modal conclusion.
#include "analysis/chain_agreement.h"

#include <gtest/gtest.h>

#include <cmath>
#include <string>
#include <vector>

namespace loupe {
namespace {

TEST(ChainAgreementTest, AllMostOrSplit) {
  EXPECT_EQ(agreement_of(4, 4), ChainAgreement::all);
  EXPECT_EQ(agreement_of(3, 4), ChainAgreement::most);
  EXPECT_EQ(agreement_of(2, 4), ChainAgreement::split);  // half is not most
  EXPECT_EQ(agreement_of(0, 4), ChainAgreement::split);
  EXPECT_EQ(agreement_of(1, 1), ChainAgreement::all);
  EXPECT_EQ(agreement_of(0, 0), ChainAgreement::split);
  EXPECT_EQ(agreement_label(ChainAgreement::all), "all chains");
  EXPECT_EQ(agreement_label(ChainAgreement::most), "most chains");
  EXPECT_EQ(agreement_label(ChainAgreement::split), "split");
}

TEST(ChainAgreementTest, ModalConclusionPrefersTheEarlierChainOnATie) {
  const std::vector<std::string> three = {"a", "b", "a"};
  const auto modal = modal_conclusion(three);
  EXPECT_EQ(modal.conclusion, "a");
  EXPECT_EQ(modal.backing, 2u);
  EXPECT_EQ(modal.chains, 3u);
  EXPECT_EQ(modal.agreement, ChainAgreement::most);
  const std::vector<std::string> tie = {"b", "a", "a", "b"};
  EXPECT_EQ(modal_conclusion(tie).conclusion, "b");
  EXPECT_EQ(modal_conclusion(tie).agreement, ChainAgreement::split);
  EXPECT_EQ(modal_conclusion(std::vector<std::string>{}).backing, 0u);
}

TEST(ChainAgreementTest, BackingInWords) {
  EXPECT_EQ(describe_backing(4, 4), "all 4 chains");
  EXPECT_EQ(describe_backing(2, 2), "both chains");
  EXPECT_EQ(describe_backing(3, 4), "3 of 4 chains");
  EXPECT_EQ(describe_backing(2, 4), "2 of 4 chains (split)");
  EXPECT_EQ(describe_backing(1, 1), "1 chain");
}

TEST(ChainAgreementTest, SignificanceUsesTheAdjustedPValueWhenThereIsOne) {
  EXPECT_EQ(significance_conclusion(0.01, std::nan(""), 0.05), "p <= 0.05");
  EXPECT_EQ(significance_conclusion(0.05, std::nan(""), 0.05), "p <= 0.05");  // at the level counts
  EXPECT_EQ(significance_conclusion(0.01, 0.2, 0.05), "p > 0.05");
  EXPECT_EQ(significance_conclusion(std::nan(""), std::nan(""), 0.01), "no p-value");
}

}  // namespace
}  // namespace loupe

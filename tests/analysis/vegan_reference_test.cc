// Checks against outside sources, each named beside its check:
//   vegan 2.6 (R, Debian r-cran-vegan): adonis2, betadisper(type = "centroid") +
//     permutest, anosim  (tests/analysis/reference/vegan_group_tests.R);
//   scikit-bio 0.5 (Debian python3-skbio): permanova, anosim, permdisp(test = "centroid")
//     (tests/analysis/reference/skbio_group_tests.py);
//   the "dune" data shipped with vegan (Jongman, ter Braak & van Tongeren 1987),
//     Hellinger-transformed as in Legendre & Gallagher (2001) (reference/dune_reference.R).
// Statistics agree to 1e-9 relative; Monte-Carlo p-values within a 99.9% binomial band.
#include <gtest/gtest.h>

#include <cstdio>
#include <fstream>

#include "analysis/anosim.h"
#include "analysis/hellinger.h"
#include "analysis/permanova.h"
#include "analysis/permdisp.h"
#include "analysis_test_support.h"

namespace loupe {
namespace {

using testing::draw_documents;
using testing::p_values_agree;
using testing::relative_difference;
using testing::tilted_profile;

PermutationOptions with(std::size_t permutations) {
  PermutationOptions options;
  options.permutations = permutations;
  options.seed = 2024;
  return options;
}

// Writes DIR/dist.csv (loupe's Hellinger distances), DIR/groups.txt and optionally DIR/strata.txt.
void write_inputs(const testing::TempFolder& folder, const GroupedDocuments& data) {
  testing::write_square_csv(folder.file("dist.csv"), condensed_hellinger_distances(data.theta),
                            static_cast<std::size_t>(data.theta.rows()));
  testing::write_ints(folder.file("groups.txt"), data.groups);
  if (!data.strata.empty()) testing::write_ints(folder.file("strata.txt"), data.strata);
}

// A weak effect, so that p-values are moderate and their agreement means something.
GroupedDocuments weak_effect() {
  return draw_documents({18, 22, 20}, {tilted_profile(8, 0), tilted_profile(8, 0.25), tilted_profile(8, 0.4)},
                        {4, 3, 5}, 31);
}

TEST(GroupTestsReferenceTest, FreePermutationsMatchVeganAndScikitBio) {
  const auto data = weak_effect();
  testing::TempFolder folder("analysis");
  write_inputs(folder, data);
  const std::size_t permutations = 999;
  const auto vegan = testing::run_r("vegan_group_tests.R", testing::shell_quote(folder.str()) + " 999 random 1");
  ASSERT_EQ(vegan.exit_code, 0) << vegan.text;
  const auto skbio = testing::run_python("skbio_group_tests.py", testing::shell_quote(folder.str()) + " 999 1");
  ASSERT_EQ(skbio.exit_code, 0) << skbio.text;

  const auto perm = permanova(data, with(permutations));
  // PERMANOVA pseudo-F and R² against vegan's adonis2; pseudo-F against scikit-bio's permanova,
  // whose R² is not reported and follows from F: R² = F (G-1) / (F (G-1) + N - G).
  EXPECT_LT(relative_difference(perm.record.statistic, vegan.at("permanova_f")), 1e-9);
  EXPECT_LT(relative_difference(perm.record.effect_size, vegan.at("permanova_r2")), 1e-9);
  EXPECT_LT(relative_difference(perm.record.statistic, skbio.at("permanova_f")), 1e-9);
  const double fs = skbio.at("permanova_f");
  EXPECT_LT(relative_difference(perm.record.effect_size, fs * 2 / (fs * 2 + 57)), 1e-9);
  EXPECT_EQ(skbio.at("permanova_n"), 60);
  EXPECT_EQ(skbio.at("permanova_groups"), 3);
  EXPECT_TRUE(p_values_agree(perm.record.p_value, permutations, vegan.at("permanova_p"), 999))
      << perm.record.p_value << " vs vegan " << vegan.at("permanova_p");
  EXPECT_TRUE(p_values_agree(perm.record.p_value, permutations, skbio.at("permanova_p"), 999))
      << perm.record.p_value << " vs scikit-bio " << skbio.at("permanova_p");
  EXPECT_GT(perm.record.p_value, 0.005);  // moderate, so the band is a real check

  // PERMDISP F against vegan's betadisper(type = "centroid") + permutest, and
  // scikit-bio's permdisp(test = "centroid"); vegan computes distances in a PCoA
  // of the distance matrix, hence 1e-8 for the distances to centroids.
  const auto disp = permdisp(data, with(permutations));
  EXPECT_LT(relative_difference(disp.record.statistic, vegan.at("permdisp_f")), 1e-8);
  EXPECT_LT(relative_difference(disp.record.statistic, skbio.at("permdisp_f")), 1e-8);
  for (std::size_t g = 0; g < 3; ++g) {
    EXPECT_LT(
        relative_difference(disp.mean_distance_to_centroid[g], vegan.at("permdisp_mean_distance_" + std::to_string(g))),
        1e-8);
  }
  EXPECT_TRUE(p_values_agree(disp.record.p_value, permutations, vegan.at("permdisp_p"), 999))
      << disp.record.p_value << " vs vegan " << vegan.at("permdisp_p");
  EXPECT_TRUE(p_values_agree(disp.record.p_value, permutations, skbio.at("permdisp_p"), 999))
      << disp.record.p_value << " vs scikit-bio " << skbio.at("permdisp_p");

  // ANOSIM R against vegan's anosim and scikit-bio's anosim.
  const auto an = anosim(data, with(permutations));
  EXPECT_LT(relative_difference(an.record.statistic, vegan.at("anosim_r")), 1e-9);
  EXPECT_LT(relative_difference(an.record.statistic, skbio.at("anosim_r")), 1e-9);
  EXPECT_TRUE(p_values_agree(an.record.p_value, permutations, vegan.at("anosim_p"), 999))
      << an.record.p_value << " vs vegan " << vegan.at("anosim_p");
  EXPECT_TRUE(p_values_agree(an.record.p_value, permutations, skbio.at("anosim_p"), 999))
      << an.record.p_value << " vs scikit-bio " << skbio.at("anosim_p");

  std::printf(
      "p-values, loupe / vegan / scikit-bio: PERMANOVA %.3f / %.3f / %.3f, PERMDISP %.3f / %.3f / %.3f, "
      "ANOSIM %.3f / %.3f / %.3f\n",
      perm.record.p_value, vegan.at("permanova_p"), skbio.at("permanova_p"), disp.record.p_value,
      vegan.at("permdisp_p"), skbio.at("permdisp_p"), an.record.p_value, vegan.at("anosim_p"), skbio.at("anosim_p"));

  // Pairwise PERMANOVA: vegan's adonis2 on each pair's documents.
  const auto pairs = pairwise_permanova(data, with(99), Adjustment::benjamini_hochberg);
  const char* keys[3] = {"0_1", "0_2", "1_2"};
  for (std::size_t i = 0; i < 3; ++i) {
    EXPECT_LT(relative_difference(pairs[i].record.statistic, vegan.at(std::string("pairwise_f_") + keys[i])), 1e-9);
    EXPECT_LT(relative_difference(pairs[i].record.effect_size, vegan.at(std::string("pairwise_r2_") + keys[i])), 1e-9);
  }
}

TEST(GroupTestsReferenceTest, WithinStrataMatchVegan) {
  auto data = weak_effect();
  data.strata_name = "decade";
  for (std::size_t i = 0; i < data.groups.size(); ++i) data.strata.push_back(static_cast<int>((i * 7) % 4));
  testing::TempFolder folder("analysis");
  write_inputs(folder, data);
  // vegan: how(blocks = strata), the same restriction (permutations within blocks).
  const auto vegan = testing::run_r("vegan_group_tests.R", testing::shell_quote(folder.str()) + " 999 random 2");
  ASSERT_EQ(vegan.exit_code, 0) << vegan.text;
  const auto perm = permanova(data, with(999));
  EXPECT_LT(relative_difference(perm.record.statistic, vegan.at("permanova_f")), 1e-9);
  EXPECT_TRUE(p_values_agree(perm.record.p_value, 999, vegan.at("permanova_p"), 999))
      << perm.record.p_value << " vs vegan " << vegan.at("permanova_p");
  const auto disp = permdisp(data, with(999));
  EXPECT_TRUE(p_values_agree(disp.record.p_value, 999, vegan.at("permdisp_p"), 999))
      << disp.record.p_value << " vs vegan " << vegan.at("permdisp_p");
  const auto an = anosim(data, with(999));
  EXPECT_TRUE(p_values_agree(an.record.p_value, 999, vegan.at("anosim_p"), 999))
      << an.record.p_value << " vs vegan " << vegan.at("anosim_p");
}

TEST(GroupTestsReferenceTest, CompleteEnumerationMatchesVeganExactly) {
  // 2 strata of 4 documents: vegan enumerates all 4! x 4! = 576 orderings
  // (how(complete = TRUE)), loupe the 24 distinct labelings; the p-values are
  // the same number, since each labeling appears 2! 2! x 1! 3! times among the orderings.
  auto data = draw_documents({4, 4}, {tilted_profile(5, 0), tilted_profile(5, 0.8)}, {5, 5}, 41);
  data.groups = {0, 0, 1, 1, 0, 1, 1, 1};
  data.strata = {0, 0, 0, 0, 1, 1, 1, 1};
  data.strata_name = "box";
  testing::TempFolder folder("analysis");
  write_inputs(folder, data);
  const auto vegan = testing::run_r("vegan_group_tests.R", testing::shell_quote(folder.str()) + " 999 complete 3");
  ASSERT_EQ(vegan.exit_code, 0) << vegan.text;
  const auto perm = permanova(data, with(999));
  ASSERT_TRUE(perm.record.complete_enumeration);
  EXPECT_EQ(perm.record.permutations, 23u);
  EXPECT_LT(relative_difference(perm.record.statistic, vegan.at("permanova_f")), 1e-9);
  EXPECT_NEAR(perm.record.p_value, vegan.at("permanova_p"), 1e-12);
  const auto an = anosim(data, with(999));
  EXPECT_NEAR(an.record.p_value, vegan.at("anosim_p"), 1e-12);
}

TEST(GroupTestsReferenceTest, DuneMeadowDataMatchesVegan) {
  testing::TempFolder folder("analysis");
  const auto vegan = testing::run_r("dune_reference.R", testing::shell_quote(folder.str()) + " 999 5");
  ASSERT_EQ(vegan.exit_code, 0) << vegan.text;
  // Read the counts vegan wrote; theta = counts / row total, so sqrt(theta) is
  // the Hellinger transformation of Legendre & Gallagher (2001).
  GroupedDocuments data;
  std::vector<std::vector<double>> rows;
  {
    std::ifstream in(folder.file("dune.csv"));
    std::string line;
    while (std::getline(in, line)) {
      std::vector<double> row;
      std::size_t start = 0;
      while (start <= line.size()) {
        const auto comma = std::min(line.find(',', start), line.size());
        row.push_back(std::stod(line.substr(start, comma - start)));
        start = comma + 1;
      }
      rows.push_back(row);
    }
  }
  ASSERT_EQ(rows.size(), 20u);
  ASSERT_EQ(rows[0].size(), 30u);
  data.theta.resize(20, 30);
  for (Eigen::Index i = 0; i < 20; ++i) {
    double total = 0;
    for (const double v : rows[static_cast<std::size_t>(i)]) total += v;
    for (Eigen::Index k = 0; k < 30; ++k)
      data.theta(i, k) = rows[static_cast<std::size_t>(i)][static_cast<std::size_t>(k)] / total;
  }
  // Management levels in R's (alphabetical) order: BF, HF, NM, SF.
  const std::vector<std::string> levels{"BF", "HF", "NM", "SF"};
  data.group_names = levels;
  std::ifstream management(folder.file("management.txt"));
  for (std::string level; std::getline(management, level);) {
    data.groups.push_back(static_cast<int>(std::find(levels.begin(), levels.end(), level) - levels.begin()));
  }
  ASSERT_EQ(data.groups.size(), 20u);
  const auto perm = permanova(data, with(999));
  EXPECT_LT(relative_difference(perm.record.statistic, vegan.at("permanova_f")), 1e-9);
  EXPECT_LT(relative_difference(perm.record.effect_size, vegan.at("permanova_r2")), 1e-9);
  EXPECT_TRUE(p_values_agree(perm.record.p_value, 999, vegan.at("permanova_p"), 999))
      << perm.record.p_value << " vs vegan " << vegan.at("permanova_p");
  const auto disp = permdisp(data, with(999));
  EXPECT_LT(relative_difference(disp.record.statistic, vegan.at("permdisp_f")), 1e-8);
  EXPECT_TRUE(p_values_agree(disp.record.p_value, 999, vegan.at("permdisp_p"), 999))
      << disp.record.p_value << " vs vegan " << vegan.at("permdisp_p");
  std::printf(
      "dune: pseudo-F %.6f (vegan %.6f), R² %.6f, p %.3f (vegan %.3f); PERMDISP F %.6f (vegan %.6f), p %.3f (vegan "
      "%.3f)\n",
      perm.record.statistic, vegan.at("permanova_f"), perm.record.effect_size, perm.record.p_value,
      vegan.at("permanova_p"), disp.record.statistic, vegan.at("permdisp_f"), disp.record.p_value,
      vegan.at("permdisp_p"));
  // vegan's distances are Euclidean on sqrt(theta): sqrt(2) times Hellinger.
  for (std::size_t g = 0; g < 4; ++g) {
    EXPECT_LT(relative_difference(disp.mean_distance_to_centroid[g] * std::sqrt(2.0),
                                  vegan.at("permdisp_mean_distance_" + levels[g])),
              1e-8);
  }
}

}  // namespace
}  // namespace loupe

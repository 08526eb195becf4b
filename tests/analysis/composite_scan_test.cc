// The composite scan: the energy statistic of Matteson & James (2014, JASA) against
// its definition computed here, the best split of obvious sequences, hierarchical
// splitting, too few segments, thread and seed behaviour, simulated composite and
// single-group documents (theta by fold-in with the true topics), and the scan of
// a model's segmented texts with per-segment and per-stretch attribution.
#include "analysis/composite_scan.h"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <cstdio>
#include <random>

#include "analysis/attribution_cautions.h"
#include "analysis_test_support.h"
#include "common/error.h"
#include "model/fold_in.h"

namespace loupe {
namespace {

using testing::draw_dirichlet;
using ::testing::HasSubstr;

ChangePointOptions options_with(std::size_t permutations, std::uint64_t seed = 7, std::size_t threads = 2) {
  ChangePointOptions options;
  options.permutations = permutations;
  options.seed = seed;
  options.threads = threads;
  return options;
}

TopicMatrix rows_of(const std::vector<std::vector<double>>& rows) {
  TopicMatrix theta(static_cast<Eigen::Index>(rows.size()), static_cast<Eigen::Index>(rows[0].size()));
  for (std::size_t i = 0; i < rows.size(); ++i) {
    for (std::size_t k = 0; k < rows[i].size(); ++k) {
      theta(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k)) = rows[i][k];
    }
  }
  return theta;
}

// H(p, q) = sqrt(1 - sum_k sqrt(p_k q_k)) (common practice; ARCHITECTURE.md), written out here.
double hellinger_here(const TopicMatrix& theta, Eigen::Index i, Eigen::Index j) {
  double bc = 0;
  for (Eigen::Index k = 0; k < theta.cols(); ++k) bc += std::sqrt(theta(i, k) * theta(j, k));
  return std::sqrt(std::max(0.0, 1.0 - bc));
}

// Q straight from the definition in Matteson & James (2014), alpha = 1 (the formula as
// the paper states it, read from memory and checked against the authors' R package ecp,
// src/energyChangePoint.cpp, splitPointC): X = points [0, tau), Y = [tau, kappa), every
// pair summed separately.
double q_by_definition(const TopicMatrix& theta, std::size_t tau, std::size_t kappa) {
  double between = 0, within_x = 0, within_y = 0;
  for (std::size_t i = 0; i < kappa; ++i) {
    for (std::size_t j = i + 1; j < kappa; ++j) {
      const double d = hellinger_here(theta, static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j));
      if (j < tau) {
        within_x += d;
      } else if (i >= tau) {
        within_y += d;
      } else {
        between += d;
      }
    }
  }
  const double m = static_cast<double>(tau), r = static_cast<double>(kappa - tau);
  const double energy = 2.0 / (m * r) * between - within_x / (m * (m - 1) / 2) - within_y / (r * (r - 1) / 2);
  return m * r / (m + r) * energy;
}

TEST(EnergySplitStatistic, MatchesTheDefinitionOnATinyExample) {
  const TopicMatrix theta = rows_of({{0.7, 0.2, 0.1},
                                     {0.6, 0.3, 0.1},
                                     {0.5, 0.25, 0.25},
                                     {0.1, 0.2, 0.7},
                                     {0.2, 0.1, 0.7},
                                     {0.15, 0.15, 0.7},
                                     {0.6, 0.2, 0.2}});
  const auto split = energy_split_statistics(hellinger_distance_matrix(theta), 2);
  ASSERT_EQ(split.statistic.size(), 8u);
  for (const std::size_t tau : {0u, 1u, 6u, 7u}) EXPECT_TRUE(std::isnan(split.statistic[tau])) << tau;
  double best = -1;
  std::size_t best_tau = 0, best_kappa = 0;
  for (std::size_t tau = 2; tau <= 5; ++tau) {
    double most = -1;
    std::size_t end = 0;
    for (std::size_t kappa = tau + 2; kappa <= 7; ++kappa) {
      const double q = q_by_definition(theta, tau, kappa);
      if (q > most) most = q, end = kappa;
    }
    EXPECT_NEAR(split.statistic[tau], most, 1e-12) << tau;
    EXPECT_EQ(split.best_end[tau], end) << tau;
    if (most > best) best = most, best_tau = tau, best_kappa = end;
  }
  // The block of rows 3-5 stands out: X = rows 0-2, Y = rows 3-5 (kappa = 6, not the end).
  EXPECT_EQ(best_tau, 3u);
  EXPECT_EQ(best_kappa, 6u);
  EXPECT_EQ(split.best_split, best_tau);
  EXPECT_EQ(split.best_split_end, best_kappa);
  EXPECT_NEAR(split.best_statistic, best, 1e-12);
}

TEST(EnergySplitStatistic, PointsOnALineByHand) {
  // Points 0, 0, 1, 1, 1 with |x - y| as the distance. By hand:
  // tau = 2, kappa = 5: between = 6 pairs at 1, within both 0: E = 2*6/(2*3) = 2, Q = 2*3/5 * 2 = 2.4;
  //          kappa = 4: between = 4, E = 2*4/(2*2) = 2, Q = 2*2/4 * 2 = 2; the best end is 5.
  // tau = 3, kappa = 5: between = 4 (the two zeros against the two last ones), within X = 2
  //          over C(3,2) = 3 pairs, within Y = 0: E = 2*4/6 - 2/3 = 2/3, Q = 6/5 * 2/3 = 0.8.
  const std::vector<double> x{0, 0, 1, 1, 1};
  Eigen::MatrixXd d(5, 5);
  for (int i = 0; i < 5; ++i)
    for (int j = 0; j < 5; ++j) d(i, j) = std::abs(x[static_cast<std::size_t>(i)] - x[static_cast<std::size_t>(j)]);
  const auto split = energy_split_statistics(d, 2);
  EXPECT_NEAR(split.statistic[2], 2.4, 1e-12);
  EXPECT_EQ(split.best_end[2], 5u);
  EXPECT_NEAR(split.statistic[3], 0.8, 1e-12);
  EXPECT_EQ(split.best_split, 2u);
  // The header's example: 0, 0, 1, 1 -> 2.
  const auto four = energy_split_statistics(d.topLeftCorner(4, 4).eval(), 2);
  EXPECT_NEAR(four.statistic[2], 2.0, 1e-12);
}

TEST(EnergySplitStatistic, HellingerMatrixIsTheHellingerDistance) {
  const TopicMatrix theta = rows_of({{0.5, 0.5, 0.0}, {1.0, 0.0, 0.0}, {0.0, 0.0, 1.0}});
  const auto d = hellinger_distance_matrix(theta);
  EXPECT_NEAR(d(0, 1), hellinger_here(theta, 0, 1), 1e-12);
  EXPECT_NEAR(d(1, 2), 1.0, 1e-12);  // disjoint supports
  EXPECT_EQ(d(2, 2), 0.0);
  EXPECT_EQ(d(0, 2), d(2, 0));
}

// n rows: the first `first` near profile a, the rest near b, with small seeded noise.
TopicMatrix two_blocks(std::size_t n, std::size_t first, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::vector<std::vector<double>> rows;
  for (std::size_t i = 0; i < n; ++i) {
    rows.push_back(draw_dirichlet(
        i < first ? std::vector<double>{0.6, 0.3, 0.05, 0.05} : std::vector<double>{0.05, 0.05, 0.3, 0.6}, 200.0, rng));
  }
  return rows_of(rows);
}

TEST(ChangePoints, FindsTheSplitOfAnObviousTwoBlockSequence) {
  const TopicMatrix theta = two_blocks(10, 4, 3);
  EXPECT_EQ(energy_split_statistics(hellinger_distance_matrix(theta), 2).best_split, 4u);
  const auto scan = find_change_points(theta, options_with(999), "two blocks");
  ASSERT_EQ(scan.change_points.size(), 1u);
  const auto& cp = scan.change_points[0];
  EXPECT_EQ(cp.position, 4u);
  EXPECT_EQ(cp.step, 1u);
  EXPECT_EQ(cp.stretch_begin, 0u);
  EXPECT_EQ(cp.stretch_end, 10u);
  // Only shuffles keeping the two sides apart reach the observed Q: 2 / C(10, 4) = 1/105.
  EXPECT_LE(cp.p_value, 0.05);
  EXPECT_GT(cp.p_value, 1.0 / 1000);
  EXPECT_EQ(scan.options.seed, 7u);
  EXPECT_TRUE(scan.warning.empty()) << scan.warning;
  // The search ended on a candidate that was not kept (one of the two sides split again).
  ASSERT_TRUE(scan.has_last_candidate);
  EXPECT_GT(scan.last_candidate.p_value, 0.05);
}

TEST(ChangePoints, SplitsHierarchicallyIntoThreeStretches) {
  // a a a a b b b b a a a a: two change points, at 4 and 8.
  std::mt19937_64 rng(5);
  std::vector<std::vector<double>> rows;
  for (std::size_t i = 0; i < 12; ++i) {
    const bool middle = i >= 4 && i < 8;
    rows.push_back(draw_dirichlet(
        middle ? std::vector<double>{0.05, 0.05, 0.3, 0.6} : std::vector<double>{0.6, 0.3, 0.05, 0.05}, 200.0, rng));
  }
  const auto scan = find_change_points(rows_of(rows), options_with(999), "a b a");
  ASSERT_EQ(scan.change_points.size(), 2u);
  EXPECT_EQ(scan.change_points[0].position, 4u);
  EXPECT_EQ(scan.change_points[1].position, 8u);
  EXPECT_NE(scan.change_points[0].step, scan.change_points[1].step);
  for (const auto& cp : scan.change_points) EXPECT_LE(cp.p_value, 0.05);
}

TEST(ChangePoints, TooFewSegmentsIsAnError) {
  const TopicMatrix theta = two_blocks(3, 1, 1);
  try {
    find_change_points(theta, options_with(99), "letter-7");
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("letter-7 has 3 segments"));
    EXPECT_THAT(e.what(), HasSubstr("at least 4"));
    EXPECT_THAT(e.what(), HasSubstr("--segment-words"));
  }
  auto options = options_with(99);
  options.min_segments = 3;
  EXPECT_THROW(find_change_points(two_blocks(5, 2, 1), options, "x"), Error);
  EXPECT_NO_THROW(find_change_points(two_blocks(6, 3, 1), options, "x"));
  EXPECT_THROW(energy_split_statistics(Eigen::MatrixXd::Zero(3, 3), 2), Error);
}

TEST(ChangePoints, BadOptionsNameTheOption) {
  const TopicMatrix theta = two_blocks(8, 4, 1);
  auto bad = options_with(99);
  bad.level = 1.5;
  EXPECT_THROW(
      {
        try {
          find_change_points(theta, bad, "x");
        } catch (const Error& e) {
          EXPECT_THAT(e.what(), HasSubstr("--level"));
          throw;
        }
      },
      Error);
  bad = options_with(0);
  EXPECT_THROW(find_change_points(theta, bad, "x"), Error);
  bad = options_with(99);
  bad.min_segments = 1;
  EXPECT_THROW(find_change_points(theta, bad, "x"), Error);
}

TEST(ChangePoints, SameSeedSameResultForAnyThreadCount) {
  const TopicMatrix theta = two_blocks(12, 5, 9);
  const auto one = find_change_points(theta, options_with(499, 21, 1), "x");
  const auto four = find_change_points(theta, options_with(499, 21, 4), "x");
  ASSERT_EQ(one.change_points.size(), four.change_points.size());
  for (std::size_t i = 0; i < one.change_points.size(); ++i) {
    EXPECT_EQ(one.change_points[i].position, four.change_points[i].position);
    EXPECT_EQ(one.change_points[i].p_value, four.change_points[i].p_value);
  }
  EXPECT_EQ(one.last_candidate.p_value, four.last_candidate.p_value);
}

TEST(ChangePoints, TooFewSegmentsForTheLevelIsWarned) {
  // 5 segments: the best split 2 | 3 is reproduced by 2 * 2! * 3! of 5! orders, p >= 0.2.
  EXPECT_NEAR(smallest_attainable_p_value(5), 0.2, 1e-12);
  EXPECT_NEAR(smallest_attainable_p_value(8), 2.0 / 70.0, 1e-12);
  EXPECT_NEAR(smallest_attainable_p_value(4), 2.0 / 6.0, 1e-12);
  const auto scan = find_change_points(two_blocks(5, 2, 4), options_with(999), "short text");
  EXPECT_TRUE(scan.change_points.empty());
  ASSERT_TRUE(scan.has_last_candidate);
  EXPECT_EQ(scan.last_candidate.position, 2u);
  EXPECT_NEAR(scan.last_candidate.p_value, 0.2, 0.04);  // Monte Carlo around 0.2
  EXPECT_THAT(scan.warning, HasSubstr("at least 8 segments"));
}

// ---------------------------------------------------------------------------
// Simulated documents: two groups with their own topic preferences, segments of
// 100 tokens, theta of each segment by fold-in with the true topics.

struct Simulation {
  static constexpr std::uint32_t kTopics = 8;
  static constexpr std::uint32_t kWords = 240;
  static constexpr std::size_t kSegment = 100;
  std::vector<double> phi;  // K x V: topic k puts 0.9 on its own 30 words, 0.1 spread over all
  std::vector<double> profile_a{3, 3, 3, 0.3, 0.3, 0.3, 1.5, 1.5};  // group A favours topics 0-2
  std::vector<double> profile_b{0.3, 0.3, 0.3, 3, 3, 3, 1.5, 1.5};  // group B topics 3-5; 6, 7 shared
  std::mt19937_64 rng;

  explicit Simulation(std::uint64_t seed) : rng(seed) {
    phi.assign(kTopics * kWords, 0.1 / kWords);
    for (std::uint32_t k = 0; k < kTopics; ++k)
      for (std::uint32_t w = 30 * k; w < 30 * (k + 1); ++w) phi[k * kWords + w] += 0.9 / 30;
    for (auto* p : {&profile_a, &profile_b}) {
      double sum = 0;
      for (const double v : *p) sum += v;
      for (auto& v : *p) v /= sum;
    }
  }

  // One document's theta: Dirichlet(8 * group profile).
  std::vector<double> document_theta(bool group_a) { return draw_dirichlet(group_a ? profile_a : profile_b, 8.0, rng); }

  WordId draw_word(const std::vector<double>& theta) {
    std::discrete_distribution<std::uint32_t> topic(theta.begin(), theta.end());
    const std::uint32_t k = topic(rng);
    std::discrete_distribution<std::uint32_t> word(phi.begin() + k * kWords, phi.begin() + (k + 1) * kWords);
    return word(rng);
  }

  // Segment thetas of a text whose first `seam` tokens come from `before` and the rest from `after`.
  TopicMatrix segment_thetas(const std::vector<double>& before, const std::vector<double>& after, std::size_t tokens,
                             std::size_t seam, std::uint64_t seed) {
    const TopicWordTable table(std::span<const double>(phi), kTopics, kWords);
    const std::vector<double> alpha(kTopics, 0.1);
    const std::size_t n = tokens / kSegment;
    TopicMatrix theta(static_cast<Eigen::Index>(n), kTopics);
    for (std::size_t s = 0; s < n; ++s) {
      std::vector<WordId> words;
      for (std::size_t t = s * kSegment; t < (s + 1) * kSegment; ++t)
        words.push_back(draw_word(t < seam ? before : after));
      FoldInOptions fold;
      fold.seed = seed;
      const auto row = fold_in_document(table, alpha, words, fold, s);
      for (std::uint32_t k = 0; k < kTopics; ++k) theta(static_cast<Eigen::Index>(s), k) = row[k];
    }
    return theta;
  }
};

TEST(ChangePoints, FindsTheSeamOfSimulatedCompositeTextsWithinOneSegment) {
  // 50 texts of 1000 tokens (10 segments): group A's text, then from a seam drawn
  // uniformly in [250, 750] tokens, group B's (or B then A).
  Simulation sim(2024);
  const std::size_t trials = 50;
  std::size_t hits = 0, found = 0;
  std::uniform_int_distribution<std::size_t> seam_at(250, 750);
  for (std::size_t trial = 0; trial < trials; ++trial) {
    const bool a_first = trial % 2 == 0;
    const auto before = sim.document_theta(a_first), after = sim.document_theta(!a_first);
    const std::size_t seam = seam_at(sim.rng);
    const auto theta = sim.segment_thetas(before, after, 1000, seam, trial + 1);
    const auto scan = find_change_points(theta, options_with(999, trial + 1), "composite");
    if (scan.change_points.empty()) continue;
    ++found;
    // The strongest change point (found first) within one segment (100 tokens) of the seam.
    for (const auto& cp : scan.change_points) {
      if (cp.step == 1 && std::abs(static_cast<double>(cp.position * Simulation::kSegment) -
                                   static_cast<double>(seam)) <= static_cast<double>(Simulation::kSegment)) {
        ++hits;
      }
    }
  }
  std::printf("composite texts: change point found in %zu of %zu, within one segment of the seam in %zu\n", found,
              trials, hits);
  // Required: at least 90% within one segment.
  EXPECT_GE(hits, 45u);
}

TEST(ChangePoints, SingleGroupTextsAreFlaggedAtAboutTheLevel) {
  // 200 texts of 10 segments, each from one group's single theta: the segments are
  // exchangeable, so "composite" (at least one change point) should come up at rate
  // <= 0.05. Tolerance: the central 99% band of Binomial(200, 0.05), 3 to 19 texts
  // (scipy.stats.binom.ppf(0.005 / 0.995, 200, 0.05), SciPy 1.10).
  Simulation sim(77);
  const std::size_t trials = 200;
  std::size_t flagged = 0;
  for (std::size_t trial = 0; trial < trials; ++trial) {
    const auto theta_doc = sim.document_theta(trial % 2 == 0);
    const auto theta = sim.segment_thetas(theta_doc, theta_doc, 1000, 1000, trial + 1);
    const auto scan = find_change_points(theta, options_with(999, 1000 + trial), "single");
    if (!scan.change_points.empty()) ++flagged;
  }
  std::printf("single-group texts: flagged composite in %zu of %zu (%.3f)\n", flagged, trials,
              static_cast<double>(flagged) / static_cast<double>(trials));
  EXPECT_GE(flagged, 3u);
  EXPECT_LE(flagged, 19u);
}

// ---------------------------------------------------------------------------
// The scan of a model's segmented texts.

struct ScanStudy {
  Corpus corpus;
  Model model;
  static constexpr std::size_t kTopics = 4;

  // 25 known documents in each of groups a and b, one disputed text "mixed" of 10
  // segments (a a a a b b b b b b) and one known segmented text "known-long" of
  // group a (6 segments); theta drawn near each group's profile.
  explicit ScanStudy(std::size_t chains = 2) {
    corpus.vocabulary = {"w0", "w1", "w2", "w3"};
    corpus.word_frequency.assign(4, 0);
    corpus.document_frequency.assign(4, 0);
    corpus.groups = {"a", "b"};
    std::vector<std::vector<double>> rows;
    std::mt19937_64 rng(11);
    const std::vector<double> a{0.55, 0.3, 0.1, 0.05}, b{0.05, 0.1, 0.3, 0.55};
    const std::vector<WordId> words(40, 1);
    for (std::size_t d = 0; d < 50; ++d) {
      Document doc;
      doc.id = (d < 25 ? "a-" : "b-") + std::to_string(d);
      doc.group = d < 25 ? 0 : 1;
      corpus.add_document(doc, words);
      rows.push_back(draw_dirichlet(d < 25 ? a : b, 30.0, rng));
    }
    auto add_segments = [&](const std::string& id, DocumentRole role, std::uint32_t group, std::size_t n,
                            std::size_t change) {
      for (std::size_t s = 0; s < n; ++s) {
        Document doc;
        doc.id = id + "#" + std::to_string(s + 1);
        doc.role = role;
        doc.group = group;
        doc.parent_id = id;
        doc.segment_index = static_cast<std::uint32_t>(s);
        doc.segment_count = static_cast<std::uint32_t>(n);
        doc.first_token = 40 * s;
        corpus.add_document(doc, words);
        rows.push_back(draw_dirichlet(s < change ? a : b, 30.0, rng));
      }
    };
    add_segments("mixed", DocumentRole::disputed, kNoGroup, 10, 4);
    add_segments("known-long", DocumentRole::known, 0, 6, 6);
    Document plain;
    plain.id = "plain";
    plain.role = DocumentRole::disputed;
    corpus.add_document(plain, words);
    rows.push_back(a);
    corpus.word_frequency[1] = corpus.num_tokens();
    corpus.document_frequency[1] = 50;

    model.options.topic_count = kTopics;
    model.options.chains = static_cast<std::uint32_t>(chains);
    record_corpus(model, corpus);
    for (std::size_t c = 0; c < chains; ++c) {
      ChainEstimates chain;
      chain.seed = c + 1;
      chain.alpha.assign(kTopics, 0.1);
      chain.beta = 0.01;
      chain.phi.assign(kTopics * 4, 0.25f);
      for (const auto& row : rows) {
        // Chains differ a little: a small perturbation, renormalised.
        std::vector<double> r = row;
        double sum = 0;
        for (std::size_t k = 0; k < kTopics; ++k) sum += (r[k] *= 1.0 + 0.02 * static_cast<double>((c + k) % 3));
        for (auto& v : r) chain.theta.push_back(static_cast<float>(v / sum));
      }
      chain.topic_share.assign(kTopics, 0.25);
      model.chains.push_back(chain);
    }
  }
};

CompositeScanOptions scan_options() {
  CompositeScanOptions options;
  options.change_points.permutations = 499;
  options.change_points.seed = 5;
  return options;
}

TEST(CompositeScan, FindsSegmentedTextsAndRefusesTheRest) {
  const ScanStudy study;
  const auto texts = segmented_texts(study.corpus);
  ASSERT_EQ(texts.size(), 2u);
  EXPECT_EQ(texts[0].id, "mixed");
  EXPECT_EQ(texts[0].num_segments(), 10u);
  EXPECT_EQ(texts[0].first_tokens[3], 120u);
  EXPECT_EQ(texts[0].tokens[3], 40u);
  EXPECT_EQ(texts[0].segment_ids[0], "mixed#1");
  // By default: the segmented disputed texts only.
  const auto chosen = texts_to_scan(study.corpus, {});
  ASSERT_EQ(chosen.size(), 1u);
  EXPECT_EQ(chosen[0].id, "mixed");
  const std::vector<std::string> known{"known-long"};
  EXPECT_EQ(texts_to_scan(study.corpus, known).at(0).id, "known-long");

  auto message = [&](const std::vector<std::string>& ids) -> std::string {
    try {
      texts_to_scan(study.corpus, ids);
    } catch (const Error& e) {
      return e.what();
    }
    return "no error";
  };
  EXPECT_THAT(message({"nowhere"}), HasSubstr("no document nowhere"));
  EXPECT_THAT(message({"nowhere"}), HasSubstr("mixed"));
  EXPECT_THAT(message({"plain"}), HasSubstr("plain is not segmented"));
  EXPECT_THAT(message({"plain"}), HasSubstr("--segment-words"));
  EXPECT_THAT(message({"mixed#2"}), HasSubstr("segment of mixed"));

  Corpus unsegmented;
  unsegmented.vocabulary = {"w"};
  unsegmented.word_frequency = {1};
  unsegmented.document_frequency = {1};
  Document d;
  d.id = "only";
  unsegmented.add_document(d, std::vector<WordId>{0});
  try {
    texts_to_scan(unsegmented, {});
    FAIL() << "no error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("no segmented texts"));
    EXPECT_THAT(e.what(), HasSubstr("loupe ingest"));
    EXPECT_THAT(e.what(), HasSubstr("--segment-words"));
  }
}

TEST(CompositeScan, ScansEveryChainAndNamesTheGroupOnEachSide) {
  const ScanStudy study;
  const auto scan = scan_composite_texts(study.model, study.corpus, {}, scan_options());
  EXPECT_EQ(scan.num_chains, 2u);
  ASSERT_EQ(scan.group_names, (std::vector<std::string>{"a", "b"}));
  // known-long (6 segments) is merged into one known document of group a.
  EXPECT_EQ(scan.reference_sizes, (std::vector<std::size_t>{26, 25}));
  ASSERT_EQ(scan.texts.size(), 1u);
  const TextScan& text = scan.texts[0];
  EXPECT_EQ(text.chains_with_change, 2u);
  EXPECT_EQ(text.share_with_change, 1.0);
  EXPECT_EQ(text.first_position_min, 4u);
  EXPECT_EQ(text.first_position_max, 4u);
  EXPECT_EQ(text.first_token_min, 160u);
  for (const auto& chain : text.chains) {
    ASSERT_EQ(chain.change_points.change_points.size(), 1u);
    EXPECT_EQ(chain.change_points.change_points[0].position, 4u);
    ASSERT_EQ(chain.segments.size(), 10u);
    for (std::size_t s = 0; s < 10; ++s) {
      const auto& e = chain.segments[s].evidence;
      ASSERT_EQ(e.size(), 2u);
      const std::uint32_t truth = s < 4 ? 0u : 1u;
      // The nearer centroid is always the true group's; the verdict names it unless
      // the segment is an outlier for both groups ("none": p <= 0.05 for both).
      EXPECT_LT(e[truth].distance, e[1 - truth].distance) << "segment " << s;
      if (chain.segments[s].verdict.kind == VerdictKind::group) {
        EXPECT_EQ(chain.segments[s].verdict.best, truth) << "segment " << s;
      }
    }
    ASSERT_EQ(chain.stretches.size(), 2u);
    EXPECT_EQ(chain.stretches[0].end, 4u);
    EXPECT_EQ(chain.stretches[0].nearest, 0u);
    EXPECT_EQ(chain.stretches[1].nearest, 1u);
    EXPECT_GT(chain.stretches[1].p_value, 0.05);
  }
  const auto json = to_json(scan);
  ASSERT_EQ(json["cautions"].size(), kAttributionCautions.size());
  for (std::size_t i = 0; i < kAttributionCautions.size(); ++i) EXPECT_EQ(json["cautions"][i], kAttributionCautions[i]);
  EXPECT_EQ(json["seed"], 5);
  EXPECT_EQ(json["exponent_alpha"], 1.0);
  EXPECT_EQ(json["texts"][0]["chains"][0]["change_points"][0]["first_token_after"], 160);
  EXPECT_EQ(json["texts"][0]["chains"][1]["stretches"][1]["nearest_group"], "b");
  const std::string csv = to_csv(scan);
  EXPECT_EQ(csv.rfind("# " + std::string(kAttributionCautions[0]), 0), 0u);
  EXPECT_THAT(csv, HasSubstr("\nmixed,1,5,mixed#5,160,40,yes,"));
  // Same seed, same output.
  EXPECT_EQ(to_json(scan_composite_texts(study.model, study.corpus, {}, scan_options())).dump(), json.dump());
}

TEST(CompositeScan, AKnownTextIsLeftOutOfItsOwnReference) {
  const ScanStudy study(1);
  const std::vector<std::string> ids{"known-long", "mixed"};
  const auto scan = scan_composite_texts(study.model, study.corpus, ids, scan_options());
  ASSERT_EQ(scan.texts.size(), 2u);
  EXPECT_TRUE(scan.texts[0].chains[0].change_points.change_points.empty());
  ASSERT_EQ(scan.texts[0].chains[0].stretches.size(), 1u);
  EXPECT_EQ(scan.texts[0].chains[0].stretches[0].nearest, 0u);
  // Conformal p-values are multiples of 1 / (1 + n_a): n_a = 25 without known-long
  // itself, 26 (it is a known document of group a) for the disputed text.
  auto multiple_of = [](double p, double n) { return std::abs(p * (1 + n) - std::round(p * (1 + n))) < 1e-9; };
  for (const auto& segment : scan.texts[0].chains[0].segments) {
    EXPECT_TRUE(multiple_of(segment.evidence[0].p_value, 25)) << segment.evidence[0].p_value;
  }
  bool all_of_27 = true;
  for (const auto& segment : scan.texts[1].chains[0].segments)
    all_of_27 &= multiple_of(segment.evidence[0].p_value, 26);
  EXPECT_TRUE(all_of_27);
}

}  // namespace
}  // namespace loupe

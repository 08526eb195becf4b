// Attribution of disputed texts: centroids, leave-one-out distances and
// conformal p-values worked by hand, verdicts, the neighbour vote, the
// leave-one-out calibration against a plain rebuild, the errors users meet, and
// drawn corpora with known truth fitted with loupe's own sampler.
#include "analysis/attribution.h"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cmath>
#include <iostream>
#include <random>

#include "analysis/analysis_test_support.h"
#include "analysis/attribution_cautions.h"
#include "attribution_test_support.h"
#include "common/error.h"
#include "model/fit.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;

TopicMatrix rows(const std::vector<std::vector<double>>& values) {
  TopicMatrix m(static_cast<Eigen::Index>(values.size()), static_cast<Eigen::Index>(values[0].size()));
  for (std::size_t i = 0; i < values.size(); ++i) {
    for (std::size_t k = 0; k < values[i].size(); ++k) {
      m(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(k)) = values[i][k];
    }
  }
  return m;
}

std::string message_of(const std::function<void()>& f) {
  try {
    f();
  } catch (const Error& e) {
    return e.what();
  }
  return "(no error)";
}

// Group A: theta (1,0), (1,0), (0,1); group B: (0,1), (0,1), (1,0). With s = 1/sqrt(2)
// the points are (s,0), (s,0), (0,s): centroid c_A = (2s/3, s/3). Left out, the first
// two lie s/sqrt(2) = 0.5 from the mean of the others, (s/2, s/2); the third lies
// sqrt(2) s = 1 from (s, 0). So A's calibration distances are {0.5, 0.5, 1}.
TEST(AttributionTest, CentroidsAndLeaveOneOutDistancesByHand) {
  const auto theta = rows({{1, 0}, {1, 0}, {0, 1}, {0, 1}, {0, 1}, {1, 0}});
  const std::vector<std::uint32_t> groups{0, 0, 0, 1, 1, 1};
  const auto reference = build_conformal_reference(theta, groups, {"A", "B"});
  const double s = std::sqrt(0.5);
  EXPECT_NEAR(reference.centroids(0, 0), 2 * s / 3, 1e-15);
  EXPECT_NEAR(reference.centroids(0, 1), s / 3, 1e-15);
  EXPECT_NEAR(reference.centroids(1, 0), s / 3, 1e-15);
  ASSERT_EQ(reference.calibration_distances[0].size(), 3u);
  EXPECT_NEAR(reference.calibration_distances[0][0], 0.5, 1e-15);
  EXPECT_NEAR(reference.calibration_distances[0][1], 0.5, 1e-15);
  EXPECT_NEAR(reference.calibration_distances[0][2], 1.0, 1e-15);
  EXPECT_EQ(reference.group_sizes, (std::vector<std::size_t>{3, 3}));

  // theta (1,0): distance to c_A = sqrt((s/3)^2 + (s/3)^2) = 1/3, all three a_i >= 1/3:
  // p_A = (1 + 3) / (1 + 3) = 1. Distance to c_B = sqrt((2s/3)^2 + (2s/3)^2) = 2/3: only
  // a = 1 is at least that, p_B = (1 + 1) / 4 = 0.5.
  const std::vector<double> first{1, 0};
  const auto evidence = score_against_candidates(reference, first, {});
  ASSERT_EQ(evidence.size(), 2u);
  EXPECT_NEAR(evidence[0].distance, 1.0 / 3, 1e-15);
  EXPECT_DOUBLE_EQ(evidence[0].p_value, 1.0);
  EXPECT_NEAR(evidence[1].distance, 2.0 / 3, 1e-15);
  EXPECT_DOUBLE_EQ(evidence[1].p_value, 0.5);
  // Only B as the candidate.
  const std::vector<std::uint32_t> only_b{1};
  const auto b = score_against_candidates(reference, first, only_b);
  ASSERT_EQ(b.size(), 1u);
  EXPECT_EQ(b[0].group, 1u);
  // The centroid is a point of the embedding (not a distribution): d = ||y - c||.
  EXPECT_NEAR(b[0].distance, std::hypot(s - s / 3, 0 - 2 * s / 3), 1e-15);

  // theta (0.5, 0.5): y = (0.5, 0.5); to c_A: sqrt((0.5 - 2s/3)^2 + (0.5 - s/3)^2).
  const std::vector<double> middle{0.5, 0.5};
  const double d = std::hypot(0.5 - 2 * s / 3, 0.5 - s / 3);  // 0.2357
  const auto m = score_against_candidates(reference, middle, {});
  EXPECT_NEAR(m[0].distance, d, 1e-15);
  EXPECT_DOUBLE_EQ(m[0].p_value, 1.0);  // all of 0.5, 0.5, 1 are >= 0.2357
}

// Group A: three documents at (1,0) and one at (0,1). Left out, each (1,0) lies
// 1/3 from the others' mean (2s/3, s/3), and (0,1) lies 1 from (s,0): calibration
// distances {1/3, 1/3, 1/3, 1}; the centroid is c = (3s/4, s/4). A document at
// y = s (cos f, sin f) lies exactly 1/3 from c when <y, c> = (|y|^2 + |c|^2 - 1/9) / 2,
// i.e. A cos f + B sin f = C with (A, B) = c and C = <y,c> / s: f = atan2(B, A) +
// acos(C / |c|). Its distance, computed another way, ties with the three 1/3's
// only up to rounding (here 1.7e-16 above them); the tolerance must count them:
// p = (1 + 4) / (1 + 4) = 1.
// A little farther out only the 1 counts: p = 2/5.
TEST(AttributionTest, TiesCountWithARelativeTolerance) {
  const auto theta = rows({{1, 0}, {1, 0}, {1, 0}, {0, 1}, {0, 1}, {0, 1}});
  const auto reference = build_conformal_reference(theta, std::vector<std::uint32_t>{0, 0, 0, 0, 1, 1}, {"A", "B"});
  const double s = std::sqrt(0.5);
  ASSERT_NEAR(reference.calibration_distances[0][0], 1.0 / 3, 1e-15);
  ASSERT_NEAR(reference.calibration_distances[0][3], 1.0, 1e-15);
  const double ca = 3 * s / 4, cb = s / 4, c_norm = std::hypot(ca, cb);
  const double inner = (0.5 + c_norm * c_norm - 1.0 / 9) / 2;
  auto at = [&](double f) { return std::vector<double>{std::cos(f) * std::cos(f), std::sin(f) * std::sin(f)}; };
  const double f = std::atan2(cb, ca) + std::acos(inner / s / c_norm);
  const auto tied = score_against_candidates(reference, at(f), {});
  EXPECT_NEAR(tied[0].distance, 1.0 / 3, 1e-12);
  EXPECT_DOUBLE_EQ(tied[0].p_value, 1.0);
  const auto farther = score_against_candidates(reference, at(f + 0.01), {});
  EXPECT_GT(farther[0].distance, 1.0 / 3 + 1e-6);
  EXPECT_DOUBLE_EQ(farther[0].p_value, 2.0 / 5);
}

TEST(AttributionTest, VerdictIsTheNearestCandidateNotRejectedOrNone) {
  const std::vector<CandidateEvidence> clear{{0, 0.10, 0.40}, {1, 0.30, 0.03}};
  const Verdict v = decide_verdict(clear, 0.05);
  EXPECT_EQ(v.kind, VerdictKind::group);
  EXPECT_EQ(v.best, 0u);
  EXPECT_EQ(v.runner_up, 1u);
  EXPECT_NEAR(v.p_value_margin, 0.37, 1e-15);
  EXPECT_NEAR(v.distance_margin, 0.20, 1e-15);

  const std::vector<CandidateEvidence> neither{{0, 0.40, 0.04}, {1, 0.50, 0.02}};
  const Verdict none = decide_verdict(neither, 0.05);
  EXPECT_EQ(none.kind, VerdictKind::none_of_the_candidates);
  EXPECT_EQ(none.best, 0u);  // still named, with its p-value
  EXPECT_DOUBLE_EQ(none.best_p_value, 0.04);

  // Exactly at the level is "none" (the conformal guarantee is P(p <= level) <= level).
  const std::vector<CandidateEvidence> at_level{{0, 0.4, 1.0 / 20}};
  EXPECT_EQ(decide_verdict(at_level, 0.05).kind, VerdictKind::none_of_the_candidates);
  EXPECT_TRUE(std::isnan(decide_verdict(at_level, 0.05).p_value_margin));

  // Among the candidates not rejected the nearest centroid wins, not the highest p-value.
  const std::vector<CandidateEvidence> spread_group{{0, 0.2, 0.30}, {1, 0.1, 0.20}};
  EXPECT_EQ(decide_verdict(spread_group, 0.05).best, 1u);
  EXPECT_EQ(decide_verdict(spread_group, 0.05, VerdictRule::highest_p_value).best, 0u);
  EXPECT_NEAR(decide_verdict(spread_group, 0.05).p_value_margin, -0.10, 1e-15);
  // A rejected candidate is never the verdict, however near.
  const std::vector<CandidateEvidence> near_but_rejected{{0, 0.1, 0.03}, {1, 0.3, 0.2}};
  const Verdict r = decide_verdict(near_but_rejected, 0.05);
  EXPECT_EQ(r.best, 1u);
  EXPECT_EQ(r.runner_up, 0u);
  EXPECT_DOUBLE_EQ(r.highest_p_value, 0.2);

  // Equal distances and p-values are ordered by distance, then p-value, then group.
  const std::vector<CandidateEvidence> tied{{2, 0.30, 0.25}, {1, 0.20, 0.25}, {0, 0.5, 0.1}};
  const Verdict t = decide_verdict(tied, 0.05);
  EXPECT_EQ(t.best, 1u);
  EXPECT_EQ(t.runner_up, 2u);
  EXPECT_DOUBLE_EQ(t.p_value_margin, 0.0);
  EXPECT_NEAR(t.distance_margin, 0.10, 1e-15);
}

TEST(AttributionTest, GroupsTooSmallForTheLevelAreAClearError) {
  EXPECT_EQ(minimum_group_size(0.05), 19u);  // 1/(1+19) = 0.05
  EXPECT_EQ(minimum_group_size(0.1), 9u);
  EXPECT_EQ(minimum_group_size(0.01), 99u);
  EXPECT_EQ(minimum_group_size(0.3), 3u);  // ceil(3.33) - 1 = 3
  EXPECT_EQ(minimum_group_size(0.5), 3u);  // the leave-one-out floor
  EXPECT_THROW(minimum_group_size(0), Error);
  EXPECT_THROW(minimum_group_size(1), Error);

  std::mt19937_64 rng(3);
  const auto data =
      testing::draw_documents({19, 10}, {testing::tilted_profile(4, 1), testing::tilted_profile(4, -1)}, {20, 20}, 7);
  std::vector<std::uint32_t> groups(data.groups.begin(), data.groups.end());
  const auto reference = build_conformal_reference(data.theta, groups, {"harbour", "customs"});
  const std::string message = message_of([&] { check_group_sizes(reference, 0.05); });
  EXPECT_THAT(message, HasSubstr("group 'customs' has 10 known documents, but 19 are needed"));
  EXPECT_THAT(message, HasSubstr("raise --none-level"));
  EXPECT_NO_THROW(check_group_sizes(reference, 0.1));

  const std::string single = message_of([&] {
    build_conformal_reference(rows({{1, 0}, {0, 1}, {0.5, 0.5}}), std::vector<std::uint32_t>{0, 0, 1}, {"A", "B"});
  });
  EXPECT_THAT(single, HasSubstr("group 'B' has 1 known documents"));
}

TEST(AttributionTest, NeighbourVoteCountsTheNearestKnownDocuments) {
  // Known: A at (1,0), (0.9,0.1), (0.8,0.2); B at (0,1), (0.1,0.9), (0.3,0.7).
  const auto theta = rows({{1, 0}, {0.9, 0.1}, {0.8, 0.2}, {0, 1}, {0.1, 0.9}, {0.3, 0.7}});
  const auto reference = build_conformal_reference(theta, std::vector<std::uint32_t>{0, 0, 0, 1, 1, 1}, {"A", "B"});
  const std::vector<double> near_a{0.85, 0.15};
  const auto vote = neighbour_vote(reference, near_a, {}, 3);
  EXPECT_EQ(vote.k, 3u);
  EXPECT_EQ(vote.votes, (std::vector<std::size_t>{3, 0}));
  EXPECT_EQ(vote.leader, 0u);
  // Nearest first: (0.9,0.1) and (0.8,0.2) are about equally near, then (1,0).
  EXPECT_EQ(vote.neighbours.back(), 0u);
  // Only B may vote: its three documents, nearest (0.3, 0.7) first.
  const std::vector<std::uint32_t> only_b{1};
  const auto b = neighbour_vote(reference, near_a, only_b, 5);
  EXPECT_EQ(b.k, 3u);
  EXPECT_EQ(b.votes, (std::vector<std::size_t>{0, 3}));
  EXPECT_EQ(b.neighbours.front(), 5u);
  // A 2-2 tie goes to the group of the nearest neighbour.
  const std::vector<double> middle{0.55, 0.45};
  const auto tie = neighbour_vote(reference, middle, {}, 4);
  EXPECT_EQ(tie.votes, (std::vector<std::size_t>{2, 2}));
  EXPECT_EQ(tie.leader, reference.known_group[tie.neighbours.front()]);
}

// The calibration's inner-product shortcut against the plain way: rebuild the
// reference without each document and score it with the public functions.
TEST(AttributionTest, LeaveOneOutCalibrationMatchesRebuildingTheReference) {
  const auto data = testing::draw_documents(
      {25, 22, 30}, {testing::tilted_profile(6, 2), testing::tilted_profile(6, -2), testing::tilted_profile(6, 0)},
      {8, 8, 8}, 11);
  const std::vector<std::uint32_t> groups(data.groups.begin(), data.groups.end());
  const std::vector<std::string> names{"A", "B", "C"};
  CalibrationOptions options;
  options.permutations = 0;
  options.none_level = 0.1;
  const Calibration c = calibrate_attribution(data.theta, groups, names, options);
  const auto n = static_cast<std::size_t>(data.theta.rows());
  std::size_t right = 0, none = 0;
  for (std::size_t i = 0; i < n; ++i) {
    TopicMatrix rest(static_cast<Eigen::Index>(n - 1), data.theta.cols());
    std::vector<std::uint32_t> rest_groups;
    for (std::size_t j = 0, r = 0; j < n; ++j) {
      if (j == i) continue;
      rest.row(static_cast<Eigen::Index>(r++)) = data.theta.row(static_cast<Eigen::Index>(j));
      rest_groups.push_back(groups[j]);
    }
    const auto reference = build_conformal_reference(rest, rest_groups, names);
    std::vector<double> theta(data.theta.row(static_cast<Eigen::Index>(i)).begin(),
                              data.theta.row(static_cast<Eigen::Index>(i)).end());
    const auto evidence = score_against_candidates(reference, theta, {});
    const Verdict v = decide_verdict(evidence, 0.1);
    const std::uint32_t expected = v.kind == VerdictKind::group ? v.best : 3u;
    EXPECT_EQ(c.loo_verdicts[i], expected) << "document " << i;
    EXPECT_NEAR(c.loo_own_p_values[i], evidence[groups[i]].p_value, 1e-12) << "document " << i;
    right += expected == groups[i];
    none += expected == 3u;
  }
  EXPECT_NEAR(c.accuracy, static_cast<double>(right) / static_cast<double>(n), 1e-15);
  EXPECT_NEAR(c.none_rate, static_cast<double>(none) / static_cast<double>(n), 1e-15);
  std::size_t in_a = 0;
  for (const auto g : groups) in_a += g == 0;
  EXPECT_NEAR(c.recall[0], static_cast<double>(c.confusion[0][0]) / static_cast<double>(in_a), 1e-15);
  std::size_t total = 0;
  for (const auto& row : c.confusion) {
    for (const auto count : row) total += count;
  }
  EXPECT_EQ(total, n);
}

TEST(AttributionTest, PermutationTestOfAccuracyIsSeededAndThreadFree) {
  // Distinct groups: accuracy far above chance, p = 1 / (1 + P).
  const auto apart =
      testing::draw_documents({30, 30}, {testing::tilted_profile(5, 3), testing::tilted_profile(5, -3)}, {30, 30}, 2);
  const std::vector<std::uint32_t> groups(apart.groups.begin(), apart.groups.end());
  CalibrationOptions options;
  options.permutations = 199;
  options.seed = 17;
  options.threads = 1;
  const Calibration one = calibrate_attribution(apart.theta, groups, std::vector<std::string>{"A", "B"}, options);
  options.threads = 4;
  const Calibration four = calibrate_attribution(apart.theta, groups, std::vector<std::string>{"A", "B"}, options);
  EXPECT_GE(one.accuracy, 0.85);
  EXPECT_DOUBLE_EQ(one.permutation_p_value, 1.0 / 200);
  EXPECT_EQ(one.permutations, 199u);
  EXPECT_LT(one.chance_accuracy, 0.7);
  EXPECT_EQ(one.permutation_p_value, four.permutation_p_value);
  EXPECT_EQ(one.chance_accuracy, four.chance_accuracy);
  EXPECT_EQ(one.loo_verdicts, four.loo_verdicts);

  // The same profile in both groups: accuracy near chance and no evidence against it.
  const auto same =
      testing::draw_documents({30, 30}, {testing::tilted_profile(5, 1), testing::tilted_profile(5, 1)}, {30, 30}, 5);
  const std::vector<std::uint32_t> same_groups(same.groups.begin(), same.groups.end());
  const Calibration null = calibrate_attribution(same.theta, same_groups, std::vector<std::string>{"A", "B"}, options);
  EXPECT_LT(null.accuracy, 0.7);
  EXPECT_GT(null.permutation_p_value, 0.01);
}

// ---------------------------------------------------------------------------
// With a model: roles, candidates, lengths, segments, errors.

TEST(AttributionTest, ModelWithoutDisputedDocumentsSaysHowToMarkThem) {
  auto built = test::small_model(/*disputed=*/0);
  const std::string message = message_of([&] { attribute_disputed(built.model, &built.corpus, {}, {}); });
  EXPECT_THAT(message, HasSubstr("no disputed documents"));
  EXPECT_THAT(message, HasSubstr("'disputed' in a 'role' column"));
  EXPECT_THAT(message, HasSubstr("--disputed-folder"));
}

TEST(AttributionTest, UnknownCandidateNamesTheDocumentTheValueAndTheGroups) {
  auto built = test::small_model(3);
  built.corpus.metadata_columns = {"suspects"};
  for (auto& d : built.corpus.documents) d.metadata = {""};
  built.corpus.documents[built.first_disputed + 1].metadata = {"harbour; parish"};
  AttributionOptions options;
  options.candidates_column = "suspects";
  options.calibration.permutations = 0;
  const std::string message = message_of([&] { attribute_disputed(built.model, &built.corpus, {}, options); });
  EXPECT_THAT(message, HasSubstr("document 'x1'"));
  EXPECT_THAT(message, HasSubstr("the candidate 'parish'"));
  EXPECT_THAT(message, HasSubstr("value 'harbour; parish'"));
  EXPECT_THAT(message, HasSubstr("the groups with known documents are: customs, harbour"));

  built.corpus.documents[built.first_disputed + 1].metadata = {"harbour"};
  const Attribution a = attribute_disputed(built.model, &built.corpus, {}, options);
  ASSERT_EQ(a.documents.size(), 3u);
  EXPECT_TRUE(a.documents[0].candidates.empty());  // empty value: every group
  EXPECT_EQ(a.documents[1].candidates, (std::vector<std::uint32_t>{1}));
  ASSERT_EQ(a.documents[1].chains[0].evidence.size(), 1u);
  EXPECT_EQ(a.documents[1].chains[0].evidence[0].group, 1u);

  options.candidates_column = "shelf";
  EXPECT_THAT(message_of([&] { attribute_disputed(built.model, &built.corpus, {}, options); }),
              HasSubstr("no metadata column 'shelf'"));
  options.candidates_column = "suspects";
  EXPECT_THAT(message_of([&] { attribute_disputed(built.model, nullptr, {}, options); }),
              HasSubstr("add --corpus FILE"));
}

TEST(AttributionTest, ShortDocumentsAreNotJudged) {
  auto built = test::small_model(2, /*disputed_length=*/40);
  AttributionOptions options;
  options.calibration.permutations = 0;
  options.min_tokens = 41;
  const Attribution a = attribute_disputed(built.model, &built.corpus, {}, options);
  ASSERT_EQ(a.documents.size(), 2u);
  EXPECT_TRUE(a.documents[0].chains.empty());
  EXPECT_EQ(a.verdict_label(a.documents[0].modal_verdict), "too short to judge (minimum 41 tokens)");
  options.min_tokens = 40;
  const Attribution b = attribute_disputed(built.model, &built.corpus, {}, options);
  EXPECT_EQ(b.documents[0].chains.size(), built.model.chains.size());
  // Without the corpus the lengths are unknown: judged, with a note saying so.
  options.min_tokens = 41;
  const Attribution c = attribute_disputed(built.model, nullptr, {}, options);
  EXPECT_FALSE(c.documents[0].tokens_known);
  EXPECT_FALSE(c.documents[0].chains.empty());
  ASSERT_EQ(c.notes.size(), 1u);
  EXPECT_THAT(c.notes[0], HasSubstr("lengths of the model's disputed documents are unknown"));
  // The JSON carries the cautions, the seed and the options.
  const auto json = to_json(a);
  ASSERT_EQ(json["cautions"].size(), kAttributionCautions.size());
  EXPECT_EQ(json["cautions"][1], std::string(kAttributionCautions[1]));
  EXPECT_EQ(json["options"]["min_tokens"], 41);
  EXPECT_EQ(json["documents"][0]["verdict"], "too short to judge (minimum 41 tokens)");
  const std::string csv = to_csv(a);
  EXPECT_EQ(csv.rfind("# " + std::string(kAttributionCautions[0]) + "\n", 0), 0u);
}

TEST(AttributionTest, SegmentsOfADisputedDocumentAreJudgedTogether) {
  auto built = test::small_model(3);
  // x1 and x2 become the two segments of "letter-9": 30 and 90 tokens.
  auto& first = built.corpus.documents[built.first_disputed + 1];
  auto& second = built.corpus.documents[built.first_disputed + 2];
  first.parent_id = second.parent_id = "letter-9";
  first.segment_count = second.segment_count = 2;
  first.segment_index = 0;
  second.segment_index = 1;
  test::set_length(built.corpus, built.first_disputed + 1, 30);
  test::set_length(built.corpus, built.first_disputed + 2, 90);
  AttributionOptions options;
  options.calibration.permutations = 0;
  options.min_tokens = 100;  // 30 + 90 = 120 tokens together, too few apart
  const Attribution a = attribute_disputed(built.model, &built.corpus, {}, options);
  ASSERT_EQ(a.documents.size(), 2u);
  EXPECT_EQ(a.documents[1].id, "letter-9");
  EXPECT_EQ(a.documents[1].parts, (std::vector<std::string>{"x1", "x2"}));
  EXPECT_EQ(a.documents[1].tokens, 120u);
  ASSERT_FALSE(a.documents[1].chains.empty());
  // The token-weighted mean theta = (30 theta_x1 + 90 theta_x2) / 120, scored directly.
  const KnownDocuments known = known_documents(built.model, 0, &built.corpus, options.min_tokens);
  const auto reference = build_conformal_reference(known.theta, known.groups, known.group_names);
  std::vector<double> mean(built.model.topic_count());
  for (std::size_t k = 0; k < mean.size(); ++k) {
    mean[k] = (30.0 * built.model.theta(0, built.first_disputed + 1)[k] +
               90.0 * built.model.theta(0, built.first_disputed + 2)[k]) /
              120.0;
  }
  const auto evidence = score_against_candidates(reference, mean, {});
  EXPECT_NEAR(a.documents[1].chains[0].evidence[0].distance, evidence[0].distance, 1e-6);
  EXPECT_NEAR(a.documents[1].chains[0].evidence[1].p_value, evidence[1].p_value, 1e-12);
}

TEST(AttributionTest, AgreementAcrossChainsCountsTheModalVerdict) {
  auto built = test::small_model(1, 200, /*chains=*/3);
  // Chain 3 moves the disputed text onto the other group's profile.
  const std::size_t x = built.first_disputed;
  const std::size_t k = built.model.topic_count();
  auto& theta = built.model.chains[2].theta;
  for (std::size_t t = 0; t < k; ++t) theta[x * k + t] = built.model.chains[2].theta[0 * k + t];  // like d0 (customs)
  for (std::size_t t = 0; t < k; ++t) {
    built.model.chains[0].theta[x * k + t] = built.model.chains[0].theta[1 * k + t];  // like d1 (harbour)
    built.model.chains[1].theta[x * k + t] = built.model.chains[1].theta[1 * k + t];
  }
  AttributionOptions options;
  options.calibration.permutations = 0;
  const Attribution a = attribute_disputed(built.model, &built.corpus, {}, options);
  const auto& d = a.documents[0];
  ASSERT_EQ(d.chains.size(), 3u);
  EXPECT_EQ(a.verdict_label(d.modal_verdict), "harbour");
  EXPECT_NEAR(d.agreement, 2.0 / 3, 1e-15);
  EXPECT_LE(d.p_value_min, d.p_value_max);
  EXPECT_EQ(d.p_value_min, std::min(d.chains[0].verdict.best_p_value, d.chains[1].verdict.best_p_value));
  EXPECT_EQ(a.calibration.size(), 3u);
}

// ---------------------------------------------------------------------------
// Drawn corpora with known truth, fitted with loupe's sampler (a modest fit).

struct DrawnOutcome {
  double accuracy = 0;             // disputed texts of a known group named correctly
  double true_group_none = 0;      // ... called "none"
  double outsider_none = 0;        // outsiders called "none" (centroid score)
  double outsider_none_plain = 0;  // the same with the nearest-document score
  double known_none = 0;           // leave-one-out: known documents called "none"
  std::size_t judged = 0, outsiders = 0, known = 0;
};

DrawnOutcome run_drawn_study(std::uint64_t seed, bool outsider_borrows) {
  test::DrawnStudySpec spec;
  spec.seed = seed;
  spec.outsider_borrows = outsider_borrows;
  const test::DrawnStudy study = test::draw_study(spec);
  FitOptions fit;
  fit.topic_count = static_cast<std::uint32_t>(study.topic_count);
  fit.sweeps = 200;
  fit.burn_in = 100;
  fit.samples = 5;
  fit.sample_lag = 10;
  fit.threads = 2;
  fit.seed = seed;
  const Model model = fit_model(study.corpus, fit);
  AttributionOptions options;
  options.calibration.permutations = 0;
  options.min_tokens = 150;
  const Attribution a = attribute_disputed(model, &study.corpus, {}, options);
  const KnownDocuments known = known_documents(model, 0, &study.corpus, options.min_tokens);
  const auto reference = build_conformal_reference(known.theta, known.groups, known.group_names);

  DrawnOutcome out;
  std::size_t right = 0, true_none = 0, outsider_none = 0, plain_none = 0;
  std::size_t next = 0;
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    if (model.document_roles[d] != DocumentRole::disputed) continue;
    const auto& doc = a.documents[next++];
    EXPECT_EQ(doc.id, model.document_ids[d]);
    const int truth = study.truth[d];
    const auto g_count = static_cast<std::uint32_t>(a.group_names.size());
    if (truth >= 0) {
      ++out.judged;
      right += doc.modal_verdict == static_cast<std::uint32_t>(truth);
      true_none += doc.modal_verdict == g_count;
    } else {
      ++out.outsiders;
      outsider_none += doc.modal_verdict == g_count;
      const auto theta = model.theta(0, d);
      const std::vector<double> row(theta.begin(), theta.end());
      plain_none += test::nearest_document_score_says_none(reference, row, options.none_level);
    }
  }
  out.accuracy = static_cast<double>(right) / static_cast<double>(out.judged);
  out.true_group_none = static_cast<double>(true_none) / static_cast<double>(out.judged);
  out.outsider_none = static_cast<double>(outsider_none) / static_cast<double>(out.outsiders);
  out.outsider_none_plain = static_cast<double>(plain_none) / static_cast<double>(out.outsiders);
  out.known_none = a.calibration[0].none_rate;
  out.known = a.calibration[0].documents;
  return out;
}

// Normal approximation to the binomial, 99% two-sided (2.576 = the 0.995 normal
// quantile, R: qnorm(0.995); common practice), plus 1/n for discreteness.
bool within_binomial_band(double rate, double p, std::size_t n) {
  const double half = 2.576 * std::sqrt(p * (1 - p) / static_cast<double>(n)) + 1.0 / static_cast<double>(n);
  return std::abs(rate - p) <= half;
}

void report(const char* scenario, const DrawnOutcome& o) {
  std::cout << scenario << ": accuracy " << o.accuracy << " on " << o.judged
            << " disputed texts of 150-250 tokens; true-group texts called none " << o.true_group_none
            << "; outsiders called none " << o.outsider_none << " (centroid score) vs " << o.outsider_none_plain
            << " (nearest-document score) of " << o.outsiders << "; known documents called none (leave-one-out) "
            << o.known_none << " of " << o.known << "\n";
  const std::string prefix = std::string(scenario) + "_";
  ::testing::Test::RecordProperty(prefix + "accuracy", std::to_string(o.accuracy));
  ::testing::Test::RecordProperty(prefix + "outsider_none_centroid", std::to_string(o.outsider_none));
  ::testing::Test::RecordProperty(prefix + "outsider_none_nearest_document", std::to_string(o.outsider_none_plain));
  ::testing::Test::RecordProperty(prefix + "known_none", std::to_string(o.known_none));
}

// Outsiders with two topics of their own (like the demo's railway company), and
// outsiders with none of their own that mix two offices' secondary business.
// Accuracy and the none rates (centroid score beside the nearest-document score)
// are reported for both.
TEST(AttributionTest, DrawnCorporaNameTheTrueGroupAndSayNoneForOutsiders) {
  for (const bool borrows : {false, true}) {
    const DrawnOutcome o = run_drawn_study(1, borrows);
    report(borrows ? "borrowing_outsider" : "distinct_outsider", o);
    EXPECT_GE(o.accuracy, 0.90);
    EXPECT_GE(o.outsider_none, 0.5);
    // Known documents wrongly called "none": about the level, within a 99% binomial band around 0.05.
    EXPECT_TRUE(within_binomial_band(o.known_none, 0.05, o.known)) << o.known_none;
    EXPECT_TRUE(within_binomial_band(o.true_group_none, 0.05, o.judged)) << o.true_group_none;
  }
}

}  // namespace
}  // namespace loupe

// Tests of the study report's renderer: escaping of every text from the results, sections that are absent,
// the null-distribution histograms (bins and the observed marker), the profile heat map's cells, the graph's
// nodes, the attribution cautions, and the atomic write.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>

#include "analysis/attribution_cautions.h"
#include "common/error.h"
#include "report/attribution_cautions_copy.h"
#include "report/html_text.h"
#include "report/report_figures.h"
#include "report/report_palette.h"
#include "report/report_test_support.h"
#include "report/study_report.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using nlohmann::json;
using testing::attribute_values;
using testing::count_of;
using testing::figure_names;
using testing::figure_svg;
using ::testing::HasSubstr;
using ::testing::Not;

const std::string kHostile = "<b>&\"x'";
const std::string kHostileEscaped = "&lt;b&gt;&amp;&quot;x&#39;";

json with_provenance(json results) {
  results["provenance"] = testing::minimal_provenance();
  return results;
}

// Profiles of GROUPS over K topics as `loupe compare --json` writes them (chain 1 only), with records.
json compare_section(const std::vector<std::string>& groups, std::size_t topics, json records = json::array()) {
  json profile_groups = json::array();
  for (std::size_t g = 0; g < groups.size(); ++g) {
    std::vector<double> mean(topics), low(topics), high(topics);
    for (std::size_t k = 0; k < topics; ++k) {
      mean[k] = (k == g ? 0.5 : 0.5 / static_cast<double>(topics - 1));
      low[k] = mean[k] * 0.9;
      high[k] = mean[k] * 1.1;
    }
    profile_groups.push_back({{"group", groups[g]},
                              {"documents", 10},
                              {"mean", mean},
                              {"interval_low", low},
                              {"interval_high", high},
                              {"total_weight", 10.0}});
  }
  json chain = {{"chain", 1},
                {"profiles", {{"chain", 1}, {"level", 0.95}, {"seed", 1}, {"groups", profile_groups}}},
                {"records", records}};
  return {{"chains", json::array({chain})}, {"across_chains", json::array()}};
}

json test_record(const std::string& method, double statistic, json null_distribution) {
  json r = {{"method", method},
            {"comparison", "all groups"},
            {"topic", nullptr},
            {"statistic_name", "pseudo-F"},
            {"statistic", statistic},
            {"effect_size_name", "R²"},
            {"effect_size", 0.4},
            {"p_value", 0.001},
            {"adjusted_p_value", nullptr},
            {"permutations", 999},
            {"seed", 1},
            {"chain", 1}};
  if (!null_distribution.is_null()) r["null_distribution"] = null_distribution;
  return r;
}

TEST(HtmlTextTest, EscapesTheFiveCharactersThatCanBreakOutOfTextOrAttributes) {
  EXPECT_EQ(report::escape_html(kHostile), kHostileEscaped);
  EXPECT_EQ(report::escape_html("Marlbrine \u2014 plain"), "Marlbrine \u2014 plain");
}

TEST(HtmlTextTest, NumbersKeepTheirSignificantDigitsWithoutExponents) {
  EXPECT_EQ(report::format_number(0.528122, 3), "0.528");
  EXPECT_EQ(report::format_number(339.67, 3), "340");
  EXPECT_EQ(report::format_number(0.001, 3), "0.001");
  EXPECT_EQ(report::format_number(1.0, 3), "1");
  EXPECT_EQ(report::format_percent(0.0549), "5.5%");
  EXPECT_EQ(report::slug("pairwise PERMANOVA: a vs b"), "pairwise-permanova-a-vs-b");
}

TEST(StudyReportTest, EveryTextFromTheResultsIsEscaped) {
  json results = with_provenance({});
  results["provenance"]["command"] = "loupe analyze " + kHostile;
  results["corpus"] = {{"source", kHostile}, {"groups", json::array({{{"group", kHostile}, {"documents", 3}}})}};
  results["compare"] = compare_section({kHostile, "plain"}, 3);
  results["conclusions"] = json::array({{{"text", kHostile + " differs"}, {"agreement", kHostile}}});
  results["attribution"] = {
      {"documents", json::array({{{"id", kHostile},
                                  {"verdict", kHostile},
                                  {"chain_agreement", 1.0},
                                  {"candidates", json::array({kHostile})},
                                  {"by_chain", json::array({{{"chain", 1},
                                                             {"verdict", kHostile},
                                                             {"candidates", json::array({{{"group", kHostile},
                                                                                          {"hellinger_distance", 0.1},
                                                                                          {"p_value", 0.5}}})}}})}}})}};
  results["graph"] = {
      {"drawing",
       {{"chain", 1},
        {"nodes", json::array({{{"id", kHostile}, {"group", kHostile}, {"community", 1}, {"x", 0.1}, {"y", 0.2}}})},
        {"edges", json::array()}}}};
  const std::string html = render_study_report(results);
  EXPECT_THAT(html, Not(HasSubstr(kHostile)));
  EXPECT_THAT(html, Not(HasSubstr("<b>")));
  // corpus (source, group), profiles (heat map label, table), conclusion (text, badge), command, attribution
  // (figure, table), graph (legend, table): each place escaped, none raw.
  EXPECT_GE(count_of(html, kHostileEscaped), 12u);
}

TEST(StudyReportTest, ProvenanceAloneNamesEveryAbsentSection) {
  const std::string html = render_study_report(with_provenance({}));
  for (const char* key : {"corpus", "model", "topics", "compare", "attribution", "scan", "graph", "near_duplicates"}) {
    EXPECT_THAT(html, HasSubstr(std::string("data-absent=\"") + key + "\"")) << key;
  }
  EXPECT_THAT(html, HasSubstr("data-absent-sections=\"conclusions, corpus, model, topics, compare, attribution, scan, "
                              "graph, near_duplicates\""));
  EXPECT_TRUE(figure_names(html).empty());
  EXPECT_THAT(html, Not(HasSubstr("class=\"cautions\"")));  // no attribution, no cautions box
  EXPECT_THAT(html, HasSubstr("ab12"));                     // the input's checksum
  EXPECT_EQ(html.rfind("<!DOCTYPE html>", 0), 0u);
  EXPECT_THAT(html, HasSubstr("</html>"));
}

TEST(StudyReportTest, ReadsProvenanceModelAndDrawingInTheShapesTheStudyPipelineWrites) {
  json results = {{"provenance",
                   {{"loupe_version", "0.1.0"},
                    {"started_at", "2024-05-01T10:00:00Z"},
                    {"finished_at", "2024-05-01T10:02:00Z"},
                    {"options", {{"fit", {{"topics", 16}, {"seed", 3}}}}},
                    {"seeds", {{"fit", 3}, {"chains", {11, 12}}}},
                    {"inputs", json::array()},
                    {"skipped_stages", {"scan"}}}}};
  for (int i = 0; i < 25; ++i) {
    results["provenance"]["inputs"].push_back({{"path", "letter-" + std::to_string(i) + ".txt"},
                                               {"bytes", 100 + i},
                                               {"fnv1a64", "00ff00ff00ff00f" + std::to_string(i % 10)}});
  }
  results["model"] = {{"topics", 16},
                      {"chains", 2},
                      {"rhat", 1.02},
                      {"sweeps", 1000},
                      {"per_chain", json::array({{{"chain", 1}, {"seed", 11}, {"final_log_likelihood", -3.5e5}},
                                                 {{"chain", 2}, {"seed", 12}, {"final_log_likelihood", -3.4e5}}})},
                      {"traces", json::array({json::array({{{"sweep", 1}, {"log_likelihood", -4e5}}})})}};
  results["graph"] = {{"drawing",
                       {{"chain", 1},
                        {"nodes", json::array()},
                        {"edges", json::array()},
                        {"note", "no drawing: more than 5000 documents"}}}};
  const std::string html = render_study_report(results);
  EXPECT_THAT(html, HasSubstr("finished 2024-05-01T10:02:00Z"));
  EXPECT_THAT(html, HasSubstr("<th scope=\"row\">fit.topics</th><td>16</td>"));
  EXPECT_THAT(html, HasSubstr("<td>11, 12</td>"));
  EXPECT_THAT(html, HasSubstr("fnv1a64 00ff00ff00ff00f7"));
  EXPECT_THAT(html, HasSubstr("Input files and their checksums (25 files)"));  // folded in <details>
  EXPECT_THAT(html, HasSubstr("Stages skipped: scan."));
  EXPECT_THAT(html, HasSubstr("below 1.1: the chains agree"));
  EXPECT_THAT(html, HasSubstr("-350000"));                            // the per-chain table
  EXPECT_THAT(html, Not(HasSubstr("log_likelihood&quot;:-400000")));  // traces stay in the JSON
  EXPECT_THAT(html, HasSubstr("The graph is not drawn: no drawing: more than 5000 documents."));
  EXPECT_TRUE(figure_svg(html, "graph").empty());
}

TEST(StudyReportTest, RefusesResultsThatAreNotAnObjectWithProvenance) {
  EXPECT_THROW(render_study_report(json::array()), Error);
  try {
    render_study_report(json{{"corpus", json::object()}});
    FAIL() << "no error for results without provenance";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("provenance"));
  }
}

TEST(StudyReportTest, ConclusionsComeFirstWithTheirAgreement) {
  json results = with_provenance(testing::demo_results());
  const std::string html = render_study_report(results);
  const auto conclusions = html.find("<section id=\"conclusions\"");
  const auto corpus = html.find("<section id=\"corpus\"");
  ASSERT_NE(conclusions, std::string::npos);
  ASSERT_NE(corpus, std::string::npos);
  EXPECT_LT(conclusions, corpus);
  EXPECT_THAT(html, HasSubstr("class=\"agreement agreement-all-chains\""));
}

TEST(StudyReportTest, HistogramHasOneBarABinAndMarksTheObservedValueInItsBin) {
  std::vector<int> counts(30);
  for (int b = 0; b < 30; ++b) counts[b] = b * (29 - b);
  // Observed 1.55 on [0, 3] with 30 bins of 0.1: bin 15 ([1.5, 1.6)).
  json record = test_record("PERMANOVA", 1.55, {{"low", 0.0}, {"high", 3.0}, {"counts", counts}});
  json results = with_provenance({});
  results["compare"] = compare_section({"a", "b"}, 2, json::array({record}));
  const std::string html = render_study_report(results);
  const std::string svg = figure_svg(html, "null-permanova-all-groups-chain-1");
  ASSERT_FALSE(svg.empty()) << "figures: " << ::testing::PrintToString(figure_names(html));

  const auto bar_counts = attribute_values(svg, "class=\"bar\"", "data-count");
  ASSERT_EQ(bar_counts.size(), 30u);
  for (int b = 0; b < 30; ++b) EXPECT_EQ(bar_counts[b], counts[b]) << "bin " << b;
  const auto xs = attribute_values(svg, "class=\"bar\"", "x");
  const auto widths = attribute_values(svg, "class=\"bar\"", "width");
  const auto heights = attribute_values(svg, "class=\"bar\"", "height");
  EXPECT_TRUE(std::is_sorted(xs.begin(), xs.end()));
  // Heights follow the counts: the tallest bar is the largest count (bins 14 and 15: 14 * 15 = 210).
  EXPECT_EQ(std::max_element(heights.begin(), heights.end()) - heights.begin(), 14);
  EXPECT_DOUBLE_EQ(heights[0], 0.0);

  const auto observed = attribute_values(svg, "class=\"observed\"", "x1");
  ASSERT_EQ(observed.size(), 1u);
  EXPECT_GE(observed[0], xs[15]);
  EXPECT_LE(observed[0], xs[15] + widths[15] + 0.5);
  EXPECT_EQ(attribute_values(svg, "class=\"observed\"", "data-value"), std::vector<double>{1.55});
  EXPECT_THAT(svg, HasSubstr("<title"));
  EXPECT_THAT(svg, HasSubstr("<desc"));
}

TEST(StudyReportTest, HistogramAxisWidensToShowAnObservedValueBeyondThePermutedOnes) {
  json record = test_record("PERMANOVA", 9.0, testing::sample_null_distribution(0, 3));
  json results = with_provenance({});
  results["compare"] = compare_section({"a", "b"}, 2, json::array({record}));
  const std::string svg = figure_svg(render_study_report(results), "null-permanova-all-groups-chain-1");
  const auto xs = attribute_values(svg, "class=\"bar\"", "x");
  const auto widths = attribute_values(svg, "class=\"bar\"", "width");
  const auto observed = attribute_values(svg, "class=\"observed\"", "x1");
  ASSERT_EQ(xs.size(), 30u);
  ASSERT_EQ(observed.size(), 1u);
  // The bars cover [0, 3] of an axis that runs to 9 and a little beyond: about the first third.
  const double right_edge = xs[29] + widths[29];
  EXPECT_GT(observed[0], right_edge);
  EXPECT_NEAR((right_edge - xs[0]) / (observed[0] - xs[0]), 3.0 / 9.0, 0.01);
  EXPECT_LE(observed[0], 540.0);  // inside the figure

  report::NullHistogram h;
  h.low = 0;
  h.high = 3;
  h.observed = -1;
  const auto axis = report::null_histogram_axis(h);
  EXPECT_LT(axis.from, -1.0);
  EXPECT_DOUBLE_EQ(axis.to, 3.0);
}

TEST(StudyReportTest, DrawsTheNullDistributionsOfDistinctiveTopicsOnlyWhereTheyDiffer) {
  json records = json::array();
  for (const double adjusted : {0.01, 0.4}) {
    json r = test_record("distinctive topic", 0.2, testing::sample_null_distribution(-0.1, 0.1));
    r["comparison"] = "a vs rest";
    r["topic"] = adjusted < 0.05 ? 1 : 2;
    r["adjusted_p_value"] = adjusted;
    records.push_back(r);
  }
  // One comparison, two statistics: the figures are told apart by the statistic's name.
  for (const char* statistic : {"Hellinger distance", "Jensen-Shannon distance"}) {
    json r = test_record("profile distance", 0.3, testing::sample_null_distribution(0, 0.1));
    r["comparison"] = "a vs b";
    r["statistic_name"] = statistic;
    records.push_back(r);
  }
  json results = with_provenance({});
  results["compare"] = compare_section({"a", "b"}, 2, records);
  const std::string html = render_study_report(results);
  EXPECT_EQ(figure_names(html),
            (std::vector<std::string>{"profiles", "null-distinctive-topic-a-vs-rest-topic-1-chain-1",
                                      "null-profile-distance-hellinger-distance-a-vs-b-chain-1",
                                      "null-profile-distance-jensen-shannon-distance-a-vs-b-chain-1"}));
  EXPECT_THAT(html, HasSubstr("1 distinctive-topic tests that find no difference"));
}

TEST(StudyReportTest, MalformedNullDistributionIsAnErrorNamingTheTest) {
  json record = test_record("PERMDISP", 2.0, {{"low", 3.0}, {"high", 1.0}, {"counts", {1, 2}}});
  json results = with_provenance({});
  results["compare"] = compare_section({"a", "b"}, 2, json::array({record}));
  try {
    render_study_report(results);
    FAIL() << "no error for high < low";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("PERMDISP, all groups"));
    EXPECT_THAT(e.what(), HasSubstr("null_distribution"));
  }
}

TEST(StudyReportTest, HeatmapHasOneCellPerGroupAndTopicAndMarksDistinctiveTopics) {
  json records = json::array();
  // Group "b" has more of topic 2 (adjusted p 0.01: marked); group "c" less of topic 4 at p 0.2 (not marked).
  records.push_back({{"method", "distinctive topic"},
                     {"comparison", "b vs rest"},
                     {"topic", 2},
                     {"effect_size", 0.3},
                     {"interval_low", 0.2},
                     {"interval_high", 0.4},
                     {"p_value", 0.001},
                     {"adjusted_p_value", 0.01}});
  records.push_back({{"method", "distinctive topic"},
                     {"comparison", "c vs rest"},
                     {"topic", 4},
                     {"effect_size", -0.1},
                     {"interval_low", -0.2},
                     {"interval_high", 0.01},
                     {"p_value", 0.1},
                     {"adjusted_p_value", 0.2}});
  json results = with_provenance({});
  results["compare"] = compare_section({"a", "b", "c"}, 5, records);
  const std::string html = render_study_report(results);
  const std::string svg = figure_svg(html, "profiles");
  ASSERT_FALSE(svg.empty());
  EXPECT_EQ(count_of(svg, "class=\"cell\""), 3u * 5u);
  EXPECT_EQ(count_of(svg, "class=\"interval\""), 3u * 5u);
  EXPECT_EQ(count_of(svg, "class=\"distinctive\""), 1u);
  EXPECT_THAT(svg, HasSubstr("data-group=\"1\" data-topic=\"1\""));  // b, topic 2 (both from 0)
  // The largest mean is the darkest: each group's own topic (0.5) gets the full ramp colour.
  EXPECT_EQ(count_of(svg, "fill=\"" + report::ramp_colour(1.0) + "\" stroke=\"#ffffff\""), 3u);
  EXPECT_THAT(html, HasSubstr("+30.0"));  // the distinctive table, in percentage points
}

TEST(StudyReportTest, TopicsTableTakesGroupSharesFromTheTopicsSection) {
  json results = with_provenance({});
  results["topics"] = {{"chains", 1},
                       {"topic_count", 2},
                       {"topics", json::array({{{"chain", 1},
                                                {"topic", 1},
                                                {"share", 0.6},
                                                {"alpha", 0.1},
                                                {"words", json::array({{{"word", "herring"}, {"weight", 0.2}}})}},
                                               {{"chain", 1},
                                                {"topic", 2},
                                                {"share", 0.4},
                                                {"alpha", 0.1},
                                                {"words", json::array({{{"word", "lifeboat"}, {"weight", 0.3}}})}}})},
                       {"group_shares", {{"quay", {0.75, 0.25}}, {"roads", {0.125, 0.875}}}}};
  const std::string html = render_study_report(results);
  EXPECT_EQ(count_of(figure_svg(html, "topics"), "class=\"bar\""), 2u);
  EXPECT_THAT(html, HasSubstr("75.0%"));
  EXPECT_THAT(html, HasSubstr("87.5%"));
  // Without compare, the heat map is drawn from the same shares, without intervals.
  const std::string heatmap = figure_svg(html, "profiles");
  EXPECT_EQ(count_of(heatmap, "class=\"cell\""), 4u);
  EXPECT_EQ(count_of(heatmap, "class=\"interval\""), 0u);
}

TEST(StudyReportTest, TopicsTableShowsStabilityAndCoherenceBesideTheWords) {
  json results = with_provenance({});
  const auto topic = [](int number, double stability, bool stable, double npmi) {
    return json{{"chain", 1},
                {"topic", number},
                {"share", 0.5},
                {"alpha", 0.1},
                {"stability", stability},
                {"stable", stable},
                {"coherence_npmi", npmi},
                {"words", json::array({{{"word", "w" + std::to_string(number)}, {"weight", 0.2}}})}};
  };
  results["topics"] = {{"chains", 4},
                       {"topic_count", 2},
                       {"topics", json::array({topic(1, 0.92, true, 0.417), topic(2, 0.31, false, 0.066)})}};
  const std::string html = render_study_report(results);
  EXPECT_THAT(html, HasSubstr("stability across chains</th>"));
  EXPECT_THAT(html, HasSubstr("coherence (NPMI)</th>"));
  EXPECT_THAT(html, HasSubstr(">0.92</td>"));
  EXPECT_THAT(html, HasSubstr(">0.31 (unstable)</td>"));
  EXPECT_THAT(html, HasSubstr(">0.066</td>"));
  EXPECT_EQ(count_of(html, "(unstable)"), 1u);
}

TEST(StudyReportTest, SweepOverKIsDrawnInFourPanelsWithTheSuggestedKMarked) {
  json results = with_provenance({});
  results["model"] = {{"topics", 12}, {"chains", 4}};
  const auto row = [](int k, double perplexity, double npmi, double redundant, int stable) {
    return json{{"topics", k},
                {"perplexity", perplexity},
                {"perplexity_min", perplexity - 1},
                {"perplexity_max", perplexity + 1},
                {"mean_npmi", npmi},
                {"mean_umass", -1.5},
                {"redundant_pairs", redundant},
                {"stable_topics", stable},
                {"mean_stability", 0.8},
                {"rhat", 1.01}};
  };
  results["sweep"] = {
      {"chains", 2},
      {"sweeps", 300},
      {"seed", 3},
      {"held_out_every", 10},
      {"redundancy_threshold", 0.5},
      {"results", json::array({row(5, 300, 0.1, 0, 5), row(10, 220, 0.25, 0, 10), row(20, 210, 0.2, 3, 14)})},
      {"suggested", 10},
      {"reason", "K = 10: " + kHostile}};
  const std::string html = render_study_report(results);
  // After the model, before the topics.
  const auto model = html.find("<section id=\"model\"");
  const auto sweep = html.find("<section id=\"sweep\"");
  ASSERT_NE(sweep, std::string::npos);
  EXPECT_LT(model, sweep);
  const std::string svg = figure_svg(html, "topic-count-sweep");
  ASSERT_FALSE(svg.empty());
  EXPECT_EQ(count_of(svg, "<path d="), 4u);   // one line a panel
  EXPECT_EQ(count_of(svg, "<circle "), 12u);  // a marker a K in each
  // The suggested K's dashed line in every panel; the first panel spans x 56..416 for K 5..20, so K = 10 is at 176.
  const auto x = attribute_values(svg, "class=\"suggested\"", "x1");
  ASSERT_EQ(x.size(), 4u);
  EXPECT_NEAR(x[0], 56.0 + 360.0 * 5.0 / 15.0, 0.05);
  EXPECT_THAT(html, HasSubstr("10 (suggested)"));
  EXPECT_THAT(html, HasSubstr("<tr class=\"suggested\">"));
  EXPECT_THAT(html, HasSubstr("14 of 20"));
  EXPECT_THAT(html, HasSubstr(kHostileEscaped));  // the reason, escaped
  EXPECT_THAT(html, Not(HasSubstr(kHostile)));
  EXPECT_THAT(html, HasSubstr("The study&#39;s model uses K = 12"));
  // Without a sweep there is no section and no note that one is missing.
  results.erase("sweep");
  EXPECT_THAT(render_study_report(results), Not(HasSubstr("<section id=\"sweep\"")));
}

TEST(StudyReportTest, GraphDrawsEveryNodeAndEdgeWithItsCommunities) {
  json nodes = json::array();
  for (int i = 0; i < 7; ++i) {
    nodes.push_back({{"id", "d" + std::to_string(i)},
                     {"group", i < 4 ? json("quay") : (i < 6 ? json("roads") : json(nullptr))},
                     {"community", i < 4 ? 1 : 2},
                     {"x", 0.1 * i},
                     {"y", (i % 3) / 2.0}});
  }
  json edges = json::array({{{"source", 0}, {"target", 1}, {"weight", 0.9}},
                            {{"source", 1}, {"target", 2}, {"weight", 0.8}},
                            {{"source", 4}, {"target", 6}, {"weight", 0.7}}});
  json results = with_provenance({});
  results["graph"] = {{"chains", json::array()}, {"drawing", {{"chain", 1}, {"nodes", nodes}, {"edges", edges}}}};
  const std::string html = render_study_report(results);
  const std::string svg = figure_svg(html, "graph");
  ASSERT_FALSE(svg.empty());
  EXPECT_EQ(count_of(svg, "class=\"node\""), 7u);
  const auto edges_begin = svg.find("<g class=\"edges\"");
  const auto edges_end = svg.find("</g>", edges_begin);
  EXPECT_EQ(count_of(svg.substr(edges_begin, edges_end - edges_begin), "<line "), 3u);
  EXPECT_EQ(count_of(svg, "class=\"community\""), 2u);  // two hulls of at least three documents each
  // The node without a group is grey; the community table counts it.
  EXPECT_THAT(svg, HasSubstr("fill=\"#999999\" class=\"node\""));
  EXPECT_THAT(html, HasSubstr("(no group)"));

  results["graph"]["drawing"]["edges"].push_back({{"source", 0}, {"target", 7}, {"weight", 0.5}});
  try {
    render_study_report(results);
    FAIL() << "no error for an edge to a node that does not exist";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("7 nodes"));
  }
}

TEST(StudyReportTest, AttributionCautionsComeFromTheResultsOrElseFromTheCopy) {
  // The copy must stay word for word the header the rest of loupe prints from.
  ASSERT_EQ(report::kAttributionCautionsCopy.size(), kAttributionCautions.size());
  for (std::size_t i = 0; i < kAttributionCautions.size(); ++i) {
    EXPECT_EQ(report::kAttributionCautionsCopy[i], kAttributionCautions[i]);
  }
  json results = with_provenance({});
  results["attribution"] = {{"documents", json::array()}, {"cautions", {"First.", "Second.", "Third."}}};
  std::string html = render_study_report(results);
  EXPECT_THAT(html, HasSubstr("<li>Second.</li>"));

  results["attribution"].erase("cautions");
  html = render_study_report(results);
  for (const auto caution : kAttributionCautions) {
    EXPECT_THAT(html, HasSubstr("<li>" + report::escape_html(caution) + "</li>"));
  }
}

TEST(StudyReportTest, DemoResultsDrawEveryFigureWithItsTable) {
  const json results = testing::demo_results_with_null_distributions();
  const std::string html = render_study_report(results);
  const auto names = figure_names(html);
  for (const char* name : {"topics", "profiles", "attribution", "scan", "graph", "null-permanova-all-groups-chain-1",
                           "null-permdisp-all-groups-chain-1", "null-anosim-all-groups-chain-1"}) {
    EXPECT_NE(std::find(names.begin(), names.end(), name), names.end()) << name;
  }
  // Every figure is followed by its caption and a table before the next figure.
  for (const auto& name : {"topics", "profiles", "attribution", "scan", "graph"}) {
    const auto at = html.find("<svg data-figure=\"" + std::string(name) + "\"");
    EXPECT_NE(html.find("<table", at), std::string::npos) << name;
  }
  // The drawn graph has every node of the fixture's drawing.
  EXPECT_EQ(count_of(figure_svg(html, "graph"), "class=\"node\""), results["graph"]["drawing"]["nodes"].size());
  // One attribution row per disputed document; the scan draws each text on each chain.
  EXPECT_EQ(count_of(figure_svg(html, "attribution"), "class=\"document\""),
            results["attribution"]["documents"].size());
  std::size_t strips = 0;
  for (const auto& t : results["scan"]["texts"]) strips += t["chains"].size();
  EXPECT_EQ(count_of(figure_svg(html, "scan"), "class=\"strip\""), strips);
  EXPECT_EQ(count_of(figure_svg(html, "scan"), "class=\"change-point\""), 2u);  // dsp-02's seam on both chains
  EXPECT_THAT(html, HasSubstr("class=\"cautions\""));
}

TEST(StudyReportTest, ReportFetchesNothing) {
  const std::string html = render_study_report(testing::demo_results_with_null_distributions());
  EXPECT_THAT(html, Not(HasSubstr("src=")));
  EXPECT_THAT(html, Not(HasSubstr("url(")));
  EXPECT_THAT(html, Not(HasSubstr("@import")));
  EXPECT_THAT(html, Not(HasSubstr("http:")));
  EXPECT_THAT(html, Not(HasSubstr("https:")));
  EXPECT_EQ(count_of(html, "href=\""), count_of(html, "href=\"#"));  // only links within the page
  EXPECT_EQ(count_of(html, "<script"), 1u);                          // the self-check
  EXPECT_THAT(html, HasSubstr("Content-Security-Policy"));
}

TEST(StudyReportTest, SameResultsGiveTheSameBytesAndTheFileIsWrittenWhole) {
  const json results = testing::demo_results();
  const std::string html = render_study_report(results);
  EXPECT_EQ(render_study_report(results), html);
  testing::TempFolder folder("study-report");
  const std::string path = folder.file("report.html");
  write_study_report(results, path);
  std::ifstream in(path, std::ios::binary);
  std::stringstream written;
  written << in.rdbuf();
  EXPECT_EQ(written.str(), html);
  // Only the report is left in the folder (the temporary file was renamed into place).
  EXPECT_EQ(std::distance(std::filesystem::directory_iterator(folder.path()), std::filesystem::directory_iterator()),
            1);
}

}  // namespace
}  // namespace loupe

// The study report's figures as inline SVG, each drawn from plain numbers (no JSON here): every figure
// carries data-figure="NAME", a <title> and <desc> as its text alternative, and the Okabe–Ito colours.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <vector>

namespace loupe::report {

// The names of the groups in the order that gives each its colour (report_palette.h) and marker shape.
struct GroupKey {
  std::vector<std::string> names;
  // The index of NAME, added at the end when new.
  std::size_t index_of(const std::string& name);
  std::optional<std::size_t> find(const std::string& name) const;
  std::string colour_of(const std::string& name) const;  // kNoGroupColour for an unknown name
};

// An SVG marker of the group's shape (circle, square, triangle, diamond; then again) centred at (x, y).
std::string group_marker(std::size_t group, double x, double y, double radius, const std::string& fill,
                         const std::string& extra_attributes = "");

// A legend of the groups: one marker and name a row, from (x, y) down; returns the SVG.
std::string group_legend(const GroupKey& groups, double x, double y);

// Topics: one bar a topic (its share of all tokens), labelled with its top words.
struct TopicBar {
  std::string label;  // "Topic 4"
  std::string words;  // "came, pounds, cost"
  double share = 0;
};
std::string topics_svg(const std::vector<TopicBar>& topics);

// Group profiles: rows are groups, columns topics; each cell the group's mean topic share with its interval.
struct ProfileCell {
  double mean = 0;
  double low = 0;       // NaN when the results carry no interval
  double high = 0;      // NaN when the results carry no interval
  int distinctive = 0;  // +1: distinctive for the group (share higher), -1: lower, 0: neither
};
struct ProfileHeatmap {
  std::vector<std::string> groups;
  std::vector<std::string> topics;              // column labels, "1".."K"
  std::vector<std::vector<ProfileCell>> cells;  // [group][topic]
  std::string interval_note;                    // "95% bootstrap interval" or ""
};
std::string profiles_svg(const ProfileHeatmap& heatmap);

// A permutation test's null distribution: counts of the permuted statistics in equal-width bins over
// [low, high], with the observed statistic marked (the axis widens to show it when it lies outside).
struct NullHistogram {
  std::string figure_name;  // data-figure value, "null-..."
  std::string title;        // "PERMANOVA, all groups (chain 1)"
  std::string statistic_name;
  double low = 0;
  double high = 1;
  std::vector<double> counts;
  double observed = 0;
  std::string summary;  // one sentence: p-value, effect size, permutations
};
std::string null_histogram_svg(const NullHistogram& histogram);

// The horizontal extent [from, to] the histogram's axis shows: [low, high] widened to hold the observed value.
struct AxisRange {
  double from = 0;
  double to = 1;
};
AxisRange null_histogram_axis(const NullHistogram& histogram);

// Attribution: a row per disputed document, a marker per candidate at its p-value (median over chains, a
// line for the range), the rejection level as a dashed line, and the verdict with its agreement.
struct CandidateEvidence {
  std::string group;
  double p_median = 0, p_min = 0, p_max = 0;
};
struct AttributionRow {
  std::string document;
  std::vector<CandidateEvidence> candidates;
  std::string verdict;
  std::string agreement;  // "2 of 2 chains"
};
std::string attribution_svg(const std::vector<AttributionRow>& rows, const GroupKey& groups, double none_level,
                            const std::string& none_label);

// Composite scans: a strip per text and chain along its tokens, each segment coloured by its nearest group
// (grey when none fits), change points as vertical lines with their p-values.
struct ScanSegment {
  double first_token = 0;
  double tokens = 0;
  std::string verdict;  // a group name, or the label for none
};
struct ScanChangePoint {
  double token = 0;
  double p_value = 0;
};
struct ScanStrip {
  std::string label;  // "dsp-02, chain 1"
  std::vector<ScanSegment> segments;
  std::vector<ScanChangePoint> change_points;
};
std::string scan_svg(const std::vector<ScanStrip>& strips, const GroupKey& groups);

// The similarity graph from its layout (x, y in [0, 1]), nodes coloured and shaped by group, each community
// behind its nodes as a light hull with its number.
struct GraphNode {
  std::string id;
  std::string group;  // empty: no group
  std::string community;
  double x = 0, y = 0;
};
struct GraphEdge {
  std::size_t source = 0, target = 0;
  double weight = 0;
};
std::string graph_svg(const std::vector<GraphNode>& nodes, const std::vector<GraphEdge>& edges, const GroupKey& groups,
                      const std::string& caption);

// Choosing the number of topics: four small panels against K (held-out perplexity, mean NPMI coherence,
// redundant topic pairs, share of stable topics), the suggested K as a dashed line (class="suggested") in each.
struct TopicCountPoint {
  double topic_count = 0;
  double perplexity = 0;
  double mean_npmi = 0;
  double redundant_pairs = 0;
  double stable_share = 0;  // 0..1
};
std::string topic_count_sweep_svg(const std::vector<TopicCountPoint>& points, double suggested);

}  // namespace loupe::report

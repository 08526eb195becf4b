#include "report/report_figures.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <utility>

#include "report/html_text.h"
#include "report/report_palette.h"

namespace loupe::report {

namespace {

std::string px(double value) { return format_fixed(value, 1); }

// The opening tag of a figure with its text alternative; close with "</svg>".
std::string svg_open(const std::string& figure, double width, double height, const std::string& title,
                     const std::string& description) {
  const std::string id = "figure-" + figure;
  return "<svg data-figure=\"" + escape_html(figure) + "\" role=\"img\" aria-labelledby=\"" + id + "-title " + id +
         "-desc\" viewBox=\"0 0 " + px(width) + " " + px(height) + "\" width=\"" + px(width) + "\" height=\"" +
         px(height) + "\" font-family=\"system-ui, sans-serif\" font-size=\"12\"><title id=\"" + id + "-title\">" +
         escape_html(title) + "</title><desc id=\"" + id + "-desc\">" + escape_html(description) + "</desc>";
}

std::string text_at(double x, double y, const std::string& text, const std::string& attributes = "") {
  return "<text x=\"" + px(x) + "\" y=\"" + px(y) + "\"" + (attributes.empty() ? "" : " " + attributes) + ">" +
         escape_html(text) + "</text>";
}

std::string line(double x1, double y1, double x2, double y2, const std::string& attributes) {
  return "<line x1=\"" + px(x1) + "\" y1=\"" + px(y1) + "\" x2=\"" + px(x2) + "\" y2=\"" + px(y2) + "\" " + attributes +
         "/>";
}

std::string rect(double x, double y, double width, double height, const std::string& attributes,
                 const std::string& inner = "") {
  const std::string open = "<rect x=\"" + px(x) + "\" y=\"" + px(y) + "\" width=\"" + px(std::max(0.0, width)) +
                           "\" height=\"" + px(std::max(0.0, height)) + "\" " + attributes;
  return inner.empty() ? open + "/>" : open + ">" + inner + "</rect>";
}

// A rough width of TEXT at 12px in a sans-serif face, for margins (UTF-8 continuation bytes not counted).
double text_width(const std::string& text) {
  double characters = 0;
  for (const char c : text) {
    if ((static_cast<unsigned char>(c) & 0xC0) != 0x80) characters += 1;
  }
  return characters * 6.8;
}

std::string shorten(const std::string& text, std::size_t characters) {
  if (text.size() <= characters) return text;
  std::size_t cut = characters;
  while (cut > 0 && (static_cast<unsigned char>(text[cut]) & 0xC0) == 0x80) --cut;
  return text.substr(0, cut) + "\u2026";
}

}  // namespace

std::size_t GroupKey::index_of(const std::string& name) {
  if (const auto found = find(name)) return *found;
  names.push_back(name);
  return names.size() - 1;
}

std::optional<std::size_t> GroupKey::find(const std::string& name) const {
  const auto it = std::find(names.begin(), names.end(), name);
  if (it == names.end()) return std::nullopt;
  return static_cast<std::size_t>(it - names.begin());
}

std::string GroupKey::colour_of(const std::string& name) const {
  const auto found = find(name);
  return found ? group_colour(*found) : std::string(kNoGroupColour);
}

std::string group_marker(std::size_t group, double x, double y, double radius, const std::string& fill,
                         const std::string& extra_attributes) {
  const std::string paint = "fill=\"" + fill + "\"" + (extra_attributes.empty() ? "" : " " + extra_attributes);
  switch (group % kShapeNames.size()) {
    case 0:
      return "<circle cx=\"" + px(x) + "\" cy=\"" + px(y) + "\" r=\"" + px(radius) + "\" " + paint + "/>";
    case 1: {
      const double side = radius * 1.7;
      return rect(x - side / 2, y - side / 2, side, side, paint);
    }
    case 2: {
      const double r = radius * 1.25;
      return "<polygon points=\"" + px(x) + "," + px(y - r) + " " + px(x + r * 0.866) + "," + px(y + r * 0.5) + " " +
             px(x - r * 0.866) + "," + px(y + r * 0.5) + "\" " + paint + "/>";
    }
    default: {
      const double r = radius * 1.3;
      return "<polygon points=\"" + px(x) + "," + px(y - r) + " " + px(x + r) + "," + px(y) + " " + px(x) + "," +
             px(y + r) + " " + px(x - r) + "," + px(y) + "\" " + paint + "/>";
    }
  }
}

std::string group_legend(const GroupKey& groups, double x, double y) {
  std::string out = "<g class=\"legend\">";
  for (std::size_t g = 0; g < groups.names.size(); ++g) {
    const double row = y + 18.0 * static_cast<double>(g);
    out += group_marker(g, x + 6, row - 4, 5, group_colour(g));
    out += text_at(x + 18, row, groups.names[g]);
  }
  return out + "</g>";
}

std::string topics_svg(const std::vector<TopicBar>& topics) {
  const double width = 760, row = 22, top = 28, label_width = 80, bar_width = 240;
  const double height = top + row * static_cast<double>(topics.size()) + 12;
  double largest = 0;
  std::size_t largest_index = 0;
  for (std::size_t t = 0; t < topics.size(); ++t) {
    if (topics[t].share > largest) {
      largest = topics[t].share;
      largest_index = t;
    }
  }
  std::string description = std::to_string(topics.size()) +
                            " topics as horizontal bars, each as long as the topic's "
                            "share of all tokens, with its most probable words.";
  if (!topics.empty()) {
    description += " The largest is " + topics[largest_index].label + " (" + format_percent(largest) + ": " +
                   topics[largest_index].words + ").";
  }
  std::string out = svg_open("topics", width, height, "Topics: share of all tokens and top words", description);
  out += text_at(label_width, 16, "share of all tokens", "font-weight=\"bold\"");
  out += text_at(label_width + bar_width + 60, 16, "most probable words", "font-weight=\"bold\"");
  for (std::size_t t = 0; t < topics.size(); ++t) {
    const double y = top + row * static_cast<double>(t);
    const double length = largest > 0 ? bar_width * topics[t].share / largest : 0;
    out += text_at(label_width - 8, y + 14, topics[t].label, "text-anchor=\"end\"");
    out += rect(label_width, y + 3, length, row - 6, "class=\"bar\" fill=\"#0072B2\"",
                "<title>" + escape_html(topics[t].label + ": " + format_percent(topics[t].share)) + "</title>");
    out += text_at(label_width + length + 4, y + 14, format_percent(topics[t].share));
    out += text_at(label_width + bar_width + 60, y + 14, shorten(topics[t].words, 64));
  }
  return out + "</svg>";
}

std::string profiles_svg(const ProfileHeatmap& heatmap) {
  const std::size_t rows = heatmap.groups.size();
  const std::size_t columns = heatmap.topics.size();
  double label_width = 60;
  for (const auto& g : heatmap.groups) label_width = std::max(label_width, text_width(g) + 16);
  label_width = std::min(label_width, 240.0);
  const double cell_width = columns ? std::clamp(700.0 / static_cast<double>(columns), 30.0, 64.0) : 30;
  const double cell_height = 38, top = 34;
  const double width = label_width + cell_width * static_cast<double>(columns) + 20;
  const double legend_top = top + cell_height * static_cast<double>(rows) + 22;
  const double height = legend_top + 46;
  double largest = 0;
  std::string top_cell;
  for (std::size_t g = 0; g < rows; ++g) {
    for (std::size_t k = 0; k < columns && k < heatmap.cells[g].size(); ++k) {
      if (heatmap.cells[g][k].mean > largest) {
        largest = heatmap.cells[g][k].mean;
        top_cell = heatmap.groups[g] + " on topic " + heatmap.topics[k];
      }
    }
  }
  std::string description = "Heat map of " + std::to_string(rows) + " groups (rows) by " + std::to_string(columns) +
                            " topics (columns): each cell's darkness and number give the group's mean share of the "
                            "topic in percent";
  if (!heatmap.interval_note.empty()) description += ", the thick mark under the number its " + heatmap.interval_note;
  description +=
      ". Up and down triangles mark topics distinctive for the group (share higher or lower than in the "
      "other groups).";
  if (largest > 0) description += " The largest share is " + format_percent(largest) + ", " + top_cell + ".";
  std::string out = svg_open("profiles", width, height, "Group profiles: mean topic shares", description);
  for (std::size_t k = 0; k < columns; ++k) {
    out += text_at(label_width + cell_width * (static_cast<double>(k) + 0.5), top - 8, heatmap.topics[k],
                   "text-anchor=\"middle\"");
  }
  const bool wide = cell_width >= 40;
  for (std::size_t g = 0; g < rows; ++g) {
    const double y = top + cell_height * static_cast<double>(g);
    out += text_at(label_width - 8, y + cell_height / 2 + 4, shorten(heatmap.groups[g], 34), "text-anchor=\"end\"");
    for (std::size_t k = 0; k < columns && k < heatmap.cells[g].size(); ++k) {
      const ProfileCell& cell = heatmap.cells[g][k];
      const double x = label_width + cell_width * static_cast<double>(k);
      const double t = largest > 0 ? cell.mean / largest : 0;
      std::string tip = heatmap.groups[g] + ", topic " + heatmap.topics[k] + ": " + format_percent(cell.mean);
      const bool has_interval = std::isfinite(cell.low) && std::isfinite(cell.high);
      if (has_interval) {
        tip += " (" + heatmap.interval_note + " " + format_percent(cell.low) + " to " + format_percent(cell.high) + ")";
      }
      if (cell.distinctive > 0) tip += "; distinctive: higher than in the other groups";
      if (cell.distinctive < 0) tip += "; distinctive: lower than in the other groups";
      out += rect(x, y, cell_width, cell_height,
                  "class=\"cell\" data-group=\"" + std::to_string(g) + "\" data-topic=\"" + std::to_string(k) +
                      "\" fill=\"" + ramp_colour(t) + "\" stroke=\"#ffffff\"",
                  "<title>" + escape_html(tip) + "</title>");
      const char* ink = ramp_text_colour(t);
      out += text_at(x + cell_width / 2, y + 17, format_fixed(100 * cell.mean, wide ? 1 : 0),
                     "text-anchor=\"middle\" font-size=\"11\" fill=\"" + std::string(ink) + "\"");
      if (has_interval && largest > 0) {
        const double inner = cell_width - 8;
        const double from = x + 4 + inner * std::clamp(cell.low / largest, 0.0, 1.0);
        const double to = x + 4 + inner * std::clamp(cell.high / largest, 0.0, 1.0);
        // A track from 0 to the largest share, and on it the interval.
        out += line(x + 4, y + cell_height - 9, x + 4 + inner, y + cell_height - 9,
                    "stroke=\"" + std::string(ink) + "\" stroke-opacity=\"0.3\" stroke-width=\"1\"");
        out += line(from, y + cell_height - 9, std::max(to, from + 2), y + cell_height - 9,
                    "class=\"interval\" stroke=\"" + std::string(ink) + "\" stroke-width=\"3\"");
      }
      if (cell.distinctive != 0) {
        out += text_at(x + cell_width - 3, y + 10, cell.distinctive > 0 ? "\u25B2" : "\u25BC",
                       "class=\"distinctive\" text-anchor=\"end\" font-size=\"9\" fill=\"" + std::string(ink) + "\"");
      }
    }
  }
  // Legend: five steps of the ramp from 0 to the largest share.
  out += text_at(label_width, legend_top, "mean share of the topic (%):");
  for (int step = 0; step <= 4; ++step) {
    const double t = step / 4.0;
    const double x = label_width + 180 + 52.0 * step;
    out += rect(x, legend_top - 12, 50, 16, "fill=\"" + ramp_colour(t) + "\" stroke=\"#cccccc\"");
    out += text_at(x + 25, legend_top + 18, format_fixed(100 * largest * t, 1), "text-anchor=\"middle\"");
  }
  return out + "</svg>";
}

AxisRange null_histogram_axis(const NullHistogram& histogram) {
  AxisRange range{std::min(histogram.low, histogram.observed), std::max(histogram.high, histogram.observed)};
  if (!(range.to > range.from)) {
    range.from -= 0.5;
    range.to += 0.5;
  }
  // Room beside an observed value that lies outside the permuted ones, so its marker is not on the frame.
  const double span = range.to - range.from;
  if (histogram.observed > histogram.high) range.to += 0.04 * span;
  if (histogram.observed < histogram.low) range.from -= 0.04 * span;
  return range;
}

std::string null_histogram_svg(const NullHistogram& histogram) {
  const double width = 540, height = 230, left = 56, right = 24, top = 34, bottom = 46;
  const double plot_width = width - left - right, plot_height = height - top - bottom;
  const AxisRange axis = null_histogram_axis(histogram);
  const auto to_x = [&](double value) { return left + plot_width * (value - axis.from) / (axis.to - axis.from); };
  double most = 0, total = 0;
  for (const double c : histogram.counts) {
    most = std::max(most, c);
    total += c;
  }
  const std::string description = "Histogram of the " + format_number(total, 6) + " permuted values of " +
                                  histogram.statistic_name + " in " + std::to_string(histogram.counts.size()) +
                                  " bins from " + format_number(histogram.low, 4) + " to " +
                                  format_number(histogram.high, 4) + "; the dashed line marks the observed value " +
                                  format_number(histogram.observed, 4) + ". " + histogram.summary;
  std::string out =
      svg_open(histogram.figure_name, width, height, "Null distribution: " + histogram.title, description);
  out += text_at(left, 18, shorten(histogram.title, 70), "font-weight=\"bold\"");
  const double bins = static_cast<double>(histogram.counts.size());
  const double bin_width = bins > 0 ? (histogram.high - histogram.low) / bins : 0;
  for (std::size_t b = 0; b < histogram.counts.size(); ++b) {
    const double from = histogram.low + bin_width * static_cast<double>(b);
    const double x0 = to_x(from), x1 = to_x(from + bin_width);
    const double h = most > 0 ? plot_height * histogram.counts[b] / most : 0;
    out += rect(x0, top + plot_height - h, std::max(0.5, x1 - x0 - 0.5), h,
                "class=\"bar\" data-bin=\"" + std::to_string(b) + "\" data-count=\"" +
                    format_number(histogram.counts[b], 12) + "\" fill=\"#56B4E9\"",
                "<title>" +
                    escape_html(format_number(from, 4) + " to " + format_number(from + bin_width, 4) + ": " +
                                format_number(histogram.counts[b], 12) + " permutations") +
                    "</title>");
  }
  // Axes: the baseline with three ticks, and the tallest bar's count.
  out += line(left, top + plot_height, left + plot_width, top + plot_height, "stroke=\"#333333\"");
  for (int tick = 0; tick <= 2; ++tick) {
    const double value = axis.from + (axis.to - axis.from) * tick / 2.0;
    const double x = to_x(value);
    out += line(x, top + plot_height, x, top + plot_height + 4, "stroke=\"#333333\"");
    out += text_at(x, top + plot_height + 16, format_number(value, 3), "text-anchor=\"middle\"");
  }
  out += text_at(left + plot_width / 2, height - 8, shorten(histogram.statistic_name, 80), "text-anchor=\"middle\"");
  out += text_at(left - 6, top + 8, format_number(most, 6), "text-anchor=\"end\"");
  out += text_at(left - 6, top + plot_height, "0", "text-anchor=\"end\"");
  const double marker = to_x(histogram.observed);
  out += line(marker, top - 6, marker, top + plot_height,
              "class=\"observed\" data-value=\"" + format_number(histogram.observed, 12) +
                  "\" stroke=\"#D55E00\" stroke-width=\"2.5\" stroke-dasharray=\"6 3\"");
  const bool label_left = marker > left + plot_width * 0.6;
  out += text_at(marker + (label_left ? -6 : 6), top + 4, "observed " + format_number(histogram.observed, 4),
                 std::string("fill=\"#D55E00\" font-weight=\"bold\"") + (label_left ? " text-anchor=\"end\"" : ""));
  return out + "</svg>";
}

std::string attribution_svg(const std::vector<AttributionRow>& rows, const GroupKey& groups, double none_level,
                            const std::string& none_label) {
  double label_width = 80;
  for (const auto& r : rows) label_width = std::max(label_width, text_width(r.document) + 16);
  label_width = std::min(label_width, 200.0);
  const double plot_width = 340, verdict_width = 280, top = 44, row = 30;
  const double width = label_width + plot_width + verdict_width;
  const double legend_top = top + row * static_cast<double>(rows.size()) + 30;
  const double height = legend_top + 18.0 * static_cast<double>(groups.names.size()) + 10;
  const auto to_x = [&](double p) { return label_width + plot_width * std::clamp(p, 0.0, 1.0); };
  std::size_t none_count = 0;
  for (const auto& r : rows) none_count += r.verdict == none_label;
  const std::string description =
      std::to_string(rows.size()) +
      " disputed documents (rows); for each candidate group a marker at its p-value "
      "(median over chains; the line through it spans the chains' range), on a scale from 0 to 1. A candidate whose "
      "p-value is at or below the dashed line at " +
      format_number(none_level) +
      " is rejected. At the right: the "
      "verdict and how many chains agree. " +
      std::to_string(none_count) +
      " documents are judged to resemble none of "
      "the candidates.";
  std::string out = svg_open("attribution", width, height, "Attribution of the disputed documents", description);
  out += text_at(label_width, 16, "p-value of each candidate group", "font-weight=\"bold\"");
  out += text_at(label_width + plot_width + 16, 16, "verdict (agreement)", "font-weight=\"bold\"");
  const double axis_y = top - 10;
  out += line(label_width, axis_y, label_width + plot_width, axis_y, "stroke=\"#333333\"");
  for (int tick = 0; tick <= 4; ++tick) {
    const double p = tick / 4.0;
    out += line(to_x(p), axis_y - 4, to_x(p), axis_y, "stroke=\"#333333\"");
    out += text_at(to_x(p), axis_y - 7, format_number(p, 2), "text-anchor=\"middle\" font-size=\"10\"");
  }
  const double bottom = top + row * static_cast<double>(rows.size());
  out += line(to_x(none_level), axis_y, to_x(none_level), bottom,
              "class=\"none-level\" stroke=\"#D55E00\" stroke-dasharray=\"4 3\"");
  for (std::size_t i = 0; i < rows.size(); ++i) {
    const AttributionRow& r = rows[i];
    const double y = top + row * static_cast<double>(i);
    if (i % 2 == 0) out += rect(0, y, width, row, "fill=\"#f4f4f4\"");
    out += text_at(label_width - 8, y + row / 2 + 4, shorten(r.document, 28), "text-anchor=\"end\"");
    const double spread = r.candidates.size() > 1 ? 14.0 / static_cast<double>(r.candidates.size() - 1) : 0;
    out += "<g class=\"document\" data-document=\"" + escape_html(r.document) + "\">";
    for (std::size_t c = 0; c < r.candidates.size(); ++c) {
      const CandidateEvidence& e = r.candidates[c];
      const double cy = y + 8 + spread * static_cast<double>(c) + (r.candidates.size() == 1 ? 7 : 0);
      const auto group = groups.find(e.group);
      const std::string colour = groups.colour_of(e.group);
      out +=
          line(to_x(e.p_min), cy, to_x(std::max(e.p_max, e.p_min)), cy, "stroke=\"" + colour + "\" stroke-width=\"2\"");
      out += group_marker(group.value_or(0), to_x(e.p_median), cy, 4.5, colour,
                          "class=\"candidate\" stroke=\"#ffffff\" stroke-width=\"0.5\"");
    }
    out += "</g>";
    const std::string verdict = r.verdict + (r.agreement.empty() ? "" : " (" + r.agreement + ")");
    out += text_at(label_width + plot_width + 16, y + row / 2 + 4, shorten(verdict, 44),
                   r.verdict == none_label ? "font-style=\"italic\"" : "");
  }
  out += group_legend(groups, label_width, legend_top);
  return out + "</svg>";
}

std::string scan_svg(const std::vector<ScanStrip>& strips, const GroupKey& groups) {
  double label_width = 80;
  for (const auto& s : strips) label_width = std::max(label_width, text_width(s.label) + 16);
  label_width = std::min(label_width, 220.0);
  const double strip_width = 540, strip_height = 20, row = 58, top = 20;
  const double width = label_width + strip_width + 30;
  const double legend_top = top + row * static_cast<double>(strips.size()) + 10;
  const double height = legend_top + 18.0 * static_cast<double>(groups.names.size() + 1) + 6;
  std::size_t with_change = 0;
  for (const auto& s : strips) with_change += !s.change_points.empty();
  const std::string description =
      std::to_string(strips.size()) +
      " strips, one per text and chain, each along the text's tokens: every segment "
      "is coloured by the group it resembles most (grey: none of them), and vertical lines mark change points with "
      "their p-values. " +
      std::to_string(with_change) + " of the strips have at least one change point.";
  std::string out = svg_open("scan", width, height, "Composite scans: segments along each text", description);
  for (std::size_t i = 0; i < strips.size(); ++i) {
    const ScanStrip& s = strips[i];
    const double y = top + row * static_cast<double>(i) + 14;
    double total = 0;
    for (const auto& seg : s.segments) total = std::max(total, seg.first_token + seg.tokens);
    const auto to_x = [&](double token) { return label_width + (total > 0 ? strip_width * token / total : 0); };
    out += text_at(label_width - 8, y + 14, shorten(s.label, 30), "text-anchor=\"end\"");
    out += "<g class=\"strip\" data-strip=\"" + escape_html(s.label) + "\">";
    for (const auto& seg : s.segments) {
      const auto group = groups.find(seg.verdict);
      const std::string fill = group ? group_colour(*group) : std::string(kNoGroupColour);
      out += rect(to_x(seg.first_token), y, to_x(seg.first_token + seg.tokens) - to_x(seg.first_token), strip_height,
                  "class=\"segment\" fill=\"" + fill + "\" stroke=\"#ffffff\"",
                  "<title>" +
                      escape_html("tokens " + format_number(seg.first_token, 9) + " to " +
                                  format_number(seg.first_token + seg.tokens, 9) + ": " + seg.verdict) +
                      "</title>");
      if (group) {
        // The group's marker repeats its colour for readers who cannot tell the colours apart.
        const double middle = (to_x(seg.first_token) + to_x(seg.first_token + seg.tokens)) / 2;
        out += group_marker(*group, middle, y + strip_height / 2, 3, "#ffffff");
      }
    }
    for (const auto& change : s.change_points) {
      const double x = to_x(change.token);
      out += line(x, y - 6, x, y + strip_height + 6,
                  "class=\"change-point\" data-token=\"" + format_number(change.token, 9) +
                      "\" stroke=\"#000000\" stroke-width=\"2.5\"");
      out += text_at(x + 4, y - 3, "change, p " + format_number(change.p_value), "font-size=\"10\"");
    }
    out += "</g>";
    out += text_at(label_width, y + strip_height + 14, "0", "font-size=\"10\"");
    out += text_at(label_width + strip_width, y + strip_height + 14, format_number(total, 9) + " tokens",
                   "font-size=\"10\" text-anchor=\"end\"");
  }
  out += group_legend(groups, label_width, legend_top);
  const double none_row = legend_top + 18.0 * static_cast<double>(groups.names.size());
  out += rect(label_width + 1, none_row - 9, 10, 10, "fill=\"" + std::string(kNoGroupColour) + "\"");
  out += text_at(label_width + 18, none_row, "none of the candidates");
  return out + "</svg>";
}

namespace {

// Andrew's monotone chain: the convex hull of POINTS, counter-clockwise.
std::vector<std::pair<double, double>> convex_hull(std::vector<std::pair<double, double>> points) {
  std::sort(points.begin(), points.end());
  points.erase(std::unique(points.begin(), points.end()), points.end());
  if (points.size() < 3) return points;
  const auto cross = [](const auto& o, const auto& a, const auto& b) {
    return (a.first - o.first) * (b.second - o.second) - (a.second - o.second) * (b.first - o.first);
  };
  std::vector<std::pair<double, double>> hull(2 * points.size());
  std::size_t k = 0;
  for (const auto& p : points) {
    while (k >= 2 && cross(hull[k - 2], hull[k - 1], p) <= 0) --k;
    hull[k++] = p;
  }
  for (std::size_t i = points.size() - 1, lower = k + 1; i-- > 0;) {
    while (k >= lower && cross(hull[k - 2], hull[k - 1], points[i]) <= 0) --k;
    hull[k++] = points[i];
  }
  hull.resize(k - 1);
  return hull;
}

}  // namespace

std::string graph_svg(const std::vector<GraphNode>& nodes, const std::vector<GraphEdge>& edges, const GroupKey& groups,
                      const std::string& caption) {
  const double size = 720, margin = 24;
  const double legend_top = size + 10;
  const double height = legend_top + 18.0 * static_cast<double>(groups.names.size() + 1) + 6;
  const auto to_x = [&](double x) { return margin + (size - 2 * margin) * std::clamp(x, 0.0, 1.0); };
  const auto to_y = [&](double y) { return margin + (size - 2 * margin) * std::clamp(y, 0.0, 1.0); };
  std::map<std::string, std::vector<std::pair<double, double>>> communities;
  for (const auto& n : nodes) communities[n.community].emplace_back(to_x(n.x), to_y(n.y));
  std::string out = svg_open("graph", size, height, "Similarity graph", caption);
  out += "<g class=\"communities\">";
  for (const auto& [community, points] : communities) {
    if (community.empty()) continue;
    const auto hull = convex_hull(points);
    if (hull.size() >= 3) {
      std::string polygon;
      for (const auto& [x, y] : hull) polygon += (polygon.empty() ? "" : " ") + px(x) + "," + px(y);
      out += "<polygon class=\"community\" points=\"" + polygon +
             "\" fill=\"#000000\" fill-opacity=\"0.04\" stroke=\"#777777\" stroke-dasharray=\"3 3\"><title>" +
             escape_html("community " + community + ": " + std::to_string(points.size()) + " documents") +
             "</title></polygon>";
    }
  }
  out += "</g><g class=\"edges\" stroke=\"#888888\" stroke-opacity=\"0.25\" stroke-width=\"0.6\">";
  for (const auto& e : edges) {
    out += line(to_x(nodes[e.source].x), to_y(nodes[e.source].y), to_x(nodes[e.target].x), to_y(nodes[e.target].y), "");
  }
  out += "</g><g class=\"nodes\" stroke=\"#ffffff\" stroke-width=\"0.6\">";
  for (const auto& n : nodes) {
    const auto group = groups.find(n.group);
    out += group_marker(group.value_or(0), to_x(n.x), to_y(n.y), 3.6,
                        group ? group_colour(*group) : std::string(kNoGroupColour), "class=\"node\"");
  }
  out += "</g><g class=\"community-labels\">";
  for (const auto& [community, points] : communities) {
    if (community.empty() || points.empty()) continue;
    double x = 0, y = 0;
    for (const auto& p : points) {
      x += p.first;
      y += p.second;
    }
    x /= static_cast<double>(points.size());
    y /= static_cast<double>(points.size());
    out += text_at(x, y, "community " + community,
                   "text-anchor=\"middle\" font-weight=\"bold\" fill=\"#000000\" stroke=\"#ffffff\" "
                   "stroke-width=\"3\" paint-order=\"stroke\"");
  }
  out += "</g>";
  out += group_legend(groups, margin, legend_top + 12);
  const double none_row = legend_top + 12 + 18.0 * static_cast<double>(groups.names.size());
  out +=
      "<circle cx=\"" + px(margin + 6) + "\" cy=\"" + px(none_row - 4) + "\" r=\"4\" fill=\"" + kNoGroupColour + "\"/>";
  out += text_at(margin + 18, none_row, "no group (disputed or unlabelled)");
  return out + "</svg>";
}

std::string topic_count_sweep_svg(const std::vector<TopicCountPoint>& points, double suggested) {
  struct Panel {
    std::string name;
    double TopicCountPoint::*value;
    bool percent;
  };
  const std::vector<Panel> panels = {
      {"held-out perplexity (lower fits better)", &TopicCountPoint::perplexity, false},
      {"mean NPMI coherence (higher is more coherent)", &TopicCountPoint::mean_npmi, false},
      {"redundant topic pairs", &TopicCountPoint::redundant_pairs, false},
      {"topics stable across chains", &TopicCountPoint::stable_share, true}};
  const double panel_width = 360, panel_height = 170, left = 56, top = 30, gap_x = 30, gap_y = 44;
  const double width = 2 * (left + panel_width) + gap_x;
  const double height = 2 * (top + panel_height + gap_y);
  double k_low = 0, k_high = 1;
  if (!points.empty()) {
    k_low = points.front().topic_count;
    k_high = points.front().topic_count;
    for (const auto& p : points) {
      k_low = std::min(k_low, p.topic_count);
      k_high = std::max(k_high, p.topic_count);
    }
  }
  if (k_high == k_low) {
    k_low -= 1;
    k_high += 1;
  }
  std::string description = "Four panels against the number of topics K (" + std::to_string(points.size()) +
                            " values from " + format_number(k_low, 4) + " to " + format_number(k_high, 4) +
                            "): held-out perplexity, mean NPMI coherence of the topics' top words, pairs of "
                            "near-duplicate topics, and the share of topics that recur across chains.";
  if (suggested > 0) description += " A dashed line marks the suggested K = " + format_number(suggested, 4) + ".";
  std::string out = svg_open("topic-count-sweep", width, height, "Choosing the number of topics", description);
  for (std::size_t i = 0; i < panels.size(); ++i) {
    const Panel& panel = panels[i];
    const double x0 = left + static_cast<double>(i % 2) * (left + panel_width + gap_x);
    const double y0 = top + static_cast<double>(i / 2) * (top + panel_height + gap_y);
    // The axis: 0..100% for the share, from 0 for the count of pairs, the values' range (padded) otherwise.
    double smallest = INFINITY, largest = -INFINITY;
    for (const auto& p : points) {
      const double v = p.*panel.value;
      if (!std::isfinite(v)) continue;
      smallest = std::min(smallest, v);
      largest = std::max(largest, v);
    }
    double low = 0, high = 1;
    if (!panel.percent && std::isfinite(smallest)) {
      const bool from_zero = panel.value == &TopicCountPoint::redundant_pairs;
      const double pad = 0.05 * std::max(largest - smallest, 1e-9);
      low = from_zero ? 0 : smallest - pad;
      high = std::max(largest + pad, low + (from_zero ? 1 : 1e-6));
    }
    const auto x_of = [&](double k) { return x0 + panel_width * (k - k_low) / (k_high - k_low); };
    const auto y_of = [&](double v) { return y0 + panel_height * (1 - (v - low) / (high - low)); };
    out += text_at(x0, y0 - 10, panel.name, "font-weight=\"bold\"");
    out += rect(x0, y0, panel_width, panel_height, "fill=\"none\" stroke=\"#999999\"");
    const auto label = [&](double v) { return panel.percent ? format_percent(v) : format_number(v, 3); };
    out += text_at(x0 - 4, y0 + 4, label(high), "text-anchor=\"end\" font-size=\"10\"");
    out += text_at(x0 - 4, y0 + panel_height, label(low), "text-anchor=\"end\" font-size=\"10\"");
    for (const auto& p : points) {
      out += text_at(x_of(p.topic_count), y0 + panel_height + 14, format_number(p.topic_count, 4),
                     "text-anchor=\"middle\" font-size=\"10\"");
    }
    out += text_at(x0 + panel_width / 2, y0 + panel_height + 28, "number of topics K", "text-anchor=\"middle\"");
    if (suggested > 0) {
      out += line(x_of(suggested), y0, x_of(suggested), y0 + panel_height,
                  "class=\"suggested\" stroke=\"#D55E00\" stroke-dasharray=\"5 4\"");
    }
    std::string path;
    for (const auto& p : points) {
      const double v = p.*panel.value;
      if (!std::isfinite(v)) continue;
      path += (path.empty() ? "M" : " L") + px(x_of(p.topic_count)) + " " + px(y_of(v));
    }
    if (!path.empty()) out += "<path d=\"" + path + "\" fill=\"none\" stroke=\"#0072B2\" stroke-width=\"2\"/>";
    for (const auto& p : points) {
      const double v = p.*panel.value;
      if (!std::isfinite(v)) continue;
      out += "<circle cx=\"" + px(x_of(p.topic_count)) + "\" cy=\"" + px(y_of(v)) +
             "\" r=\"3.5\" fill=\"#0072B2\"><title>" +
             escape_html("K = " + format_number(p.topic_count, 4) + ": " + label(v)) + "</title></circle>";
    }
  }
  return out + "</svg>";
}

}  // namespace loupe::report

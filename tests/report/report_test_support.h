// Helpers for the study report's tests: results JSON to render (the demo fixture, small hand-made sections)
// and plain-text probes of the HTML it gives (one figure's SVG, counts, attribute values).
#pragma once

#include <fstream>
#include <regex>
#include <sstream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

namespace loupe::testing {

// fixtures/report/demo-results.json: what the loupe commands wrote on the demo (fixtures/report/make_demo_results.py).
inline nlohmann::json demo_results() {
  std::ifstream in(std::string(LOUPE_SOURCE_DIR) + "/fixtures/report/demo-results.json");
  std::stringstream text;
  text << in.rdbuf();
  return nlohmann::json::parse(text.str());
}

inline nlohmann::json minimal_provenance() {
  return {{"loupe_version", "0.1.0"},
          {"command", "loupe analyze demo -o study"},
          {"options", {{"topics", 16}}},
          {"seeds", {{"fit", 3}}},
          {"inputs", nlohmann::json::array({{{"path", "letters.csv"}, {"sha256", "ab12"}}})},
          {"started", "2024-05-01T10:00:00Z"},
          {"finished", "2024-05-01T10:01:00Z"}};
}

// A sample null distribution (the shape part B adds to a test record): 30 bins over [low, high] with a hump,
// counts summing to PERMUTATIONS give or take the rounding. Not from a real permutation run.
inline nlohmann::json sample_null_distribution(double low, double high, int permutations = 999) {
  std::vector<int> counts(30);
  double total = 0;
  for (int b = 0; b < 30; ++b) total += (b + 1) * (30 - b);
  for (int b = 0; b < 30; ++b) counts[b] = static_cast<int>(permutations * (b + 1) * (30 - b) / total);
  return {{"low", low}, {"high", high}, {"counts", counts}};
}

// The demo fixture with sample null distributions on chain 1's omnibus tests and the graph's group tests.
inline nlohmann::json demo_results_with_null_distributions() {
  nlohmann::json results = demo_results();
  for (auto& record : results["compare"]["chains"][0]["records"]) {
    const std::string method = record["method"];
    if (method == "PERMANOVA" || method == "PERMDISP" || method == "ANOSIM") {
      const double observed = record["statistic"];
      record["null_distribution"] = sample_null_distribution(0, observed * 0.05 + 1);
    }
  }
  for (auto& test : results["graph"]["chains"][0]["group_tests"]) {
    test["null_distribution"] = sample_null_distribution(-0.02, 0.02);
  }
  return results;
}

inline std::size_t count_of(const std::string& text, const std::string& needle) {
  std::size_t n = 0;
  for (std::size_t at = text.find(needle); at != std::string::npos; at = text.find(needle, at + needle.size())) ++n;
  return n;
}

// The <svg data-figure="NAME" ...>...</svg> element of HTML, or "" when there is none.
inline std::string figure_svg(const std::string& html, const std::string& name) {
  const auto begin = html.find("<svg data-figure=\"" + name + "\"");
  if (begin == std::string::npos) return "";
  const auto end = html.find("</svg>", begin);
  return html.substr(begin, end - begin + 6);
}

// Every data-figure name in HTML, in order.
inline std::vector<std::string> figure_names(const std::string& html) {
  std::vector<std::string> names;
  const std::regex pattern("<svg data-figure=\"([^\"]*)\"");
  for (auto it = std::sregex_iterator(html.begin(), html.end(), pattern); it != std::sregex_iterator(); ++it) {
    names.push_back((*it)[1]);
  }
  return names;
}

// The values of ATTRIBUTE on every element of FRAGMENT whose opening tag contains MARKER (e.g. class="bar").
inline std::vector<double> attribute_values(const std::string& fragment, const std::string& marker,
                                            const std::string& attribute) {
  std::vector<double> values;
  const std::regex tag("<[a-z]+ [^>]*>");
  const std::regex value(" " + attribute + "=\"([-0-9.e+]+)\"");
  for (auto it = std::sregex_iterator(fragment.begin(), fragment.end(), tag); it != std::sregex_iterator(); ++it) {
    const std::string text = it->str();
    if (text.find(marker) == std::string::npos) continue;
    std::smatch m;
    if (std::regex_search(text, m, value)) values.push_back(std::stod(m[1]));
  }
  return values;
}

// HTML's character references back to text (those the serialiser and escape_html write).
inline std::string unescape_html(std::string text) {
  const std::vector<std::pair<std::string, std::string>> entities{
      {"&quot;", "\""}, {"&#39;", "'"}, {"&lt;", "<"}, {"&gt;", ">"}, {"&nbsp;", "\u00a0"}, {"&amp;", "&"}};
  for (const auto& [entity, character] : entities) {
    for (auto at = text.find(entity); at != std::string::npos; at = text.find(entity, at + character.size())) {
      text.replace(at, entity.size(), character);
    }
  }
  return text;
}

}  // namespace loupe::testing

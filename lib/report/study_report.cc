#include "report/study_report.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <map>
#include <set>
#include <tuple>
#include <utility>
#include <vector>

#include "common/binary_io.h"
#include "common/error.h"
#include "report/attribution_cautions_copy.h"
#include "report/html_text.h"
#include "report/report_figures.h"
#include "report/report_palette.h"

namespace loupe {

namespace {

using nlohmann::json;
using report::escape_html;
using report::format_fixed;
using report::format_number;
using report::format_percent;

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();
// Distinctive topics are marked at this adjusted p-value (the level loupe compare's tables use).
constexpr double kDistinctiveLevel = 0.05;
constexpr const char* kNoneVerdict = "none of the candidates";
// Near-duplicate pairs listed in the report; the rest stay in the JSON.
constexpr std::size_t kPairsShown = 100;

// ---- Reading the results JSON -------------------------------------------------------------------------------

// KEY of OBJECT, or nullptr when OBJECT is not an object or KEY is missing or null.
const json* member(const json& object, const char* key) {
  if (!object.is_object()) return nullptr;
  const auto it = object.find(key);
  if (it == object.end() || it->is_null()) return nullptr;
  return &*it;
}

double number_of(const json& value) { return value.is_number() ? value.get<double>() : kNaN; }

double number(const json& object, const char* key) {
  const json* value = member(object, key);
  return value ? number_of(*value) : kNaN;
}

// Any JSON value as a reader wants to see it: strings as they are, integers whole, other numbers with four
// significant digits, arrays of plain values joined with commas.
std::string plain_text(const json& value) {
  if (value.is_null()) return "\u2013";
  if (value.is_string()) return value.get<std::string>();
  if (value.is_boolean()) return value.get<bool>() ? "yes" : "no";
  if (value.is_number_integer() || value.is_number_unsigned()) return value.dump();
  if (value.is_number()) return format_number(value.get<double>(), 4);
  if (value.is_array()) {
    bool plain = true;
    for (const auto& v : value) plain = plain && !v.is_structured();
    if (plain) {
      std::string out;
      for (const auto& v : value) out += (out.empty() ? "" : ", ") + plain_text(v);
      return out.empty() ? "(none)" : out;
    }
  }
  return value.dump();
}

std::string text(const json& object, const char* key, const std::string& otherwise = "") {
  const json* value = member(object, key);
  return value ? plain_text(*value) : otherwise;
}

const json& empty_array() {
  static const json empty = json::array();
  return empty;
}

const json& array_of(const json& object, const char* key) {
  const json* value = member(object, key);
  return value && value->is_array() ? *value : empty_array();
}

// "0.001 (0.001 to 0.004)" from a {"median", "min", "max"} summary across chains; one value when they agree.
std::string spread_text(const json* summary, int digits = 3) {
  if (!summary) return "\u2013";
  if (!summary->is_object()) return plain_text(*summary);
  const double median = number(*summary, "median"), low = number(*summary, "min"), high = number(*summary, "max");
  if (!std::isfinite(median)) return "\u2013";
  if (!(low < high)) return format_number(median, digits);
  return format_number(median, digits) + " (" + format_number(low, digits) + " to " + format_number(high, digits) + ")";
}

double median_of(std::vector<double> values) {
  values.erase(std::remove_if(values.begin(), values.end(), [](double v) { return !std::isfinite(v); }), values.end());
  if (values.empty()) return kNaN;
  std::sort(values.begin(), values.end());
  const std::size_t n = values.size();
  return n % 2 ? values[n / 2] : (values[n / 2 - 1] + values[n / 2]) / 2;
}

std::string range_text(const std::vector<double>& values, int digits = 3) {
  std::vector<double> finite;
  for (const double v : values)
    if (std::isfinite(v)) finite.push_back(v);
  if (finite.empty()) return "\u2013";
  const auto [low, high] = std::minmax_element(finite.begin(), finite.end());
  const std::string middle = format_number(median_of(finite), digits);
  if (!(*low < *high)) return middle;
  return middle + " (" + format_number(*low, digits) + " to " + format_number(*high, digits) + ")";
}

// "p <= 0.05 on 3 of 4 chains (most chains)" from a summary across chains; the chain count alone when the
// summary states no conclusion.
std::string conclusion_across_chains(const json& summary) {
  const double chains = number(summary, "chains");
  const double agreeing = number(summary, "chains_agreeing");
  const std::string conclusion = text(summary, "conclusion");
  const std::string count = std::isfinite(chains) ? format_number(chains) : "?";
  if (conclusion.empty() || !std::isfinite(agreeing)) return count + (count == "1" ? " chain" : " chains");
  return conclusion + " on " + format_number(agreeing) + " of " + count + " chains (" +
         text(summary, "agreement", "agreement not stated") + ")";
}

std::string of_chains(std::size_t agreeing, std::size_t chains) {
  return std::to_string(agreeing) + " of " + std::to_string(chains) + (chains == 1 ? " chain" : " chains");
}

// ---- Writing HTML -----------------------------------------------------------------------------------------

std::string cell(const std::string& content, bool number_cell = false) {
  return std::string(number_cell ? "<td class=\"number\">" : "<td>") + escape_html(content) + "</td>";
}

std::string header_row(const std::vector<std::string>& names) {
  std::string out = "<thead><tr>";
  for (const auto& n : names) out += "<th scope=\"col\">" + escape_html(n) + "</th>";
  return out + "</tr></thead>";
}

std::string paragraph(const std::string& content, const std::string& css_class = "") {
  return (css_class.empty() ? "<p>" : "<p class=\"" + css_class + "\">") + escape_html(content) + "</p>";
}

// A value for a table cell: plain values as text, a short structure as JSON, a long one named only.
std::string cell_text(const json& value) {
  std::string text = plain_text(value);
  if (value.is_structured() && text.size() > 120) return "(" + std::to_string(value.size()) + " entries: see the JSON)";
  return text;
}

void flatten_into(const json& object, const std::string& prefix,
                  std::vector<std::pair<std::string, std::string>>& rows) {
  for (const auto& [key, value] : object.items()) {
    if (value.is_object() && !value.empty()) {
      flatten_into(value, prefix + key + ".", rows);
    } else {
      rows.emplace_back(prefix + key, cell_text(value));
    }
  }
}

// A two-column table of KEY -> value; nested objects become dotted keys ("fit.seed").
std::string key_value_table(const json& object, const std::string& caption) {
  std::vector<std::pair<std::string, std::string>> rows;
  flatten_into(object, "", rows);
  std::string out = "<table class=\"key-value\"><caption>" + escape_html(caption) + "</caption><tbody>";
  for (const auto& [key, value] : rows)
    out += "<tr><th scope=\"row\">" + escape_html(key) + "</th>" + cell(value) + "</tr>";
  return out + "</tbody></table>";
}

// A table of an array of objects: one column per key, in first-seen order.
std::string records_table(const json& records, const std::string& caption) {
  std::vector<std::string> keys;
  for (const auto& r : records) {
    if (!r.is_object()) continue;
    for (const auto& [key, value] : r.items()) {
      if (std::find(keys.begin(), keys.end(), key) == keys.end()) keys.push_back(key);
    }
  }
  std::string out = "<table><caption>" + escape_html(caption) + "</caption>" + header_row(keys) + "<tbody>";
  for (const auto& r : records) {
    out += "<tr>";
    for (const auto& key : keys) out += cell(r.is_object() && r.contains(key) ? cell_text(r[key]) : "");
    out += "</tr>";
  }
  return out + "</tbody></table>";
}

std::string absent_note(const std::string& key, const std::string& how) {
  return "<p class=\"absent\" data-absent=\"" + escape_html(key) + "\">" +
         escape_html("Not in this study: the results hold no \"" + key + "\" section. " + how) + "</p>";
}

std::string cautions_block(const json* from_results) {
  std::vector<std::string> cautions;
  if (from_results && from_results->is_array()) {
    for (const auto& c : *from_results)
      if (c.is_string()) cautions.push_back(c.get<std::string>());
  }
  if (cautions.empty()) {
    for (const auto c : report::kAttributionCautionsCopy) cautions.emplace_back(c);
  }
  std::string out = "<aside class=\"cautions\" role=\"note\"><h3>Cautions</h3><ul>";
  for (const auto& c : cautions) out += "<li>" + escape_html(c) + "</li>";
  return out + "</ul></aside>";
}

// Where a figure goes: the SVG, its caption, then the table with the same numbers.
std::string figure(const std::string& svg, const std::string& caption, const std::string& table = "") {
  return "<figure>" + svg + "<figcaption>" + escape_html(caption) + "</figcaption></figure>" + table;
}

struct Section {
  std::string id;
  std::string heading;
  std::string body;
};

// ---- The study -------------------------------------------------------------------------------------------

class StudyReport {
 public:
  explicit StudyReport(const json& results) : results_(results) {}

  std::string render();

 private:
  void collect_groups();
  void collect_topic_labels();
  std::string figure_name(const std::string& wanted);

  Section conclusions_section();
  Section corpus_section();
  Section model_section();
  Section sweep_section();
  Section topics_section();
  Section profiles_section();
  Section tests_section();
  Section attribution_section();
  Section scan_section();
  Section graph_section();
  Section near_duplicates_section();
  Section provenance_section();

  // Group shares by topic: group -> K shares, from "topics.group_shares" or else compare's chain-1 profiles.
  std::vector<std::pair<std::string, std::vector<double>>> group_shares() const;
  std::string null_histogram(const json& record, const std::string& title);

  const json& results_;
  report::GroupKey groups_;
  std::vector<std::string> topic_words_;  // topic k (from 0) -> "word, word, word"
  std::set<std::string> figure_names_;
};

// Runs BUILD for one section and names the section when its JSON has the wrong shape.
template <typename Build>
Section guarded(const char* key, Build build) {
  try {
    return build();
  } catch (const json::exception& e) {
    throw Error(std::string("results JSON, section \"") + key + "\": " + e.what() +
                "; the section does not have the shape the loupe command that writes it gives (see "
                "lib/report/study_report.h)");
  }
}

void StudyReport::collect_groups() {
  // Colours follow the corpus's group order, then any group first seen elsewhere.
  if (const json* corpus = member(results_, "corpus")) {
    for (const auto& g : array_of(*corpus, "groups")) groups_.index_of(text(g, "group"));
  }
  if (const json* compare = member(results_, "compare")) {
    const json& chains = array_of(*compare, "chains");
    if (!chains.empty()) {
      if (const json* profiles = member(chains[0], "profiles")) {
        for (const auto& g : array_of(*profiles, "groups")) groups_.index_of(text(g, "group"));
      }
    }
  }
  if (const json* topics = member(results_, "topics")) {
    if (const json* shares = member(*topics, "group_shares")) {
      for (const auto& [name, values] : shares->items()) groups_.index_of(name);
    }
  }
  if (const json* attribution = member(results_, "attribution")) {
    for (const auto& g : array_of(*attribution, "groups")) groups_.index_of(text(g, "name"));
  }
  if (const json* scan = member(results_, "scan")) {
    if (const json* a = member(*scan, "attribution")) {
      for (const auto& g : array_of(*a, "groups"))
        if (g.is_string()) groups_.index_of(g.get<std::string>());
    }
  }
  if (const json* graph = member(results_, "graph")) {
    if (const json* drawing = member(*graph, "drawing")) {
      for (const auto& n : array_of(*drawing, "nodes"))
        if (member(n, "group")) groups_.index_of(text(n, "group"));
    }
  }
}

void StudyReport::collect_topic_labels() {
  const json* topics = member(results_, "topics");
  if (!topics) return;
  const json& list = array_of(*topics, "topics");
  if (list.empty()) return;
  const double first_chain = number(list[0], "chain");
  for (const auto& t : list) {
    if (std::isfinite(first_chain) && number(t, "chain") != first_chain) continue;
    const double topic = number(t, "topic");
    if (!(topic >= 1)) continue;
    const auto k = static_cast<std::size_t>(topic) - 1;
    if (topic_words_.size() <= k) topic_words_.resize(k + 1);
    std::string words;
    for (const auto& w : array_of(t, "words")) {
      if (words.size() > 80) break;
      words += (words.empty() ? "" : ", ") + text(w, "word");
    }
    topic_words_[k] = words;
  }
}

std::string StudyReport::figure_name(const std::string& wanted) {
  std::string name = wanted;
  for (int n = 2; figure_names_.count(name); ++n) name = wanted + "-" + std::to_string(n);
  figure_names_.insert(name);
  return name;
}

std::vector<std::pair<std::string, std::vector<double>>> StudyReport::group_shares() const {
  std::vector<std::pair<std::string, std::vector<double>>> out;
  if (const json* topics = member(results_, "topics")) {
    if (const json* shares = member(*topics, "group_shares")) {
      for (const auto& [name, values] : shares->items()) {
        std::vector<double> row;
        for (const auto& v : values) row.push_back(number_of(v));
        out.emplace_back(name, std::move(row));
      }
      return out;
    }
  }
  if (const json* compare = member(results_, "compare")) {
    const json& chains = array_of(*compare, "chains");
    if (!chains.empty()) {
      if (const json* profiles = member(chains[0], "profiles")) {
        for (const auto& g : array_of(*profiles, "groups")) {
          std::vector<double> row;
          for (const auto& v : array_of(g, "mean")) row.push_back(number_of(v));
          out.emplace_back(text(g, "group"), std::move(row));
        }
      }
    }
  }
  return out;
}

Section StudyReport::conclusions_section() {
  Section s{"conclusions", "Conclusions", ""};
  s.body += paragraph(
      "What this study found, each with how many of the model's chains (independent runs of the "
      "sampler) support it. A finding that holds on all chains does not hang on one random start.");
  // A table, those on all chains first (the study writes them in that order).
  s.body += "<table class=\"conclusions\"><caption>Every conclusion and its agreement across chains</caption>" +
            header_row({"agreement across chains", "conclusion"}) + "<tbody>";
  for (const auto& c : *member(results_, "conclusions")) {
    const std::string agreement = text(c, "agreement", "agreement not stated");
    s.body += "<tr><td><span class=\"agreement agreement-" + report::slug(agreement) + "\">" + escape_html(agreement) +
              "</span></td>" + cell(text(c, "text")) + "</tr>";
  }
  s.body += "</tbody></table>";
  return s;
}

Section StudyReport::corpus_section() {
  Section s{"corpus", "The texts", ""};
  const json* corpus = member(results_, "corpus");
  if (!corpus) {
    s.body = absent_note("corpus", "Run `loupe ingest SOURCE -o FILE --summary-json FILE` for the summary.");
    return s;
  }
  const json& c = *corpus;
  s.body += paragraph("Source " + text(c, "source", "(not recorded)") + ": " + text(c, "source_documents", "?") +
                      " documents read, " + text(c, "corpus_documents", "?") + " in the corpus (after cutting " +
                      text(c, "segmented_documents", "0") + " long documents into segments), of which " +
                      text(c, "disputed_documents", "0") + " are disputed. " + text(c, "tokens_kept", "?") +
                      " word tokens kept, from a vocabulary of " + text(c, "vocabulary_size", "?") + " words.");
  const json& groups = array_of(c, "groups");
  if (!groups.empty()) {
    s.body += "<table><caption>Documents and tokens by group</caption>" + header_row({"group", "documents", "tokens"}) +
              "<tbody>";
    for (const auto& g : groups) {
      s.body +=
          "<tr>" + cell(text(g, "group")) + cell(text(g, "documents"), true) + cell(text(g, "tokens"), true) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  if (const json* dropped = member(c, "tokens_dropped")) {
    const json* words = member(c, "words_dropped");
    s.body += "<table><caption>What the filters removed</caption>" +
              header_row({"reason", "tokens dropped", "distinct words dropped"}) + "<tbody>";
    for (const auto& [reason, count] : dropped->items()) {
      s.body += "<tr>" + cell(reason) + cell(plain_text(count), true) +
                cell(words && words->contains(reason) ? plain_text((*words)[reason]) : "", true) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  const json& names = array_of(c, "proper_names_dropped");
  if (!names.empty()) {
    s.body += "<details><summary>" + escape_html(std::to_string(names.size()) + " words dropped as proper names") +
              "</summary>" + paragraph(plain_text(names)) + "</details>";
  }
  for (const char* key : {"warnings", "empty_documents", "invalid_utf8_replaced", "invalid_utf8_skipped"}) {
    const json& list = array_of(c, key);
    if (!list.empty()) s.body += paragraph(std::string(key) + ": " + plain_text(list), "warning");
  }
  return s;
}

Section StudyReport::model_section() {
  Section s{"model", "The topic model", ""};
  const json* model = member(results_, "model");
  if (!model) {
    s.body = absent_note("model", "Run `loupe fit CORPUS -o MODEL` to fit one.");
    return s;
  }
  const json& m = *model;
  s.body += paragraph("One LDA topic model (Latent Dirichlet Allocation, JMLR, 2003) with " + text(m, "topics", "?") +
                      " topics is fitted over all the texts at once, so every group is described in the same "
                      "topics. It was fitted " +
                      text(m, "chains", "?") +
                      " times from different random starts (chains); results below that hold on every chain do "
                      "not depend on one start.");
  const double rhat = number(m, "rhat");
  if (std::isfinite(rhat)) {
    s.body += paragraph("Gelman-Rubin R-hat of the chains' log-likelihood traces: " + format_number(rhat) +
                            (rhat >= 1.1 ? " (1.1 or more: the chains had not settled on the same level; read the "
                                           "results with care, or fit with more sweeps)."
                                         : " (below 1.1: the chains agree)."),
                        rhat >= 1.1 ? "warning" : "");
  }
  json facts = json::object();
  for (const auto& [key, value] : m.items()) {
    if (!value.is_structured() && key != "rhat") facts[key] = value;
  }
  if (!facts.empty()) s.body += key_value_table(facts, "The fit");
  const json& detail = array_of(m, "chains_detail").empty() ? array_of(m, "per_chain") : array_of(m, "chains_detail");
  if (!detail.empty()) s.body += records_table(detail, "Each chain");
  return s;
}

// Present only when the study swept K (`loupe analyze --sweep-topics`).
Section StudyReport::sweep_section() {
  Section s{"sweep", "Choosing the number of topics", ""};
  const json& sweep = *member(results_, "sweep");
  const json& rows = array_of(sweep, "results");
  s.body +=
      paragraph("Before the main fit the model was fitted at " + std::to_string(rows.size()) +
                " numbers of topics K, " + text(sweep, "chains", "?") + " chains of " + text(sweep, "sweeps", "?") +
                " sweeps each (seed " + text(sweep, "seed", "?") + "). Every " + text(sweep, "held_out_every", "?") +
                "th document was held out and scored by document completion (held-out perplexity: lower fits unseen "
                "texts better); coherence (NPMI, UMass) measures how often each topic's top words share documents; "
                "redundant pairs are topics of one chain closer than Hellinger " +
                text(sweep, "redundancy_threshold", "?") + "; stable topics recur on the other chains.");
  std::vector<report::TopicCountPoint> points;
  std::string table = "<table><caption>The number of topics: each K's measures, mean over chains</caption>" +
                      header_row({"K", "held-out perplexity (range over chains)", "mean NPMI", "mean UMass",
                                  "redundant pairs", "stable topics", "R-hat"}) +
                      "<tbody>";
  const double suggested = number(sweep, "suggested");
  for (const auto& r : rows) {
    report::TopicCountPoint p;
    p.topic_count = number(r, "topics");
    p.perplexity = number(r, "perplexity");
    p.mean_npmi = number(r, "mean_npmi");
    p.redundant_pairs = number(r, "redundant_pairs");
    p.stable_share = p.topic_count > 0 ? number(r, "stable_topics") / p.topic_count : kNaN;
    points.push_back(p);
    const bool chosen = p.topic_count == suggested;
    table += std::string(chosen ? "<tr class=\"suggested\">" : "<tr>") +
             cell(format_number(p.topic_count, 6) + (chosen ? " (suggested)" : ""), true) +
             cell(format_number(p.perplexity, 4) + " (" + format_number(number(r, "perplexity_min"), 4) + " to " +
                      format_number(number(r, "perplexity_max"), 4) + ")",
                  true) +
             cell(format_fixed(p.mean_npmi, 3), true) + cell(format_fixed(number(r, "mean_umass"), 2), true) +
             cell(format_number(p.redundant_pairs, 3), true) +
             cell(text(r, "stable_topics", "?") + " of " + format_number(p.topic_count, 6), true) +
             cell(std::isfinite(number(r, "rhat")) ? format_fixed(number(r, "rhat"), 3) : "n/a", true) + "</tr>";
  }
  table += "</tbody></table>";
  s.body += figure(report::topic_count_sweep_svg(points, suggested),
                   "Held-out perplexity, coherence, redundant pairs and stable topics against K; the dashed line "
                   "marks the suggested K.",
                   table);
  s.body +=
      paragraph("Suggested: " + text(sweep, "reason", "no suggestion recorded") +
                (std::isfinite(suggested) &&
                         text(results_.value("model", json::object()), "topics") != format_number(suggested, 6)
                     ? " The study's model uses K = " + text(results_.value("model", json::object()), "topics", "?") +
                           ", as its options set."
                     : ""));
  return s;
}

Section StudyReport::topics_section() {
  Section s{"topics", "Topics", ""};
  const json* topics = member(results_, "topics");
  if (!topics) {
    s.body = absent_note("topics", "Run `loupe topics MODEL --format json`.");
    return s;
  }
  const json& list = array_of(*topics, "topics");
  if (list.empty()) {
    s.body = paragraph("The topics section lists no topics.", "warning");
    return s;
  }
  const double first_chain = number(list[0], "chain");
  const auto shares = group_shares();
  std::vector<report::TopicBar> bars;
  std::string table = "<table><caption>" +
                      escape_html("Topics of chain " + format_number(first_chain) +
                                  ": share of all tokens, prior weight alpha, most probable words" +
                                  (shares.empty() ? "" : ", and each group's mean share")) +
                      "</caption>";
  const bool with_stability = list[0].contains("stability");
  std::vector<std::string> columns{"topic", "share", "alpha"};
  if (with_stability) columns.push_back("stability across chains");
  const bool with_coherence = list[0].contains("coherence_npmi");
  if (with_coherence) columns.push_back("coherence (NPMI)");
  columns.push_back("top words (p(word | topic))");
  for (const auto& [name, values] : shares) columns.push_back(name);
  table += header_row(columns) + "<tbody>";
  for (const auto& t : list) {
    if (std::isfinite(first_chain) && number(t, "chain") != first_chain) continue;
    const std::string label = "Topic " + text(t, "topic");
    const std::string number_label = text(t, "topic");
    std::string short_words, words;
    std::size_t n = 0;
    for (const auto& w : array_of(t, "words")) {
      if (n++ < 6) short_words += (short_words.empty() ? "" : ", ") + text(w, "word");
      words += (words.empty() ? "" : ", ") + text(w, "word") + " " + format_fixed(number(w, "weight"), 3);
    }
    bars.push_back({label, short_words, number(t, "share")});
    table += "<tr>" + cell(number_label) + cell(format_percent(number(t, "share")), true) +
             cell(format_number(number(t, "alpha")), true);
    if (with_stability) {
      const bool stable = t.contains("stable") && t["stable"].is_boolean() && t["stable"].get<bool>();
      table += cell(format_fixed(number(t, "stability"), 2) + (stable ? "" : " (unstable)"), true);
    }
    if (with_coherence) table += cell(format_fixed(number(t, "coherence_npmi"), 3), true);
    table += cell(words);
    const double topic = number(t, "topic");
    for (const auto& [name, values] : shares) {
      const bool known = topic >= 1 && static_cast<std::size_t>(topic) <= values.size();
      table += cell(known ? format_percent(values[static_cast<std::size_t>(topic) - 1]) : "", true);
    }
    table += "</tr>";
  }
  table += "</tbody></table>";
  s.body += paragraph(
      "A topic is a set of words that tend to occur together; each document is a mixture of topics. "
      "The bars give each topic's share of all word tokens; the table adds each group's mean share "
      "of the topic." +
      std::string(with_stability
                      ? " Stability is the mean similarity (1 - Hellinger) of the topic to its match in every "
                        "other chain (Hungarian algorithm); an unstable topic does not recur in every chain, so "
                        "no conclusion should rest on it alone."
                      : "") +
      std::string(with_coherence ? " Coherence (NPMI, from -1 to 1) is higher when a topic's top words occur in the "
                                   "same documents."
                                 : ""));
  s.body += figure(report::topics_svg(bars),
                   "Topics of chain " + format_number(first_chain) +
                       " with their share of all tokens and their most probable words.",
                   table);
  return s;
}

Section StudyReport::profiles_section() {
  Section s{"profiles", "Group profiles and distinctive topics", ""};
  report::ProfileHeatmap heatmap;
  const json* compare = member(results_, "compare");
  const json* chain = nullptr;
  if (compare) {
    const json& chains = array_of(*compare, "chains");
    if (!chains.empty()) chain = &chains[0];
  }
  const json* profiles = chain ? member(*chain, "profiles") : nullptr;
  std::size_t topics = 0;
  if (profiles) {
    const double level = number(*profiles, "level");
    heatmap.interval_note =
        (std::isfinite(level) ? format_percent(level) : std::string("bootstrap")) + " bootstrap interval";
    if (heatmap.interval_note.rfind(".0%") != std::string::npos) {
      heatmap.interval_note.replace(heatmap.interval_note.rfind(".0%"), 3, "%");
    }
    for (const auto& g : array_of(*profiles, "groups")) {
      heatmap.groups.push_back(text(g, "group"));
      const json& mean = array_of(g, "mean");
      const json& low = array_of(g, "interval_low");
      const json& high = array_of(g, "interval_high");
      std::vector<report::ProfileCell> row;
      for (std::size_t k = 0; k < mean.size(); ++k) {
        row.push_back({number_of(mean[k]), k < low.size() ? number_of(low[k]) : kNaN,
                       k < high.size() ? number_of(high[k]) : kNaN, 0});
      }
      topics = std::max(topics, row.size());
      heatmap.cells.push_back(std::move(row));
    }
  } else {
    for (auto& [name, values] : group_shares()) {
      heatmap.groups.push_back(name);
      std::vector<report::ProfileCell> row;
      for (const double v : values) row.push_back({v, kNaN, kNaN, 0});
      topics = std::max(topics, row.size());
      heatmap.cells.push_back(std::move(row));
    }
  }
  if (heatmap.groups.empty()) {
    s.body = absent_note("compare",
                         "Run `loupe compare MODEL --corpus CORPUS --json FILE` for group profiles, "
                         "their intervals and the distinctive topics.");
    return s;
  }
  for (auto& row : heatmap.cells) row.resize(topics, {kNaN, kNaN, kNaN, 0});
  for (std::size_t k = 0; k < topics; ++k) heatmap.topics.push_back(std::to_string(k + 1));

  // Distinctive topics of chain 1 (topics are numbered per chain, so chains are not pooled here).
  struct Distinctive {
    std::size_t topic;
    double effect, low, high, p, adjusted;
  };
  std::map<std::string, std::vector<Distinctive>> distinctive;
  if (chain) {
    for (const auto& r : array_of(*chain, "records")) {
      if (text(r, "method") != "distinctive topic") continue;
      const std::string comparison = text(r, "comparison");
      const std::string suffix = " vs rest";
      if (comparison.size() <= suffix.size() ||
          comparison.compare(comparison.size() - suffix.size(), suffix.size(), suffix) != 0)
        continue;
      const std::string group = comparison.substr(0, comparison.size() - suffix.size());
      const double topic = number(r, "topic");
      const double p = number(r, "p_value");
      double adjusted = number(r, "adjusted_p_value");
      if (!std::isfinite(adjusted)) adjusted = p;
      const double effect = number(r, "effect_size");
      if (!(topic >= 1) || !(adjusted <= kDistinctiveLevel) || !std::isfinite(effect) || effect == 0) continue;
      const auto k = static_cast<std::size_t>(topic) - 1;
      const auto g = std::find(heatmap.groups.begin(), heatmap.groups.end(), group);
      if (g != heatmap.groups.end() && k < topics) {
        heatmap.cells[static_cast<std::size_t>(g - heatmap.groups.begin())][k].distinctive = effect > 0 ? 1 : -1;
      }
      distinctive[group].push_back({k, effect, number(r, "interval_low"), number(r, "interval_high"), p, adjusted});
    }
  }

  s.body += paragraph(
      "A group's profile is the mean topic mixture of its documents. Dark cells are topics a group "
      "writes much about. A triangle marks a distinctive topic: one whose share in the group differs "
      "from its share in the other groups (permutation test, adjusted p at or below " +
      format_number(kDistinctiveLevel) + "; up: higher, down: lower).");
  std::string table = "<table><caption>" +
                      escape_html("Mean topic share by group" +
                                  (heatmap.interval_note.empty() ? "" : " with its " + heatmap.interval_note) +
                                  (profiles ? " (chain 1)" : "")) +
                      "</caption>";
  std::vector<std::string> columns{"topic", "top words"};
  for (const auto& g : heatmap.groups) columns.push_back(g);
  table += header_row(columns) + "<tbody>";
  for (std::size_t k = 0; k < topics; ++k) {
    table += "<tr>" + cell(std::to_string(k + 1)) + cell(k < topic_words_.size() ? topic_words_[k] : "");
    for (std::size_t g = 0; g < heatmap.groups.size(); ++g) {
      const auto& c = heatmap.cells[g][k];
      std::string value = format_percent(c.mean);
      if (std::isfinite(c.low) && std::isfinite(c.high)) {
        value += " (" + format_percent(c.low) + " to " + format_percent(c.high) + ")";
      }
      if (c.distinctive > 0) value += " \u25B2";
      if (c.distinctive < 0) value += " \u25BC";
      table += cell(value, true);
    }
    table += "</tr>";
  }
  table += "</tbody></table>";
  s.body += figure(report::profiles_svg(heatmap),
                   "Group profiles: each group's mean share of each topic in percent" +
                       (heatmap.interval_note.empty()
                            ? std::string(".")
                            : "; the thick mark on the thin line in each cell spans its " + heatmap.interval_note +
                                  " (the thin line runs from 0 to the largest share)."),
                   table);

  s.body += "<h3>Distinctive topics by group</h3>";
  if (!chain) {
    s.body +=
        paragraph("The results carry no group tests (no \"compare\" section), so no topic is marked distinctive.");
  } else if (distinctive.empty()) {
    s.body += paragraph("No topic's share differs between a group and the rest at adjusted p at or below " +
                        format_number(kDistinctiveLevel) + ".");
  } else {
    s.body +=
        "<table><caption>Topics whose share in a group differs from the other groups (chain 1; the "
        "difference in mean share is in percentage points, with its 95% interval)</caption>" +
        header_row({"group", "topic", "top words", "difference", "95% interval", "p-value", "adjusted p-value"}) +
        "<tbody>";
    for (auto& [group, list] : distinctive) {
      std::sort(list.begin(), list.end(),
                [](const Distinctive& a, const Distinctive& b) { return a.effect > b.effect; });
      for (const auto& d : list) {
        s.body += "<tr>" + cell(group) + cell(std::to_string(d.topic + 1)) +
                  cell(d.topic < topic_words_.size() ? topic_words_[d.topic] : "") +
                  cell((d.effect > 0 ? "+" : "") + format_fixed(100 * d.effect, 1), true) +
                  cell(format_fixed(100 * d.low, 1) + " to " + format_fixed(100 * d.high, 1), true) +
                  cell(format_number(d.p), true) + cell(format_number(d.adjusted), true) + "</tr>";
      }
    }
    s.body += "</tbody></table>";
  }
  return s;
}

std::string StudyReport::null_histogram(const json& record, const std::string& title) {
  const json* null_distribution = member(record, "null_distribution");
  if (!null_distribution) return "";
  report::NullHistogram h;
  h.low = number(*null_distribution, "low");
  h.high = number(*null_distribution, "high");
  for (const auto& c : array_of(*null_distribution, "counts")) h.counts.push_back(number_of(c));
  h.observed = number(record, "statistic");
  const bool counts_ok = !h.counts.empty() && std::all_of(h.counts.begin(), h.counts.end(),
                                                          [](double c) { return std::isfinite(c) && c >= 0; });
  if (!std::isfinite(h.low) || !std::isfinite(h.high) || h.high < h.low || !counts_ok || !std::isfinite(h.observed)) {
    throw Error("results JSON: the test \"" + title +
                "\" has a null_distribution that is not {\"low\": a, \"high\": b >= a, \"counts\": [counts >= 0]} "
                "beside a numeric \"statistic\"; got " +
                null_distribution->dump() + " and statistic " + text(record, "statistic", "(none)"));
  }
  h.title = title;
  h.statistic_name = text(record, "statistic_name", "statistic");
  std::string effect;
  if (member(record, "effect_size")) {
    effect =
        "; " + text(record, "effect_size_name", "effect size") + " " + format_number(number(record, "effect_size"));
  } else if (member(record, "effect")) {
    effect = "; effect " + format_number(number(record, "effect"));
  }
  h.summary =
      "p-value " + format_number(number(record, "p_value")) +
      (member(record, "adjusted_p_value") ? " (adjusted " + format_number(number(record, "adjusted_p_value")) + ")"
                                          : std::string()) +
      effect + "; " + text(record, "permutations", "?") + " permutations, seed " + text(record, "seed", "?") + ".";
  h.figure_name = figure_name("null-" + report::slug(title));
  return figure(report::null_histogram_svg(h), title + ": the permuted values of " + h.statistic_name +
                                                   " (bars) and the observed value (dashed "
                                                   "line). " +
                                                   h.summary);
}

Section StudyReport::tests_section() {
  Section s{"tests", "Do the groups differ? Permutation tests", ""};
  const json* compare = member(results_, "compare");
  const json* graph = member(results_, "graph");
  if (!compare && !graph) {
    s.body = absent_note("compare", "Run `loupe compare MODEL --corpus CORPUS --json FILE`.");
    return s;
  }
  s.body += paragraph(
      "Each test asks whether the groups' documents differ more than they would if the group labels "
      "were shuffled at random. The p-value is the share of shuffles (permutations) that give a "
      "statistic at least as large as the observed one; the effect size says how large the "
      "difference is. Every test ran on every chain.");
  if (compare) {
    const json& across = array_of(*compare, "across_chains");
    if (!across.empty()) {
      s.body += "<table><caption>Group tests across chains: median (range) over the chains</caption>" +
                header_row({"test", "comparison", "statistic", "effect size", "p-value", "adjusted p-value",
                            "conclusion across chains"}) +
                "<tbody>";
      // The summary across chains names no effect size; the first chain's records do.
      std::map<std::tuple<std::string, std::string, std::string>, std::string> effect_names;
      const json& chains = array_of(*compare, "chains");
      if (!chains.empty()) {
        for (const auto& r : array_of(chains[0], "records")) {
          effect_names[{text(r, "method"), text(r, "comparison"), text(r, "statistic_name")}] =
              text(r, "effect_size_name");
        }
      }
      for (const auto& r : across) {
        if (text(r, "method") == "distinctive topic") continue;
        const auto name = effect_names.find({text(r, "method"), text(r, "comparison"), text(r, "statistic_name")});
        const std::string effect_name = name == effect_names.end() ? "" : name->second + " ";
        s.body += "<tr>" + cell(text(r, "method")) + cell(text(r, "comparison")) +
                  cell(text(r, "statistic_name") + " " + spread_text(member(r, "statistic"))) +
                  cell(effect_name + spread_text(member(r, "effect_size"))) +
                  cell(spread_text(member(r, "p_value")), true) +
                  cell(spread_text(member(r, "adjusted_p_value")), true) + cell(conclusion_across_chains(r)) + "</tr>";
      }
      s.body += "</tbody></table>";
    }
    const json& chains = array_of(*compare, "chains");
    if (!chains.empty()) {
      std::string warnings;
      for (const auto& r : array_of(chains[0], "records")) {
        if (member(r, "warning") && !text(r, "warning").empty()) {
          warnings += "<li>" +
                      escape_html(text(r, "method") + ", " + text(r, "comparison") + ": " + text(r, "warning")) +
                      "</li>";
        }
      }
      if (!warnings.empty()) s.body += "<ul class=\"warning\">" + warnings + "</ul>";
    }
  } else {
    s.body += absent_note("compare",
                          "Run `loupe compare MODEL --corpus CORPUS --json FILE` for PERMANOVA, "
                          "PERMDISP, ANOSIM and the pairwise tests.");
  }

  std::string histograms, left_out_note;
  if (compare) {
    const json& chains = array_of(*compare, "chains");
    if (!chains.empty()) {
      // A method run twice on one comparison (profile distance: Hellinger and Jensen-Shannon) is told apart by
      // its statistic's name.
      std::map<std::string, int> uses;
      const auto title_of = [](const json& r) {
        std::string title = text(r, "method") + ", " + text(r, "comparison");
        if (member(r, "topic")) title += ", topic " + text(r, "topic");
        return title;
      };
      for (const auto& r : array_of(chains[0], "records")) ++uses[title_of(r)];
      std::size_t distinctive_left_out = 0;
      for (const auto& r : array_of(chains[0], "records")) {
        if (!member(r, "null_distribution")) continue;
        // Of the distinctive-topic tests only those the profiles mark are drawn; the rest stay in the JSON.
        if (text(r, "method") == "distinctive topic") {
          double adjusted = number(r, "adjusted_p_value");
          if (!std::isfinite(adjusted)) adjusted = number(r, "p_value");
          if (!(adjusted <= kDistinctiveLevel)) {
            ++distinctive_left_out;
            continue;
          }
        }
        std::string title = title_of(r);
        if (uses[title] > 1)
          title = text(r, "method") + " (" + text(r, "statistic_name") + "), " + text(r, "comparison") +
                  (member(r, "topic") ? ", topic " + text(r, "topic") : std::string());
        histograms += null_histogram(r, title + " (chain " + text(chains[0], "chain", "1") + ")");
      }
      if (distinctive_left_out > 0) {
        left_out_note = paragraph(std::to_string(distinctive_left_out) +
                                  " distinctive-topic tests that find no difference (adjusted p above " +
                                  format_number(kDistinctiveLevel) +
                                  ") are not drawn; their null distributions are in the results JSON.");
      }
    }
  }
  if (graph) {
    const json& chains = array_of(*graph, "chains");
    if (!chains.empty()) {
      for (const auto& r : array_of(chains[0], "group_tests")) {
        histograms +=
            null_histogram(r, "graph: " + text(r, "method") + " (chain " + text(chains[0], "chain", "1") + ")");
      }
    }
  }
  if (const json* attribution = member(results_, "attribution")) {
    const json& calibration = array_of(*attribution, "calibration");
    if (!calibration.empty()) {
      if (const json* test = member(calibration[0], "permutation_test")) {
        histograms += null_histogram(*test, "attribution: " + text(*test, "method", "calibration accuracy") +
                                                " (chain " + text(calibration[0], "chain", "1") + ")");
      }
    }
  }
  s.body += "<h3>Null distributions</h3>";
  if (histograms.empty()) {
    s.body += paragraph(
        "The results carry no null distributions (a \"null_distribution\" histogram beside a test), "
        "so only the numbers above are shown.",
        "absent");
  } else {
    s.body += paragraph(
        "Each histogram shows the statistic over the shuffled labelings; the dashed line is the value "
        "for the real groups. A line far to the right of the bars is a difference that shuffling "
        "does not produce.");
    s.body += "<div class=\"figure-grid\">" + histograms + "</div>" + left_out_note;
  }
  return s;
}

Section StudyReport::attribution_section() {
  Section s{"attribution", "Attribution of the disputed documents", ""};
  const json* attribution = member(results_, "attribution");
  if (!attribution) {
    s.body = absent_note("attribution", "Run `loupe attribute MODEL --corpus CORPUS --json FILE`.");
    return s;
  }
  const json& a = *attribution;
  s.body += cautions_block(member(a, "cautions"));
  const json* options = member(a, "options");
  const double none_level = options ? number(*options, "none_level") : kNaN;
  const double level = std::isfinite(none_level) ? none_level : 0.05;
  s.body += paragraph(
      "Each disputed document is compared with every candidate group: the Hellinger distance from "
      "its topic mixture to the group's centre, and a p-value saying how ordinary that distance is "
      "among the group's own documents (" +
      text(a, "method", "conformal p-values") +
      "). A small p-value rejects the group. The verdict "
      "is the nearest group that is not rejected, or \"" +
      kNoneVerdict + "\" when every p-value is at or below " + format_number(level) + ". Seed " + text(a, "seed", "?") +
      ".");
  for (const auto& note : array_of(a, "notes")) s.body += paragraph("Note: " + plain_text(note), "warning");

  const json& documents = array_of(a, "documents");
  std::vector<report::AttributionRow> rows;
  std::string table =
      "<table><caption>Each disputed document against each candidate: median (range) over the "
      "chains</caption>" +
      header_row({"document", "tokens", "candidate", "Hellinger distance", "p-value", "verdict", "agreement",
                  "verdict's p-value over chains"}) +
      "<tbody>";
  for (const auto& d : documents) {
    report::AttributionRow row;
    row.document = text(d, "id");
    row.verdict = text(d, "verdict");
    const json& by_chain = array_of(d, "by_chain");
    const double agreement = number(d, "chain_agreement");
    if (!by_chain.empty() && std::isfinite(agreement)) {
      const std::size_t chains = by_chain.size();
      row.agreement = of_chains(static_cast<std::size_t>(std::lround(agreement * static_cast<double>(chains))), chains);
    }
    // Candidates in the order of the document's list, or else of the first chain.
    std::vector<std::string> candidates;
    for (const auto& c : array_of(d, "candidates"))
      if (c.is_string()) candidates.push_back(c.get<std::string>());
    if (candidates.empty() && !by_chain.empty()) {
      for (const auto& c : array_of(by_chain[0], "candidates")) candidates.push_back(text(c, "group"));
    }
    std::vector<std::string> candidate_rows;
    for (const auto& group : candidates) {
      std::vector<double> distances, p_values;
      for (const auto& chain : by_chain) {
        for (const auto& c : array_of(chain, "candidates")) {
          if (text(c, "group") != group) continue;
          distances.push_back(number(c, "hellinger_distance"));
          p_values.push_back(number(c, "p_value"));
        }
      }
      if (!p_values.empty()) {
        const auto [low, high] = std::minmax_element(p_values.begin(), p_values.end());
        row.candidates.push_back({group, median_of(p_values), *low, *high});
      }
      candidate_rows.push_back(cell(group) + cell(range_text(distances), true) + cell(range_text(p_values), true));
    }
    std::string p_range = "\u2013";
    const json& verdict_range = array_of(d, "verdict_p_value_range");
    if (verdict_range.size() == 2) {
      const double low = number_of(verdict_range[0]), high = number_of(verdict_range[1]);
      p_range = low < high ? format_number(low) + " to " + format_number(high) : format_number(low);
    }
    const std::size_t span = std::max<std::size_t>(1, candidate_rows.size());
    const std::string rowspan = " rowspan=\"" + std::to_string(span) + "\"";
    const std::string head = "<td" + rowspan + ">" + escape_html(row.document) + "</td><td class=\"number\"" + rowspan +
                             ">" + escape_html(text(d, "tokens", "?")) + "</td>";
    const std::string tail = "<td" + rowspan + ">" + escape_html(row.verdict) + "</td><td" + rowspan + ">" +
                             escape_html(row.agreement.empty() ? "\u2013" : row.agreement) + "</td><td" + rowspan +
                             " class=\"number\">" + escape_html(p_range) + "</td>";
    if (candidate_rows.empty()) {
      table += "<tr>" + head + "<td colspan=\"3\">not judged</td>" + tail + "</tr>";
    }
    for (std::size_t i = 0; i < candidate_rows.size(); ++i) {
      table += "<tr>" + (i == 0 ? head : std::string()) + candidate_rows[i] + (i == 0 ? tail : std::string()) + "</tr>";
    }
    rows.push_back(std::move(row));
  }
  table += "</tbody></table>";
  if (rows.empty()) {
    s.body += paragraph("The attribution results list no disputed documents.", "warning");
  } else {
    s.body += figure(report::attribution_svg(rows, groups_, level, kNoneVerdict),
                     "Attribution: each candidate group's p-value for each disputed document (marker: median over the "
                     "chains; line: their range); dashed line: the level " +
                         format_number(level) + " at or below which a candidate is rejected.",
                     table);
  }

  const json& groups = array_of(a, "groups");
  if (!groups.empty()) {
    s.body += "<table><caption>The reference: known documents of each group</caption>" +
              header_row({"group", "known documents", "left out as too short"}) + "<tbody>";
    for (const auto& g : groups) {
      s.body += "<tr>" + cell(text(g, "name")) + cell(text(g, "known_documents"), true) +
                cell(text(g, "known_documents_too_short"), true) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  const json& calibration = array_of(a, "calibration");
  if (!calibration.empty()) {
    s.body += "<h3>How often is the method right on known documents?</h3>";
    s.body += paragraph(
        "Each known document was left out in turn and judged against the rest. Accuracy is the share "
        "judged to their own group; chance accuracy is what guessing by group sizes gives; the "
        "permutation p-value tests accuracy against shuffled labels (Ojala & Garriga 2010).");
    s.body += "<table><caption>Calibration by chain</caption>" +
              header_row({"chain", "documents", "accuracy", "judged to none", "chance accuracy", "permutation p-value",
                          "recall by group"}) +
              "<tbody>";
    for (const auto& c : calibration) {
      const json* test = member(c, "permutation_test");
      std::string recall;
      if (const json* by_group = member(c, "recall")) {
        for (const auto& [group, value] : by_group->items())
          recall += (recall.empty() ? "" : ", ") + group + " " + format_percent(number_of(value));
      }
      s.body += "<tr>" + cell(text(c, "chain")) + cell(text(c, "documents"), true) +
                cell(format_percent(number(c, "accuracy")), true) + cell(format_percent(number(c, "none_rate")), true) +
                cell(test ? format_percent(number(*test, "chance_accuracy")) : "\u2013", true) +
                cell(test ? format_number(number(*test, "p_value")) : "\u2013", true) + cell(recall) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  return s;
}

Section StudyReport::scan_section() {
  Section s{"scan", "Composite texts: scans along the disputed texts", ""};
  const json* scan = member(results_, "scan");
  if (!scan) {
    s.body = absent_note("scan",
                         "Run `loupe scan MODEL --corpus CORPUS --json FILE` on a corpus ingested with "
                         "--segment-words N.");
    return s;
  }
  const json& sc = *scan;
  s.body += cautions_block(member(sc, "cautions"));
  s.body += paragraph(
      "A long disputed text is cut into segments of equal length. Each segment is judged against the "
      "groups like a disputed document; a change point is where the segments before and after differ "
      "in topics more than shuffling them gives (" +
      text(sc, "method", "energy-distance change point") + "; level " + text(sc, "level", "?") + ", " +
      text(sc, "permutations", "?") + " permutations a step, seed " + text(sc, "seed", "?") + ").");
  for (const auto& w : array_of(sc, "warnings")) s.body += paragraph("Warning: " + plain_text(w), "warning");
  std::vector<report::ScanStrip> strips;
  std::string table = "<table><caption>Change points and the stretches between them, by text and chain</caption>" +
                      header_row({"text", "chain", "change points (first token after, p-value)",
                                  "stretches (tokens: nearest group, p-value)", "chains with a change point"}) +
                      "<tbody>";
  for (const auto& t : array_of(sc, "texts")) {
    const std::string id = text(t, "id");
    const json& segments = array_of(t, "segments");
    const json& chains = array_of(t, "chains");
    std::string agreement = "\u2013";
    if (const json* ag = member(t, "agreement")) {
      agreement =
          of_chains(static_cast<std::size_t>(std::max(0.0, number(*ag, "chains_with_change_point"))), chains.size());
    }
    for (std::size_t c = 0; c < chains.size(); ++c) {
      const json& chain = chains[c];
      // Chains are numbered from 1 in the report, in the order of the list.
      report::ScanStrip strip;
      strip.label = id + ", chain " + std::to_string(c + 1);
      const json& judged = array_of(chain, "segments");
      for (std::size_t i = 0; i < segments.size(); ++i) {
        report::ScanSegment seg;
        seg.first_token = number(segments[i], "first_token");
        seg.tokens = number(segments[i], "tokens");
        seg.verdict = i < judged.size() ? text(judged[i], "verdict") : "";
        if (std::isfinite(seg.first_token) && std::isfinite(seg.tokens)) strip.segments.push_back(seg);
      }
      std::string changes;
      for (const auto& cp : array_of(chain, "change_points")) {
        strip.change_points.push_back({number(cp, "first_token_after"), number(cp, "p_value")});
        changes += (changes.empty() ? "" : "; ") + text(cp, "first_token_after") + " (" +
                   text(cp, "first_segment_after") + "), p " + format_number(number(cp, "p_value"));
      }
      std::string stretches;
      for (const auto& st : array_of(chain, "stretches")) {
        const double end = number(st, "end");
        double last_token = kNaN;
        if (std::isfinite(end) && end >= 1 && static_cast<std::size_t>(end) <= segments.size()) {
          const json& last = segments[static_cast<std::size_t>(end) - 1];
          last_token = number(last, "first_token") + number(last, "tokens");
        }
        stretches += (stretches.empty() ? "" : "; ") + text(st, "first_token") + " to " + format_number(last_token, 9) +
                     ": " + text(st, "nearest_group") + ", p " + format_number(number(st, "p_value"));
      }
      table += "<tr>" + cell(id) + cell(std::to_string(c + 1)) + cell(changes.empty() ? "none" : changes) +
               cell(stretches) + cell(agreement) + "</tr>";
      strips.push_back(std::move(strip));
    }
  }
  table += "</tbody></table>";
  if (strips.empty()) {
    s.body += paragraph("The scan results list no scanned texts.", "warning");
  } else {
    s.body += figure(report::scan_svg(strips, groups_),
                     "Composite scans: each segment coloured by the group it resembles most (grey: none); black "
                     "lines: change points with their p-values.",
                     table);
  }
  const json& aside = array_of(sc, "texts_set_aside");
  if (!aside.empty()) {
    std::string list;
    for (const auto& t : aside) list += (list.empty() ? "" : ", ") + text(t, "id") + " (" + text(t, "segments") + ")";
    s.body += paragraph("Set aside as too short to scan (segments in brackets): " + list + ".");
  }
  return s;
}

Section StudyReport::graph_section() {
  Section s{"graph", "The similarity graph", ""};
  const json* graph = member(results_, "graph");
  if (!graph) {
    s.body = absent_note("graph", "Run `loupe graph MODEL --corpus CORPUS --json FILE`.");
    return s;
  }
  const json& gr = *graph;
  s.body += paragraph("Each document is linked to the documents whose topic mixtures are closest to its own (" +
                      text(gr, "construction", "?") + "; " + text(gr, "distance", "Hellinger distance") +
                      "). Communities are groups of documents more linked among themselves than to the rest "
                      "(Louvain). If the groups differ in subject, documents link mostly within their own group.");
  if (member(gr, "note")) s.body += paragraph(text(gr, "note"), "warning");
  const json& chains = array_of(gr, "chains");
  if (!chains.empty()) {
    s.body += "<table><caption>The graph of each chain</caption>" +
              header_row({"chain", "edges", "components", "communities", "Louvain modularity", "isolated documents",
                          "share of neighbours in the own group"}) +
              "<tbody>";
    for (const auto& c : chains) {
      std::string shares;
      if (const json* by_group = member(c, "same_group_share_by_group")) {
        for (const auto& [group, value] : by_group->items())
          shares += (shares.empty() ? "" : ", ") + group + " " + format_percent(number_of(value));
      }
      s.body += "<tr>" + cell(text(c, "chain")) + cell(text(c, "edges"), true) + cell(text(c, "components"), true) +
                cell(text(c, "communities"), true) + cell(format_number(number(c, "louvain_modularity")), true) +
                cell(text(c, "isolated_documents"), true) + cell(shares) + "</tr>";
    }
    s.body += "</tbody></table>";
    s.body += "<table><caption>Group mixing tests by chain</caption>" +
              header_row({"chain", "test", "statistic", "value", "effect", "p-value", "permutations"}) + "<tbody>";
    for (const auto& c : chains) {
      for (const auto& t : array_of(c, "group_tests")) {
        s.body += "<tr>" + cell(text(c, "chain")) + cell(text(t, "method")) + cell(text(t, "statistic_name")) +
                  cell(format_number(number(t, "statistic")), true) + cell(format_number(number(t, "effect")), true) +
                  cell(format_number(number(t, "p_value")), true) + cell(text(t, "permutations"), true) + "</tr>";
      }
    }
    s.body += "</tbody></table>";
  }
  const json* drawing = member(gr, "drawing");
  if (!drawing) {
    s.body += paragraph(
        "The results carry no drawing of the graph (\"graph.drawing\" with node positions), so it is "
        "not drawn.",
        "absent");
    return s;
  }
  if (array_of(*drawing, "nodes").empty()) {
    s.body +=
        paragraph("The graph is not drawn" +
                      (member(*drawing, "note") ? ": " + text(*drawing, "note") : std::string(" (no nodes)")) + ".",
                  "absent");
    return s;
  }
  std::vector<report::GraphNode> nodes;
  for (const auto& n : array_of(*drawing, "nodes")) {
    report::GraphNode node{text(n, "id"), text(n, "group"), text(n, "community"), number(n, "x"), number(n, "y")};
    if (!std::isfinite(node.x) || !std::isfinite(node.y)) {
      throw Error("results JSON: graph.drawing node \"" + node.id + "\" needs numeric x and y in [0, 1]; got " +
                  n.dump());
    }
    nodes.push_back(std::move(node));
  }
  std::vector<report::GraphEdge> edges;
  for (const auto& e : array_of(*drawing, "edges")) {
    const double source = number(e, "source"), target = number(e, "target");
    const auto valid = [&](double i) { return i >= 0 && i < static_cast<double>(nodes.size()) && i == std::floor(i); };
    if (!valid(source) || !valid(target)) {
      throw Error("results JSON: graph.drawing edge " + e.dump() +
                  " needs \"source\" and \"target\" indices into "
                  "its " +
                  std::to_string(nodes.size()) + " nodes (from 0)");
    }
    edges.push_back({static_cast<std::size_t>(source), static_cast<std::size_t>(target), number(e, "weight")});
  }
  // Communities by group: how the communities the graph finds line up with the groups.
  std::map<std::string, std::map<std::string, std::size_t>> crossing;
  std::set<std::string> node_groups;
  for (const auto& n : nodes) {
    const std::string group = n.group.empty() ? "(no group)" : n.group;
    ++crossing[n.community][group];
    node_groups.insert(group);
  }
  std::vector<std::string> group_columns;
  for (const auto& g : groups_.names)
    if (node_groups.count(g)) group_columns.push_back(g);
  for (const auto& g : node_groups)
    if (std::find(group_columns.begin(), group_columns.end(), g) == group_columns.end()) group_columns.push_back(g);
  std::vector<std::string> columns{"community"};
  columns.insert(columns.end(), group_columns.begin(), group_columns.end());
  columns.push_back("documents");
  std::string table = "<table><caption>Documents of each community by group (the drawn chain)</caption>" +
                      header_row(columns) + "<tbody>";
  for (const auto& [community, counts] : crossing) {
    std::size_t total = 0;
    table += "<tr>" + cell(community);
    for (const auto& g : group_columns) {
      const auto it = counts.find(g);
      const std::size_t n = it == counts.end() ? 0 : it->second;
      total += n;
      table += cell(std::to_string(n), true);
    }
    table += cell(std::to_string(total), true) + "</tr>";
  }
  table += "</tbody></table>";
  const std::string caption = "The similarity graph of chain " + text(*drawing, "chain", "1") + ": " +
                              std::to_string(nodes.size()) + " documents and " + std::to_string(edges.size()) +
                              " links drawn by a force-directed layout (" + text(gr, "layout", "layout") +
                              "); colour and shape give the group, dashed outlines the " +
                              std::to_string(crossing.size()) + " communities.";
  s.body += figure(report::graph_svg(nodes, edges, groups_, caption), caption, table);
  return s;
}

Section StudyReport::near_duplicates_section() {
  Section s{"near-duplicates", "Near-duplicates", ""};
  const json* nd = member(results_, "near_duplicates");
  if (!nd) {
    s.body = absent_note("near_duplicates", "Run `loupe near-duplicates CORPUS --json FILE`.");
    return s;
  }
  const json* settings = member(*nd, "settings");
  const json& pairs = array_of(*nd, "pairs");
  s.body += paragraph(
      "Pairs of documents that share many short word sequences (Jaccard similarity of their 2-word "
      "shingles at or above " +
      (settings ? text(*settings, "threshold", "?") : std::string("?")) + "): copies, drafts and quotations. " +
      std::to_string(pairs.size()) + (pairs.size() == 1 ? " pair among " : " pairs among ") +
      text(*nd, "documents", "?") + " documents" +
      (settings ? " (" + text(*settings, "method", "MinHash") + ")." : std::string(".")));
  if (!pairs.empty()) {
    s.body +=
        "<table><caption>Near-duplicate pairs" +
        escape_html(pairs.size() > kPairsShown ? " (the first " + std::to_string(kPairsShown) + ")" : "") +
        "</caption>" +
        header_row({"first", "its group", "second", "its group", "Jaccard similarity", "topic distance", "cluster"}) +
        "<tbody>";
    for (std::size_t i = 0; i < pairs.size() && i < kPairsShown; ++i) {
      const json& p = pairs[i];
      s.body += "<tr>" + cell(text(p, "first")) + cell(text(p, "first_group", "(no group)")) + cell(text(p, "second")) +
                cell(text(p, "second_group", "(no group)")) + cell(format_number(number(p, "jaccard")), true) +
                cell(format_number(number(p, "topic_distance")), true) + cell(text(p, "cluster"), true) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  const json& clusters = array_of(*nd, "clusters");
  if (!clusters.empty()) {
    s.body += "<table><caption>Clusters of near-duplicates</caption>" + header_row({"cluster", "documents", "size"}) +
              "<tbody>";
    for (const auto& c : clusters) {
      s.body += "<tr>" + cell(text(c, "cluster")) + cell(plain_text(array_of(c, "documents"))) +
                cell(text(c, "size"), true) + "</tr>";
    }
    s.body += "</tbody></table>";
  }
  return s;
}

Section StudyReport::provenance_section() {
  Section s{"provenance", "Provenance: how to reproduce this study", ""};
  const json& p = results_["provenance"];
  const std::string started = text(p, "started", text(p, "started_at", "?"));
  const std::string finished = text(p, "finished", text(p, "finished_at", "?"));
  s.body += paragraph("loupe " + text(p, "loupe_version", "(version not recorded)") + ", started " + started +
                      ", finished " + finished + ". The same inputs, options and seeds give the same results.");
  if (member(p, "command")) s.body += "<pre class=\"command\">" + escape_html(text(p, "command")) + "</pre>";
  const json& skipped = array_of(p, "skipped_stages");
  if (!skipped.empty()) s.body += paragraph("Stages skipped: " + plain_text(skipped) + ".", "warning");
  if (const json* options = member(p, "options"); options && options->is_object())
    s.body += key_value_table(*options, "Options");
  if (const json* seeds = member(p, "seeds"); seeds && seeds->is_object()) s.body += key_value_table(*seeds, "Seeds");
  for (const auto& [key, caption] : {std::pair<const char*, const char*>{"inputs", "Input files and their checksums"},
                                     {"outputs", "Files written and their checksums"}}) {
    const json& files = array_of(p, key);
    if (files.empty()) continue;
    std::string table = "<table><caption>" + escape_html(caption) + "</caption>" +
                        header_row({"path", "bytes", "checksum"}) + "<tbody>";
    for (const auto& f : files) {
      std::string checksum = "\u2013";
      for (const char* algorithm : {"sha256", "fnv1a64", "checksum"}) {
        if (member(f, algorithm)) {
          checksum = (std::string(algorithm) == "checksum" ? "" : std::string(algorithm) + " ") + text(f, algorithm);
          break;
        }
      }
      table += "<tr>" + cell(text(f, "path")) + cell(text(f, "bytes", ""), true) + "<td class=\"checksum\">" +
               escape_html(checksum) + "</td></tr>";
    }
    table += "</tbody></table>";
    // A corpus of many files: the list folds away.
    s.body += files.size() > 20
                  ? "<details><summary>" +
                        escape_html(std::string(caption) + " (" + std::to_string(files.size()) + " files)") +
                        "</summary>" + table + "</details>"
                  : table;
  }
  if (member(p, "checksum_algorithm")) s.body += paragraph("Checksums: " + text(p, "checksum_algorithm") + ".");
  return s;
}

// Records script errors and console errors in <body data-errors>, and after load lists every figure with its
// rendered size in <body data-figures-ok>, for the browser test (tests/report/report_browser_test.cc).
constexpr const char* kSelfCheckScript = R"JS(
(function () {
  var errors = [];
  function record(message) {
    errors.push(String(message));
    if (document.body) document.body.setAttribute('data-errors', JSON.stringify(errors));
  }
  window.addEventListener('error', function (e) {
    record(e.message || ('could not load ' + (e.target && (e.target.src || e.target.href || e.target.tagName))));
  }, true);
  window.addEventListener('unhandledrejection', function (e) { record('unhandled rejection: ' + e.reason); });
  document.addEventListener('securitypolicyviolation', function (e) {
    record('blocked by the content security policy: ' + e.blockedURI + ' (' + e.violatedDirective + ')');
  });
  var consoleError = console.error;
  console.error = function () {
    record(Array.prototype.slice.call(arguments).join(' '));
    return consoleError.apply(console, arguments);
  };
  window.addEventListener('load', function () {
    try {
      var figures = [];
      var svgs = document.querySelectorAll('svg[data-figure]');
      for (var i = 0; i < svgs.length; ++i) {
        var box = svgs[i].getBBox();
        var rect = svgs[i].getBoundingClientRect();
        figures.push({figure: svgs[i].getAttribute('data-figure'), width: Math.round(rect.width),
                      height: Math.round(rect.height), content_width: Math.round(box.width),
                      content_height: Math.round(box.height),
                      ok: rect.width > 0 && rect.height > 0 && box.width > 0 && box.height > 0});
      }
      document.body.setAttribute('data-figures-ok', JSON.stringify(figures));
      document.body.setAttribute('data-errors', JSON.stringify(errors));
    } catch (e) {
      record('self-check failed: ' + e);
    }
  });
})();
)JS";

constexpr const char* kStyle = R"CSS(
body { font-family: system-ui, sans-serif; line-height: 1.45; color: #1a1a1a; background: #ffffff;
       margin: 0 auto; max-width: 1180px; padding: 0 24px 48px; }
header { border-bottom: 2px solid #0072B2; margin-bottom: 16px; }
h1 { margin-bottom: 4px; }
h2 { border-bottom: 1px solid #cccccc; padding-bottom: 4px; margin-top: 40px; }
nav ol { columns: 2; }
table { border-collapse: collapse; margin: 12px 0 20px; font-size: 14px; }
caption { text-align: left; font-weight: bold; padding: 4px 0; }
th, td { border: 1px solid #d0d0d0; padding: 3px 8px; vertical-align: top; text-align: left; }
th { background: #f0f0f0; }
td.number { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
td.checksum { font-family: ui-monospace, monospace; font-size: 12px; word-break: break-all; }
figure { margin: 16px 0 8px; }
figcaption { font-size: 14px; color: #333333; max-width: 860px; }
svg { max-width: 100%; height: auto; display: block; }
.figure-grid { display: flex; flex-wrap: wrap; gap: 8px 24px; }
.figure-grid figure { width: 540px; max-width: 100%; }
.absent { color: #555555; font-style: italic; background: #f6f6f6; padding: 6px 10px; }
.warning { color: #8a3b00; }
.cautions { border-left: 6px solid #D55E00; background: #fff4ec; padding: 4px 16px; margin: 12px 0; }
.cautions h3 { margin: 8px 0 4px; }
.conclusions li { margin: 6px 0; }
.agreement { display: inline-block; font-size: 12px; font-weight: bold; padding: 1px 6px; border-radius: 3px;
             border: 1px solid #333333; margin-right: 6px; }
.agreement-all-chains { background: #0072B2; color: #ffffff; }
.agreement-most-chains { background: #56B4E9; color: #000000; }
.agreement-split { background: #ffffff; color: #000000; border-style: dashed; }
pre.command { background: #f4f4f4; padding: 8px; white-space: pre-wrap; word-break: break-all; }
)CSS";

std::string StudyReport::render() {
  if (!results_.is_object()) {
    throw Error("the results JSON must be one object with a \"provenance\" key (as `loupe analyze` writes); got " +
                std::string(results_.type_name()));
  }
  if (!member(results_, "provenance") || !results_["provenance"].is_object()) {
    throw Error(
        "the results JSON has no \"provenance\" object (loupe_version, command, options, seeds, inputs): "
        "write it with the study, as `loupe analyze` does");
  }
  guarded("groups", [&] {
    collect_groups();
    collect_topic_labels();
    return Section{};
  });

  std::vector<Section> sections;
  if (const json* conclusions = member(results_, "conclusions");
      conclusions && conclusions->is_array() && !conclusions->empty()) {
    sections.push_back(guarded("conclusions", [&] { return conclusions_section(); }));
  }
  sections.push_back(guarded("corpus", [&] { return corpus_section(); }));
  sections.push_back(guarded("model", [&] { return model_section(); }));
  if (member(results_, "sweep")) sections.push_back(guarded("sweep", [&] { return sweep_section(); }));
  sections.push_back(guarded("topics", [&] { return topics_section(); }));
  sections.push_back(guarded("compare", [&] { return profiles_section(); }));
  sections.push_back(guarded("compare", [&] { return tests_section(); }));
  sections.push_back(guarded("attribution", [&] { return attribution_section(); }));
  sections.push_back(guarded("scan", [&] { return scan_section(); }));
  sections.push_back(guarded("graph", [&] { return graph_section(); }));
  sections.push_back(guarded("near_duplicates", [&] { return near_duplicates_section(); }));
  sections.push_back(guarded("provenance", [&] { return provenance_section(); }));

  std::vector<std::string> absent;
  for (const char* key :
       {"conclusions", "corpus", "model", "topics", "compare", "attribution", "scan", "graph", "near_duplicates"}) {
    if (!member(results_, key)) absent.push_back(key);
  }
  const json& provenance = results_["provenance"];

  std::string out;
  out.reserve(1 << 16);
  out +=
      "<!DOCTYPE html>\n<html lang=\"en\">\n<head>\n<meta charset=\"utf-8\">\n"
      "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">\n"
      // Nothing may be fetched: the report is one file that works offline.
      "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; style-src 'unsafe-inline'; "
      "script-src 'unsafe-inline'\">\n"
      "<meta name=\"generator\" content=\"loupe " +
      escape_html(text(provenance, "loupe_version", "")) + "\">\n<title>Study report</title>\n<script>" +
      kSelfCheckScript + "</script>\n<style>" + kStyle + "</style>\n</head>\n<body data-errors=\"[]\">\n";
  out += "<header><h1>Study report</h1>" +
         paragraph("Made by loupe " + text(provenance, "loupe_version", "") +
                   (member(provenance, "finished") ? " on " + text(provenance, "finished") : std::string()) + ".") +
         paragraph(
             "This report compares groups of texts through one shared topic model: what each group writes "
             "about, whether the groups differ beyond chance, which group each disputed text resembles, and "
             "which texts are near-copies. Every figure has a table beside it with the same numbers; hover "
             "over a mark to read its value.") +
         "</header>\n";
  out += "<nav aria-label=\"Contents\"><h2>Contents</h2><ol>";
  for (const auto& s : sections) out += "<li><a href=\"#" + s.id + "\">" + escape_html(s.heading) + "</a></li>";
  out += "</ol>";
  if (!absent.empty()) {
    std::string list;
    for (const auto& a : absent) list += (list.empty() ? "" : ", ") + a;
    out += "<p class=\"absent\" data-absent-sections=\"" + escape_html(list) + "\">" +
           escape_html("Not in this study: " + list + ".") + "</p>";
  }
  out += "</nav>\n<main>\n";
  for (const auto& s : sections) {
    out += "<section id=\"" + s.id + "\" aria-labelledby=\"" + s.id + "-heading\"><h2 id=\"" + s.id + "-heading\">" +
           escape_html(s.heading) + "</h2>\n" + s.body + "\n</section>\n";
  }
  out += "</main>\n</body>\n</html>\n";
  return out;
}

}  // namespace

std::string render_study_report(const nlohmann::json& results) { return StudyReport(results).render(); }

void write_study_report(const nlohmann::json& results, const std::string& path) {
  write_file_atomically(path, render_study_report(results));
}

}  // namespace loupe

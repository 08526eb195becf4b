#include "analysis/test_record.h"

#include <algorithm>
#include <charconv>
#include <cmath>
#include <limits>
#include <map>
#include <set>
#include <tuple>

#include "common/binary_io.h"
#include "common/error.h"

namespace loupe {
namespace {

nlohmann::json number_or_null(double value) {
  if (!std::isfinite(value)) return nullptr;
  return value;
}

nlohmann::json spread_json(const Spread& spread) {
  return {{"median", number_or_null(spread.median)},
          {"min", number_or_null(spread.min)},
          {"max", number_or_null(spread.max)}};
}

auto test_key(const TestRecord& r) { return std::tie(r.method, r.statistic_name, r.comparison, r.topic); }

}  // namespace

std::string format_number(double value) {
  if (std::isnan(value)) return "";
  if (std::isinf(value)) return value > 0 ? "inf" : "-inf";
  char buffer[64];
  const auto result = std::to_chars(buffer, buffer + sizeof buffer, value);
  return std::string(buffer, result.ptr);
}

std::string csv_field(const std::string& text) {
  if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
  return out;
}

NullDistribution null_distribution_of(std::span<const double> permuted, std::size_t stride, std::size_t column,
                                      double observed, std::size_t bins) {
  NullDistribution histogram;
  if (bins == 0 || stride == 0 || column >= stride) return histogram;
  const bool observed_finite = std::isfinite(observed);
  double low = observed_finite ? observed : std::numeric_limits<double>::infinity();
  double high = observed_finite ? observed : -std::numeric_limits<double>::infinity();
  for (std::size_t i = column; i < permuted.size(); i += stride) {
    if (!std::isfinite(permuted[i])) continue;
    low = std::min(low, permuted[i]);
    high = std::max(high, permuted[i]);
  }
  if (low > high) return histogram;  // nothing finite to draw
  if (!(high > low)) {
    low -= 0.5;
    high += 0.5;
  }
  histogram.low = low;
  histogram.high = high;
  histogram.counts.assign(bins, 0);
  const double width = (high - low) / static_cast<double>(bins);
  for (std::size_t i = column; i < permuted.size(); i += stride) {
    if (!std::isfinite(permuted[i])) continue;
    const auto bin = static_cast<std::size_t>(std::max(0.0, std::floor((permuted[i] - low) / width)));
    ++histogram.counts[std::min(bin, bins - 1)];
  }
  return histogram;
}

// In files and tables chains and topics are numbered from 1, as `loupe topics`
// shows them; in memory they are 0-based indices.
nlohmann::json to_json(const TestRecord& r) {
  nlohmann::json json = {{"method", r.method},
                         {"statistic_name", r.statistic_name},
                         {"comparison", r.comparison},
                         {"topic", r.topic < 0 ? nlohmann::json(nullptr) : nlohmann::json(r.topic + 1)},
                         {"sample_size", r.sample_size},
                         {"groups", r.num_groups},
                         {"statistic", number_or_null(r.statistic)},
                         {"effect_size_name", r.effect_size_name},
                         {"effect_size", number_or_null(r.effect_size)},
                         {"interval_low", number_or_null(r.interval_low)},
                         {"interval_high", number_or_null(r.interval_high)},
                         {"p_value", number_or_null(r.p_value)},
                         {"adjusted_p_value", number_or_null(r.adjusted_p_value)},
                         {"adjustment", r.adjustment},
                         {"permutations", r.permutations},
                         {"complete_enumeration", r.complete_enumeration},
                         {"strata", r.strata},
                         {"seed", r.seed},
                         {"chain", r.chain + 1},
                         {"warning", r.warning}};
  if (!r.null_distribution.counts.empty()) {
    json["null_distribution"] = {
        {"low", r.null_distribution.low}, {"high", r.null_distribution.high}, {"counts", r.null_distribution.counts}};
  }
  return json;
}

nlohmann::json to_json(std::span<const TestRecord> records) {
  auto array = nlohmann::json::array();
  for (const auto& r : records) array.push_back(to_json(r));
  return array;
}

std::string csv_header() {
  return "method,statistic_name,comparison,topic,sample_size,groups,statistic,effect_size_name,effect_size,"
         "interval_low,interval_high,p_value,adjusted_p_value,adjustment,permutations,complete_enumeration,"
         "strata,seed,chain,warning";
}

std::string csv_row(const TestRecord& r) {
  std::string row;
  auto add = [&row](const std::string& field) {
    if (!row.empty()) row += ',';
    row += field;
  };
  // The first field is never empty, so `row.empty()` only holds before it.
  row = csv_field(r.method);
  add(csv_field(r.statistic_name));
  add(csv_field(r.comparison));
  add(r.topic < 0 ? "" : std::to_string(r.topic + 1));
  add(std::to_string(r.sample_size));
  add(std::to_string(r.num_groups));
  add(format_number(r.statistic));
  add(csv_field(r.effect_size_name));
  add(format_number(r.effect_size));
  add(format_number(r.interval_low));
  add(format_number(r.interval_high));
  add(format_number(r.p_value));
  add(format_number(r.adjusted_p_value));
  add(csv_field(r.adjustment));
  add(std::to_string(r.permutations));
  add(r.complete_enumeration ? "true" : "false");
  add(csv_field(r.strata));
  add(std::to_string(r.seed));
  add(std::to_string(r.chain + 1));
  add(csv_field(r.warning));
  return row;
}

std::string to_csv(std::span<const TestRecord> records) {
  std::string out = csv_header() + "\n";
  for (const auto& r : records) out += csv_row(r) + "\n";
  return out;
}

void write_records_json(const std::string& path, std::span<const TestRecord> records) {
  write_file_atomically(path, to_json(records).dump(2) + "\n");
}

void write_records_csv(const std::string& path, std::span<const TestRecord> records) {
  write_file_atomically(path, to_csv(records));
}

Spread spread_of(std::span<const double> values) {
  std::vector<double> finite;
  for (const double v : values) {
    if (std::isfinite(v)) finite.push_back(v);
  }
  Spread spread;
  if (finite.empty()) return spread;
  std::sort(finite.begin(), finite.end());
  const std::size_t n = finite.size();
  spread.min = finite.front();
  spread.max = finite.back();
  spread.median = n % 2 == 1 ? finite[n / 2] : 0.5 * (finite[n / 2 - 1] + finite[n / 2]);
  return spread;
}

ChainSummary summarize_chains(std::span<const TestRecord> one_per_chain, double level) {
  if (one_per_chain.empty()) throw Error("summarize_chains: no records to summarise");
  const auto& first = one_per_chain.front();
  ChainSummary summary;
  summary.method = first.method;
  summary.statistic_name = first.statistic_name;
  summary.comparison = first.comparison;
  summary.topic = first.topic;
  summary.chains = one_per_chain.size();
  std::set<int> chains;
  std::vector<double> statistic, effect, p, adjusted;
  std::vector<std::string> conclusions;
  for (const auto& r : one_per_chain) {
    if (test_key(r) != test_key(first)) {
      throw Error("summarize_chains: records of different tests (" + first.method + " " + first.comparison + " and " +
                  r.method + " " + r.comparison + ") cannot be summarised together");
    }
    if (!chains.insert(r.chain).second) {
      throw Error("summarize_chains: chain " + std::to_string(r.chain) + " appears twice for " + r.method + " " +
                  r.comparison);
    }
    statistic.push_back(r.statistic);
    effect.push_back(r.effect_size);
    p.push_back(r.p_value);
    adjusted.push_back(r.adjusted_p_value);
    conclusions.push_back(significance_conclusion(r.p_value, r.adjusted_p_value, level));
  }
  summary.statistic = spread_of(statistic);
  summary.effect_size = spread_of(effect);
  summary.p_value = spread_of(p);
  summary.adjusted_p_value = spread_of(adjusted);
  summary.level = level;
  summary.significance = modal_conclusion(conclusions);
  return summary;
}

std::vector<ChainSummary> summarize_by_test(std::span<const TestRecord> records, double level) {
  std::vector<std::vector<TestRecord>> groups;
  std::map<std::tuple<std::string, std::string, std::string, int>, std::size_t> index;
  for (const auto& r : records) {
    const auto key = std::make_tuple(r.method, r.statistic_name, r.comparison, r.topic);
    const auto [it, inserted] = index.try_emplace(key, groups.size());
    if (inserted) groups.emplace_back();
    groups[it->second].push_back(r);
  }
  std::vector<ChainSummary> summaries;
  summaries.reserve(groups.size());
  for (const auto& g : groups) summaries.push_back(summarize_chains(g, level));
  return summaries;
}

nlohmann::json to_json(const ChainSummary& s) {
  return {{"method", s.method},
          {"statistic_name", s.statistic_name},
          {"comparison", s.comparison},
          {"topic", s.topic < 0 ? nlohmann::json(nullptr) : nlohmann::json(s.topic + 1)},
          {"chains", s.chains},
          {"statistic", spread_json(s.statistic)},
          {"effect_size", spread_json(s.effect_size)},
          {"p_value", spread_json(s.p_value)},
          {"adjusted_p_value", spread_json(s.adjusted_p_value)},
          {"level", s.level},
          {"conclusion", s.significance.conclusion},
          {"chains_agreeing", s.significance.backing},
          {"agreement", agreement_label(s.significance.agreement)}};
}

}  // namespace loupe

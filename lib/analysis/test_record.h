// One record per test, the shape permutation-test results are read in: method,
// statistic, sample size, groups, effect size, p-value, permutations, strata,
// seed and chain. JSON and CSV writers, and the summary of one test across chains.
#pragma once

#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analysis/chain_agreement.h"

namespace loupe {

inline constexpr double kNotAvailable = std::numeric_limits<double>::quiet_NaN();

// The permuted statistics of a test as a histogram, for drawing its null distribution: counts[b] permutations
// fell in bin b of `bins` equal-width bins over [low, high], a range holding every permuted value and the
// observed statistic (the last bin includes high). Empty counts: not kept.
struct NullDistribution {
  double low = 0;
  double high = 0;
  std::vector<std::uint64_t> counts;
};
inline constexpr std::size_t kNullDistributionBins = 30;

// The histogram of column `column` of a table of permuted statistics with `stride` values a permutation
// (count_exceedances' layout); NaN values are left out. When every value equals the observed one, the
// range is [value - 0.5, value + 0.5]. Example: permuted {0, 1, 2, 3}, observed 4, 2 bins -> [0, 4], {2, 2}.
NullDistribution null_distribution_of(std::span<const double> permuted, std::size_t stride, std::size_t column,
                                      double observed, std::size_t bins = kNullDistributionBins);

struct TestRecord {
  std::string method;          // "PERMANOVA", "PERMDISP", "ANOSIM", "pairwise PERMANOVA", ...
  std::string statistic_name;  // "pseudo-F", "F", "R", "Hellinger distance", ...
  std::string comparison;      // "all groups", "A vs B", "A vs rest"
  int topic = -1;              // the topic, for per-topic tests; -1 otherwise
  std::size_t sample_size = 0;
  std::size_t num_groups = 0;
  double statistic = kNotAvailable;
  std::string effect_size_name;  // "R²", "difference in mean share", ...
  double effect_size = kNotAvailable;
  double interval_low = kNotAvailable;  // 95% bootstrap interval of the effect, when it has one
  double interval_high = kNotAvailable;
  double p_value = kNotAvailable;
  double adjusted_p_value = kNotAvailable;  // q-value (BH) or Holm-adjusted p
  std::string adjustment;                   // "BH", "Holm" or ""
  std::size_t permutations = 0;
  bool complete_enumeration = false;
  std::string strata;  // the metadata column permutations were restricted by; "" = free
  std::uint64_t seed = 0;
  int chain = 0;
  std::string warning;                 // plain-language caution, "" when none
  NullDistribution null_distribution;  // kept only when PermutationOptions::keep_null_distribution
};

// NaN becomes null; "null_distribution" {"low", "high", "counts"} only when kept.
nlohmann::json to_json(const TestRecord& record);
nlohmann::json to_json(std::span<const TestRecord> records);

// CSV with a header line; numbers in shortest round-trip form, NaN as an empty field.
std::string csv_header();
std::string csv_row(const TestRecord& record);
std::string to_csv(std::span<const TestRecord> records);
// Atomic writes (common/binary_io.h).
void write_records_json(const std::string& path, std::span<const TestRecord> records);
void write_records_csv(const std::string& path, std::span<const TestRecord> records);

// "1.25", "0.001", "1e-12": the shortest text that reads back as the same double; "" for NaN.
std::string format_number(double value);
// A CSV field, quoted when it holds a comma, quote or line break.
std::string csv_field(const std::string& text);

// One test's figure across chains.
struct Spread {
  double median = kNotAvailable;
  double min = kNotAvailable;
  double max = kNotAvailable;
};
// Median, minimum and maximum of the finite values; all NaN when none is finite.
Spread spread_of(std::span<const double> values);

struct ChainSummary {
  std::string method, statistic_name, comparison;
  int topic = -1;
  std::size_t chains = 0;
  Spread statistic, effect_size, p_value, adjusted_p_value;
  double level = 0.05;           // the level the conclusion is drawn at
  ModalConclusion significance;  // "p <= level" or "p > level" (adjusted p when there is one) on most chains
};

// Summarises one record per chain of the same test, and whether the test is
// significant at `level` on all chains, most or split. Throws loupe::Error when
// the records are of different tests, or when a chain appears twice.
ChainSummary summarize_chains(std::span<const TestRecord> one_per_chain, double level = 0.05);
// Groups records by test (method, statistic, comparison, topic) in order of
// first appearance and summarises each group.
std::vector<ChainSummary> summarize_by_test(std::span<const TestRecord> records, double level = 0.05);
nlohmann::json to_json(const ChainSummary& summary);

}  // namespace loupe

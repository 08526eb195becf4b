#include "model/prior_tuning.h"

#include <algorithm>
#include <cmath>
#include <numeric>

namespace loupe {

namespace {
constexpr int kMaxIterations = 200;
constexpr double kTolerance = 1e-7;  // relative change that ends the iteration
constexpr double kFloor = 1e-8;      // a prior never reaches zero (an unused topic)
}  // namespace

CountHistogram make_histogram(std::span<const std::uint32_t> values) {
  std::uint32_t largest = 0;
  for (const auto value : values) largest = std::max(largest, value);
  CountHistogram histogram;
  if (largest <= (1U << 22)) {
    // Counting by value: one pass, no copy of the (possibly V x K) values.
    std::vector<std::uint64_t> tally(static_cast<std::size_t>(largest) + 1, 0);
    for (const auto value : values) ++tally[value];
    for (std::uint32_t value = 1; value <= largest; ++value) {
      if (tally[value] > 0) histogram.emplace_back(value, tally[value]);
    }
    return histogram;
  }
  std::vector<std::uint32_t> sorted(values.begin(), values.end());
  std::sort(sorted.begin(), sorted.end());
  for (const auto value : sorted) {
    if (value == 0) continue;
    if (!histogram.empty() && histogram.back().first == value) {
      ++histogram.back().second;
    } else {
      histogram.emplace_back(value, 1);
    }
  }
  return histogram;
}

double digamma(double x) {
  // Recurrence psi(x) = psi(x + 1) - 1/x up to x >= 10, then the asymptotic series.
  double result = 0;
  while (x < 10.0) {
    result -= 1.0 / x;
    x += 1.0;
  }
  const double inv = 1.0 / x;
  const double inv2 = inv * inv;
  result += std::log(x) - 0.5 * inv -
            inv2 * (1.0 / 12 - inv2 * (1.0 / 120 - inv2 * (1.0 / 252 - inv2 * (1.0 / 240 - inv2 * (1.0 / 132)))));
  return result;
}

double digamma_difference(std::uint32_t n, double a) {
  if (n <= 32) {
    double sum = 0;
    for (std::uint32_t f = 0; f < n; ++f) sum += 1.0 / (f + a);
    return sum;
  }
  // The first terms exactly (they dominate for small a), the rest by digamma.
  double sum = 0;
  for (std::uint32_t f = 0; f < 8; ++f) sum += 1.0 / (f + a);
  return sum + digamma(n + a) - digamma(8 + a);
}

namespace {
double histogram_sum(const CountHistogram& histogram, double a) {
  double sum = 0;
  for (const auto& [value, count] : histogram) sum += static_cast<double>(count) * digamma_difference(value, a);
  return sum;
}
}  // namespace

std::vector<double> fit_asymmetric_dirichlet(const std::vector<CountHistogram>& per_component,
                                             const CountHistogram& totals, std::vector<double> alpha) {
  for (int iteration = 0; iteration < kMaxIterations; ++iteration) {
    const double sum = std::accumulate(alpha.begin(), alpha.end(), 0.0);
    const double denominator = histogram_sum(totals, sum);
    if (!(denominator > 0)) return alpha;
    double change = 0;
    for (std::size_t k = 0; k < alpha.size(); ++k) {
      const double updated = std::max(kFloor, alpha[k] * histogram_sum(per_component[k], alpha[k]) / denominator);
      change = std::max(change, std::abs(updated - alpha[k]) / alpha[k]);
      alpha[k] = updated;
    }
    if (change < kTolerance) break;
  }
  return alpha;
}

double fit_symmetric_dirichlet(const CountHistogram& cells, const CountHistogram& totals, std::uint32_t dimension,
                               double a) {
  for (int iteration = 0; iteration < kMaxIterations; ++iteration) {
    const double denominator = dimension * histogram_sum(totals, dimension * a);
    if (!(denominator > 0)) return a;
    const double updated = std::max(kFloor, a * histogram_sum(cells, a) / denominator);
    const double change = std::abs(updated - a) / a;
    a = updated;
    if (change < kTolerance) break;
  }
  return a;
}

DocumentCountHistograms document_count_histograms(const Corpus& corpus, const SamplerState& state,
                                                  bool asymmetric_alpha) {
  const std::size_t k = state.counts.topic_count;
  // Document-topic counts n_dk, per topic (asymmetric) or pooled (symmetric).
  std::vector<std::vector<std::uint32_t>> per_topic(asymmetric_alpha ? k : 1);
  std::vector<std::uint32_t> lengths;
  lengths.reserve(corpus.num_documents());
  std::vector<std::uint32_t> c(k, 0);
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const auto first = corpus.token_offsets[d];
    const auto last = corpus.token_offsets[d + 1];
    lengths.push_back(static_cast<std::uint32_t>(last - first));
    for (auto i = first; i < last; ++i) ++c[state.topics[i]];
    for (auto i = first; i < last; ++i) {
      const Topic t = state.topics[i];
      if (c[t] == 0) continue;
      per_topic[asymmetric_alpha ? t : 0].push_back(c[t]);
      c[t] = 0;
    }
  }
  DocumentCountHistograms histograms;
  histograms.lengths = make_histogram(lengths);
  histograms.topic_counts.reserve(per_topic.size());
  for (auto& values : per_topic) histograms.topic_counts.push_back(make_histogram(values));
  return histograms;
}

CountHistogram add_histograms(const CountHistogram& a, const CountHistogram& b) {
  CountHistogram sum;
  sum.reserve(a.size() + b.size());
  std::size_t i = 0;
  std::size_t j = 0;
  while (i < a.size() || j < b.size()) {
    if (j == b.size() || (i < a.size() && a[i].first < b[j].first)) {
      sum.push_back(a[i++]);
    } else if (i == a.size() || b[j].first < a[i].first) {
      sum.push_back(b[j++]);
    } else {
      sum.emplace_back(a[i].first, a[i].second + b[j].second);
      ++i;
      ++j;
    }
  }
  return sum;
}

void tune_priors(const DocumentCountHistograms& documents, SamplerState& state, bool asymmetric_alpha) {
  const std::size_t k = state.counts.topic_count;
  if (asymmetric_alpha) {
    state.alpha = fit_asymmetric_dirichlet(documents.topic_counts, documents.lengths, state.alpha);
  } else {
    const double mean = state.alpha_sum() / static_cast<double>(k);
    const double a =
        fit_symmetric_dirichlet(documents.topic_counts[0], documents.lengths, static_cast<std::uint32_t>(k), mean);
    state.alpha.assign(k, a);
  }
  // Topic-word counts n_wk against topic totals n_k, symmetric over V words.
  state.beta =
      fit_symmetric_dirichlet(make_histogram(state.counts.word_topic), make_histogram(state.counts.topic_total),
                              state.counts.vocabulary_size, state.beta);
}

void tune_priors(const Corpus& corpus, SamplerState& state, bool asymmetric_alpha) {
  tune_priors(document_count_histograms(corpus, state, asymmetric_alpha), state, asymmetric_alpha);
}

}  // namespace loupe

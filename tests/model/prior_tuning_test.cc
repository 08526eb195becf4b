// Minka's fixed point (histogram form): digamma values from tables, and
// recovery of known Dirichlet parameters from counts drawn with them.
#include <cmath>
#include <numeric>

#include <gtest/gtest.h>

#include "model/prior_tuning.h"
#include "model/random.h"

namespace loupe {
namespace {

TEST(DigammaTest, KnownValues) {
  // Abramowitz & Stegun (1964) 6.3.2 and 6.3.3: psi(1) = -gamma, psi(1/2) = -gamma - 2 ln 2.
  const double euler = 0.57721566490153286;
  EXPECT_NEAR(digamma(1.0), -euler, 1e-12);
  EXPECT_NEAR(digamma(0.5), -euler - 2 * std::log(2.0), 1e-12);
  // psi(x + 1) = psi(x) + 1/x (A&S 6.3.5).
  EXPECT_NEAR(digamma(7.3) - digamma(6.3), 1 / 6.3, 1e-12);
}

TEST(DigammaTest, DifferenceMatchesTheSum) {
  for (const double a : {1e-4, 0.01, 0.5, 3.0}) {
    for (const std::uint32_t n : {1U, 5U, 33U, 1000U}) {
      double sum = 0;
      for (std::uint32_t f = 0; f < n; ++f) sum += 1.0 / (f + a);
      EXPECT_NEAR(digamma_difference(n, a), sum, 1e-9 * sum) << "n=" << n << " a=" << a;
    }
  }
}

TEST(HistogramTest, CountsPositiveValues) {
  const std::vector<std::uint32_t> values{3, 0, 1, 3};
  EXPECT_EQ(make_histogram(values), (CountHistogram{{1, 1}, {3, 2}}));
}

// Draws `groups` multinomial count vectors of `draws` each from theta ~ Dir(alpha).
struct DrawnCounts {
  std::vector<CountHistogram> per_component;
  CountHistogram pooled;
  CountHistogram totals;
};

DrawnCounts draw_counts(const std::vector<double>& alpha, std::size_t groups, std::uint32_t draws, std::uint64_t seed) {
  Xoshiro256 rng(seed);
  const std::size_t k = alpha.size();
  std::vector<std::vector<std::uint32_t>> per(k);
  std::vector<std::uint32_t> all;
  std::vector<std::uint32_t> totals;
  for (std::size_t g = 0; g < groups; ++g) {
    std::vector<double> theta(k);
    double sum = 0;
    for (std::size_t i = 0; i < k; ++i) sum += theta[i] = rng.gamma(alpha[i]);
    std::vector<std::uint32_t> counts(k, 0);
    for (std::uint32_t n = 0; n < draws; ++n) {
      double u = rng.uniform() * sum;
      std::size_t i = 0;
      while (i + 1 < k && u >= theta[i]) u -= theta[i++];
      ++counts[i];
    }
    for (std::size_t i = 0; i < k; ++i) {
      per[i].push_back(counts[i]);
      all.push_back(counts[i]);
    }
    totals.push_back(draws);
  }
  DrawnCounts out;
  for (auto& values : per) out.per_component.push_back(make_histogram(values));
  out.pooled = make_histogram(all);
  out.totals = make_histogram(totals);
  return out;
}

TEST(PriorTuningTest, RecoversASymmetricPrior) {
  const auto counts = draw_counts(std::vector<double>(10, 0.3), 3000, 60, 21);
  const double a = fit_symmetric_dirichlet(counts.pooled, counts.totals, 10, 1.0);
  EXPECT_NEAR(a, 0.3, 0.03);
}

TEST(PriorTuningTest, RecoversAnAsymmetricPrior) {
  const std::vector<double> truth{0.1, 0.5, 1.0, 2.0};
  const auto counts = draw_counts(truth, 4000, 80, 22);
  const auto alpha = fit_asymmetric_dirichlet(counts.per_component, counts.totals, std::vector<double>(4, 1.0));
  for (std::size_t k = 0; k < 4; ++k) EXPECT_NEAR(alpha[k], truth[k], 0.1 * truth[k]) << "component " << k;
}

TEST(PriorTuningTest, TheFixedPointMaximisesThePolyaLikelihood) {
  // log p(counts | a) for a symmetric Dirichlet-multinomial (Minka 2000, eq. 53):
  //   sum_groups [lgamma(K a) - lgamma(N + K a) + sum_k (lgamma(n_k + a) - lgamma(a))]
  const auto counts = draw_counts(std::vector<double>(6, 0.05), 500, 40, 23);
  auto evidence = [&](double a) {
    double sum = 0;
    for (const auto& [n, c] : counts.totals)
      sum += static_cast<double>(c) * (std::lgamma(6 * a) - std::lgamma(n + 6 * a));
    for (const auto& [n, c] : counts.pooled) sum += static_cast<double>(c) * (std::lgamma(n + a) - std::lgamma(a));
    return sum;
  };
  const double best = fit_symmetric_dirichlet(counts.pooled, counts.totals, 6, 1.0);
  EXPECT_GT(evidence(best), evidence(best * 1.05));
  EXPECT_GT(evidence(best), evidence(best * 0.95));
}

}  // namespace
}  // namespace loupe

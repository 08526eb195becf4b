#include "analysis/multiple_testing.h"

#include <algorithm>
#include <cmath>
#include <numeric>

#include "common/error.h"

namespace loupe {
namespace {

// Indices of the non-NaN p-values, sorted by p ascending (ties by position).
std::vector<std::size_t> sorted_finite(std::span<const double> p) {
  std::vector<std::size_t> order;
  for (std::size_t i = 0; i < p.size(); ++i) {
    if (!std::isnan(p[i])) order.push_back(i);
  }
  std::stable_sort(order.begin(), order.end(), [&](std::size_t a, std::size_t b) { return p[a] < p[b]; });
  return order;
}

}  // namespace

std::vector<double> benjamini_hochberg(std::span<const double> p_values) {
  std::vector<double> q(p_values.begin(), p_values.end());
  const auto order = sorted_finite(p_values);
  const double m = static_cast<double>(order.size());
  // Benjamini & Hochberg (1995): q_(i) = min_{j >= i} m p_(j) / j, capped at 1.
  double running = 1.0;
  for (std::size_t r = order.size(); r-- > 0;) {
    const double candidate = m * p_values[order[r]] / static_cast<double>(r + 1);
    running = std::min(running, candidate);
    q[order[r]] = running;
  }
  return q;
}

std::vector<double> holm(std::span<const double> p_values) {
  std::vector<double> adjusted(p_values.begin(), p_values.end());
  const auto order = sorted_finite(p_values);
  const double m = static_cast<double>(order.size());
  // Holm (1979): p~_(i) = max_{j <= i} (m - j + 1) p_(j), capped at 1.
  double running = 0.0;
  for (std::size_t r = 0; r < order.size(); ++r) {
    const double candidate = std::min(1.0, (m - static_cast<double>(r)) * p_values[order[r]]);
    running = std::max(running, candidate);
    adjusted[order[r]] = running;
  }
  return adjusted;
}

std::vector<double> adjust_p_values(std::span<const double> p_values, Adjustment adjustment) {
  switch (adjustment) {
    case Adjustment::benjamini_hochberg:
      return benjamini_hochberg(p_values);
    case Adjustment::holm:
      return holm(p_values);
    case Adjustment::none:
      break;
  }
  return {p_values.begin(), p_values.end()};
}

std::string adjustment_name(Adjustment adjustment) {
  switch (adjustment) {
    case Adjustment::benjamini_hochberg:
      return "BH";
    case Adjustment::holm:
      return "Holm";
    case Adjustment::none:
      break;
  }
  return "";
}

Adjustment parse_adjustment(std::string_view text) {
  std::string lower(text);
  for (auto& c : lower) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  if (lower == "bh") return Adjustment::benjamini_hochberg;
  if (lower == "holm") return Adjustment::holm;
  if (lower == "none") return Adjustment::none;
  throw Error("unknown p-value adjustment '" + std::string(text) + "': choose bh (Benjamini-Hochberg), holm or none");
}

}  // namespace loupe

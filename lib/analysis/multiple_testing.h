// Adjusting p-values for many tests at once: Benjamini-Hochberg (1995) q-values
// controlling the false discovery rate, and Holm (1979) adjusted p-values
// controlling the family-wise error rate. NaN p-values are kept and not counted.
#pragma once

#include <span>
#include <string>
#include <string_view>
#include <vector>

namespace loupe {

enum class Adjustment { none, benjamini_hochberg, holm };

// q_(i) = min_{j >= i} min(1, m p_(j) / j) over p sorted ascending.
// Example: {0.01, 0.04, 0.03} -> {0.03, 0.04, 0.04}.
std::vector<double> benjamini_hochberg(std::span<const double> p_values);

// p~_(i) = max_{j <= i} min(1, (m - j + 1) p_(j)).
// Example: {0.01, 0.04, 0.03} -> {0.03, 0.06, 0.06}.
std::vector<double> holm(std::span<const double> p_values);

std::vector<double> adjust_p_values(std::span<const double> p_values, Adjustment adjustment);

// "BH", "Holm", "" (none).
std::string adjustment_name(Adjustment adjustment);
// "bh" / "holm" / "none" (case-insensitive); throws loupe::Error naming the choices otherwise.
Adjustment parse_adjustment(std::string_view text);

}  // namespace loupe

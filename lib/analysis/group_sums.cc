#include "analysis/group_sums.h"

#include <algorithm>

namespace loupe {
namespace {

// Rows per block: a block of 64 rows of K = 100 doubles (50 KiB) stays in
// cache while every labeling of the batch adds it up.
constexpr std::size_t kBlockRows = 64;

inline __attribute__((always_inline)) void add_row(double* __restrict destination, const double* __restrict source,
                                                   std::size_t cols) {
  for (std::size_t k = 0; k < cols; ++k) destination[k] += source[k];
}

}  // namespace

// Compiled for AVX-512, AVX2 and plain x86-64, chosen at load time: each sum is
// added element by element in the same order, so every version gives the same bits.
__attribute__((target_clones("avx512f", "avx2", "default"))) void accumulate_group_sums(
    const RowTable& table, const int* labels, std::size_t batch, std::size_t groups, const double* column_totals,
    int skip_group, double* sums) {
  const std::size_t cols = table.cols;
  std::fill(sums, sums + batch * groups * cols, 0.0);
  for (std::size_t block = 0; block < table.n; block += kBlockRows) {
    const std::size_t block_end = std::min(table.n, block + kBlockRows);
    for (std::size_t b = 0; b < batch; ++b) {
      const int* labeling = labels + b * table.n;
      double* batch_sums = sums + b * groups * cols;
      for (std::size_t i = block; i < block_end; ++i) {
        const int g = labeling[i];
        if (g == skip_group) continue;
        add_row(batch_sums + static_cast<std::size_t>(g) * cols, table.rows + i * cols, cols);
      }
    }
  }
  if (skip_group < 0) return;
  for (std::size_t b = 0; b < batch; ++b) {
    double* batch_sums = sums + b * groups * cols;
    double* skipped = batch_sums + static_cast<std::size_t>(skip_group) * cols;
    std::copy(column_totals, column_totals + cols, skipped);
    for (std::size_t g = 0; g < groups; ++g) {
      if (static_cast<int>(g) == skip_group) continue;
      const double* other = batch_sums + g * cols;
      for (std::size_t k = 0; k < cols; ++k) skipped[k] -= other[k];
    }
  }
}

}  // namespace loupe

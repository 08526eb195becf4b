// The inner loop of the permutation tests on group means: for a batch of
// labelings, the column sums of a row matrix per group. One pass over a block
// of rows serves every labeling of the batch, so the rows are read from memory
// once per batch rather than once per permutation.
#pragma once

#include <cstddef>

namespace loupe {

struct RowTable {  // n rows of `cols` doubles, row-major
  const double* rows = nullptr;
  std::size_t n = 0;
  std::size_t cols = 0;
};

// sums[(b * groups + g) * cols + k] = sum of rows(i, k) over i with
// labels[b * n + i] == g, for b < batch. Rows labelled skip_group are never
// read: that group's sum is column_totals - the other groups' sums (pass
// skip_group = -1 to sum every group directly).
// Example: rows {1, 2, 4}, labels {0, 1, 0}, groups 2 -> sums {5, 2}.
void accumulate_group_sums(const RowTable& table, const int* labels, std::size_t batch, std::size_t groups,
                           const double* column_totals, int skip_group, double* sums);

}  // namespace loupe

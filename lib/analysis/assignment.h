// The linear assignment problem (Hungarian algorithm, Kuhn 1955, in the
// shortest-augmenting-path form with potentials): match the rows of a cost
// matrix to distinct columns at the least total cost. Used to align topics.
#pragma once

#include <cstddef>
#include <vector>

#include "analysis/hellinger.h"

namespace loupe {

struct Assignment {
  // For each row, its column; rows beyond the number of columns (more rows than
  // columns) are left unmatched as kUnassigned.
  std::vector<std::size_t> column_of_row;
  double total_cost = 0;  // sum of the matched costs
  static constexpr std::size_t kUnassigned = static_cast<std::size_t>(-1);
};

// Least-cost assignment of a rows x columns matrix (rectangular allowed: the
// smaller side is matched completely). O(n^2 m) for n = min side, m = max side.
// Example: {{4, 1, 3}, {2, 0, 5}, {3, 2, 2}} -> rows to columns {1, 0, 2}, cost 5.
// Costs must be finite (loupe::Error otherwise).
Assignment solve_assignment(const TopicMatrix& cost);

}  // namespace loupe

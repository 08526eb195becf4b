#include "analysis/assignment.h"

#include <cmath>
#include <limits>

#include "common/error.h"

namespace loupe {
namespace {

// rows <= columns. Potentials u (rows), v (columns); way[j] is the column
// before j on the augmenting path; row_of[j] the row matched to column j
// (1-based, 0 = free), with column 0 as the path's virtual start.
std::vector<std::size_t> assign_rows(const TopicMatrix& cost) {
  const auto n = static_cast<std::size_t>(cost.rows());
  const auto m = static_cast<std::size_t>(cost.cols());
  const double inf = std::numeric_limits<double>::infinity();
  std::vector<double> u(n + 1, 0.0), v(m + 1, 0.0), min_slack(m + 1);
  std::vector<std::size_t> row_of(m + 1, 0), way(m + 1, 0);
  std::vector<char> used(m + 1);
  for (std::size_t i = 1; i <= n; ++i) {
    row_of[0] = i;
    std::size_t j0 = 0;
    std::fill(min_slack.begin(), min_slack.end(), inf);
    std::fill(used.begin(), used.end(), 0);
    do {
      used[j0] = 1;
      const std::size_t i0 = row_of[j0];
      double delta = inf;
      std::size_t j1 = 0;
      for (std::size_t j = 1; j <= m; ++j) {
        if (used[j]) continue;
        const double slack = cost(static_cast<Eigen::Index>(i0 - 1), static_cast<Eigen::Index>(j - 1)) - u[i0] - v[j];
        if (slack < min_slack[j]) {
          min_slack[j] = slack;
          way[j] = j0;
        }
        if (min_slack[j] < delta) {
          delta = min_slack[j];
          j1 = j;
        }
      }
      for (std::size_t j = 0; j <= m; ++j) {
        if (used[j]) {
          u[row_of[j]] += delta;
          v[j] -= delta;
        } else {
          min_slack[j] -= delta;
        }
      }
      j0 = j1;
    } while (row_of[j0] != 0);
    do {  // augment along the path
      const std::size_t j1 = way[j0];
      row_of[j0] = row_of[j1];
      j0 = j1;
    } while (j0 != 0);
  }
  std::vector<std::size_t> column_of_row(n, Assignment::kUnassigned);
  for (std::size_t j = 1; j <= m; ++j) {
    if (row_of[j] != 0) column_of_row[row_of[j] - 1] = j - 1;
  }
  return column_of_row;
}

}  // namespace

Assignment solve_assignment(const TopicMatrix& cost) {
  if (!cost.allFinite()) throw Error("assignment: the cost matrix has a value that is not finite");
  Assignment result;
  const auto rows = static_cast<std::size_t>(cost.rows());
  const auto columns = static_cast<std::size_t>(cost.cols());
  if (rows == 0 || columns == 0) {
    result.column_of_row.assign(rows, Assignment::kUnassigned);
    return result;
  }
  if (rows <= columns) {
    result.column_of_row = assign_rows(cost);
  } else {
    const TopicMatrix transposed = cost.transpose();
    const auto row_of_column = assign_rows(transposed);
    result.column_of_row.assign(rows, Assignment::kUnassigned);
    for (std::size_t j = 0; j < columns; ++j) result.column_of_row[row_of_column[j]] = j;
  }
  for (std::size_t i = 0; i < rows; ++i) {
    if (result.column_of_row[i] != Assignment::kUnassigned) {
      result.total_cost += cost(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(result.column_of_row[i]));
    }
  }
  return result;
}

}  // namespace loupe

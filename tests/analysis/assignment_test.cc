// The assignment solver: a worked example, brute force over every permutation
// on small matrices, and SciPy's linear_sum_assignment (Debian python3-scipy,
// tests/analysis/reference/scipy_assignment.py) on random square and
// rectangular matrices.
#include "analysis/assignment.h"

#include <gtest/gtest.h>

#include <algorithm>
#include <numeric>
#include <random>
#include <set>

#include "analysis_test_support.h"
#include "common/error.h"

namespace loupe {
namespace {

TopicMatrix random_costs(Eigen::Index rows, Eigen::Index cols, std::mt19937_64& rng) {
  std::uniform_real_distribution<double> u(0.0, 1.0);
  TopicMatrix cost(rows, cols);
  for (Eigen::Index i = 0; i < rows; ++i)
    for (Eigen::Index j = 0; j < cols; ++j) cost(i, j) = u(rng);
  return cost;
}

// Least cost over every injective map of rows to columns (rows <= columns).
double brute_force_cost(const TopicMatrix& cost) {
  std::vector<Eigen::Index> columns(static_cast<std::size_t>(cost.cols()));
  std::iota(columns.begin(), columns.end(), 0);
  double best = std::numeric_limits<double>::infinity();
  do {
    double total = 0;
    for (Eigen::Index i = 0; i < cost.rows(); ++i) total += cost(i, columns[static_cast<std::size_t>(i)]);
    best = std::min(best, total);
  } while (std::next_permutation(columns.begin(), columns.end()));
  return best;
}

void expect_valid(const Assignment& a, const TopicMatrix& cost) {
  const auto matched = static_cast<std::size_t>(std::min(cost.rows(), cost.cols()));
  std::set<std::size_t> used;
  double total = 0;
  for (std::size_t i = 0; i < a.column_of_row.size(); ++i) {
    if (a.column_of_row[i] == Assignment::kUnassigned) continue;
    EXPECT_LT(a.column_of_row[i], static_cast<std::size_t>(cost.cols()));
    EXPECT_TRUE(used.insert(a.column_of_row[i]).second) << "column used twice";
    total += cost(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(a.column_of_row[i]));
  }
  EXPECT_EQ(used.size(), matched);
  EXPECT_NEAR(total, a.total_cost, 1e-12);
}

TEST(AssignmentTest, WorkedExample) {
  // Rows to columns 1, 0, 2: 1 + 2 + 2 = 5; every other permutation costs more
  // (e.g. the diagonal 4 + 0 + 2 = 6).
  TopicMatrix cost(3, 3);
  cost << 4, 1, 3, 2, 0, 5, 3, 2, 2;
  const auto a = solve_assignment(cost);
  EXPECT_EQ(a.column_of_row, (std::vector<std::size_t>{1, 0, 2}));
  EXPECT_DOUBLE_EQ(a.total_cost, 5.0);
}

TEST(AssignmentTest, MatchesBruteForceOnSmallMatrices) {
  std::mt19937_64 rng(11);
  for (int trial = 0; trial < 200; ++trial) {
    const Eigen::Index n = 1 + trial % 6;
    const Eigen::Index m = n + (trial / 6) % 3;  // square and wide
    const TopicMatrix cost = random_costs(n, m, rng);
    const auto a = solve_assignment(cost);
    expect_valid(a, cost);
    EXPECT_NEAR(a.total_cost, brute_force_cost(cost), 1e-12) << "trial " << trial;
    // Tall: the transpose has the same least cost.
    const TopicMatrix tall = cost.transpose();
    const auto t = solve_assignment(tall);
    expect_valid(t, tall);
    EXPECT_NEAR(t.total_cost, a.total_cost, 1e-12);
  }
}

TEST(AssignmentTest, NonFiniteCostIsAnError) {
  TopicMatrix cost = TopicMatrix::Zero(2, 2);
  cost(1, 0) = std::numeric_limits<double>::quiet_NaN();
  EXPECT_THROW(solve_assignment(cost), Error);
}

TEST(AssignmentReferenceTest, SameLeastCostAsScipyLinearSumAssignment) {
  // Reference: scipy.optimize.linear_sum_assignment (tests/analysis/reference/scipy_assignment.py).
  testing::TempFolder folder("assignment");
  std::mt19937_64 rng(2026);
  const std::vector<std::pair<Eigen::Index, Eigen::Index>> shapes = {{5, 5},  {20, 20}, {60, 60}, {7, 12},
                                                                     {12, 7}, {30, 50}, {50, 30}, {1, 9}};
  std::vector<double> ours;
  std::string args;
  for (std::size_t s = 0; s < shapes.size(); ++s) {
    const TopicMatrix cost = random_costs(shapes[s].first, shapes[s].second, rng);
    const std::string path = folder.file("cost" + std::to_string(s) + ".csv");
    testing::write_matrix_csv(path, cost);
    args += " " + testing::shell_quote(path);
    const auto a = solve_assignment(cost);
    expect_valid(a, cost);
    ours.push_back(a.total_cost);
  }
  const auto scipy = testing::run_python("scipy_assignment.py", args);
  ASSERT_EQ(scipy.exit_code, 0) << scipy.text;
  for (std::size_t s = 0; s < shapes.size(); ++s) {
    EXPECT_NEAR(ours[s], scipy.at("cost_" + std::to_string(s)), 1e-9) << shapes[s].first << " x " << shapes[s].second;
  }
}

}  // namespace
}  // namespace loupe

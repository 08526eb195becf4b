#include "graph/hellinger_neighbours.h"

#include <fstream>
#include <set>
#include <sstream>

#include <gtest/gtest.h>

#include "common/error.h"
#include "graph_test_support.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

ProfileMatrix rows(std::initializer_list<std::initializer_list<double>> values) {
  ProfileMatrix m(static_cast<Eigen::Index>(values.size()), static_cast<Eigen::Index>(values.begin()->size()));
  Eigen::Index r = 0;
  for (const auto& row : values) {
    Eigen::Index c = 0;
    for (const double v : row) m(r, c++) = v;
    ++r;
  }
  return m;
}

TEST(HellingerNeighboursTest, SmallExampleFromTheHeader) {
  const ProfileMatrix theta = rows({{1.0, 0.0}, {0.9, 0.1}, {0.0, 1.0}});
  NeighbourOptions options;
  options.threads = 1;
  const NeighbourTable table = nearest_neighbours(theta, 1, options);
  ASSERT_EQ(table.num_documents(), 3u);
  EXPECT_EQ(table.neighbours_of(0)[0], 1u);
  EXPECT_EQ(table.neighbours_of(1)[0], 0u);
  EXPECT_EQ(table.neighbours_of(2)[0], 1u);
  // H = sqrt(1 - sum sqrt(p q)) by hand: a-b: sqrt(1 - sqrt(0.9)), c-b: sqrt(1 - sqrt(0.1)).
  EXPECT_NEAR(table.distances_of(0)[0], std::sqrt(1.0 - std::sqrt(0.9)), 1e-12);
  EXPECT_NEAR(table.distances_of(2)[0], std::sqrt(1.0 - std::sqrt(0.1)), 1e-12);
  EXPECT_NEAR(table.distances_of(0)[0], 0.2265, 5e-5);
  EXPECT_NEAR(table.distances_of(2)[0], 0.8269, 5e-5);
  EXPECT_NEAR(hellinger_between(theta, 0, 2), 1.0, 1e-15);
}

// The exact answer by brute force in double precision, for several sizes,
// block sizes and thread counts: the screened, blocked computation must give
// the very same neighbours in the same order.
TEST(HellingerNeighboursTest, EqualsBruteForceForAnyBlockAndThreadCount) {
  for (const auto& [n, k, block, threads] : std::vector<std::tuple<std::size_t, std::size_t, std::size_t, std::size_t>>{
           {50, 3, 16, 1}, {301, 10, 64, 2}, {301, 10, 512, 1}, {257, 1, 16, 2}, {40, 39, 16, 2}}) {
    const ProfileMatrix theta = test::random_profiles(n, 20, 0.3, 1000 + n + k);
    NeighbourOptions options;
    options.block_size = block;
    options.threads = threads;
    const NeighbourTable table = nearest_neighbours(theta, k, options);
    for (std::size_t d = 0; d < n; ++d) {
      const auto truth = test::brute_force_row(theta, d);
      for (std::size_t s = 0; s < k; ++s) {
        ASSERT_EQ(table.neighbours_of(d)[s], truth[s].second)
            << "n=" << n << " k=" << k << " doc " << d << " rank " << s;
        ASSERT_NEAR(table.distances_of(d)[s], truth[s].first, 1e-7);
      }
    }
  }
}

// Many identical and near-identical profiles: the float screening cannot
// separate them, so the exact fallback must take over and ties go to the lower index.
TEST(HellingerNeighboursTest, DuplicateProfilesFallBackToExactScan) {
  ProfileMatrix theta = test::random_profiles(120, 8, 0.5, 7);
  for (Eigen::Index d = 0; d < 60; ++d) theta.row(d) = theta.row(0);
  NeighbourOptions options;
  options.block_size = 32;
  options.threads = 2;
  const NeighbourTable table = nearest_neighbours(theta, 5, options);
  // Document 10's nearest are the other copies with the lowest indices: 0, 1, 2, 3, 4.
  const auto ids = table.neighbours_of(10);
  EXPECT_EQ(std::vector<std::uint32_t>(ids.begin(), ids.end()), (std::vector<std::uint32_t>{0, 1, 2, 3, 4}));
  for (const double h : table.distances_of(10)) EXPECT_EQ(h, 0.0);
  for (std::size_t d = 60; d < 120; ++d) {
    const auto truth = test::brute_force_row(theta, d);
    for (std::size_t s = 0; s < 5; ++s) ASSERT_NEAR(table.distances_of(d)[s], truth[s].first, 1e-7);
  }
}

TEST(HellingerNeighboursTest, PairsWithinDistanceEqualBruteForce) {
  const ProfileMatrix theta = test::random_profiles(260, 12, 0.4, 99);
  NeighbourOptions options;
  options.block_size = 64;
  options.threads = 2;
  for (const double limit : {0.2, 0.45, 1.0}) {
    const auto edges = pairs_within_distance(theta, limit, options);
    std::set<std::pair<std::uint32_t, std::uint32_t>> truth;
    for (std::size_t i = 0; i < 260; ++i)
      for (const auto& [h, j] : test::brute_force_row(theta, i))
        if (j > i && h <= limit) truth.emplace(static_cast<std::uint32_t>(i), j);
    std::set<std::pair<std::uint32_t, std::uint32_t>> found;
    for (const auto& e : edges) {
      EXPECT_LT(e.source, e.target);
      EXPECT_LE(e.distance, limit);
      found.emplace(e.source, e.target);
    }
    EXPECT_EQ(found, truth) << "limit " << limit;
    EXPECT_EQ(edges.size(), found.size());
  }
  EXPECT_EQ(pairs_within_distance(theta, 1.0, options).size(), 260u * 259u / 2u);
}

TEST(HellingerNeighboursTest, EitherAndMutualNeighbourEdges) {
  // With k = 1: a's nearest is b, b's is a, c's is b: either = {ab, bc}, mutual = {ab}.
  const ProfileMatrix theta = rows({{1.0, 0.0}, {0.9, 0.1}, {0.0, 1.0}});
  const NeighbourTable table = nearest_neighbours(theta, 1);
  const auto either = neighbour_edges(table, NeighbourRule::either);
  const auto mutual = neighbour_edges(table, NeighbourRule::mutual);
  ASSERT_EQ(either.size(), 2u);
  EXPECT_EQ(either[0].source, 0u);
  EXPECT_EQ(either[0].target, 1u);
  EXPECT_EQ(either[1].source, 1u);
  EXPECT_EQ(either[1].target, 2u);
  ASSERT_EQ(mutual.size(), 1u);
  EXPECT_EQ(mutual[0].target, 1u);
}

TEST(HellingerNeighboursTest, BadInputIsRefusedWithAClearMessage) {
  const ProfileMatrix theta = test::random_profiles(5, 3, 1.0, 1);
  try {
    nearest_neighbours(theta, 5);
    FAIL() << "k = N accepted";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("k = 5"), std::string::npos) << e.what();
    EXPECT_NE(std::string(e.what()).find("there are 5"), std::string::npos) << e.what();
  }
  EXPECT_THROW(nearest_neighbours(theta, 7), Error);
  EXPECT_THROW(nearest_neighbours(theta, 0), Error);
  for (const double bad : {0.0, -0.1, 1.5, std::nan("")}) {
    try {
      pairs_within_distance(theta, bad);
      FAIL() << "threshold " << bad << " accepted";
    } catch (const Error& e) {
      EXPECT_NE(std::string(e.what()).find("(0, 1]"), std::string::npos) << e.what();
    }
  }
  const ProfileMatrix single = test::random_profiles(1, 3, 1.0, 1);
  try {
    pairs_within_distance(single, 0.5);
    FAIL() << "a single document accepted";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("at least 2"), std::string::npos) << e.what();
  }
  ProfileMatrix unnormalised = theta;
  unnormalised(2, 1) += 0.5;
  try {
    nearest_neighbours(unnormalised, 2);
    FAIL() << "rows not summing to 1 accepted";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find("document 2"), std::string::npos) << e.what();
  }
}

// Outside reference: SciPy's cdist (Debian python3-scipy) on the square-root
// profiles gives the brute-force Euclidean distances ||sqrt p - sqrt q||, whose
// order is the Hellinger order; neighbour sets must be identical, ties aside.
TEST(HellingerNeighboursReferenceTest, MatchesScipyCdistOnSquareRootProfiles) {
  const std::size_t n = 1500;
  const std::size_t k = 10;
  const ProfileMatrix theta = test::random_profiles(n, 30, 0.2, 4242);
  testing::TempFolder folder("graph-knn");
  {
    std::ostringstream csv;
    csv.precision(17);
    for (Eigen::Index d = 0; d < theta.rows(); ++d) {
      for (Eigen::Index t = 0; t < theta.cols(); ++t) csv << (t ? "," : "") << theta(d, t);
      csv << "\n";
    }
    folder.write("theta.csv", csv.str());
  }
  const auto reference =
      test::run_python_reference("knn_cdist.py", test::shell_quote(folder.file("theta.csv")) + " " + std::to_string(k) +
                                                     " " + test::shell_quote(folder.file("neighbours.txt")));
  ASSERT_EQ(reference.exit_code, 0) << reference.output;
  NeighbourOptions options;
  options.threads = 2;
  const NeighbourTable table = nearest_neighbours(theta, k, options);
  std::ifstream in(folder.file("neighbours.txt"));
  std::string line;
  std::size_t d = 0;
  std::size_t differing = 0;
  while (std::getline(in, line)) {
    // Line d: "j1 j2 ... jk | kth_distance next_distance" (scipy, H = cdist / sqrt 2).
    std::istringstream fields(line);
    std::set<std::uint32_t> theirs;
    for (std::size_t s = 0; s < k; ++s) {
      std::uint32_t j;
      fields >> j;
      theirs.insert(j);
    }
    std::string bar;
    double kth = 0, next = 0;
    fields >> bar >> kth >> next;
    const auto mine_span = table.neighbours_of(d);
    const std::set<std::uint32_t> mine(mine_span.begin(), mine_span.end());
    const bool tie_at_k = next - kth < 1e-12;
    if (mine != theirs) {
      ++differing;
      EXPECT_TRUE(tie_at_k) << "document " << d << " differs from SciPy without a tie at rank k";
    }
    EXPECT_NEAR(table.distances_of(d)[k - 1], kth, 1e-9) << "document " << d;
    ++d;
  }
  EXPECT_EQ(d, n);
  EXPECT_EQ(differing, 0u);
}

}  // namespace
}  // namespace loupe

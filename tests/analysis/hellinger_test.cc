// Hellinger and Jensen-Shannon distances; the square-root embedding.
#include "analysis/hellinger.h"

#include <gtest/gtest.h>

#include <cmath>
#include <fstream>

#include "analysis_test_support.h"

namespace loupe {
namespace {

TEST(HellingerTest, KnownValues) {
  const std::vector<double> a{1, 0}, b{0, 1}, c{0.5, 0.5};
  EXPECT_DOUBLE_EQ(hellinger_distance(a, b), 1.0);
  EXPECT_DOUBLE_EQ(hellinger_distance(a, a), 0.0);
  // H((1,0), (1/2,1/2)) = sqrt(1 - sqrt(1/2)).
  EXPECT_NEAR(hellinger_distance(a, c), std::sqrt(1 - std::sqrt(0.5)), 1e-15);
  EXPECT_DOUBLE_EQ(jensen_shannon_distance(a, b), 1.0);
  EXPECT_DOUBLE_EQ(jensen_shannon_distance(c, c), 0.0);
  // JSD((1,0), (1/2,1/2)) = 1/2 [log2(4/3)] + 1/2 [1/2 log2(2/3) + 1/2 log2(2)].
  const double jsd = 0.5 * std::log2(4.0 / 3.0) + 0.25 * std::log2(2.0 / 3.0) + 0.25;
  EXPECT_NEAR(jensen_shannon_distance(a, c), std::sqrt(jsd), 1e-15);
}

TEST(HellingerTest, EmbeddingDistancesAreHellingerDistances) {
  const auto data = testing::draw_documents({10}, {testing::tilted_profile(7, 1)}, {3}, 1);
  const TopicMatrix y = sqrt_embedding(data.theta);
  const auto condensed = condensed_hellinger_distances(data.theta);
  ASSERT_EQ(condensed.size(), 45u);
  std::size_t idx = 0;
  for (Eigen::Index i = 0; i < 10; ++i) {
    for (Eigen::Index j = i + 1; j < 10; ++j, ++idx) {
      const auto ri = data.theta.row(i), rj = data.theta.row(j);
      const std::vector<double> p(ri.begin(), ri.end()), q(rj.begin(), rj.end());
      const double h = hellinger_distance(p, q);
      // H(p,q) = sqrt(1 - sum sqrt(p q)) (ARCHITECTURE.md) = ||y_i - y_j||.
      double bc = 0;
      for (std::size_t k = 0; k < p.size(); ++k) bc += std::sqrt(p[k] * q[k]);
      EXPECT_NEAR(h, std::sqrt(1 - bc), 1e-12);
      EXPECT_NEAR((y.row(i) - y.row(j)).norm(), h, 1e-14);
      EXPECT_NEAR(condensed[idx], h, 1e-7);  // via the matrix product: 1 - BC loses digits when close
    }
  }
}

// Outside reference: SciPy's scipy.spatial.distance.jensenshannon(p, q, base=2)
// and NumPy's norm of sqrt p - sqrt q over sqrt 2 (tests/analysis/reference/scipy_distances.py).
TEST(HellingerReferenceTest, MatchesSciPy) {
  testing::TempFolder folder("analysis");
  const auto data = testing::draw_documents({12}, {testing::tilted_profile(9, 2)}, {0.8}, 17);
  testing::write_matrix_csv(folder.file("pairs.csv"), data.theta);
  const auto reference = testing::run_python("scipy_distances.py", testing::shell_quote(folder.file("pairs.csv")));
  ASSERT_EQ(reference.exit_code, 0) << reference.text;
  for (Eigen::Index i = 0; i < 6; ++i) {
    const auto ri = data.theta.row(2 * i), rj = data.theta.row(2 * i + 1);
    const std::vector<double> p(ri.begin(), ri.end()), q(rj.begin(), rj.end());
    EXPECT_NEAR(jensen_shannon_distance(p, q), reference.at("js_" + std::to_string(i)), 1e-12);
    EXPECT_NEAR(hellinger_distance(p, q), reference.at("hellinger_" + std::to_string(i)), 1e-12);
  }
}

}  // namespace
}  // namespace loupe

// Distances between topic profiles. Hellinger: H(p,q) = sqrt(1 - sum_k sqrt(p_k q_k))
// = ||sqrt p - sqrt q||_2 / sqrt 2, so every document becomes the point
// y = sqrt(theta) / sqrt 2 and Hellinger distances are plain Euclidean ones there.
#pragma once

#include <span>
#include <vector>

#include <Eigen/Dense>

namespace loupe {

// Documents x topics (theta) and other per-document rows; row-major so that a
// document's topic shares lie next to each other.
using TopicMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

// y_i = sqrt(theta_i) / sqrt(2); ||y_i - y_j|| = H(theta_i, theta_j).
// Example: theta row (0.5, 0.5) -> (0.5, 0.5); row (1, 0) -> (0.7071, 0).
TopicMatrix sqrt_embedding(const TopicMatrix& theta);

// Hellinger distance in [0, 1]. Example: H((1,0), (0,1)) = 1; H(p, p) = 0.
double hellinger_distance(std::span<const double> p, std::span<const double> q);

// Jensen-Shannon distance in [0, 1]: the square root of the Jensen-Shannon
// divergence with base-2 logarithms, JSD = (KL(p||m) + KL(q||m)) / 2, m = (p + q) / 2.
// Example: JS((1,0), (0,1)) = 1.
double jensen_shannon_distance(std::span<const double> p, std::span<const double> q);

// All N(N-1)/2 Hellinger distances between the rows of theta, in the order
// (0,1), (0,2), ..., (0,N-1), (1,2), ... (R's dist and SciPy's condensed order).
// One matrix product of the square-root profiles: H_ij^2 = 1 - <sqrt theta_i, sqrt theta_j>.
std::vector<double> condensed_hellinger_distances(const TopicMatrix& theta);

}  // namespace loupe

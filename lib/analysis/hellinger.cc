#include "analysis/hellinger.h"

#include <algorithm>
#include <cassert>
#include <cmath>

namespace loupe {

TopicMatrix sqrt_embedding(const TopicMatrix& theta) {
  // y = sqrt(theta) / sqrt(2) (ARCHITECTURE.md: Hellinger is Euclidean in this embedding).
  return (theta.array().max(0.0).sqrt() * std::sqrt(0.5)).matrix();
}

double hellinger_distance(std::span<const double> p, std::span<const double> q) {
  assert(p.size() == q.size());
  // H^2 = (1/2) sum_k (sqrt p_k - sqrt q_k)^2: summing squares avoids the
  // cancellation in 1 - sum sqrt(p q) when p and q are close.
  double sum = 0;
  for (std::size_t k = 0; k < p.size(); ++k) {
    const double d = std::sqrt(std::max(p[k], 0.0)) - std::sqrt(std::max(q[k], 0.0));
    sum += d * d;
  }
  return std::sqrt(0.5 * sum);
}

double jensen_shannon_distance(std::span<const double> p, std::span<const double> q) {
  assert(p.size() == q.size());
  // JSD = (1/2) sum_k [p_k log2(p_k / m_k) + q_k log2(q_k / m_k)], m = (p + q) / 2; 0 log 0 = 0.
  double sum = 0;
  for (std::size_t k = 0; k < p.size(); ++k) {
    const double m = 0.5 * (p[k] + q[k]);
    if (p[k] > 0) sum += p[k] * std::log2(p[k] / m);
    if (q[k] > 0) sum += q[k] * std::log2(q[k] / m);
  }
  return std::sqrt(std::max(0.5 * sum, 0.0));
}

std::vector<double> condensed_hellinger_distances(const TopicMatrix& theta) {
  const auto n = static_cast<std::size_t>(theta.rows());
  const TopicMatrix root = theta.array().max(0.0).sqrt().matrix();
  // Bhattacharyya coefficients BC_ij = <sqrt theta_i, sqrt theta_j>; H_ij = sqrt(1 - BC_ij).
  const Eigen::MatrixXd overlap = root * root.transpose();
  std::vector<double> distances;
  distances.reserve(n > 1 ? n * (n - 1) / 2 : 0);
  for (std::size_t i = 0; i < n; ++i) {
    const auto ii = static_cast<Eigen::Index>(i);
    for (std::size_t j = i + 1; j < n; ++j) {
      const double bc = overlap(static_cast<Eigen::Index>(j), ii);
      distances.push_back(std::sqrt(std::max(0.0, 1.0 - bc)));
    }
  }
  return distances;
}

}  // namespace loupe

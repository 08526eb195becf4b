#include "analysis/topic_alignment.h"

#include <algorithm>
#include <cmath>
#include <string>

#include "analysis/assignment.h"
#include "common/error.h"

namespace loupe {
namespace {

// K x V matrix of sqrt(phi) for one chain.
TopicMatrix sqrt_phi(const Model& model, std::size_t chain) {
  const auto k = static_cast<Eigen::Index>(model.topic_count());
  const auto v = static_cast<Eigen::Index>(model.vocabulary_size());
  TopicMatrix root(k, v);
  for (Eigen::Index t = 0; t < k; ++t) {
    const auto row = model.phi(chain, static_cast<std::size_t>(t));
    for (Eigen::Index w = 0; w < v; ++w) root(t, w) = std::sqrt(static_cast<double>(row[static_cast<std::size_t>(w)]));
  }
  return root;
}

// H = sqrt(max(0, 1 - <sqrt p, sqrt q>)), clamped against rounding.
TopicMatrix distances_from_roots(const TopicMatrix& a, const TopicMatrix& b) {
  TopicMatrix distance = a * b.transpose();
  for (Eigen::Index i = 0; i < distance.rows(); ++i) {
    for (Eigen::Index j = 0; j < distance.cols(); ++j) {
      distance(i, j) = std::sqrt(std::clamp(1.0 - distance(i, j), 0.0, 1.0));
    }
  }
  return distance;
}

}  // namespace

TopicMatrix topic_distances(const Model& model, std::size_t chain_a, std::size_t chain_b) {
  return distances_from_roots(sqrt_phi(model, chain_a), sqrt_phi(model, chain_b));
}

ChainAlignment align_chains(const Model& model, const AlignmentOptions& options) {
  const std::size_t chains = model.chains.size();
  if (chains < 2) {
    throw Error("topic stability needs at least two chains and this model has " + std::to_string(chains) +
                "; fit again with --chains 2 or more (4 is the usual choice)");
  }
  if (options.reference_chain >= chains) {
    throw Error("reference chain " + std::to_string(options.reference_chain + 1) + " does not exist; the model has " +
                std::to_string(chains) + " chains");
  }
  const std::size_t k = model.topic_count();
  const std::size_t ref = options.reference_chain;
  ChainAlignment result;
  result.reference_chain = ref;
  result.topic_of.assign(chains, std::vector<std::size_t>(k));
  result.similarity.assign(chains, std::vector<double>(k, 1.0));
  const TopicMatrix ref_roots = sqrt_phi(model, ref);
  for (std::size_t c = 0; c < chains; ++c) {
    if (c == ref) {
      for (std::size_t t = 0; t < k; ++t) result.topic_of[c][t] = t;
      continue;
    }
    const TopicMatrix distance = distances_from_roots(ref_roots, sqrt_phi(model, c));
    const Assignment matched = solve_assignment(distance);
    for (std::size_t t = 0; t < k; ++t) {
      result.topic_of[c][t] = matched.column_of_row[t];
      result.similarity[c][t] =
          1.0 - distance(static_cast<Eigen::Index>(t), static_cast<Eigen::Index>(matched.column_of_row[t]));
    }
  }
  result.stability.assign(k, 0.0);
  result.worst_similarity.assign(k, 1.0);
  result.stable.assign(k, false);
  for (std::size_t t = 0; t < k; ++t) {
    double sum = 0;
    for (std::size_t c = 0; c < chains; ++c) {
      if (c == ref) continue;
      sum += result.similarity[c][t];
      result.worst_similarity[t] = std::min(result.worst_similarity[t], result.similarity[c][t]);
    }
    result.stability[t] = sum / static_cast<double>(chains - 1);
    result.stable[t] = result.stability[t] >= options.stable_threshold;
  }
  // Consensus: means of the matched rows (phi) and columns (theta) over chains.
  const auto kk = static_cast<Eigen::Index>(k);
  const auto v = static_cast<Eigen::Index>(model.vocabulary_size());
  const auto d = static_cast<Eigen::Index>(model.num_documents());
  result.consensus_phi = TopicMatrix::Zero(kk, v);
  result.consensus_theta = TopicMatrix::Zero(d, kk);
  const double weight = 1.0 / static_cast<double>(chains);
  for (std::size_t c = 0; c < chains; ++c) {
    for (Eigen::Index t = 0; t < kk; ++t) {
      const auto row = model.phi(c, result.topic_of[c][static_cast<std::size_t>(t)]);
      for (Eigen::Index w = 0; w < v; ++w) result.consensus_phi(t, w) += weight * row[static_cast<std::size_t>(w)];
    }
    result.consensus_theta += weight * aligned_theta(model, result, c);
  }
  return result;
}

TopicMatrix aligned_theta(const Model& model, const ChainAlignment& alignment, std::size_t chain) {
  const auto k = static_cast<Eigen::Index>(model.topic_count());
  const auto d = static_cast<Eigen::Index>(model.num_documents());
  TopicMatrix theta(d, k);
  for (Eigen::Index doc = 0; doc < d; ++doc) {
    const auto row = model.theta(chain, static_cast<std::size_t>(doc));
    for (Eigen::Index t = 0; t < k; ++t) {
      theta(doc, t) = row[alignment.topic_of[chain][static_cast<std::size_t>(t)]];
    }
  }
  return theta;
}

std::vector<RedundantPair> redundant_topic_pairs(const Model& model, std::size_t chain, double threshold) {
  const TopicMatrix roots = sqrt_phi(model, chain);
  const TopicMatrix distance = distances_from_roots(roots, roots);
  std::vector<RedundantPair> pairs;
  for (Eigen::Index a = 0; a < distance.rows(); ++a) {
    for (Eigen::Index b = a + 1; b < distance.cols(); ++b) {
      if (distance(a, b) < threshold) {
        pairs.push_back({static_cast<std::size_t>(a), static_cast<std::size_t>(b), distance(a, b)});
      }
    }
  }
  std::sort(pairs.begin(), pairs.end(), [](const RedundantPair& x, const RedundantPair& y) {
    if (x.hellinger != y.hellinger) return x.hellinger < y.hellinger;
    return std::make_pair(x.topic_a, x.topic_b) < std::make_pair(y.topic_a, y.topic_b);
  });
  return pairs;
}

}  // namespace loupe

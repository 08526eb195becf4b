// Topics across chains: every chain's topics matched to a reference chain's by
// the Hungarian algorithm on Hellinger distances between topic-word rows (phi),
// a stability score per topic, consensus topics and document profiles, and
// pairs of near-identical topics within a chain (redundancy, for choosing K).
#pragma once

#include <cstddef>
#include <cstdint>
#include <vector>

#include "analysis/hellinger.h"
#include "model/model.h"

namespace loupe {

struct AlignmentOptions {
  std::size_t reference_chain = 0;  // 0-based
  // A topic is stable when its mean matched similarity (1 - Hellinger) across
  // the other chains is at least this.
  double stable_threshold = 0.8;
};

struct ChainAlignment {
  std::size_t reference_chain = 0;
  // topic_of[c][k]: the topic of chain c matched to reference topic k (identity for the reference).
  std::vector<std::vector<std::size_t>> topic_of;
  // similarity[c][k] = 1 - H(phi_ref_k, phi_c_topic_of[c][k]); 1 for the reference chain.
  std::vector<std::vector<double>> similarity;
  std::vector<double> stability;         // per reference topic: mean similarity over the other chains
  std::vector<double> worst_similarity;  // per reference topic: lowest similarity over the other chains
  std::vector<bool> stable;              // stability >= options.stable_threshold
  TopicMatrix consensus_phi;             // K x V: mean of the matched phi rows over chains
  TopicMatrix consensus_theta;           // D x K: mean of the matched theta columns over chains
};

// Hellinger distances between the K rows of phi in chain a and those in chain b
// (K x K, entry (i, j) = H(phi_a_i, phi_b_j)), from one matrix product of
// square-root rows: H^2 = 1 - <sqrt p, sqrt q>.
TopicMatrix topic_distances(const Model& model, std::size_t chain_a, std::size_t chain_b);

// Aligns every chain to options.reference_chain. Needs at least two chains:
// loupe::Error otherwise, saying how to fit more.
ChainAlignment align_chains(const Model& model, const AlignmentOptions& options = {});

// Reorders chain c's topics to the reference's (via alignment.topic_of) and
// returns that chain's theta (D x K) in the reference topic order.
TopicMatrix aligned_theta(const Model& model, const ChainAlignment& alignment, std::size_t chain);

struct RedundantPair {
  std::size_t topic_a = 0, topic_b = 0;  // 0-based, topic_a < topic_b
  double hellinger = 0;
};

// Pairs of topics within one chain closer than `threshold` in Hellinger distance:
// a sign that K is too large and themes have been split. Closest first.
std::vector<RedundantPair> redundant_topic_pairs(const Model& model, std::size_t chain, double threshold);

}  // namespace loupe

// Near-duplicate documents: MinHash signatures of word shingles (Broder 1997),
// LSH banding to find candidate pairs, every candidate verified by its exact
// Jaccard similarity, and clusters of near-duplicates (connected components).
// Shingles are taken over the corpus tokens, i.e. AFTER stop-word removal and
// vocabulary pruning: "the harbour master wrote" -> tokens (harbour, master,
// wrote) -> 2-word shingles {harbour master, master wrote}.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <limits>
#include <span>
#include <vector>

#include <nlohmann/json.hpp>

#include "corpus/corpus.h"
#include "graph/document_profiles.h"

namespace loupe {

// Each document's distinct shingles as sorted 64-bit hashes (CSR layout).
struct ShingleSets {
  std::vector<std::uint64_t> offset{0};
  std::vector<std::uint64_t> hash;

  std::size_t num_documents() const { return offset.size() - 1; }
  std::span<const std::uint64_t> of(std::size_t d) const {
    return {hash.data() + offset[d], static_cast<std::size_t>(offset[d + 1] - offset[d])};
  }
};

// Shingles of `words` consecutive tokens. A document with fewer tokens than
// that (but at least one) has one shingle, all of its tokens; an empty one has none.
ShingleSets word_shingles(const Corpus& corpus, std::size_t words, std::size_t threads = 1);

// The hash of one shingle (the word ids in order), as word_shingles computes it.
std::uint64_t shingle_hash(std::span<const WordId> words);

// |A n B| / |A u B| of two sorted sets; 0 when both are empty.
double jaccard_similarity(std::span<const std::uint64_t> a, std::span<const std::uint64_t> b);

// LSH banding: the signature of `bands * rows` values is cut into bands of
// `rows`; two documents are candidates when any band agrees in full. A pair with
// Jaccard similarity J becomes a candidate with probability 1 - (1 - J^rows)^bands.
struct Banding {
  std::size_t bands = 0;
  std::size_t rows = 0;
};
double candidate_probability(double jaccard, const Banding& banding);
// The most rows per band (fewest false candidates) such that a pair exactly at
// `threshold` is a candidate with probability >= target, using at most
// num_hashes values. Example: 128 hashes, threshold 0.8, target 0.999 -> 25 bands of 5.
Banding choose_banding(std::size_t num_hashes, double threshold, double target = 0.999);

using StageProgress = std::function<void(const char* stage, std::size_t done, std::size_t total)>;

struct NearDuplicateOptions {
  // Defaults: 2-word shingles (stop words are already gone, so pairs of
  // content words) and Jaccard >= 0.5, which keeps copies with a few edits:
  // the demo's near copy (7 edits in about 110 tokens) has 0.75, and no other
  // demo pair reaches 0.3.
  std::size_t shingle_words = 2;
  double threshold = 0.5;         // minimum exact Jaccard similarity, in (0, 1]
  std::size_t num_hashes = 128;   // MinHash signature length
  std::size_t rows_per_band = 0;  // 0: choose_banding(num_hashes, threshold)
  std::uint64_t seed = 1;         // the hash functions
  std::size_t threads = 0;        // 0: all hardware threads; never changes the result
  StageProgress progress;         // called from the calling thread only
};

struct NearDuplicatePair {
  std::uint32_t first = 0;  // document indices, first < second
  std::uint32_t second = 0;
  double jaccard = 0;   // exact, over the two shingle sets
  double estimate = 0;  // share of agreeing MinHash values
  std::size_t shared_shingles = 0;
  double topic_distance = std::numeric_limits<double>::quiet_NaN();  // Hellinger, when a model is given
};

struct NearDuplicateResult {
  NearDuplicateOptions options;  // as used (rows_per_band filled in)
  Banding banding;
  std::size_t documents = 0;
  std::size_t documents_without_shingles = 0;
  std::size_t candidates = 0;            // distinct candidate pairs verified
  std::vector<NearDuplicatePair> pairs;  // Jaccard >= threshold, highest first, then by indices
  // Components of the near-duplicate pairs, largest first (ties: lowest member);
  // members ascending. cluster_of[d] is d's cluster, kNoCluster when none.
  std::vector<std::vector<std::uint32_t>> clusters;
  std::vector<std::uint32_t> cluster_of;
  static constexpr std::uint32_t kNoCluster = 0xFFFFFFFFu;
};

// Throws loupe::Error for a threshold outside (0, 1], shingle_words 0,
// num_hashes 0, or rows_per_band above num_hashes.
NearDuplicateResult find_near_duplicates(const Corpus& corpus, const NearDuplicateOptions& options);

// Fills topic_distance of every pair from theta (rows = corpus documents).
void add_topic_distances(NearDuplicateResult& result, const ProfileMatrix& theta);

// {"settings": ..., "pairs": [...], "clusters": [...]} with document ids; clusters are numbered
// from 1 in files and tables (cluster_of holds 0-based indices), as chains and topics are.
nlohmann::json near_duplicates_json(const NearDuplicateResult& result, const Corpus& corpus);
// CSV: first,second,first_group,second_group,jaccard,minhash_estimate,shared_shingles,topic_distance,cluster
std::string near_duplicates_csv(const NearDuplicateResult& result, const Corpus& corpus);

}  // namespace loupe

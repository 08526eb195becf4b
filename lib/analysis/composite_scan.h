// Is a text composite? The energy-distance change-point test of Matteson & James (2014, JASA, "A
// nonparametric approach for multiple change point analysis of multivariate data") on the topic
// profiles of one document's consecutive segments, found by hierarchical splitting with permutation p-values.
#pragma once

#include <cstddef>
#include <cstdint>
#include <span>
#include <string>
#include <utility>
#include <vector>

#include <Eigen/Dense>
#include <nlohmann/json.hpp>

#include "analysis/attribution.h"
#include "analysis/hellinger.h"
#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe {

// The exponent alpha of the energy distance |x - y|^alpha. alpha = 1, the paper's
// default: distances between segments are plain Hellinger distances (the
// Euclidean distance in the square-root embedding of hellinger.h).
inline constexpr double kEnergyDistanceExponent = 1.0;

struct ChangePointOptions {
  double level = 0.05;             // a change point is kept while its p-value is at most this
  std::size_t permutations = 999;  // P, per step of the search
  std::size_t min_segments = 2;    // segments on each side of a change point, at least (>= 2)
  std::uint64_t seed = 1;
  std::size_t threads = 2;  // never changes the results

  // Throws loupe::Error naming the option (--level, --permutations, --min-segments).
  void validate() const;
};

// The statistic of Matteson & James (2014) for a stretch of n points, with alpha = 1.
// For X = the first tau points and Y = the points tau .. kappa-1 (kappa <= n):
//   E(X, Y) = 2/(m r) sum_{i,j} |X_i - Y_j| - 1/C(m,2) sum_{i<k} |X_i - X_k|
//             - 1/C(r,2) sum_{j<k} |Y_j - Y_k|,        m = tau, r = kappa - tau,
//   Q(X, Y) = m r / (m + r) * E(X, Y).
// As in the paper, a split tau is scored by its best end kappa, so a block in
// the middle of the stretch (a b a) stands out as well as a change between two
// halves: statistic[tau] = max over kappa of Q, with min_segments <= tau and
// kappa - tau >= min_segments (kappa = n, "Y = the rest", is one of the ends
// tried), NaN where no kappa is allowed; best_split is the first tau with the
// largest statistic, best_end its kappa.
// Example: the points 0, 0, 1, 1 on a line -> statistic[2] = Q with kappa = 4 = 2.
struct SplitStatistics {
  std::vector<double> statistic;      // n + 1 values, NaN where a side would be too short
  std::vector<std::size_t> best_end;  // n + 1 values: the kappa of statistic[tau] (0 where NaN)
  std::size_t best_split = 0;
  std::size_t best_split_end = 0;
  double best_statistic = 0;
};

// distances: n x n, symmetric, zero diagonal. Throws loupe::Error when
// min_segments < 2 or n < 2 * min_segments.
SplitStatistics energy_split_statistics(const Eigen::MatrixXd& distances, std::size_t min_segments);

// The n x n Hellinger distances between the rows of theta (Euclidean in the square-root embedding).
Eigen::MatrixXd hellinger_distance_matrix(const TopicMatrix& theta);

struct ChangePoint {
  std::size_t position = 0;                        // the first segment after the change (0-based in the sequence)
  double statistic = 0;                            // Q at this split of its stretch, with its best end
  std::size_t end = 0;                             // that end kappa: Y = segments position .. end-1
  double p_value = 0;                              // permutation p-value of the step that found it
  std::size_t stretch_begin = 0, stretch_end = 0;  // the stretch [begin, end) it divided
  std::size_t step = 0;                            // 1 for the first change point found, 2 for the next, ...
};

// Hierarchical search (the paper's E-divisive procedure): at each step the
// stretches between the change points found so far are each split at their
// best (tau, kappa), and the stretch with the largest Q offers the candidate tau. Its p-value
// comes from P permutations that shuffle the segments within every stretch
// independently, each scored by its own maximum of Q over every (tau, kappa) of
// every stretch; p = (1 + b) / (1 + P). The candidate is kept when p <= level, and the
// search goes on; the first candidate that is not kept ends it. Permutation r of
// step s uses the random stream stream_seed(stream_seed(seed, permutation, s), permutation, r).
struct ChangePointScan {
  std::size_t segments = 0;
  std::vector<ChangePoint> change_points;  // ordered by position
  bool has_last_candidate = false;         // false when no stretch could be split further
  ChangePoint last_candidate;              // the candidate that was not kept (p > level)
  ChangePointOptions options;              // as used, the seed included
  // Plain words, "" when none: too few permutations for the level, or too few
  // segments: shuffles that keep a split's two sides together reproduce its Q, so
  // p cannot fall much below 2 / C(n, tau) (0.2 for 5 segments split 2 | 3).
  std::string warning;
};

// theta: one row per segment, in text order. `document` names the text in messages.
// Throws loupe::Error for bad options, or when the text has fewer than
// 2 * min_segments segments.
// The smallest p-value a text of n segments can give: 2 / C(n, floor(n / 2)), the
// chance that a shuffle keeps the two halves of the best possible split (about).
double smallest_attainable_p_value(std::size_t segments);
ChangePointScan find_change_points(const TopicMatrix& theta, const ChangePointOptions& options,
                                   const std::string& document);

// ---------------------------------------------------------------------------
// Scanning the segmented texts of a corpus with a fitted model.

// A source document cut into segments at ingestion (`loupe ingest --segment-words N`).
struct SegmentedText {
  std::string id;  // the source document's id (its segments' parent_id)
  DocumentRole role = DocumentRole::known;
  std::uint32_t group = kNoGroup;
  std::vector<std::size_t> rows;            // corpus (= model) document index of each segment, in text order
  std::vector<std::string> segment_ids;     // "PARENT#001", ...
  std::vector<std::uint64_t> first_tokens;  // each segment's first token in the source's token stream
  std::vector<std::size_t> tokens;          // each segment's length in tokens

  std::size_t num_segments() const { return rows.size(); }
};

// Every segmented source document, in corpus order. Throws loupe::Error when a
// document's segments are inconsistent (a missing or repeated index).
std::vector<SegmentedText> segmented_texts(const Corpus& corpus);

// The named texts (source ids, in the order given), or, with no names, every
// segmented disputed text. Throws loupe::Error, saying how to ingest with
// segments, for a name not in the corpus, a text that is not segmented, a corpus
// without segmented texts, or (no names) without segmented disputed texts.
std::vector<SegmentedText> texts_to_scan(const Corpus& corpus, std::span<const std::string> ids);

struct CompositeScanOptions {
  ChangePointOptions change_points;  // one seed for every chain and text
  // A segment or stretch is "none of the groups" when every group's conformal
  // p-value is at or below this (analysis/attribution.h).
  double none_level = kDefaultNoneLevel;
};

// One segment scored against every group (conformal p-values of attribution.h).
struct SegmentEvidence {
  std::vector<CandidateEvidence> evidence;  // one per group, in group order
  Verdict verdict;                          // the best group (highest p-value) or "none"
};

// A stretch of segments between change points (or the text's ends): its
// token-weighted mean profile scored against every group; nearest = the group
// whose centroid is nearest that mean.
struct StretchEvidence {
  std::size_t begin = 0, end = 0;  // segments [begin, end)
  std::vector<CandidateEvidence> evidence;
  std::uint32_t nearest = kNoCandidate;
  double distance = 0;
  double p_value = 0;
};

struct ChainScan {
  int chain = 0;
  ChangePointScan change_points;
  // Empty when no attribution reference could be built (see CompositeScan::warnings).
  std::vector<SegmentEvidence> segments;   // one per segment
  std::vector<StretchEvidence> stretches;  // change_points.size() + 1, in text order
};

struct TextScan {
  SegmentedText text;
  std::vector<ChainScan> chains;
  // Across chains.
  std::size_t chains_with_change = 0;  // chains that found at least one change point
  double share_with_change = 0;
  std::size_t fewest_change_points = 0, most_change_points = 0;
  // The first change point each chain found (its strongest): the range of its
  // position, in segments and in tokens (first token of the segment after it).
  std::size_t first_position_min = 0, first_position_max = 0;
  std::uint64_t first_token_min = 0, first_token_max = 0;
};

struct CompositeScan {
  std::vector<std::string> group_names;      // the groups segments are scored against
  std::vector<std::size_t> reference_sizes;  // known documents per group
  std::size_t num_chains = 0;
  std::vector<TextScan> texts;
  CompositeScanOptions options;
  // Texts chosen by default (no names given) with fewer than 2 * min_segments
  // segments, left out: (id, segments).
  std::vector<std::pair<std::string, std::size_t>> texts_set_aside;
  std::vector<std::string> warnings;  // plain words, once each
};

// Runs find_change_points on each text under every chain (theta of its segments)
// and scores its segments and stretches against the groups' known documents
// (attribution.h's conformal reference, built per chain from known_documents();
// a scanned known text is left out of its own reference). `corpus` must be the
// model's corpus (check it with check_model_matches). Without known documents in
// at least two groups the change points are still found and a warning says why
// the attribution is missing. Without names, texts too short for the test are
// set aside (listed in texts_set_aside). Throws loupe::Error as texts_to_scan and
// find_change_points do, and when every text chosen by default is too short.
CompositeScan scan_composite_texts(const Model& model, const Corpus& corpus, std::span<const std::string> ids,
                                   const CompositeScanOptions& options);

// Everything, including the method, options, seed and the cautions (analysis/attribution_cautions.h).
nlohmann::json to_json(const CompositeScan& scan);
// One line per text, chain and segment; the cautions as '#' comment lines above the header.
std::string to_csv(const CompositeScan& scan);

}  // namespace loupe

// Attribution of disputed texts with calibrated uncertainty: conformal p-values
// against each candidate group's centroid in the square-root (Hellinger) embedding,
// a k-nearest-neighbour vote as a second view, and a leave-one-out calibration.
//
// Method. Every document is the point y = sqrt(theta) / sqrt(2), where Hellinger
// distance is Euclidean (analysis/hellinger.h). A group's reference is its known
// documents' centroid c_g and their leave-one-out distances a_i = ||y_i - c_g^(-i)||,
// c_g^(-i) = (n c_g - y_i) / (n - 1): how far a member of the group lies from the
// rest of it. A document at distance d from c_g gets the conformal p-value (Vovk,
// Gammerman & Shafer 2005, "Algorithmic learning in a random world")
//   p_g = (1 + #{i in g : a_i >= d}) / (1 + n_g)
// in the plain "+1" form without random tie-breaking (no smoothing): if the
// document is exchangeable with the group's known documents, P(p_g <= e) <= e.
// Ties count as ">=" with a relative tolerance of 1e-9, so distances that differ
// only by rounding still tie.
//
// Verdict: the test rejects group g for a document when p_g <= none_level (at
// or below, the level the guarantee above holds at). "None of the candidates"
// when it rejects every candidate; otherwise the NEAREST centroid among the
// candidates it does not reject (ties: higher p-value, then group order). Not
// the highest p-value: a group whose documents are spread widely gives high
// p-values to anything far from every centroid. In the SpamAssassin check
// (tests/analysis/attribution_reference_test.cc) the highest-p rule drew most
// ham to the wide spam group, leave-one-out accuracy 0.70 against 0.86 for the
// nearest centroid not rejected. A group needs at least ceil(1/none_level) - 1
// known documents, or 1/(1+n) could never reach the level and the test could
// never reject it.
//
// Segmented documents (corpus segments sharing a parent_id) are judged whole:
// their theta is the token-weighted mean of their segments' theta. Known
// documents shorter than min_tokens are left out of the reference, so that it
// is made of documents like the ones it judges.
#pragma once

#include <cstddef>
#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analysis/hellinger.h"
#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe {

inline constexpr double kDefaultNoneLevel = 0.05;
inline constexpr std::uint32_t kNoCandidate = std::numeric_limits<std::uint32_t>::max();

// ---------------------------------------------------------------------------
// The reference and the scores of one document (plain matrices, no model).

struct ConformalReference {
  std::vector<std::string> group_names;    // G
  TopicMatrix embedding;                   // n x K: y_i = sqrt(theta_i) / sqrt(2) of the known documents
  std::vector<std::uint32_t> known_group;  // n: 0..G-1
  TopicMatrix centroids;                   // G x K, in the embedding
  std::vector<std::size_t> group_sizes;    // G
  // G lists, each ascending: the leave-one-out distances a_i of the group's documents.
  std::vector<std::vector<double>> calibration_distances;

  std::size_t num_groups() const { return group_names.size(); }
  std::size_t num_known() const { return known_group.size(); }
  std::size_t topic_count() const { return static_cast<std::size_t>(embedding.cols()); }
};

// known_theta: n x K, rows distributions; known_group: n values in 0..G-1 with
// G = group_names.size(). Throws loupe::Error for mismatched sizes, a theta row
// that is not a distribution, or a group with fewer than 2 documents (no
// leave-one-out distance exists) naming the group.
ConformalReference build_conformal_reference(const TopicMatrix& known_theta, std::span<const std::uint32_t> known_group,
                                             std::vector<std::string> group_names);

// The smallest group size that can give p <= level: ceil(1/level) - 1 (19 at 0.05),
// and never below 3 (the leave-one-out calibration leaves 2). Throws loupe::Error
// unless 0 < level < 1.
std::size_t minimum_group_size(double level);
// Throws loupe::Error when a group has fewer known documents than minimum_group_size(level),
// naming the group, how many it has and how many are needed.
void check_group_sizes(const ConformalReference& reference, double level);

struct CandidateEvidence {
  std::uint32_t group = kNoCandidate;
  double distance = 0;  // Hellinger distance of the document to the group's centroid
  double p_value = 0;   // conformal p-value (above)
};

// One entry per candidate, in the order given (groups index reference.group_names;
// an empty list means every group). theta: K values, a distribution.
std::vector<CandidateEvidence> score_against_candidates(const ConformalReference& reference,
                                                        std::span<const double> theta,
                                                        std::span<const std::uint32_t> candidates);

enum class VerdictKind { group, none_of_the_candidates, too_short };
// How the verdict picks among the candidates the test does not reject (see the top of the file).
enum class VerdictRule { nearest_plausible, highest_p_value };
const char* verdict_kind_name(VerdictKind kind);  // "group", "none of the candidates", "too short to judge"

struct Verdict {
  VerdictKind kind = VerdictKind::none_of_the_candidates;
  // The best candidate, also when the verdict is "none" (then the one with the highest p-value).
  std::uint32_t best = kNoCandidate;
  double best_p_value = std::numeric_limits<double>::quiet_NaN();
  double best_distance = std::numeric_limits<double>::quiet_NaN();
  std::uint32_t runner_up = kNoCandidate;  // kNoCandidate with a single candidate
  double runner_up_p_value = std::numeric_limits<double>::quiet_NaN();
  double runner_up_distance = std::numeric_limits<double>::quiet_NaN();
  double highest_p_value = std::numeric_limits<double>::quiet_NaN();  // over all candidates
  // best_p_value - runner_up_p_value and runner_up_distance - best_distance (NaN without a runner-up).
  double p_value_margin = std::numeric_limits<double>::quiet_NaN();
  double distance_margin = std::numeric_limits<double>::quiet_NaN();
};

// Picks the verdict from one document's evidence (see the top of the file); the
// runner-up is the next candidate in the same order (not rejected and nearest first,
// then the rejected ones by p-value).
// Example: (distance, p) = {(0.10, 0.40), (0.30, 0.03)} at level 0.05 -> group 0, p-value
// margin 0.37, distance margin 0.20; {(0.2, 0.30), (0.1, 0.20)} -> group 1; p = {0.04, 0.02} -> none.
Verdict decide_verdict(std::span<const CandidateEvidence> evidence, double none_level = kDefaultNoneLevel,
                       VerdictRule rule = VerdictRule::nearest_plausible);

// The second view: the k known documents of the candidate groups nearest to the
// document in Hellinger distance (ties by document order), their votes per group.
struct NeighbourVote {
  std::size_t k = 0;               // neighbours used (fewer when fewer known documents)
  std::vector<std::size_t> votes;  // G: votes per group (0 for non-candidates)
  // Most votes; a tie goes to the group of the nearest neighbour among the tied groups.
  std::uint32_t leader = kNoCandidate;
  std::vector<std::size_t> neighbours;  // k known-document rows, nearest first
};
NeighbourVote neighbour_vote(const ConformalReference& reference, std::span<const double> theta,
                             std::span<const std::uint32_t> candidates, std::size_t k = 5);

// ---------------------------------------------------------------------------
// Calibration on the known documents (always computed).

struct CalibrationOptions {
  double none_level = kDefaultNoneLevel;
  VerdictRule rule = VerdictRule::nearest_plausible;
  std::size_t permutations = 999;  // of the known labels, for the test of accuracy against chance
  std::uint64_t seed = 1;
  std::size_t threads = 2;  // never changes the results
};

struct Calibration {
  std::size_t documents = 0;
  // Leave-one-out: each known document scored against every group with itself
  // removed (its own group's centroid and calibration distances recomputed).
  double accuracy = 0;  // share whose verdict is their own group ("none" counts as wrong)
  // (G + 1) x G counts, row = true group, column = verdict; column G is "none".
  std::vector<std::vector<std::size_t>> confusion;
  std::vector<double> recall;  // G
  double none_rate = 0;        // share of known documents wrongly called "none"
  // Permutation test of LOO accuracy against chance (Ojala & Garriga 2010, JMLR):
  // the known labels permuted P times (seeded), p = (1 + b) / (1 + P).
  double chance_accuracy = 0;  // mean accuracy over the permutations
  double permutation_p_value = std::numeric_limits<double>::quiet_NaN();
  std::size_t permutations = 0;
  bool complete_enumeration = false;
  std::uint64_t seed = 0;
  std::vector<std::uint32_t> loo_verdicts;  // n: group, or G for "none"
  std::vector<double> loo_own_p_values;     // n: each document's p-value for its own group
};

// Groups as in build_conformal_reference; needs every group to have at least 3
// documents (2 remain when one is left out). Exact leave-one-out from inner
// products (no reference is rebuilt): each labeling costs O(n K G + sum of n_g^2),
// the Gram matrix is kept up to 3000 known documents.
Calibration calibrate_attribution(const TopicMatrix& known_theta, std::span<const std::uint32_t> known_group,
                                  std::span<const std::string> group_names, const CalibrationOptions& options);

// ---------------------------------------------------------------------------
// Attribution with a fitted model: every chain, every disputed document.

struct AttributionOptions {
  double none_level = kDefaultNoneLevel;
  VerdictRule rule = VerdictRule::nearest_plausible;
  // Shorter documents are reported "too short to judge". 50 modelled tokens:
  // loupe's default prior alpha = 50/K adds 50 pseudo-tokens to every document,
  // so below 50 a document's theta is mostly prior, not evidence. The demo's
  // disputed letters of 200-280 words keep 68-100 tokens after stop words and
  // names are dropped; raise it (e.g. 100) when the known documents are long.
  std::size_t min_tokens = 50;
  std::size_t neighbours = 5;
  std::string candidates_column;      // corpus metadata column, candidates separated by ';'; "" = all groups
  CalibrationOptions calibration;     // none_level is copied from above
  std::uint32_t fold_in_sweeps = 60;  // for --disputed-folder texts
  std::uint32_t fold_in_burn_in = 20;
};

// A disputed document brought from outside the model: its tokens are matched
// to the model's vocabulary by word text (see fold_in_with_model).
struct ExternalDocuments {
  const Corpus* corpus = nullptr;  // any vocabulary; every document is attributed
  std::string source;              // where it came from, for messages ("folder DIR")
};

struct DocumentChainResult {
  std::vector<CandidateEvidence> evidence;  // candidates in order
  Verdict verdict;
  NeighbourVote vote;
};

struct DisputedDocumentResult {
  std::string id;                           // the parent's id for a merged segmented document
  std::string origin;                       // "model", or "folder DIR"
  std::vector<std::string> parts;           // the segments' ids when merged; empty otherwise
  std::size_t tokens = 0;                   // modelled tokens (matched to the vocabulary for outside texts)
  bool tokens_known = true;                 // false for the model's documents without the corpus (lengths unknown)
  std::vector<std::uint32_t> candidates;    // groups (an empty column value = all groups)
  std::vector<DocumentChainResult> chains;  // one per chain (empty when too short)
  // Across chains: the verdict most chains give (a group index, or G for
  // "none", or G + 1 for "too short"; ties to the smaller value), the share of
  // chains giving it and the range of its p-value over those chains (for "none":
  // the highest candidate p-value).
  std::uint32_t modal_verdict = 0;
  double agreement = 0;
  double p_value_min = std::numeric_limits<double>::quiet_NaN();
  double p_value_max = std::numeric_limits<double>::quiet_NaN();
};

struct Attribution {
  std::vector<std::string> group_names;      // G, groups with known documents
  std::vector<std::size_t> group_sizes;      // G, known documents in the reference (whole documents)
  std::vector<std::size_t> known_too_short;  // G, known documents left out as shorter than min_tokens
  std::vector<DisputedDocumentResult> documents;
  std::vector<Calibration> calibration;  // one per chain
  AttributionOptions options;
  std::size_t num_chains = 0;
  bool segments_merged = false;    // a corpus was given, so segments were merged by parent
  std::vector<std::string> notes;  // plain-language remarks on how the run went (e.g. lengths unknown)

  // "skelloway-harbour", "none of the candidates" or "too short to judge (minimum N tokens)".
  std::string verdict_label(std::uint32_t verdict) const;
};

// Known documents: role known with a group, and (with the corpus) at least
// min_tokens tokens; disputed: role disputed (with or without a group). With `corpus` (the model's corpus, checked by
// the caller with check_model_matches), segments sharing a parent_id are merged into one document whose theta is the
// token-weighted mean of its segments' theta, both for known and disputed documents; without it, each segment is its
// own document. theta comes from each chain of the model; outside documents are folded in with each chain. Throws
// loupe::Error when there are no disputed documents (saying how to mark them), when a group has too few known
// documents, for an unknown or missing candidates column or candidate value (naming the document, the value and the
// groups that exist).
Attribution attribute_disputed(const Model& model, const Corpus* corpus, const ExternalDocuments& outside,
                               const AttributionOptions& options);

// Everything, including options, seed and the cautions (analysis/attribution_cautions.h).
nlohmann::json to_json(const Attribution& attribution);
// One line per disputed document, chain and candidate; the cautions are written
// as '#' comment lines above the header.
std::string to_csv(const Attribution& attribution);

// The known documents of one chain as a reference, for callers scoring their own
// texts (e.g. segments in a composite scan): rows as attribute_disputed builds
// them (merged segments when `corpus` is given). With the corpus, documents of
// fewer than min_tokens tokens are left out, as attribute_disputed does: a text
// too short to be judged is too short to stand for its group, and the reference
// must be made of documents like the ones it judges for the p-values to hold.
struct KnownDocuments {
  TopicMatrix theta;                     // n x K
  std::vector<std::uint32_t> groups;     // n: index into group_names
  std::vector<std::string> group_names;  // groups with known documents (before the length filter)
  std::vector<std::string> ids;          // n
  std::vector<std::size_t> too_short;    // per group: documents left out for their length
};
KnownDocuments known_documents(const Model& model, std::size_t chain, const Corpus* corpus, std::size_t min_tokens = 0);

}  // namespace loupe

#include "analysis/attribution.h"

#include <algorithm>
#include <cmath>
#include <functional>
#include <map>
#include <numeric>
#include <unordered_map>

#include "analysis/attribution_cautions.h"
#include "analysis/permutation.h"
#include "analysis/strata.h"
#include "analysis/test_record.h"
#include "common/error.h"
#include "model/fold_in.h"
#include "model/parallel_runner.h"

namespace loupe {
namespace {

// Distances that differ by rounding only still tie (see the header).
constexpr double kTieTolerance = 1e-9;
// Above this many known documents the calibration computes inner products on the
// fly instead of keeping the n x n Gram matrix (8 n^2 bytes: 72 MB at 3000).
constexpr std::size_t kGramLimit = 3000;

double nan() { return std::numeric_limits<double>::quiet_NaN(); }

// #{a in sorted : a >= d}, with the tie tolerance.
std::size_t count_at_least(const std::vector<double>& sorted, double d) {
  const double threshold = d * (1 - kTieTolerance);
  return static_cast<std::size_t>(sorted.end() - std::lower_bound(sorted.begin(), sorted.end(), threshold));
}

bool at_least_tied(double a, double d) { return a >= d * (1 - kTieTolerance); }

// A theta row as the embedding point y = sqrt(theta) / sqrt(2), after checking it is a distribution.
Eigen::RowVectorXd embed(std::span<const double> theta, std::size_t topics, const char* what) {
  if (theta.size() != topics) {
    throw Error(std::string(what) + ": the topic shares have " + std::to_string(theta.size()) +
                " values but the reference has " + std::to_string(topics) + " topics");
  }
  double sum = 0;
  for (const double v : theta) {
    if (!std::isfinite(v) || v < 0) throw Error(std::string(what) + ": a topic share is negative or not finite");
    sum += v;
  }
  if (std::abs(sum - 1) > 1e-4) {
    throw Error(std::string(what) + ": the topic shares sum to " + std::to_string(sum) + ", not 1");
  }
  Eigen::RowVectorXd y(static_cast<Eigen::Index>(topics));
  for (std::size_t k = 0; k < topics; ++k) y(static_cast<Eigen::Index>(k)) = std::sqrt(theta[k] / sum * 0.5);
  return y;
}

void check_known(const TopicMatrix& theta, std::span<const std::uint32_t> groups, std::size_t num_groups,
                 const char* what) {
  if (static_cast<std::size_t>(theta.rows()) != groups.size()) {
    throw Error(std::string(what) + ": " + std::to_string(theta.rows()) + " rows of topic shares but " +
                std::to_string(groups.size()) + " group labels");
  }
  if (num_groups == 0) throw Error(std::string(what) + ": no groups");
  for (Eigen::Index i = 0; i < theta.rows(); ++i) {
    const double sum = theta.row(i).sum();
    if (!std::isfinite(sum) || std::abs(sum - 1) > 1e-4 || theta.row(i).minCoeff() < 0) {
      throw Error(std::string(what) + ": known document " + std::to_string(i + 1) +
                  " has topic shares that are not a distribution");
    }
    if (groups[static_cast<std::size_t>(i)] >= num_groups) {
      throw Error(std::string(what) + ": known document " + std::to_string(i + 1) + " has group " +
                  std::to_string(groups[static_cast<std::size_t>(i)]) + " of " + std::to_string(num_groups));
    }
  }
}

TopicMatrix normalised_embedding(const TopicMatrix& theta) {
  TopicMatrix rows = theta;
  for (Eigen::Index i = 0; i < rows.rows(); ++i) rows.row(i) /= rows.row(i).sum();
  return sqrt_embedding(rows);
}

// The order of candidates for a verdict (see the header).
bool comes_first(const CandidateEvidence& a, const CandidateEvidence& b, double level, VerdictRule rule) {
  if (rule == VerdictRule::highest_p_value) {
    if (a.p_value != b.p_value) return a.p_value > b.p_value;
    if (a.distance != b.distance) return a.distance < b.distance;
    return a.group < b.group;
  }
  // p <= level, with room for the rounding of (1 + b) / (1 + n).
  const bool a_kept = a.p_value > level * (1 + 1e-12);
  const bool b_kept = b.p_value > level * (1 + 1e-12);
  if (a_kept != b_kept) return a_kept;
  if (a_kept && a.distance != b.distance) return a.distance < b.distance;
  if (a.p_value != b.p_value) return a.p_value > b.p_value;
  if (a.distance != b.distance) return a.distance < b.distance;
  return a.group < b.group;
}

// ---------------------------------------------------------------------------
// Leave-one-out verdicts for a labeling, from inner products only:
//   ||y_i - s/m||^2 = <y_i,y_i> - 2 <y_i,s>/m + ||s||^2/m^2, s a sum of group members.
class LeaveOneOutScorer {
 public:
  LeaveOneOutScorer(const TopicMatrix& embedding, std::size_t num_groups, double none_level, VerdictRule rule)
      : y_(embedding), num_groups_(num_groups), level_(none_level), rule_(rule) {
    const auto n = static_cast<std::size_t>(y_.rows());
    if (n <= kGramLimit) gram_ = y_ * y_.transpose();
    diagonal_.resize(n);
    for (std::size_t i = 0; i < n; ++i) diagonal_[i] = y_.row(static_cast<Eigen::Index>(i)).squaredNorm();
  }

  struct Scratch {
    Eigen::MatrixXd sums;   // G x K group sums s_g
    Eigen::MatrixXd inner;  // n x G: R(i, g) = <y_i, s_g>
    std::vector<double> squared_sums;
    std::vector<std::size_t> sizes;
    std::vector<std::vector<std::size_t>> members;
    std::vector<std::vector<double>> calibration;  // per group, ascending
    std::vector<CandidateEvidence> evidence;
  };

  // verdicts[i]: the group, or G for "none"; own_p[i] (when not null): p-value for its own group.
  void run(std::span<const int> labels, Scratch& s, std::span<std::uint32_t> verdicts, double* own_p) const {
    const auto n = static_cast<std::size_t>(y_.rows());
    const std::size_t g_count = num_groups_;
    s.sums.setZero(static_cast<Eigen::Index>(g_count), y_.cols());
    s.sizes.assign(g_count, 0);
    s.members.assign(g_count, {});
    for (std::size_t i = 0; i < n; ++i) {
      const auto g = static_cast<std::size_t>(labels[i]);
      s.sums.row(static_cast<Eigen::Index>(g)) += y_.row(static_cast<Eigen::Index>(i));
      ++s.sizes[g];
      s.members[g].push_back(i);
    }
    s.inner.noalias() = y_ * s.sums.transpose();
    s.squared_sums.resize(g_count);
    for (std::size_t g = 0; g < g_count; ++g)
      s.squared_sums[g] = s.sums.row(static_cast<Eigen::Index>(g)).squaredNorm();
    // Each group's calibration distances: a_j = ||y_j - (s_g - y_j)/(n_g - 1)||.
    s.calibration.assign(g_count, {});
    for (std::size_t g = 0; g < g_count; ++g) {
      const double m = static_cast<double>(s.sizes[g] - 1);
      for (const std::size_t j : s.members[g]) {
        const double r = inner(s, j, g);
        s.calibration[g].push_back(
            root(diagonal_[j] - 2 * (r - diagonal_[j]) / m + (s.squared_sums[g] - 2 * r + diagonal_[j]) / (m * m)));
      }
      std::sort(s.calibration[g].begin(), s.calibration[g].end());
    }
    s.evidence.resize(g_count);
    for (std::size_t i = 0; i < n; ++i) {
      const auto own = static_cast<std::size_t>(labels[i]);
      for (std::size_t h = 0; h < g_count; ++h) {
        auto& e = s.evidence[h];
        e.group = static_cast<std::uint32_t>(h);
        const double r = inner(s, i, h);
        if (h != own) {
          const double m = static_cast<double>(s.sizes[h]);
          e.distance = root(diagonal_[i] - 2 * r / m + s.squared_sums[h] / (m * m));
          e.p_value = static_cast<double>(1 + count_at_least(s.calibration[h], e.distance)) / (1 + m);
          continue;
        }
        // Own group without i: centroid (s - y_i)/(n-1); member j's distance to (s - y_i - y_j)/(n-2).
        const double m1 = static_cast<double>(s.sizes[h] - 1);
        const double m2 = static_cast<double>(s.sizes[h] - 2);
        const double gii = diagonal_[i];
        e.distance = root(gii - 2 * (r - gii) / m1 + (s.squared_sums[h] - 2 * r + gii) / (m1 * m1));
        std::size_t at_least = 0;
        for (const std::size_t j : s.members[h]) {
          if (j == i) continue;
          const double gjj = diagonal_[j];
          const double gij = product(i, j);
          const double rj = inner(s, j, h);
          const double cross = rj - gij - gjj;
          const double norm = s.squared_sums[h] + gii + gjj - 2 * r - 2 * rj + 2 * gij;
          at_least += at_least_tied(root(gjj - 2 * cross / m2 + norm / (m2 * m2)), e.distance);
        }
        e.p_value = static_cast<double>(1 + at_least) / (1 + m1);
        if (own_p) own_p[i] = e.p_value;
      }
      const Verdict verdict = decide_verdict(s.evidence, level_, rule_);
      verdicts[i] = verdict.kind == VerdictKind::group ? verdict.best : static_cast<std::uint32_t>(g_count);
    }
  }

 private:
  static double root(double squared) { return std::sqrt(std::max(squared, 0.0)); }
  double inner(const Scratch& s, std::size_t i, std::size_t g) const {
    return s.inner(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(g));
  }
  double product(std::size_t i, std::size_t j) const {
    if (gram_.size() > 0) return gram_(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(j));
    return y_.row(static_cast<Eigen::Index>(i)).dot(y_.row(static_cast<Eigen::Index>(j)));
  }

  const TopicMatrix& y_;
  std::size_t num_groups_;
  double level_;
  VerdictRule rule_;
  Eigen::MatrixXd gram_;
  std::vector<double> diagonal_;
};

double accuracy_of(std::span<const int> labels, std::span<const std::uint32_t> verdicts) {
  std::size_t right = 0;
  for (std::size_t i = 0; i < labels.size(); ++i) right += verdicts[i] == static_cast<std::uint32_t>(labels[i]);
  return labels.empty() ? nan() : static_cast<double>(right) / static_cast<double>(labels.size());
}

std::string join(const std::vector<std::string>& items, const char* separator = ", ") {
  std::string out;
  for (const auto& item : items) out += (out.empty() ? "" : separator) + item;
  return out;
}

std::string trimmed(const std::string& text) {
  const auto first = text.find_first_not_of(" \t");
  if (first == std::string::npos) return {};
  const auto last = text.find_last_not_of(" \t");
  return text.substr(first, last - first + 1);
}

// One disputed unit: a model document, a merged segmented document, or an outside text.
struct DisputedUnit {
  std::string id;
  std::string origin;
  std::vector<std::string> parts;
  std::vector<std::size_t> rows;  // model documents (or outside-corpus documents)
  std::vector<double> weights;    // token counts of the rows
  bool outside = false;
  std::size_t tokens = 0;
  bool tokens_known = true;
  std::vector<std::uint32_t> candidates;
};

}  // namespace

// ---------------------------------------------------------------------------

ConformalReference build_conformal_reference(const TopicMatrix& known_theta, std::span<const std::uint32_t> known_group,
                                             std::vector<std::string> group_names) {
  const std::size_t g_count = group_names.size();
  check_known(known_theta, known_group, g_count, "conformal reference");
  ConformalReference reference;
  reference.group_names = std::move(group_names);
  reference.known_group.assign(known_group.begin(), known_group.end());
  reference.embedding = normalised_embedding(known_theta);
  reference.group_sizes.assign(g_count, 0);
  for (const auto g : known_group) ++reference.group_sizes[g];
  for (std::size_t g = 0; g < g_count; ++g) {
    if (reference.group_sizes[g] < 2) {
      throw Error("conformal reference: group '" + reference.group_names[g] + "' has " +
                  std::to_string(reference.group_sizes[g]) +
                  " known documents; at least 2 are needed to measure how far its members lie from the rest");
    }
  }
  const auto k = reference.embedding.cols();
  reference.centroids.setZero(static_cast<Eigen::Index>(g_count), k);
  for (std::size_t i = 0; i < known_group.size(); ++i) {
    reference.centroids.row(known_group[i]) += reference.embedding.row(static_cast<Eigen::Index>(i));
  }
  for (std::size_t g = 0; g < g_count; ++g) {
    reference.centroids.row(static_cast<Eigen::Index>(g)) /= static_cast<double>(reference.group_sizes[g]);
  }
  // a_i = ||y_i - c_g^(-i)||, c_g^(-i) = (n c_g - y_i) / (n - 1).
  reference.calibration_distances.assign(g_count, {});
  for (std::size_t i = 0; i < known_group.size(); ++i) {
    const auto g = known_group[i];
    const double n = static_cast<double>(reference.group_sizes[g]);
    const auto y = reference.embedding.row(static_cast<Eigen::Index>(i));
    const Eigen::RowVectorXd without = (n * reference.centroids.row(g) - y) / (n - 1);
    reference.calibration_distances[g].push_back((y - without).norm());
  }
  for (auto& list : reference.calibration_distances) std::sort(list.begin(), list.end());
  return reference;
}

std::size_t minimum_group_size(double level) {
  if (!(level > 0 && level < 1)) {
    throw Error("the level for 'none of the candidates' must lie strictly between 0 and 1 (got " +
                format_number(level) + "); 0.05 is usual");
  }
  // ceil(1/level) - 1 documents make 1/(1+n) <= level; the guard keeps 1/0.05 from rounding up to 21.
  const auto needed = static_cast<std::size_t>(std::ceil(1 / level - 1e-9)) - 1;
  return std::max<std::size_t>(needed, 3);
}

void check_group_sizes(const ConformalReference& reference, double level) {
  const std::size_t needed = minimum_group_size(level);
  for (std::size_t g = 0; g < reference.num_groups(); ++g) {
    if (reference.group_sizes[g] < needed) {
      throw Error("group '" + reference.group_names[g] + "' has " + std::to_string(reference.group_sizes[g]) +
                  " known documents, but " + std::to_string(needed) +
                  " are needed for a calibrated p-value at the level " + format_number(level) +
                  " (with n documents the smallest p-value is 1/(n+1)). Add known documents to the group, "
                  "merge it with another, leave it out of the corpus, or raise --none-level.");
    }
  }
}

std::vector<CandidateEvidence> score_against_candidates(const ConformalReference& reference,
                                                        std::span<const double> theta,
                                                        std::span<const std::uint32_t> candidates) {
  const Eigen::RowVectorXd y = embed(theta, reference.topic_count(), "attribution");
  std::vector<std::uint32_t> all;
  if (candidates.empty()) {
    all.resize(reference.num_groups());
    std::iota(all.begin(), all.end(), 0u);
    candidates = all;
  }
  std::vector<CandidateEvidence> evidence;
  evidence.reserve(candidates.size());
  for (const auto g : candidates) {
    if (g >= reference.num_groups()) {
      throw Error("attribution: candidate group " + std::to_string(g) + " does not exist (there are " +
                  std::to_string(reference.num_groups()) + ")");
    }
    CandidateEvidence e;
    e.group = g;
    e.distance = (y - reference.centroids.row(g)).norm();
    e.p_value = static_cast<double>(1 + count_at_least(reference.calibration_distances[g], e.distance)) /
                static_cast<double>(1 + reference.group_sizes[g]);
    evidence.push_back(e);
  }
  return evidence;
}

const char* verdict_kind_name(VerdictKind kind) {
  switch (kind) {
    case VerdictKind::group:
      return "group";
    case VerdictKind::none_of_the_candidates:
      return "none of the candidates";
    case VerdictKind::too_short:
      return "too short to judge";
  }
  return "";
}

Verdict decide_verdict(std::span<const CandidateEvidence> evidence, double none_level, VerdictRule rule) {
  if (evidence.empty()) throw Error("attribution: no candidate groups to decide between");
  auto first = [&](const CandidateEvidence& a, const CandidateEvidence& b) {
    return comes_first(a, b, none_level, rule);
  };
  std::size_t best = 0;
  double highest = evidence[0].p_value;
  for (std::size_t i = 1; i < evidence.size(); ++i) {
    if (first(evidence[i], evidence[best])) best = i;
    highest = std::max(highest, evidence[i].p_value);
  }
  std::size_t runner = evidence.size();
  for (std::size_t i = 0; i < evidence.size(); ++i) {
    if (i != best && (runner == evidence.size() || first(evidence[i], evidence[runner]))) runner = i;
  }
  Verdict v;
  v.best = evidence[best].group;
  v.best_p_value = evidence[best].p_value;
  v.best_distance = evidence[best].distance;
  v.highest_p_value = highest;
  // Every candidate rejected: p <= level, with room for the rounding of (1 + b) / (1 + n).
  v.kind = highest <= none_level * (1 + 1e-12) ? VerdictKind::none_of_the_candidates : VerdictKind::group;
  if (runner < evidence.size()) {
    v.runner_up = evidence[runner].group;
    v.runner_up_p_value = evidence[runner].p_value;
    v.runner_up_distance = evidence[runner].distance;
    v.p_value_margin = v.best_p_value - v.runner_up_p_value;
    v.distance_margin = v.runner_up_distance - v.best_distance;
  }
  return v;
}

NeighbourVote neighbour_vote(const ConformalReference& reference, std::span<const double> theta,
                             std::span<const std::uint32_t> candidates, std::size_t k) {
  const Eigen::RowVectorXd y = embed(theta, reference.topic_count(), "neighbour vote");
  std::vector<bool> allowed(reference.num_groups(), candidates.empty());
  for (const auto g : candidates) {
    if (g < allowed.size()) allowed[g] = true;
  }
  std::vector<std::pair<double, std::size_t>> distances;
  for (std::size_t i = 0; i < reference.num_known(); ++i) {
    if (!allowed[reference.known_group[i]]) continue;
    distances.emplace_back((y - reference.embedding.row(static_cast<Eigen::Index>(i))).norm(), i);
  }
  NeighbourVote vote;
  vote.k = std::min(k, distances.size());
  vote.votes.assign(reference.num_groups(), 0);
  std::partial_sort(distances.begin(), distances.begin() + static_cast<std::ptrdiff_t>(vote.k), distances.end());
  for (std::size_t r = 0; r < vote.k; ++r) {
    vote.neighbours.push_back(distances[r].second);
    ++vote.votes[reference.known_group[distances[r].second]];
  }
  const std::size_t most = vote.k == 0 ? 0 : *std::max_element(vote.votes.begin(), vote.votes.end());
  for (const auto row : vote.neighbours) {  // nearest first: the first group with the most votes
    if (vote.votes[reference.known_group[row]] == most) {
      vote.leader = reference.known_group[row];
      break;
    }
  }
  return vote;
}

Calibration calibrate_attribution(const TopicMatrix& known_theta, std::span<const std::uint32_t> known_group,
                                  std::span<const std::string> group_names, const CalibrationOptions& options) {
  const std::size_t g_count = group_names.size();
  check_known(known_theta, known_group, g_count, "calibration");
  minimum_group_size(options.none_level);  // checks the level
  const std::size_t n = known_group.size();
  std::vector<std::size_t> sizes(g_count, 0);
  for (const auto g : known_group) ++sizes[g];
  for (std::size_t g = 0; g < g_count; ++g) {
    if (sizes[g] < 3) {
      throw Error("calibration: group '" + group_names[g] + "' has " + std::to_string(sizes[g]) +
                  " known documents; leave-one-out calibration needs at least 3");
    }
  }
  const TopicMatrix y = normalised_embedding(known_theta);
  const LeaveOneOutScorer scorer(y, g_count, options.none_level, options.rule);
  std::vector<int> labels(known_group.begin(), known_group.end());

  Calibration c;
  c.documents = n;
  c.seed = options.seed;
  c.loo_verdicts.assign(n, 0);
  c.loo_own_p_values.assign(n, nan());
  LeaveOneOutScorer::Scratch scratch;
  scorer.run(labels, scratch, c.loo_verdicts, c.loo_own_p_values.data());
  c.accuracy = accuracy_of(labels, c.loo_verdicts);
  c.confusion.assign(g_count, std::vector<std::size_t>(g_count + 1, 0));
  std::size_t none = 0;
  for (std::size_t i = 0; i < n; ++i) {
    ++c.confusion[known_group[i]][c.loo_verdicts[i]];
    none += c.loo_verdicts[i] == g_count;
  }
  c.none_rate = static_cast<double>(none) / static_cast<double>(n);
  for (std::size_t g = 0; g < g_count; ++g) {
    c.recall.push_back(static_cast<double>(c.confusion[g][g]) / static_cast<double>(sizes[g]));
  }

  // Ojala & Garriga (2010), test 1: the same leave-one-out accuracy with the known labels permuted.
  c.chance_accuracy = nan();
  if (options.permutations == 0 || g_count < 2) return c;
  PermutationOptions permutation;
  permutation.permutations = options.permutations;
  permutation.seed = options.seed;
  permutation.threads = std::max<std::size_t>(options.threads, 1);
  const LabelPermuter permuter(labels, {}, permutation, "");
  std::vector<double> permuted_accuracy(permuter.count());
  run_in_parallel(permuter.count(), permutation.threads, 4, [&](std::size_t begin, std::size_t end) {
    LeaveOneOutScorer::Scratch local;
    std::vector<int> permuted(n);
    std::vector<std::uint32_t> verdicts(n);
    for (std::size_t p = begin; p < end; ++p) {
      permuter.permuted(p, permuted);
      scorer.run(permuted, local, verdicts, nullptr);
      permuted_accuracy[p] = accuracy_of(permuted, verdicts);
    }
  });
  std::uint64_t exceed = 0;
  double sum = 0;
  for (const double a : permuted_accuracy) {
    exceed += at_least_as_extreme(a, c.accuracy, Tail::upper);
    sum += a;
  }
  c.permutations = permuter.count();
  c.complete_enumeration = permuter.complete();
  c.chance_accuracy = sum / static_cast<double>(permuter.count());
  c.permutation_p_value = permutation_p_value(exceed, permuter.count());
  return c;
}

// ---------------------------------------------------------------------------

namespace {

// Rows of the model's documents (or merged segmented documents) in order of first appearance.
struct MergedRows {
  std::string id;
  std::vector<std::size_t> rows;
  std::vector<double> weights;
  std::vector<std::string> parts;
};

// Model documents selected by `keep`, merged by parent_id when the corpus is given.
std::vector<MergedRows> merge_documents(const Model& model, const Corpus* corpus,
                                        const std::function<bool(std::size_t)>& keep) {
  std::vector<MergedRows> out;
  std::unordered_map<std::string, std::size_t> by_parent;
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    if (!keep(d)) continue;
    const double weight = corpus ? static_cast<double>(corpus->document_length(d)) : 1.0;
    if (corpus && corpus->documents[d].is_segment()) {
      const auto& document = corpus->documents[d];
      const auto [it, inserted] = by_parent.emplace(document.parent_id, out.size());
      if (inserted) out.push_back({document.parent_id, {}, {}, {}});
      auto& merged = out[it->second];
      merged.rows.push_back(d);
      merged.weights.push_back(weight);
      merged.parts.push_back(document.id);
      continue;
    }
    out.push_back({model.document_ids[d], {d}, {weight}, {}});
  }
  return out;
}

// Token-weighted mean of the rows' theta (equal weights when every weight is 0).
std::vector<double> mean_theta(const Model& model, std::size_t chain, const std::vector<std::size_t>& rows,
                               const std::vector<double>& weights) {
  const std::size_t k = model.topic_count();
  std::vector<double> theta(k, 0.0);
  double total = std::accumulate(weights.begin(), weights.end(), 0.0);
  for (std::size_t r = 0; r < rows.size(); ++r) {
    const double w = total > 0 ? weights[r] / total : 1.0 / static_cast<double>(rows.size());
    const auto row = model.theta(chain, rows[r]);
    for (std::size_t t = 0; t < k; ++t) theta[t] += w * static_cast<double>(row[t]);
  }
  const double sum = std::accumulate(theta.begin(), theta.end(), 0.0);
  for (auto& v : theta) v /= sum;
  return theta;
}

bool is_known(const Model& model, std::size_t d) {
  return model.document_roles[d] == DocumentRole::known && model.document_groups[d] != kNoGroup;
}

}  // namespace

KnownDocuments known_documents(const Model& model, std::size_t chain, const Corpus* corpus, std::size_t min_tokens) {
  if (chain >= model.chains.size()) {
    throw Error("attribution: the model has " + std::to_string(model.chains.size()) + " chains, not " +
                std::to_string(chain + 1));
  }
  const auto merged = merge_documents(model, corpus, [&](std::size_t d) { return is_known(model, d); });
  // Groups with known documents, in the model's order.
  std::vector<std::uint32_t> index_of(model.groups.size(), kNoCandidate);
  std::vector<bool> used(model.groups.size(), false);
  for (const auto& m : merged) used[model.document_groups[m.rows.front()]] = true;
  KnownDocuments known;
  for (std::size_t g = 0; g < model.groups.size(); ++g) {
    if (!used[g]) continue;
    index_of[g] = static_cast<std::uint32_t>(known.group_names.size());
    known.group_names.push_back(model.groups[g]);
  }
  known.too_short.assign(known.group_names.size(), 0);
  std::vector<const MergedRows*> kept;
  for (const auto& m : merged) {
    const double tokens = std::accumulate(m.weights.begin(), m.weights.end(), 0.0);
    if (corpus && tokens < static_cast<double>(min_tokens)) {
      ++known.too_short[index_of[model.document_groups[m.rows.front()]]];
    } else {
      kept.push_back(&m);
    }
  }
  const std::size_t k = model.topic_count();
  known.theta.resize(static_cast<Eigen::Index>(kept.size()), static_cast<Eigen::Index>(k));
  for (std::size_t i = 0; i < kept.size(); ++i) {
    const auto theta = mean_theta(model, chain, kept[i]->rows, kept[i]->weights);
    for (std::size_t t = 0; t < k; ++t)
      known.theta(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(t)) = theta[t];
    known.groups.push_back(index_of[model.document_groups[kept[i]->rows.front()]]);
    known.ids.push_back(kept[i]->id);
  }
  return known;
}

std::string Attribution::verdict_label(std::uint32_t verdict) const {
  if (verdict < group_names.size()) return group_names[verdict];
  if (verdict == group_names.size()) return verdict_kind_name(VerdictKind::none_of_the_candidates);
  return "too short to judge (minimum " + std::to_string(options.min_tokens) + " tokens)";
}

Attribution attribute_disputed(const Model& model, const Corpus* corpus, const ExternalDocuments& outside,
                               const AttributionOptions& options_in) {
  AttributionOptions options = options_in;
  options.calibration.none_level = options.none_level;
  options.calibration.rule = options.rule;
  minimum_group_size(options.none_level);  // checks the level
  if (options.neighbours == 0) throw Error("--neighbours must be at least 1 (5 is usual)");
  if (model.chains.empty()) throw Error("attribution: the model has no chains; fit it again");
  if (corpus && corpus->num_documents() != model.num_documents()) {
    throw Error("attribution: the corpus has " + std::to_string(corpus->num_documents()) + " documents but the model " +
                std::to_string(model.num_documents()) + "; pass the corpus the model was fitted on");
  }

  Attribution result;
  result.options = options;
  result.num_chains = model.chains.size();
  result.segments_merged = corpus != nullptr;
  {
    const KnownDocuments known = known_documents(model, 0, corpus, options.min_tokens);
    result.group_names = known.group_names;
    result.known_too_short = known.too_short;
    result.group_sizes.assign(known.group_names.size(), 0);
    for (const auto g : known.groups) ++result.group_sizes[g];
  }
  const std::size_t g_count = result.group_names.size();
  if (g_count == 0) {
    throw Error(
        "attribution: the model has no known documents with a group; the candidates come from them. "
        "Give known documents a group in the manifest (or a group sub-folder) and ingest and fit again.");
  }
  const std::size_t needed = minimum_group_size(options.none_level);
  for (std::size_t g = 0; g < g_count; ++g) {
    if (result.group_sizes[g] >= needed) continue;
    const std::size_t short_ones = result.known_too_short[g];
    throw Error("group '" + result.group_names[g] + "' has " + std::to_string(result.group_sizes[g]) +
                " known documents" +
                (short_ones > 0 ? " of at least " + std::to_string(options.min_tokens) + " tokens (" +
                                      std::to_string(short_ones) + " shorter ones are left out)"
                                : std::string()) +
                ", but " + std::to_string(needed) + " are needed for a calibrated p-value at the level " +
                format_number(options.none_level) +
                " (with n documents the smallest p-value is 1/(n+1)). Add known documents to the group, merge it "
                "with another, leave it out of the corpus, or raise --none-level" +
                (short_ones > 0 ? " or lower --min-tokens." : "."));
  }

  // The disputed units.
  std::vector<DisputedUnit> units;
  for (auto& m : merge_documents(model, corpus,
                                 [&](std::size_t d) { return model.document_roles[d] == DocumentRole::disputed; })) {
    DisputedUnit unit;
    unit.id = m.id;
    unit.origin = "model";
    unit.parts = m.parts;
    unit.rows = m.rows;
    unit.weights = m.weights;
    unit.tokens_known = corpus != nullptr;
    if (corpus) unit.tokens = static_cast<std::size_t>(std::accumulate(m.weights.begin(), m.weights.end(), 0.0));
    units.push_back(std::move(unit));
  }
  std::vector<std::size_t> outside_rows;
  if (outside.corpus) {
    std::unordered_map<std::string_view, bool> known_word;
    for (const auto& w : model.vocabulary) known_word.emplace(w, true);
    std::vector<bool> matched(outside.corpus->vocabulary_size());
    for (std::size_t w = 0; w < matched.size(); ++w) matched[w] = known_word.count(outside.corpus->vocabulary[w]) > 0;
    for (std::size_t d = 0; d < outside.corpus->num_documents(); ++d) {
      DisputedUnit unit;
      unit.id = outside.corpus->documents[d].id;
      unit.origin = outside.source.empty() ? "outside texts" : outside.source;
      unit.rows = {d};
      unit.outside = true;
      for (const auto w : outside.corpus->document_tokens(d)) unit.tokens += matched[w];
      unit.weights = {static_cast<double>(unit.tokens)};
      units.push_back(std::move(unit));
      outside_rows.push_back(d);
    }
  }
  if (units.empty()) {
    throw Error(
        "no disputed documents to attribute: the model's corpus marks none as disputed and no "
        "--disputed-folder was given. Mark them with the value 'disputed' in a 'role' column of the "
        "manifest (or put them in the source's 'disputed' sub-folder) and ingest and fit again, or pass a "
        "folder of .txt files with --disputed-folder DIR.");
  }
  if (!corpus) {
    result.notes.push_back(
        "Without --corpus the lengths of the model's disputed documents are unknown, so the minimum of " +
        std::to_string(options.min_tokens) +
        " tokens was not checked for them, and segments were not merged into their documents.");
  }

  // Candidates.
  std::unordered_map<std::string, std::uint32_t> group_index;
  for (std::size_t g = 0; g < g_count; ++g) group_index.emplace(result.group_names[g], static_cast<std::uint32_t>(g));
  if (!options.candidates_column.empty()) {
    if (!corpus) {
      throw Error("--candidates-column " + options.candidates_column +
                  " needs the corpus file the model was fitted on: add --corpus FILE");
    }
    const std::size_t column = find_metadata_column(options.candidates_column, corpus->metadata_columns);
    for (auto& unit : units) {
      if (unit.outside) continue;  // outside texts have no metadata: every group is a candidate
      const std::string& value = corpus->documents[unit.rows.front()].metadata[column];
      std::size_t start = 0;
      while (start <= value.size()) {
        const auto end = std::min(value.find(';', start), value.size());
        const std::string name = trimmed(value.substr(start, end - start));
        start = end + 1;
        if (name.empty()) continue;
        const auto found = group_index.find(name);
        if (found == group_index.end()) {
          const bool in_model = std::find(model.groups.begin(), model.groups.end(), name) != model.groups.end();
          throw Error("document '" + unit.id + "': the candidate '" + name + "' in column '" +
                      options.candidates_column + "' (value '" + value + "') is " +
                      (in_model ? "a group without known documents" : "not a group") +
                      "; the groups with known documents are: " + join(result.group_names) +
                      ". Correct the value in the manifest (candidates are separated by ';').");
        }
        if (std::find(unit.candidates.begin(), unit.candidates.end(), found->second) == unit.candidates.end()) {
          unit.candidates.push_back(found->second);
        }
      }
    }
  }

  // Every chain.
  result.documents.resize(units.size());
  const ParallelRunner runner(std::max<std::size_t>(options.calibration.threads, 1));
  for (std::size_t chain = 0; chain < model.chains.size(); ++chain) {
    const KnownDocuments known = known_documents(model, chain, corpus, options.min_tokens);
    const ConformalReference reference = build_conformal_reference(known.theta, known.groups, known.group_names);
    check_group_sizes(reference, options.none_level);
    result.calibration.push_back(
        calibrate_attribution(known.theta, known.groups, known.group_names, options.calibration));
    std::vector<double> outside_theta;
    if (outside.corpus) {
      FoldInOptions fold;
      fold.sweeps = options.fold_in_sweeps;
      fold.burn_in = options.fold_in_burn_in;
      fold.seed = options.calibration.seed;
      outside_theta = fold_in_with_model(model, chain, *outside.corpus, outside_rows, fold, runner);
    }
    const std::size_t k = model.topic_count();
    std::size_t next_outside = 0;  // outside texts come in outside_rows order
    for (std::size_t u = 0; u < units.size(); ++u) {
      const auto& unit = units[u];
      const std::size_t outside_index = unit.outside ? next_outside++ : 0;
      if (unit.tokens_known && unit.tokens < options.min_tokens) continue;
      std::vector<double> theta;
      if (unit.outside) {
        theta.assign(outside_theta.begin() + static_cast<std::ptrdiff_t>(outside_index * k),
                     outside_theta.begin() + static_cast<std::ptrdiff_t>((outside_index + 1) * k));
      } else {
        theta = mean_theta(model, chain, unit.rows, unit.weights);
      }
      DocumentChainResult r;
      r.evidence = score_against_candidates(reference, theta, unit.candidates);
      r.verdict = decide_verdict(r.evidence, options.none_level, options.rule);
      r.vote = neighbour_vote(reference, theta, unit.candidates, options.neighbours);
      result.documents[u].chains.push_back(std::move(r));
    }
  }

  // Per document: identity and the summary across chains.
  for (std::size_t u = 0; u < units.size(); ++u) {
    auto& doc = result.documents[u];
    const auto& unit = units[u];
    doc.id = unit.id;
    doc.origin = unit.origin;
    doc.parts = unit.parts;
    doc.tokens = unit.tokens;
    doc.tokens_known = unit.tokens_known;
    doc.candidates = unit.candidates;
    if (doc.chains.empty()) {
      doc.modal_verdict = static_cast<std::uint32_t>(g_count + 1);
      doc.agreement = 1;
      continue;
    }
    std::map<std::uint32_t, std::size_t> counts;
    for (const auto& r : doc.chains) {
      ++counts[r.verdict.kind == VerdictKind::group ? r.verdict.best : static_cast<std::uint32_t>(g_count)];
    }
    std::size_t most = 0;
    for (const auto& [verdict, count] : counts) {
      if (count > most) {  // std::map is ordered, so ties go to the smaller value
        most = count;
        doc.modal_verdict = verdict;
      }
    }
    doc.agreement = static_cast<double>(most) / static_cast<double>(doc.chains.size());
    for (const auto& r : doc.chains) {
      const std::uint32_t v =
          r.verdict.kind == VerdictKind::group ? r.verdict.best : static_cast<std::uint32_t>(g_count);
      if (v != doc.modal_verdict) continue;
      const double p = v == g_count ? r.verdict.highest_p_value : r.verdict.best_p_value;
      doc.p_value_min = std::isnan(doc.p_value_min) ? p : std::min(doc.p_value_min, p);
      doc.p_value_max = std::isnan(doc.p_value_max) ? p : std::max(doc.p_value_max, p);
    }
  }
  return result;
}

// ---------------------------------------------------------------------------

namespace {

nlohmann::json number_or_null(double v) { return std::isfinite(v) ? nlohmann::json(v) : nlohmann::json(nullptr); }

nlohmann::json cautions_json() {
  nlohmann::json out = nlohmann::json::array();
  for (const auto caution : kAttributionCautions) out.push_back(std::string(caution));
  return out;
}

std::string group_or_dash(const Attribution& a, std::uint32_t g) {
  return g < a.group_names.size() ? a.group_names[g] : std::string();
}

}  // namespace

nlohmann::json to_json(const Attribution& a) {
  nlohmann::json out;
  out["method"] = "conformal attribution (Vovk, Gammerman & Shafer 2005) in the Hellinger embedding";
  out["cautions"] = cautions_json();
  out["seed"] = a.options.calibration.seed;
  out["options"] = {
      {"none_level", a.options.none_level},
      {"verdict_rule", a.options.rule == VerdictRule::nearest_plausible
                           ? "nearest centroid among the candidates not rejected"
                           : "highest p-value"},
      {"min_tokens", a.options.min_tokens},
      {"neighbours", a.options.neighbours},
      {"candidates_column", a.options.candidates_column},
      {"permutations", a.options.calibration.permutations},
      {"fold_in_sweeps", a.options.fold_in_sweeps},
      {"fold_in_burn_in", a.options.fold_in_burn_in},
  };
  out["chains"] = a.num_chains;
  out["segments_merged"] = a.segments_merged;
  out["notes"] = a.notes;
  nlohmann::json groups = nlohmann::json::array();
  for (std::size_t g = 0; g < a.group_names.size(); ++g) {
    groups.push_back({{"name", a.group_names[g]},
                      {"known_documents", a.group_sizes[g]},
                      {"known_documents_too_short", a.known_too_short[g]}});
  }
  out["groups"] = groups;

  nlohmann::json documents = nlohmann::json::array();
  for (const auto& d : a.documents) {
    nlohmann::json doc;
    doc["id"] = d.id;
    doc["origin"] = d.origin;
    doc["segments"] = d.parts;
    doc["tokens"] = d.tokens_known ? nlohmann::json(d.tokens) : nlohmann::json(nullptr);
    nlohmann::json candidates = nlohmann::json::array();
    if (d.candidates.empty()) {
      candidates = a.group_names;
    } else {
      for (const auto g : d.candidates) candidates.push_back(a.group_names[g]);
    }
    doc["candidates"] = candidates;
    doc["verdict"] = a.verdict_label(d.modal_verdict);
    doc["chain_agreement"] = d.agreement;
    doc["verdict_p_value_range"] = {number_or_null(d.p_value_min), number_or_null(d.p_value_max)};
    nlohmann::json chains = nlohmann::json::array();
    for (std::size_t c = 0; c < d.chains.size(); ++c) {
      const auto& r = d.chains[c];
      nlohmann::json chain;
      chain["chain"] = c + 1;
      chain["verdict"] = r.verdict.kind == VerdictKind::group ? a.group_names[r.verdict.best]
                                                              : std::string(verdict_kind_name(r.verdict.kind));
      chain["best_candidate"] = group_or_dash(a, r.verdict.best);
      chain["best_p_value"] = number_or_null(r.verdict.best_p_value);
      chain["highest_p_value"] = number_or_null(r.verdict.highest_p_value);
      chain["best_distance"] = number_or_null(r.verdict.best_distance);
      chain["runner_up"] = r.verdict.runner_up == kNoCandidate ? nlohmann::json(nullptr)
                                                               : nlohmann::json(a.group_names[r.verdict.runner_up]);
      chain["runner_up_p_value"] = number_or_null(r.verdict.runner_up_p_value);
      chain["runner_up_distance"] = number_or_null(r.verdict.runner_up_distance);
      chain["p_value_margin"] = number_or_null(r.verdict.p_value_margin);
      chain["distance_margin"] = number_or_null(r.verdict.distance_margin);
      nlohmann::json evidence = nlohmann::json::array();
      for (const auto& e : r.evidence) {
        evidence.push_back(
            {{"group", a.group_names[e.group]}, {"hellinger_distance", e.distance}, {"p_value", e.p_value}});
      }
      chain["candidates"] = evidence;
      nlohmann::json votes = nlohmann::json::object();
      for (std::size_t g = 0; g < a.group_names.size(); ++g) {
        if (r.vote.votes[g] > 0) votes[a.group_names[g]] = r.vote.votes[g];
      }
      chain["neighbour_vote"] = {{"k", r.vote.k}, {"votes", votes}, {"leader", group_or_dash(a, r.vote.leader)}};
      chains.push_back(chain);
    }
    doc["by_chain"] = chains;
    documents.push_back(doc);
  }
  out["documents"] = documents;

  nlohmann::json calibration = nlohmann::json::array();
  for (std::size_t c = 0; c < a.calibration.size(); ++c) {
    const auto& cal = a.calibration[c];
    nlohmann::json recall = nlohmann::json::object();
    for (std::size_t g = 0; g < a.group_names.size(); ++g) recall[a.group_names[g]] = cal.recall[g];
    std::vector<std::string> columns = a.group_names;
    columns.push_back(verdict_kind_name(VerdictKind::none_of_the_candidates));
    calibration.push_back({
        {"chain", c + 1},
        {"method", "leave-one-out on the known documents"},
        {"documents", cal.documents},
        {"accuracy", cal.accuracy},
        {"recall", recall},
        {"none_rate", cal.none_rate},
        {"confusion", {{"rows_true_group", a.group_names}, {"columns_verdict", columns}, {"counts", cal.confusion}}},
        {"permutation_test",
         {{"method", "permutation test of leave-one-out accuracy (Ojala & Garriga 2010)"},
          {"statistic_name", "accuracy"},
          {"statistic", cal.accuracy},
          {"chance_accuracy", number_or_null(cal.chance_accuracy)},
          {"p_value", number_or_null(cal.permutation_p_value)},
          {"permutations", cal.permutations},
          {"complete_enumeration", cal.complete_enumeration},
          {"seed", cal.seed}}},
    });
  }
  out["calibration"] = calibration;
  return out;
}

std::string to_csv(const Attribution& a) {
  std::string out;
  for (const auto caution : kAttributionCautions) out += "# " + std::string(caution) + "\n";
  out +=
      "document,origin,tokens,chain,candidate,hellinger_distance,p_value,chain_verdict,neighbour_votes,verdict,"
      "chain_agreement\n";
  for (const auto& d : a.documents) {
    const std::string head = csv_field(d.id) + "," + csv_field(d.origin) + "," +
                             (d.tokens_known ? std::to_string(d.tokens) : std::string()) + ",";
    const std::string tail =
        "," + csv_field(a.verdict_label(d.modal_verdict)) + "," + format_number(d.agreement) + "\n";
    if (d.chains.empty()) {
      out += head + ",,,," + csv_field(a.verdict_label(d.modal_verdict)) + "," + tail;
      continue;
    }
    for (std::size_t c = 0; c < d.chains.size(); ++c) {
      const auto& r = d.chains[c];
      const std::string verdict = r.verdict.kind == VerdictKind::group ? a.group_names[r.verdict.best]
                                                                       : std::string(verdict_kind_name(r.verdict.kind));
      for (const auto& e : r.evidence) {
        out += head + std::to_string(c + 1) + "," + csv_field(a.group_names[e.group]) + "," +
               format_number(e.distance) + "," + format_number(e.p_value) + "," + csv_field(verdict) + "," +
               std::to_string(r.vote.votes[e.group]) + tail;
      }
    }
  }
  return out;
}

}  // namespace loupe

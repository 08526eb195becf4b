#include "analysis/composite_scan.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <memory>
#include <numeric>
#include <span>
#include <unordered_map>

#include "analysis/attribution_cautions.h"
#include "analysis/permutation.h"
#include "analysis/test_record.h"
#include "common/error.h"

namespace loupe {
namespace {

constexpr double kNaN = std::numeric_limits<double>::quiet_NaN();

struct BestSplit {
  std::size_t tau = 0, end = 0;
  double statistic = -std::numeric_limits<double>::infinity();
};

// The best (tau, kappa) of the points order[0..m), read from the full distance
// matrix; with `all`, statistic[tau] = max over kappa. S is the (m+1) x (m+1)
// prefix sum S(i, j) = sum_{a<i, b<j} D(order a, order b) (scratch, resized), so
//   within X = S(t,t)/2, between = S(t,k) - S(t,t), within Y = (S(k,k) - 2 S(t,k) + S(t,t))/2.
BestSplit best_split(const Eigen::MatrixXd& distances, std::span<const std::size_t> order, std::size_t min_segments,
                     std::vector<double>& prefix, SplitStatistics* all = nullptr) {
  const std::size_t m = order.size();
  const std::size_t w = m + 1;
  prefix.assign(w * w, 0.0);
  for (std::size_t i = 0; i < m; ++i) {
    const auto oi = static_cast<Eigen::Index>(order[i]);
    for (std::size_t j = 0; j < m; ++j) {
      prefix[(i + 1) * w + j + 1] = prefix[i * w + j + 1] + prefix[(i + 1) * w + j] - prefix[i * w + j] +
                                    distances(oi, static_cast<Eigen::Index>(order[j]));
    }
  }
  if (all != nullptr) {
    all->statistic.assign(w, kNaN);
    all->best_end.assign(w, 0);
  }
  BestSplit best;
  for (std::size_t tau = min_segments; tau + min_segments <= m; ++tau) {
    const double x = static_cast<double>(tau);
    const double s_tt = prefix[tau * w + tau];
    const double within_x = s_tt / 2;
    for (std::size_t kappa = tau + min_segments; kappa <= m; ++kappa) {
      const double y = static_cast<double>(kappa - tau);
      const double s_tk = prefix[tau * w + kappa];
      const double between = s_tk - s_tt;
      const double within_y = (prefix[kappa * w + kappa] - 2 * s_tk + s_tt) / 2;
      // E = 2/(xy) between - within_x / C(x,2) - within_y / C(y,2); Q = xy/(x+y) E.
      const double energy = 2.0 * between / (x * y) - 2.0 * within_x / (x * (x - 1)) - 2.0 * within_y / (y * (y - 1));
      const double q = x * y / (x + y) * energy;
      if (all != nullptr && !(q <= all->statistic[tau])) {  // NaN compares false: the first value is taken
        all->statistic[tau] = q;
        all->best_end[tau] = kappa;
      }
      if (q > best.statistic) {
        best.statistic = q;
        best.tau = tau;
        best.end = kappa;
      }
    }
  }
  return best;
}

struct Stretch {
  std::size_t begin = 0, end = 0;
  std::size_t size() const { return end - begin; }
};

}  // namespace

void ChangePointOptions::validate() const {
  if (!(level > 0.0 && level < 1.0)) {
    throw Error("--level must be in (0, 1); got " + std::to_string(level) + ".");
  }
  if (permutations < 1) {
    throw Error("--permutations must be at least 1 (a change point needs a p-value); 999 is usual.");
  }
  if (min_segments < 2) {
    throw Error("--min-segments must be at least 2 (the statistic compares distances within each side); got " +
                std::to_string(min_segments) + ".");
  }
}

Eigen::MatrixXd hellinger_distance_matrix(const TopicMatrix& theta) {
  const TopicMatrix y = sqrt_embedding(theta);
  const Eigen::Index n = y.rows();
  Eigen::MatrixXd distances = Eigen::MatrixXd::Zero(n, n);
  for (Eigen::Index i = 0; i < n; ++i) {
    for (Eigen::Index j = i + 1; j < n; ++j) {
      // Differences, not 1 - <y_i, y_j>: no cancellation for close profiles.
      distances(i, j) = distances(j, i) = (y.row(i) - y.row(j)).norm();
    }
  }
  return distances;
}

SplitStatistics energy_split_statistics(const Eigen::MatrixXd& distances, std::size_t min_segments) {
  const auto n = static_cast<std::size_t>(distances.rows());
  if (distances.cols() != distances.rows()) throw Error("the distance matrix is not square");
  if (min_segments < 2)
    throw Error("each side of a split needs at least 2 points; got " + std::to_string(min_segments));
  if (n < 2 * min_segments) {
    throw Error("a split needs at least " + std::to_string(2 * min_segments) + " points (" +
                std::to_string(min_segments) + " on each side); got " + std::to_string(n));
  }
  std::vector<std::size_t> order(n);
  std::iota(order.begin(), order.end(), std::size_t{0});
  SplitStatistics result;
  std::vector<double> prefix;
  const BestSplit best = best_split(distances, order, min_segments, prefix, &result);
  result.best_split = best.tau;
  result.best_split_end = best.end;
  result.best_statistic = best.statistic;
  return result;
}

double smallest_attainable_p_value(std::size_t segments) {
  // 2 / C(n, floor(n/2)), computed as a product to stay exact for small n.
  const std::size_t half = segments / 2;
  double combinations = 1;
  for (std::size_t i = 1; i <= half; ++i) {
    combinations = combinations * static_cast<double>(segments - half + i) / static_cast<double>(i);
  }
  return std::min(1.0, 2.0 / combinations);
}

ChangePointScan find_change_points(const TopicMatrix& theta, const ChangePointOptions& options,
                                   const std::string& document) {
  options.validate();
  const auto n = static_cast<std::size_t>(theta.rows());
  const std::size_t min = options.min_segments;
  if (n < 2 * min) {
    throw Error(document + " has " + std::to_string(n) + (n == 1 ? " segment" : " segments") +
                "; the change-point test needs at least " + std::to_string(2 * min) + " (" + std::to_string(min) +
                " on each side of a change, --min-segments). Ingest it in shorter segments (loupe ingest ... "
                "--segment-words N with a smaller N)" +
                (min > 2 ? std::string(" or lower --min-segments.") : std::string(".")));
  }
  ChangePointScan scan;
  scan.segments = n;
  scan.options = options;
  if (1.0 / static_cast<double>(options.permutations + 1) > options.level) {
    scan.warning = "with " + std::to_string(options.permutations) +
                   " permutations no p-value can be at or below the level " + format_number(options.level) +
                   "; use more permutations";
  }
  if (smallest_attainable_p_value(n) > options.level) {
    std::size_t enough = n;
    while (smallest_attainable_p_value(enough) > options.level) ++enough;
    if (!scan.warning.empty()) scan.warning += "; ";
    scan.warning += document + " has " + std::to_string(n) + " segments: even a clear change gets a p-value of about " +
                    format_number(std::round(smallest_attainable_p_value(n) * 1000) / 1000) +
                    " or more (shuffles that keep its two sides apart give the same statistic), above the level " +
                    format_number(options.level) + "; cut it into at least " + std::to_string(enough) +
                    " segments (loupe ingest ... --segment-words N with a smaller N)";
  }
  const Eigen::MatrixXd distances = hellinger_distance_matrix(theta);
  std::vector<Stretch> stretches{{0, n}};
  std::vector<std::size_t> identity(n);
  std::iota(identity.begin(), identity.end(), std::size_t{0});

  for (std::size_t step = 1;; ++step) {
    // The candidate: the best split of the stretch with the largest Q.
    bool any = false;
    ChangePoint candidate;
    double observed = -std::numeric_limits<double>::infinity();
    std::vector<double> prefix;
    for (const auto& s : stretches) {
      if (s.size() < 2 * min) continue;
      const BestSplit split = best_split(distances, std::span(identity).subspan(s.begin, s.size()), min, prefix);
      if (!any || split.statistic > observed) {
        any = true;
        observed = split.statistic;
        candidate.position = s.begin + split.tau;
        candidate.end = s.begin + split.end;
        candidate.statistic = split.statistic;
        candidate.stretch_begin = s.begin;
        candidate.stretch_end = s.end;
      }
    }
    if (!any) break;
    candidate.step = step;

    // Permutations within every stretch, each scored by its maximum over all splits.
    const std::uint64_t step_seed = stream_seed(options.seed, StreamPurpose::permutation, step);
    std::vector<double> permuted(options.permutations);
    run_in_parallel(options.permutations, options.threads, 16, [&](std::size_t begin, std::size_t end) {
      std::vector<std::size_t> order(n);
      std::vector<double> scratch;
      for (std::size_t r = begin; r < end; ++r) {
        RandomStream stream(stream_seed(step_seed, StreamPurpose::permutation, r));
        std::iota(order.begin(), order.end(), std::size_t{0});
        double most = -std::numeric_limits<double>::infinity();
        for (const auto& s : stretches) {
          if (s.size() < 2 * min) continue;
          // Fisher-Yates shuffle of the stretch.
          for (std::size_t i = s.size() - 1; i > 0; --i) {
            const std::size_t j = stream.below(static_cast<std::uint32_t>(i + 1));
            std::swap(order[s.begin + i], order[s.begin + j]);
          }
          most = std::max(most,
                          best_split(distances, std::span(order).subspan(s.begin, s.size()), min, scratch).statistic);
        }
        permuted[r] = most;
      }
    });
    std::uint64_t exceedances = 0;
    for (const double q : permuted) exceedances += at_least_as_extreme(q, observed, Tail::upper) ? 1 : 0;
    candidate.p_value = permutation_p_value(exceedances, options.permutations);

    if (candidate.p_value > options.level) {
      scan.has_last_candidate = true;
      scan.last_candidate = candidate;
      break;
    }
    scan.change_points.push_back(candidate);
    std::vector<Stretch> next;
    for (const auto& s : stretches) {
      if (s.begin == candidate.stretch_begin) {
        next.push_back({s.begin, candidate.position});
        next.push_back({candidate.position, s.end});
      } else {
        next.push_back(s);
      }
    }
    stretches = std::move(next);
  }
  std::sort(scan.change_points.begin(), scan.change_points.end(),
            [](const ChangePoint& a, const ChangePoint& b) { return a.position < b.position; });
  return scan;
}

// ---------------------------------------------------------------------------
// Segmented texts of a corpus.

namespace {

constexpr const char* kHowToSegment =
    "ingest the texts in segments, e.g. `loupe ingest SOURCE -o CORPUS --segment-words 100` (add "
    "--segment-disputed-only to cut only disputed texts), then fit the model on that corpus";

std::string list_ids(const std::vector<SegmentedText>& texts) {
  std::string out;
  const std::size_t shown = std::min<std::size_t>(texts.size(), 10);
  for (std::size_t i = 0; i < shown; ++i) out += (i ? ", " : "") + texts[i].id;
  if (texts.size() > shown) out += " and " + std::to_string(texts.size() - shown) + " more";
  return out;
}

}  // namespace

std::vector<SegmentedText> segmented_texts(const Corpus& corpus) {
  std::vector<SegmentedText> texts;
  std::unordered_map<std::string, std::size_t> index;
  std::vector<std::vector<std::pair<std::uint32_t, std::size_t>>> members;  // (segment_index, row)
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const Document& doc = corpus.documents[d];
    if (!doc.is_segment()) continue;
    auto [it, added] = index.try_emplace(doc.parent_id, texts.size());
    if (added) {
      SegmentedText text;
      text.id = doc.parent_id;
      text.role = doc.role;
      text.group = doc.group;
      texts.push_back(std::move(text));
      members.emplace_back();
    }
    members[it->second].emplace_back(doc.segment_index, d);
  }
  for (std::size_t t = 0; t < texts.size(); ++t) {
    auto& m = members[t];
    std::sort(m.begin(), m.end());
    SegmentedText& text = texts[t];
    const std::uint32_t count = corpus.documents[m.front().second].segment_count;
    for (std::size_t i = 0; i < m.size(); ++i) {
      const Document& doc = corpus.documents[m[i].second];
      if (m[i].first != i || doc.segment_count != count || m.size() != count) {
        throw Error("the corpus's segments of " + text.id + " are inconsistent (" + std::to_string(m.size()) +
                    " segments found, " + std::to_string(count) + " expected, segment " + std::to_string(m[i].first) +
                    " at place " + std::to_string(i) + "); ingest the texts again");
      }
      text.rows.push_back(m[i].second);
      text.segment_ids.push_back(doc.id);
      text.first_tokens.push_back(doc.first_token);
      text.tokens.push_back(corpus.document_length(m[i].second));
    }
  }
  return texts;
}

std::vector<SegmentedText> texts_to_scan(const Corpus& corpus, std::span<const std::string> ids) {
  std::vector<SegmentedText> all = segmented_texts(corpus);
  if (all.empty()) {
    throw Error("the corpus holds no segmented texts, so there is nothing to scan for change points: " +
                std::string(kHowToSegment) + ".");
  }
  std::vector<SegmentedText> chosen;
  if (ids.empty()) {
    for (auto& text : all) {
      if (text.role == DocumentRole::disputed) chosen.push_back(text);
    }
    if (chosen.empty()) {
      throw Error("the corpus has segmented texts (" + list_ids(all) +
                  ") but none of them is disputed: name the texts to scan, or " + kHowToSegment + ".");
    }
    return chosen;
  }
  for (const auto& id : ids) {
    const auto it = std::find_if(all.begin(), all.end(), [&](const SegmentedText& t) { return t.id == id; });
    if (it != all.end()) {
      chosen.push_back(*it);
      continue;
    }
    const auto doc =
        std::find_if(corpus.documents.begin(), corpus.documents.end(), [&](const Document& d) { return d.id == id; });
    if (doc != corpus.documents.end() && doc->is_segment()) {
      throw Error(id + " is one segment of " + doc->parent_id + "; name the whole text, " + doc->parent_id + ".");
    }
    if (doc != corpus.documents.end()) {
      throw Error(id + " is not segmented in this corpus (" +
                  std::to_string(corpus.document_length(static_cast<std::size_t>(doc - corpus.documents.begin()))) +
                  " tokens, one piece); to scan it, " + kHowToSegment +
                  ". Segmented texts in this corpus: " + list_ids(all) + ".");
    }
    throw Error("there is no document " + id + " in the corpus. Segmented texts in it: " + list_ids(all) + ".");
  }
  return chosen;
}

// ---------------------------------------------------------------------------
// The scan with a model.

namespace {

TopicMatrix segment_theta(const Model& model, std::size_t chain, const SegmentedText& text) {
  const std::size_t k = model.topic_count();
  TopicMatrix theta(static_cast<Eigen::Index>(text.num_segments()), static_cast<Eigen::Index>(k));
  for (std::size_t i = 0; i < text.num_segments(); ++i) {
    const auto shares = model.theta(chain, text.rows[i]);
    double sum = 0;
    for (std::size_t t = 0; t < k; ++t) sum += static_cast<double>(shares[t]);
    // float32 in the model file: rescale so every row sums to exactly 1.
    for (std::size_t t = 0; t < k; ++t) {
      theta(static_cast<Eigen::Index>(i), static_cast<Eigen::Index>(t)) = static_cast<double>(shares[t]) / sum;
    }
  }
  return theta;
}

// The reference for one chain, leaving out the known document `leave_out` ("" for none).
ConformalReference reference_without(const KnownDocuments& known, const std::string& leave_out) {
  if (leave_out.empty() || std::find(known.ids.begin(), known.ids.end(), leave_out) == known.ids.end()) {
    return build_conformal_reference(known.theta, known.groups, known.group_names);
  }
  std::vector<Eigen::Index> keep;
  std::vector<std::uint32_t> groups;
  for (std::size_t i = 0; i < known.ids.size(); ++i) {
    if (known.ids[i] == leave_out) continue;
    keep.push_back(static_cast<Eigen::Index>(i));
    groups.push_back(known.groups[i]);
  }
  TopicMatrix theta(static_cast<Eigen::Index>(keep.size()), known.theta.cols());
  for (std::size_t i = 0; i < keep.size(); ++i) theta.row(static_cast<Eigen::Index>(i)) = known.theta.row(keep[i]);
  return build_conformal_reference(theta, groups, known.group_names);
}

std::vector<CandidateEvidence> score_row(const ConformalReference& reference, const Eigen::VectorXd& theta) {
  return score_against_candidates(reference,
                                  std::span<const double>(theta.data(), static_cast<std::size_t>(theta.size())), {});
}

void add_warning(std::vector<std::string>& warnings, const std::string& warning) {
  if (!warning.empty() && std::find(warnings.begin(), warnings.end(), warning) == warnings.end()) {
    warnings.push_back(warning);
  }
}

}  // namespace

CompositeScan scan_composite_texts(const Model& model, const Corpus& corpus, std::span<const std::string> ids,
                                   const CompositeScanOptions& options) {
  options.change_points.validate();
  if (model.chains.empty()) throw Error("the model has no chains to scan with");
  if (corpus.num_documents() != model.num_documents()) {
    throw Error("the corpus has " + std::to_string(corpus.num_documents()) + " documents but the model " +
                std::to_string(model.num_documents()) + "; use the corpus the model was fitted on");
  }
  CompositeScan scan;
  scan.options = options;
  scan.num_chains = model.chains.size();
  const std::size_t needed = 2 * options.change_points.min_segments;
  for (const auto& text : texts_to_scan(corpus, ids)) {
    // Texts the user named must be testable (find_change_points says why not); of
    // the texts chosen by default, the short ones are set aside and listed.
    if (ids.empty() && text.num_segments() < needed) {
      scan.texts_set_aside.push_back({text.id, text.num_segments()});
      continue;
    }
    TextScan t;
    t.text = text;
    scan.texts.push_back(std::move(t));
  }
  if (scan.texts.empty()) {
    std::string names;
    for (const auto& [id, n] : scan.texts_set_aside)
      names += (names.empty() ? "" : ", ") + id + " " + std::to_string(n);
    throw Error("no segmented disputed text has the " + std::to_string(needed) +
                " segments the change-point test needs (segments: " + names +
                "). Ingest them in shorter segments (loupe ingest ... --segment-words N with a smaller N), or name "
                "the texts to scan.");
  }

  for (std::size_t chain = 0; chain < model.chains.size(); ++chain) {
    // The groups' known documents under this chain; the attribution is left out when they cannot form one.
    std::unique_ptr<KnownDocuments> known;
    try {
      known = std::make_unique<KnownDocuments>(known_documents(model, chain, &corpus));
      const ConformalReference whole = build_conformal_reference(known->theta, known->groups, known->group_names);
      if (whole.num_groups() < 2)
        throw Error("only " + std::to_string(whole.num_groups()) + " group has known documents");
      if (chain == 0) {
        scan.group_names = whole.group_names;
        scan.reference_sizes = whole.group_sizes;
        for (std::size_t g = 0; g < whole.num_groups(); ++g) {
          if (whole.group_sizes[g] < minimum_group_size(options.none_level)) {
            add_warning(scan.warnings,
                        "group " + whole.group_names[g] + " has " + std::to_string(whole.group_sizes[g]) +
                            " known documents, too few for a p-value at or below " + format_number(options.none_level) +
                            " (" + std::to_string(minimum_group_size(options.none_level)) + " needed)");
          }
        }
      }
    } catch (const Error& e) {
      known.reset();
      add_warning(scan.warnings, std::string("segments are not scored against the groups: ") + e.what());
    }

    for (auto& text_scan : scan.texts) {
      const SegmentedText& text = text_scan.text;
      ChainScan result;
      result.chain = static_cast<int>(chain);
      const TopicMatrix theta = segment_theta(model, chain, text);
      result.change_points = find_change_points(theta, options.change_points, text.id);
      add_warning(scan.warnings, result.change_points.warning);
      if (known) {
        const ConformalReference reference =
            reference_without(*known, text.role == DocumentRole::known ? text.id : std::string());
        for (Eigen::Index i = 0; i < theta.rows(); ++i) {
          SegmentEvidence segment;
          segment.evidence = score_row(reference, theta.row(i).transpose());
          segment.verdict = decide_verdict(segment.evidence, options.none_level);
          result.segments.push_back(std::move(segment));
        }
        std::vector<std::size_t> bounds{0};
        for (const auto& cp : result.change_points.change_points) bounds.push_back(cp.position);
        bounds.push_back(text.num_segments());
        for (std::size_t b = 0; b + 1 < bounds.size(); ++b) {
          StretchEvidence stretch;
          stretch.begin = bounds[b];
          stretch.end = bounds[b + 1];
          // The stretch's profile: the token-weighted mean of its segments' theta.
          Eigen::VectorXd mean = Eigen::VectorXd::Zero(theta.cols());
          double weight = 0;
          for (std::size_t i = stretch.begin; i < stretch.end; ++i) {
            const auto w = static_cast<double>(std::max<std::size_t>(text.tokens[i], 1));
            mean += w * theta.row(static_cast<Eigen::Index>(i)).transpose();
            weight += w;
          }
          mean /= weight;
          stretch.evidence = score_row(reference, mean);
          for (const auto& e : stretch.evidence) {
            if (stretch.nearest == kNoCandidate || e.distance < stretch.distance) {
              stretch.nearest = e.group;
              stretch.distance = e.distance;
              stretch.p_value = e.p_value;
            }
          }
          result.stretches.push_back(std::move(stretch));
        }
      }
      text_scan.chains.push_back(std::move(result));
    }
  }

  for (auto& t : scan.texts) {
    bool first = true;
    t.fewest_change_points = std::numeric_limits<std::size_t>::max();
    for (const auto& chain : t.chains) {
      const auto& cps = chain.change_points.change_points;
      t.fewest_change_points = std::min(t.fewest_change_points, cps.size());
      t.most_change_points = std::max(t.most_change_points, cps.size());
      if (cps.empty()) continue;
      ++t.chains_with_change;
      const auto strongest = std::find_if(cps.begin(), cps.end(), [](const ChangePoint& c) { return c.step == 1; });
      const std::size_t position = strongest->position;
      const std::uint64_t token = t.text.first_tokens[position];
      t.first_position_min = first ? position : std::min(t.first_position_min, position);
      t.first_position_max = first ? position : std::max(t.first_position_max, position);
      t.first_token_min = first ? token : std::min(t.first_token_min, token);
      t.first_token_max = first ? token : std::max(t.first_token_max, token);
      first = false;
    }
    t.share_with_change = static_cast<double>(t.chains_with_change) / static_cast<double>(t.chains.size());
  }
  return scan;
}

// ---------------------------------------------------------------------------
// Output.

namespace {

nlohmann::json number_or_null(double value) {
  return std::isfinite(value) ? nlohmann::json(value) : nlohmann::json(nullptr);
}

nlohmann::json change_point_json(const ChangePoint& cp, const SegmentedText& text) {
  return {{"position", cp.position},
          {"first_segment_after", text.segment_ids[cp.position]},
          {"first_token_after", text.first_tokens[cp.position]},
          {"statistic", cp.statistic},
          {"p_value", number_or_null(cp.p_value)},
          {"second_side_end", cp.end},
          {"stretch_begin", cp.stretch_begin},
          {"stretch_end", cp.stretch_end},
          {"step", cp.step}};
}

nlohmann::json evidence_json(const std::vector<CandidateEvidence>& evidence, const CompositeScan& scan) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& e : evidence) {
    out.push_back({{"group", scan.group_names.at(e.group)}, {"distance", e.distance}, {"p_value", e.p_value}});
  }
  return out;
}

std::string group_label(const CompositeScan& scan, std::uint32_t group) {
  return group == kNoCandidate ? std::string() : scan.group_names.at(group);
}

}  // namespace

nlohmann::json to_json(const CompositeScan& scan) {
  const auto& o = scan.options.change_points;
  nlohmann::json out;
  out["method"] = "energy-distance change point, hierarchical (Matteson & James 2014, JASA)";
  out["statistic_name"] =
      "Q (energy distance between the segments before the change and those after it up to the best end, scaled by "
      "m n / (m + n))";
  out["distance"] = "Hellinger";
  out["exponent_alpha"] = kEnergyDistanceExponent;
  out["level"] = o.level;
  out["permutations"] = o.permutations;
  out["permutation_scheme"] = "segments shuffled within each stretch between the change points found so far";
  out["min_segments"] = o.min_segments;
  out["seed"] = o.seed;
  out["attribution"] = {{"method", "conformal p-values against each group's centroid (analysis/attribution.h)"},
                        {"none_level", scan.options.none_level},
                        {"groups", scan.group_names},
                        {"known_documents", scan.reference_sizes}};
  out["chains"] = scan.num_chains;
  out["cautions"] = nlohmann::json::array();
  for (const auto caution : kAttributionCautions) out["cautions"].push_back(std::string(caution));
  out["warnings"] = scan.warnings;
  out["texts_set_aside"] = nlohmann::json::array();
  for (const auto& [id, segments] : scan.texts_set_aside) {
    out["texts_set_aside"].push_back({{"id", id}, {"segments", segments}});
  }
  out["texts"] = nlohmann::json::array();
  for (const auto& t : scan.texts) {
    nlohmann::json text;
    text["id"] = t.text.id;
    text["role"] = t.text.role == DocumentRole::disputed ? "disputed" : "known";
    text["segments"] = nlohmann::json::array();
    for (std::size_t i = 0; i < t.text.num_segments(); ++i) {
      text["segments"].push_back({{"index", i},
                                  {"id", t.text.segment_ids[i]},
                                  {"first_token", t.text.first_tokens[i]},
                                  {"tokens", t.text.tokens[i]}});
    }
    text["agreement"] = {{"chains_with_change_point", t.chains_with_change},
                         {"share_with_change_point", t.share_with_change},
                         {"fewest_change_points", t.fewest_change_points},
                         {"most_change_points", t.most_change_points}};
    if (t.chains_with_change > 0) {
      text["agreement"]["first_change_point_position"] = {t.first_position_min, t.first_position_max};
      text["agreement"]["first_change_point_token"] = {t.first_token_min, t.first_token_max};
    }
    text["chains"] = nlohmann::json::array();
    for (const auto& c : t.chains) {
      nlohmann::json chain;
      chain["chain"] = c.chain + 1;  // numbered from 1, as in every file
      chain["seed"] = c.change_points.options.seed;
      chain["change_points"] = nlohmann::json::array();
      for (const auto& cp : c.change_points.change_points)
        chain["change_points"].push_back(change_point_json(cp, t.text));
      chain["last_candidate"] = c.change_points.has_last_candidate
                                    ? change_point_json(c.change_points.last_candidate, t.text)
                                    : nlohmann::json(nullptr);
      chain["segments"] = nlohmann::json::array();
      for (const auto& s : c.segments) {
        chain["segments"].push_back(
            {{"best_group", group_label(scan, s.verdict.best)},
             {"verdict", s.verdict.kind == VerdictKind::group ? group_label(scan, s.verdict.best)
                                                              : verdict_kind_name(s.verdict.kind)},
             {"p_value", number_or_null(s.verdict.best_p_value)},
             {"distance", number_or_null(s.verdict.best_distance)},
             {"groups", evidence_json(s.evidence, scan)}});
      }
      chain["stretches"] = nlohmann::json::array();
      for (const auto& s : c.stretches) {
        chain["stretches"].push_back({{"begin", s.begin},
                                      {"end", s.end},
                                      {"first_token", t.text.first_tokens[s.begin]},
                                      {"nearest_group", group_label(scan, s.nearest)},
                                      {"distance", s.distance},
                                      {"p_value", s.p_value},
                                      {"groups", evidence_json(s.evidence, scan)}});
      }
      text["chains"].push_back(std::move(chain));
    }
    out["texts"].push_back(std::move(text));
  }
  return out;
}

std::string to_csv(const CompositeScan& scan) {
  std::string out;
  for (const auto caution : kAttributionCautions) out += "# " + std::string(caution) + "\n";
  out +=
      "text,chain,segment,segment_id,first_token,tokens,change_point_before,change_point_p_value,best_group,"
      "verdict,p_value,distance,stretch,stretch_nearest_group,stretch_p_value,permutations,seed\n";
  for (const auto& t : scan.texts) {
    for (const auto& c : t.chains) {
      std::size_t stretch = 0;
      for (std::size_t i = 0; i < t.text.num_segments(); ++i) {
        const auto& cps = c.change_points.change_points;
        const auto cp = std::find_if(cps.begin(), cps.end(), [&](const ChangePoint& p) { return p.position == i; });
        if (cp != cps.end()) ++stretch;
        std::string row = csv_field(t.text.id) + "," + std::to_string(c.chain + 1) + "," + std::to_string(i + 1) + "," +
                          csv_field(t.text.segment_ids[i]) + "," + std::to_string(t.text.first_tokens[i]) + "," +
                          std::to_string(t.text.tokens[i]) + "," + (cp != cps.end() ? "yes" : "no") + "," +
                          (cp != cps.end() ? format_number(cp->p_value) : "") + ",";
        if (!c.segments.empty()) {
          const Verdict& v = c.segments[i].verdict;
          row += csv_field(group_label(scan, v.best)) + "," +
                 csv_field(v.kind == VerdictKind::group ? group_label(scan, v.best) : verdict_kind_name(v.kind)) + "," +
                 format_number(v.best_p_value) + "," + format_number(v.best_distance) + ",";
        } else {
          row += ",,,,";
        }
        row += std::to_string(stretch + 1) + ",";
        if (!c.stretches.empty()) {
          row += csv_field(group_label(scan, c.stretches[stretch].nearest)) + "," +
                 format_number(c.stretches[stretch].p_value) + ",";
        } else {
          row += ",,";
        }
        row +=
            std::to_string(c.change_points.options.permutations) + "," + std::to_string(c.change_points.options.seed);
        out += row + "\n";
      }
    }
  }
  return out;
}

}  // namespace loupe

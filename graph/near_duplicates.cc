#include "graph/near_duplicates.h"

#include <algorithm>
#include <cmath>
#include <numeric>
#include <thread>

#include "common/error.h"
#include "graph/graph_export.h"
#include "graph/hellinger_neighbours.h"
#include "model/parallel_runner.h"
#include "model/random.h"

namespace loupe {

namespace {

// The 64-bit finaliser of MurmurHash3 (Appleby; from memory): a bijection that
// mixes every input bit into every output bit.
inline std::uint64_t mix64(std::uint64_t x) {
  x ^= x >> 33;
  x *= 0xFF51AFD7ED558CCDULL;
  x ^= x >> 33;
  x *= 0xC4CEB9FE1A85EC53ULL;
  x ^= x >> 33;
  return x;
}

std::size_t worker_count(std::size_t requested) {
  if (requested != 0) return requested;
  const unsigned hardware = std::thread::hardware_concurrency();
  return hardware == 0 ? 1 : hardware;
}

struct DisjointSets {
  std::vector<std::uint32_t> parent;
  explicit DisjointSets(std::size_t n) : parent(n) { std::iota(parent.begin(), parent.end(), 0u); }
  std::uint32_t find(std::uint32_t x) {
    while (parent[x] != x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  }
  void join(std::uint32_t a, std::uint32_t b) {
    a = find(a);
    b = find(b);
    if (a != b) parent[std::max(a, b)] = std::min(a, b);
  }
};

}  // namespace

std::uint64_t shingle_hash(std::span<const WordId> words) {
  std::uint64_t h = 0x9E3779B97F4A7C15ULL ^ words.size();
  for (const WordId w : words) h = mix64(h ^ (static_cast<std::uint64_t>(w) + 0x632BE59BD9B4E019ULL));
  return h;
}

ShingleSets word_shingles(const Corpus& corpus, std::size_t words, std::size_t threads) {
  if (words == 0) throw Error("the shingle length must be at least 1 word.");
  const std::size_t n = corpus.num_documents();
  // Room for every shingle (one per position), filled in parallel, sorted and
  // deduplicated per document, then packed.
  std::vector<std::uint64_t> room(n + 1, 0);
  for (std::size_t d = 0; d < n; ++d) {
    const std::size_t length = corpus.document_length(d);
    room[d + 1] = room[d] + (length == 0 ? 0 : length < words ? 1 : length - words + 1);
  }
  std::vector<std::uint64_t> hashes(room[n]);
  std::vector<std::uint64_t> distinct(n, 0);
  const std::size_t chunk = 256;
  ParallelRunner(worker_count(threads)).run((n + chunk - 1) / chunk, [&](std::size_t c) {
    for (std::size_t d = c * chunk; d < std::min(n, (c + 1) * chunk); ++d) {
      const auto tokens = corpus.document_tokens(d);
      std::uint64_t* out = hashes.data() + room[d];
      if (tokens.empty()) continue;
      if (tokens.size() < words) {
        out[0] = shingle_hash(tokens);
      } else {
        for (std::size_t i = 0; i + words <= tokens.size(); ++i) out[i] = shingle_hash(tokens.subspan(i, words));
      }
      std::uint64_t* end = hashes.data() + room[d + 1];
      std::sort(out, end);
      distinct[d] = static_cast<std::uint64_t>(std::unique(out, end) - out);
    }
  });
  ShingleSets sets;
  sets.offset.assign(n + 1, 0);
  for (std::size_t d = 0; d < n; ++d) sets.offset[d + 1] = sets.offset[d] + distinct[d];
  sets.hash.resize(sets.offset[n]);
  for (std::size_t d = 0; d < n; ++d) {
    std::copy_n(hashes.begin() + static_cast<std::ptrdiff_t>(room[d]), distinct[d],
                sets.hash.begin() + static_cast<std::ptrdiff_t>(sets.offset[d]));
  }
  return sets;
}

namespace {

std::size_t shared_count(std::span<const std::uint64_t> a, std::span<const std::uint64_t> b) {
  std::size_t i = 0;
  std::size_t j = 0;
  std::size_t shared = 0;
  while (i < a.size() && j < b.size()) {
    if (a[i] < b[j]) {
      ++i;
    } else if (b[j] < a[i]) {
      ++j;
    } else {
      ++shared;
      ++i;
      ++j;
    }
  }
  return shared;
}

}  // namespace

double jaccard_similarity(std::span<const std::uint64_t> a, std::span<const std::uint64_t> b) {
  if (a.empty() && b.empty()) return 0.0;
  const std::size_t shared = shared_count(a, b);
  return static_cast<double>(shared) / static_cast<double>(a.size() + b.size() - shared);
}

double candidate_probability(double jaccard, const Banding& banding) {
  // P(candidate) = 1 - (1 - J^r)^b (Leskovec, Rajaraman & Ullman, Mining of
  // Massive Datasets, ch. 3.4; from memory).
  return 1.0 - std::pow(1.0 - std::pow(jaccard, static_cast<double>(banding.rows)), static_cast<double>(banding.bands));
}

Banding choose_banding(std::size_t num_hashes, double threshold, double target) {
  Banding best{num_hashes, 1};
  for (std::size_t rows = 1; rows <= num_hashes; ++rows) {
    const Banding candidate{num_hashes / rows, rows};
    if (candidate_probability(threshold, candidate) >= target) best = candidate;
  }
  return best;
}

NearDuplicateResult find_near_duplicates(const Corpus& corpus, const NearDuplicateOptions& options) {
  if (!(options.threshold > 0.0 && options.threshold <= 1.0)) {
    throw Error("the near-duplicate threshold is a Jaccard similarity and must lie in (0, 1], not " +
                std::to_string(options.threshold) + ".");
  }
  if (options.num_hashes == 0) throw Error("the MinHash signature needs at least 1 hash.");
  if (options.rows_per_band > options.num_hashes) {
    throw Error("rows per band (" + std::to_string(options.rows_per_band) + ") cannot exceed the number of hashes (" +
                std::to_string(options.num_hashes) + ").");
  }
  const auto report = [&](const char* stage, std::size_t done, std::size_t total) {
    if (options.progress) options.progress(stage, done, total);
  };
  NearDuplicateResult result;
  result.options = options;
  result.banding = options.rows_per_band == 0
                       ? choose_banding(options.num_hashes, options.threshold)
                       : Banding{options.num_hashes / options.rows_per_band, options.rows_per_band};
  result.options.rows_per_band = result.banding.rows;
  const std::size_t n = corpus.num_documents();
  result.documents = n;
  result.cluster_of.assign(n, NearDuplicateResult::kNoCluster);
  const std::size_t workers = worker_count(options.threads);
  const ParallelRunner runner(workers);

  report("shingles", 0, n);
  const ShingleSets shingles = word_shingles(corpus, options.shingle_words, workers);
  report("shingles", n, n);

  // MinHash with multiply-add-shift hash functions h_i(x) = (a_i x + b_i) >> 32
  // over the 64-bit shingle hashes (Dietzfelbinger et al. 1997; from memory).
  const std::size_t hashes = result.banding.bands * result.banding.rows;
  std::vector<std::uint64_t> multiplier(hashes);
  std::vector<std::uint64_t> increment(hashes);
  for (std::size_t i = 0; i < hashes; ++i) {
    multiplier[i] = derive_seed(options.seed, {i, 0}) | 1u;
    increment[i] = derive_seed(options.seed, {i, 1});
  }
  std::vector<std::uint32_t> signature(n * hashes, 0xFFFFFFFFu);
  const std::size_t chunk = 256;
  const std::size_t chunks = (n + chunk - 1) / chunk;
  runner.run(chunks, [&](std::size_t c) {
    for (std::size_t d = c * chunk; d < std::min(n, (c + 1) * chunk); ++d) {
      std::uint32_t* sig = signature.data() + d * hashes;
      for (const std::uint64_t x : shingles.of(d)) {
        for (std::size_t i = 0; i < hashes; ++i) {
          const auto h = static_cast<std::uint32_t>((multiplier[i] * x + increment[i]) >> 32);
          sig[i] = std::min(sig[i], h);
        }
      }
    }
  });
  report("signatures", n, n);

  std::vector<std::uint32_t> active;
  for (std::size_t d = 0; d < n; ++d) {
    if (shingles.of(d).empty()) {
      ++result.documents_without_shingles;
    } else {
      active.push_back(static_cast<std::uint32_t>(d));
    }
  }

  // Banding: documents whose band values agree fall into one bucket; every
  // pair in a bucket is a candidate. Candidates are pairs packed in 64 bits.
  const std::size_t bands = result.banding.bands;
  const std::size_t rows = result.banding.rows;
  std::vector<std::vector<std::uint64_t>> band_candidates(bands);
  runner.run(bands, [&](std::size_t b) {
    std::vector<std::pair<std::uint64_t, std::uint32_t>> keyed;
    keyed.reserve(active.size());
    for (const std::uint32_t d : active) {
      std::uint64_t key = 0x2545F4914F6CDD1DULL + b;
      const std::uint32_t* values = signature.data() + d * hashes + b * rows;
      for (std::size_t r = 0; r < rows; ++r) key = mix64(key ^ (values[r] + (static_cast<std::uint64_t>(r) << 32)));
      keyed.emplace_back(key, d);
    }
    std::sort(keyed.begin(), keyed.end());
    auto& out = band_candidates[b];
    for (std::size_t i = 0; i < keyed.size();) {
      std::size_t j = i + 1;
      while (j < keyed.size() && keyed[j].first == keyed[i].first) ++j;
      for (std::size_t p = i; p < j; ++p)
        for (std::size_t q = p + 1; q < j; ++q)
          out.push_back((static_cast<std::uint64_t>(keyed[p].second) << 32) | keyed[q].second);
      i = j;
    }
    std::sort(out.begin(), out.end());
    out.erase(std::unique(out.begin(), out.end()), out.end());
  });
  std::vector<std::uint64_t> candidates;
  for (auto& part : band_candidates) {
    candidates.insert(candidates.end(), part.begin(), part.end());
    std::vector<std::uint64_t>().swap(part);
  }
  std::sort(candidates.begin(), candidates.end());
  candidates.erase(std::unique(candidates.begin(), candidates.end()), candidates.end());
  result.candidates = candidates.size();
  report("candidates", bands, bands);

  // Verification: exact Jaccard similarity of every candidate pair.
  std::vector<std::vector<NearDuplicatePair>> verified(workers);
  const std::size_t verify_chunk = 4096;
  const std::size_t verify_chunks = (candidates.size() + verify_chunk - 1) / verify_chunk;
  runner.run_with_worker(verify_chunks, [&](std::size_t c, std::size_t worker) {
    for (std::size_t i = c * verify_chunk; i < std::min(candidates.size(), (c + 1) * verify_chunk); ++i) {
      const auto a = static_cast<std::uint32_t>(candidates[i] >> 32);
      const auto b = static_cast<std::uint32_t>(candidates[i] & 0xFFFFFFFFu);
      const auto sa = shingles.of(a);
      const auto sb = shingles.of(b);
      const std::size_t shared = shared_count(sa, sb);
      const double j = static_cast<double>(shared) / static_cast<double>(sa.size() + sb.size() - shared);
      if (j < options.threshold) continue;
      NearDuplicatePair pair;
      pair.first = a;
      pair.second = b;
      pair.jaccard = j;
      pair.shared_shingles = shared;
      std::size_t agree = 0;
      const std::uint32_t* x = signature.data() + a * hashes;
      const std::uint32_t* y = signature.data() + b * hashes;
      for (std::size_t h = 0; h < hashes; ++h) agree += x[h] == y[h];
      pair.estimate = static_cast<double>(agree) / static_cast<double>(hashes);
      verified[worker].push_back(pair);
    }
  });
  for (const auto& part : verified) result.pairs.insert(result.pairs.end(), part.begin(), part.end());
  std::sort(result.pairs.begin(), result.pairs.end(), [](const NearDuplicatePair& p, const NearDuplicatePair& q) {
    if (p.jaccard != q.jaccard) return p.jaccard > q.jaccard;
    return p.first != q.first ? p.first < q.first : p.second < q.second;
  });
  report("verified", candidates.size(), candidates.size());

  DisjointSets sets(n);
  for (const auto& pair : result.pairs) sets.join(pair.first, pair.second);
  std::vector<std::uint32_t> root_cluster(n, NearDuplicateResult::kNoCluster);
  std::vector<char> paired(n, 0);
  for (const auto& pair : result.pairs) paired[pair.first] = paired[pair.second] = 1;
  for (std::size_t d = 0; d < n; ++d) {
    if (!paired[d]) continue;
    const std::uint32_t root = sets.find(static_cast<std::uint32_t>(d));
    if (root_cluster[root] == NearDuplicateResult::kNoCluster) {
      root_cluster[root] = static_cast<std::uint32_t>(result.clusters.size());
      result.clusters.emplace_back();
    }
    result.clusters[root_cluster[root]].push_back(static_cast<std::uint32_t>(d));
  }
  std::stable_sort(result.clusters.begin(), result.clusters.end(),
                   [](const auto& a, const auto& b) { return a.size() > b.size(); });
  for (std::size_t c = 0; c < result.clusters.size(); ++c)
    for (const auto d : result.clusters[c]) result.cluster_of[d] = static_cast<std::uint32_t>(c);
  return result;
}

void add_topic_distances(NearDuplicateResult& result, const ProfileMatrix& theta) {
  if (static_cast<std::size_t>(theta.rows()) != result.documents) {
    throw Error("the model has " + std::to_string(theta.rows()) + " documents but the corpus " +
                std::to_string(result.documents) + ". Pass the model fitted on this corpus.");
  }
  for (auto& pair : result.pairs) pair.topic_distance = hellinger_between(theta, pair.first, pair.second);
}

nlohmann::json near_duplicates_json(const NearDuplicateResult& result, const Corpus& corpus) {
  const auto group_of = [&](std::uint32_t d) -> nlohmann::json {
    const auto g = corpus.documents[d].group;
    return g == kNoGroup ? nlohmann::json(nullptr) : nlohmann::json(corpus.groups[g]);
  };
  nlohmann::json pairs = nlohmann::json::array();
  for (const auto& p : result.pairs) {
    pairs.push_back(
        {{"first", corpus.documents[p.first].id},
         {"second", corpus.documents[p.second].id},
         {"first_group", group_of(p.first)},
         {"second_group", group_of(p.second)},
         {"jaccard", p.jaccard},
         {"minhash_estimate", p.estimate},
         {"shared_shingles", p.shared_shingles},
         {"topic_distance", std::isnan(p.topic_distance) ? nlohmann::json(nullptr) : nlohmann::json(p.topic_distance)},
         {"cluster", result.cluster_of[p.first] + 1}});
  }
  nlohmann::json clusters = nlohmann::json::array();
  for (std::size_t c = 0; c < result.clusters.size(); ++c) {
    nlohmann::json members = nlohmann::json::array();
    for (const auto d : result.clusters[c]) members.push_back(corpus.documents[d].id);
    clusters.push_back({{"cluster", c + 1}, {"size", result.clusters[c].size()}, {"documents", members}});
  }
  const auto& o = result.options;
  return {{"settings",
           {{"method", "MinHash with LSH banding, verified by exact Jaccard similarity"},
            {"shingle_words", o.shingle_words},
            {"shingles_over", "corpus tokens (after stop-word removal and vocabulary pruning)"},
            {"threshold", o.threshold},
            {"hashes", result.banding.bands * result.banding.rows},
            {"bands", result.banding.bands},
            {"rows_per_band", result.banding.rows},
            {"candidate_probability_at_threshold", candidate_probability(o.threshold, result.banding)},
            {"seed", o.seed}}},
          {"documents", result.documents},
          {"documents_without_shingles", result.documents_without_shingles},
          {"candidates_verified", result.candidates},
          {"pairs", pairs},
          {"clusters", clusters}};
}

std::string near_duplicates_csv(const NearDuplicateResult& result, const Corpus& corpus) {
  const auto group_of = [&](std::uint32_t d) {
    const auto g = corpus.documents[d].group;
    return g == kNoGroup ? std::string() : corpus.groups[g];
  };
  std::string out =
      "first,second,first_group,second_group,jaccard,minhash_estimate,shared_shingles,topic_distance,cluster\n";
  for (const auto& p : result.pairs) {
    out += csv_cell(corpus.documents[p.first].id) + "," + csv_cell(corpus.documents[p.second].id) + "," +
           csv_cell(group_of(p.first)) + "," + csv_cell(group_of(p.second)) + "," + nlohmann::json(p.jaccard).dump() +
           "," + nlohmann::json(p.estimate).dump() + "," + std::to_string(p.shared_shingles) + "," +
           (std::isnan(p.topic_distance) ? std::string() : nlohmann::json(p.topic_distance).dump()) + "," +
           std::to_string(result.cluster_of[p.first] + 1) + "\n";
  }
  return out;
}

}  // namespace loupe

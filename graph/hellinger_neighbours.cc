#include "graph/hellinger_neighbours.h"

#include <algorithm>
#include <cmath>
#include <limits>
#include <mutex>
#include <string>
#include <thread>

#include "common/error.h"
#include "model/parallel_runner.h"

namespace loupe {

namespace {

using FloatMatrix = Eigen::Matrix<float, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

std::size_t worker_count(std::size_t requested) {
  if (requested != 0) return requested;
  const unsigned hardware = std::thread::hardware_concurrency();
  return hardware == 0 ? 1 : hardware;
}

// The square-root profiles twice: in float for the block products that screen
// candidates, and in double for the exact distances of the candidates kept.
// y_i = sqrt(theta_i / 2), so that H(theta_i, theta_j) = ||y_i - y_j||_2 and
// H^2 = |y_i|^2 + |y_j|^2 - 2 y_i.y_j (the norms are about 1/2).
struct SquareRootProfiles {
  FloatMatrix screen;          // N x K, float
  ProfileMatrix exact;         // N x K, double
  std::vector<float> norm;     // |y_i|^2 (about 1/2), from the float rows, in float
  double screening_error = 0;  // bound on the error of a screened key (and of H^2 / 2)
};

SquareRootProfiles square_root_profiles(const ProfileMatrix& theta) {
  SquareRootProfiles y;
  y.exact = (theta.array() * 0.5).sqrt().matrix();
  y.screen = y.exact.cast<float>();
  y.norm.resize(static_cast<std::size_t>(theta.rows()));
  for (Eigen::Index i = 0; i < theta.rows(); ++i) {
    y.norm[static_cast<std::size_t>(i)] = static_cast<float>(y.screen.row(i).cast<double>().squaredNorm());
  }
  // Dot products of K non-negative terms in float: |fl(x.y) - x.y| <= gamma_K x.y
  // with gamma_K = K u / (1 - K u), u = 2^-24 (Higham, Accuracy and Stability of
  // Numerical Algorithms, 2002, eq. 3.5; from memory). x.y <= 1/2 here; rounding
  // the inputs and the norms to float adds a few u more. Twice that, to be safe.
  const double u = std::ldexp(1.0, -24);
  const double k = static_cast<double>(theta.cols());
  y.screening_error = 2.0 * (k + 8.0) * u / (1.0 - (k + 8.0) * u);
  return y;
}

double exact_squared_distance(const ProfileMatrix& y, std::size_t i, std::size_t j) {
  return (y.row(static_cast<Eigen::Index>(i)) - y.row(static_cast<Eigen::Index>(j))).squaredNorm();
}

// Candidate lists of one worker: for every document the `capacity` best
// screened keys seen so far (key = y_i.y_j - |y_j|^2 / 2: larger is nearer,
// since H^2 = |y_i|^2 + |y_j|^2 - 2 y_i.y_j).
struct CandidateLists {
  std::size_t capacity = 0;
  std::vector<float> key;             // N x capacity
  std::vector<std::uint32_t> index;   // N x capacity
  std::vector<std::uint32_t> filled;  // N
  std::vector<float> worst;           // N: the smallest key kept once full, else -inf

  CandidateLists(std::size_t n, std::size_t cap)
      : capacity(cap), key(n * cap), index(n * cap), filled(n, 0), worst(n, -std::numeric_limits<float>::infinity()) {}

  void offer(std::size_t d, std::uint32_t candidate, float value) {
    float* keys = key.data() + d * capacity;
    std::uint32_t* ids = index.data() + d * capacity;
    std::size_t slot;
    if (filled[d] < capacity) {
      slot = filled[d]++;
      keys[slot] = value;
      ids[slot] = candidate;
      if (filled[d] < capacity) return;
    } else {
      slot = static_cast<std::size_t>(std::min_element(keys, keys + capacity) - keys);
      keys[slot] = value;
      ids[slot] = candidate;
    }
    worst[d] = *std::min_element(keys, keys + capacity);
  }
};

// Runs `visit(block_i, block_j, G)` for every block pair j >= i of the screened
// Gram matrix G = Y_I Y_J^T, on the workers, with per-worker state.
template <typename Visit>
void for_each_block_pair(const SquareRootProfiles& y, const NeighbourOptions& options, std::size_t workers,
                         const Visit& visit) {
  const std::size_t n = static_cast<std::size_t>(y.screen.rows());
  const std::size_t block = std::max<std::size_t>(options.block_size, 16);
  const std::size_t blocks = (n + block - 1) / block;
  std::vector<std::pair<std::uint32_t, std::uint32_t>> tasks;
  tasks.reserve(blocks * (blocks + 1) / 2);
  for (std::size_t bi = 0; bi < blocks; ++bi)
    for (std::size_t bj = bi; bj < blocks; ++bj) tasks.emplace_back(bi, bj);

  std::vector<FloatMatrix> gram(workers);
  std::mutex progress_mutex;
  std::size_t done = 0;
  const std::size_t report_every = std::max<std::size_t>(1, tasks.size() / 200);
  ParallelRunner(workers).run_with_worker(tasks.size(), [&](std::size_t task, std::size_t worker) {
    const std::size_t i0 = tasks[task].first * block;
    const std::size_t j0 = tasks[task].second * block;
    const auto rows = static_cast<Eigen::Index>(std::min(block, n - i0));
    const auto cols = static_cast<Eigen::Index>(std::min(block, n - j0));
    FloatMatrix& g = gram[worker];
    g.resize(rows, cols);
    g.noalias() = y.screen.middleRows(static_cast<Eigen::Index>(i0), rows) *
                  y.screen.middleRows(static_cast<Eigen::Index>(j0), cols).transpose();
    visit(i0, j0, g, worker);
    if (options.progress) {
      std::lock_guard lock(progress_mutex);
      ++done;
      if (done % report_every == 0 || done == tasks.size()) options.progress(done, tasks.size());
    }
  });
}

void check_k(std::size_t k, std::size_t n) {
  if (k == 0) throw Error("the number of neighbours k must be at least 1.");
  if (k >= n) {
    throw Error("k = " + std::to_string(k) + " neighbours needs more than " + std::to_string(k) +
                " documents, but there are " + std::to_string(n) + ". Choose k below " + std::to_string(n) + ".");
  }
}

}  // namespace

double hellinger_between(const ProfileMatrix& theta, std::size_t i, std::size_t j) {
  double sum = 0;
  for (Eigen::Index t = 0; t < theta.cols(); ++t) {
    const double diff =
        std::sqrt(theta(static_cast<Eigen::Index>(i), t)) - std::sqrt(theta(static_cast<Eigen::Index>(j), t));
    sum += diff * diff;
  }
  return std::sqrt(0.5 * sum);
}

NeighbourTable nearest_neighbours(const ProfileMatrix& theta, std::size_t k, const NeighbourOptions& options) {
  check_profiles(theta, "topic profiles");
  const std::size_t n = static_cast<std::size_t>(theta.rows());
  check_k(k, n);
  const SquareRootProfiles y = square_root_profiles(theta);
  const std::size_t workers = worker_count(options.threads);
  // Keep a margin of extra candidates so the exact re-ranking below can prove
  // it saw everything that could be among the k nearest.
  const std::size_t capacity = std::min(n - 1, k + std::max<std::size_t>(8, k / 2));
  std::vector<CandidateLists> lists;
  lists.reserve(workers);
  for (std::size_t w = 0; w < workers; ++w) lists.emplace_back(n, capacity);

  std::vector<float> half_norm(n);
  for (std::size_t i = 0; i < n; ++i) half_norm[i] = 0.5f * y.norm[i];

  for_each_block_pair(y, options, workers, [&](std::size_t i0, std::size_t j0, const FloatMatrix& g, std::size_t w) {
    CandidateLists& list = lists[w];
    const bool diagonal = i0 == j0;
    for (Eigen::Index r = 0; r < g.rows(); ++r) {
      const std::size_t i = i0 + static_cast<std::size_t>(r);
      const float* row = g.data() + r * g.cols();
      const float half_norm_i = half_norm[i];
      float worst_i = list.worst[i];
      const Eigen::Index first = diagonal ? r + 1 : 0;
      for (Eigen::Index c = first; c < g.cols(); ++c) {
        const std::size_t j = j0 + static_cast<std::size_t>(c);
        const float key_for_i = row[c] - half_norm[j];
        if (key_for_i > worst_i) {
          list.offer(i, static_cast<std::uint32_t>(j), key_for_i);
          worst_i = list.worst[i];
        }
        const float key_for_j = row[c] - half_norm_i;
        if (key_for_j > list.worst[j]) list.offer(j, static_cast<std::uint32_t>(i), key_for_j);
      }
    }
  });

  // Merge the workers' lists, re-rank the candidates by exact distance, and
  // prove the result: every document left out has a screened key below the
  // last one kept, so its exact H^2 is at least key gap - 2 * error larger than
  // that of the k-th candidate. When the gap is too small, scan the row exactly.
  NeighbourTable table;
  table.k = k;
  table.neighbour.resize(n * k);
  table.distance.resize(n * k);
  const double margin = 2.0 * y.screening_error;
  ParallelRunner(workers).run(workers, [&](std::size_t part) {
    std::vector<std::pair<float, std::uint32_t>> pooled;
    std::vector<std::pair<double, std::uint32_t>> exact;
    for (std::size_t d = part; d < n; d += workers) {
      pooled.clear();
      for (const auto& list : lists) {
        for (std::size_t s = 0; s < list.filled[d]; ++s) {
          pooled.emplace_back(list.key[d * capacity + s], list.index[d * capacity + s]);
        }
      }
      const auto by_key = [](const auto& a, const auto& b) {
        return a.first != b.first ? a.first > b.first : a.second < b.second;
      };
      std::sort(pooled.begin(), pooled.end(), by_key);
      if (pooled.size() > capacity) pooled.resize(capacity);
      const bool complete = pooled.size() == n - 1;
      const bool proven =
          complete || static_cast<double>(pooled[k - 1].first) - static_cast<double>(pooled.back().first) > margin;
      exact.clear();
      if (proven) {
        for (const auto& [key, j] : pooled) exact.emplace_back(exact_squared_distance(y.exact, d, j), j);
      } else {
        for (std::size_t j = 0; j < n; ++j) {
          if (j != d) exact.emplace_back(exact_squared_distance(y.exact, d, j), static_cast<std::uint32_t>(j));
        }
      }
      std::partial_sort(exact.begin(), exact.begin() + static_cast<std::ptrdiff_t>(k), exact.end());
      for (std::size_t s = 0; s < k; ++s) {
        table.neighbour[d * k + s] = exact[s].second;
        table.distance[d * k + s] = std::sqrt(exact[s].first);
      }
    }
  });
  return table;
}

std::vector<DistanceEdge> pairs_within_distance(const ProfileMatrix& theta, double max_distance,
                                                const NeighbourOptions& options) {
  if (!(max_distance > 0.0 && max_distance <= 1.0)) {
    throw Error("the distance threshold must lie in (0, 1] (Hellinger distances run from 0 to 1), not " +
                std::to_string(max_distance) + ".");
  }
  check_profiles(theta, "topic profiles");
  const SquareRootProfiles y = square_root_profiles(theta);
  const std::size_t workers = worker_count(options.threads);
  const double limit = max_distance * max_distance;
  const double screen_limit = limit + 2.0 * y.screening_error;
  std::vector<std::vector<DistanceEdge>> found(workers);
  for_each_block_pair(y, options, workers, [&](std::size_t i0, std::size_t j0, const FloatMatrix& g, std::size_t w) {
    const bool diagonal = i0 == j0;
    for (Eigen::Index r = 0; r < g.rows(); ++r) {
      const std::size_t i = i0 + static_cast<std::size_t>(r);
      const float* row = g.data() + r * g.cols();
      const double norm_i = y.norm[i];
      for (Eigen::Index c = diagonal ? r + 1 : 0; c < g.cols(); ++c) {
        const std::size_t j = j0 + static_cast<std::size_t>(c);
        // Screened H^2 = |y_i|^2 + |y_j|^2 - 2 y_i.y_j.
        const double screened = norm_i + static_cast<double>(y.norm[j]) - 2.0 * static_cast<double>(row[c]);
        if (screened > screen_limit) continue;
        const double squared = exact_squared_distance(y.exact, i, j);
        if (squared <= limit) {
          found[w].push_back({static_cast<std::uint32_t>(i), static_cast<std::uint32_t>(j), std::sqrt(squared)});
        }
      }
    }
  });
  std::vector<DistanceEdge> edges;
  for (auto& part : found) edges.insert(edges.end(), part.begin(), part.end());
  std::sort(edges.begin(), edges.end(), [](const DistanceEdge& a, const DistanceEdge& b) {
    return a.source != b.source ? a.source < b.source : a.target < b.target;
  });
  return edges;
}

std::vector<DistanceEdge> neighbour_edges(const NeighbourTable& table, NeighbourRule rule) {
  const std::size_t n = table.num_documents();
  std::vector<DistanceEdge> directed;
  directed.reserve(n * table.k);
  for (std::size_t d = 0; d < n; ++d) {
    const auto ids = table.neighbours_of(d);
    const auto distances = table.distances_of(d);
    for (std::size_t s = 0; s < table.k; ++s) {
      const auto a = static_cast<std::uint32_t>(d);
      directed.push_back({std::min(a, ids[s]), std::max(a, ids[s]), distances[s]});
    }
  }
  std::sort(directed.begin(), directed.end(), [](const DistanceEdge& a, const DistanceEdge& b) {
    return a.source != b.source ? a.source < b.source : a.target < b.target;
  });
  // After sorting, a pair listed from both ends appears twice in a row.
  std::vector<DistanceEdge> edges;
  for (std::size_t e = 0; e < directed.size();) {
    std::size_t next = e + 1;
    while (next < directed.size() && directed[next].source == directed[e].source &&
           directed[next].target == directed[e].target)
      ++next;
    const bool both_ends = next - e >= 2;
    if (rule == NeighbourRule::either || both_ends) edges.push_back(directed[e]);
    e = next;
  }
  return edges;
}

}  // namespace loupe

#include "analysis/permutation.h"

#include <algorithm>
#include <atomic>
#include <cmath>
#include <exception>
#include <limits>
#include <mutex>
#include <thread>
#include <utility>

#include "common/error.h"
#include "common/process_group.h"

namespace loupe {
namespace {

constexpr std::uint64_t kSaturated = std::numeric_limits<std::uint64_t>::max();
// Complete enumeration is offered up to this many arrangements, which keeps
// every product in the (un)ranking below 2^63.
constexpr std::uint64_t kMaxEnumerated = std::uint64_t{1} << 31;

std::uint64_t mix(std::uint64_t value) {
  RandomStream stream(value);
  return stream.next();
}

std::uint64_t saturating_multiply(std::uint64_t a, std::uint64_t b) {
  std::uint64_t product = 0;
  if (__builtin_mul_overflow(a, b, &product)) return kSaturated;
  return product;
}

// C(n, k), saturating. Each step r = r * (n - k + i) / i is exact.
std::uint64_t binomial(std::uint64_t n, std::uint64_t k) {
  k = std::min(k, n - k);
  std::uint64_t r = 1;
  for (std::uint64_t i = 1; i <= k; ++i) {
    const std::uint64_t product = saturating_multiply(r, n - k + i);
    if (product == kSaturated) return kSaturated;
    r = product / i;
  }
  return r;
}

// n! / prod_g c_g!, as a product of binomials, saturating.
std::uint64_t multinomial(const std::vector<std::size_t>& counts) {
  std::uint64_t result = 1;
  std::uint64_t total = 0;
  for (const auto c : counts) {
    total += c;
    result = saturating_multiply(result, binomial(total, c));
    if (result == kSaturated) return kSaturated;
  }
  return result;
}

int num_labels(std::span<const int> labels) {
  int max_label = -1;
  for (const int g : labels) max_label = std::max(max_label, g);
  return max_label + 1;
}

}  // namespace

std::uint64_t stream_seed(std::uint64_t seed, StreamPurpose purpose, std::uint64_t index) {
  // Three rounds of splitmix64 mixing: seed, then purpose, then index.
  std::uint64_t value = mix(seed);
  value = mix(value ^ (static_cast<std::uint64_t>(purpose) * 0xD1B54A32D192ED03ULL));
  return mix(value ^ (index * 0x8CB92BA72F3D8DD7ULL + 0x2545F4914F6CDD1DULL));
}

std::uint64_t distinct_arrangements(std::span<const int> labels, std::span<const int> strata) {
  const auto groups = static_cast<std::size_t>(num_labels(labels));
  const auto num_strata = strata.empty() ? std::size_t{1} : static_cast<std::size_t>(num_labels(strata));
  std::vector<std::vector<std::size_t>> counts(num_strata, std::vector<std::size_t>(groups, 0));
  for (std::size_t i = 0; i < labels.size(); ++i) {
    const auto s = strata.empty() ? std::size_t{0} : static_cast<std::size_t>(strata[i]);
    ++counts[s][static_cast<std::size_t>(labels[i])];
  }
  std::uint64_t total = 1;
  for (const auto& c : counts) total = saturating_multiply(total, multinomial(c));
  return total;
}

LabelPermuter::LabelPermuter(std::vector<int> labels, std::vector<int> strata, const PermutationOptions& options,
                             const std::string& strata_name)
    : observed_(std::move(labels)), seed_(options.seed), processes_(options.processes) {
  const std::size_t n = observed_.size();
  num_groups_ = static_cast<std::size_t>(num_labels(observed_));
  const auto num_strata = strata.empty() ? std::size_t{1} : static_cast<std::size_t>(num_labels(strata));
  // Members grouped by stratum (stable, so the order is the document order).
  std::vector<std::size_t> stratum_sizes(num_strata, 0);
  for (std::size_t i = 0; i < n; ++i) ++stratum_sizes[strata.empty() ? 0 : static_cast<std::size_t>(strata[i])];
  std::vector<std::size_t> starts(num_strata + 1, 0);
  for (std::size_t s = 0; s < num_strata; ++s) starts[s + 1] = starts[s] + stratum_sizes[s];
  members_.resize(n);
  {
    auto next = starts;
    for (std::size_t i = 0; i < n; ++i) members_[next[strata.empty() ? 0 : static_cast<std::size_t>(strata[i])]++] = i;
  }
  arrangements_ = 1;
  for (std::size_t s = 0; s < num_strata; ++s) {
    Segment segment;
    segment.begin = starts[s];
    segment.end = starts[s + 1];
    segment.counts.assign(num_groups_, 0);
    for (std::size_t j = segment.begin; j < segment.end; ++j) ++segment.counts[observed_[members_[j]]];
    segment.arrangements = multinomial(segment.counts);
    if (segment.arrangements == 1) continue;  // one group only: nothing moves
    arrangements_ = saturating_multiply(arrangements_, segment.arrangements);
    segments_.push_back(std::move(segment));
  }
  if (arrangements_ == 1) {
    if (strata.empty()) {
      throw Error("no permutation is possible: all " + std::to_string(n) +
                  " documents are in one group; comparing groups needs at least two");
    }
    throw Error("no permutation is possible within the strata of '" + strata_name + "': in each of its " +
                std::to_string(num_strata) +
                " strata all documents belong to one group, so groups and strata are confounded; "
                "choose coarser strata or permute freely");
  }
  if (options.complete_enumeration && arrangements_ <= kMaxEnumerated && arrangements_ - 1 <= options.permutations) {
    complete_ = true;
    count_ = static_cast<std::size_t>(arrangements_ - 1);
    observed_rank_ = rank(observed_);
  } else {
    count_ = options.permutations;
  }
}

void LabelPermuter::permuted(std::size_t index, std::span<int> out) const {
  if (complete_) {
    const std::uint64_t r = index < observed_rank_ ? index : index + 1;
    unrank(r, out);
    return;
  }
  std::copy(observed_.begin(), observed_.end(), out.begin());
  RandomStream stream(stream_seed(seed_, StreamPurpose::permutation, index));
  // Fisher-Yates within each stratum that holds more than one group.
  for (const auto& segment : segments_) {
    const std::size_t* member = members_.data() + segment.begin;
    for (std::size_t i = segment.end - segment.begin - 1; i > 0; --i) {
      const std::size_t j = stream.below(static_cast<std::uint32_t>(i + 1));
      std::swap(out[member[i]], out[member[j]]);
    }
  }
}

// Multiset permutations in lexicographic order: with counts c over the n
// remaining places, c_g * M / n of the M arrangements put group g first.
std::uint64_t LabelPermuter::rank(std::span<const int> labels) const {
  std::uint64_t total = 0;
  std::uint64_t radix = 1;
  for (const auto& segment : segments_) {
    auto counts = segment.counts;
    std::uint64_t arrangements = segment.arrangements;
    std::uint64_t remaining = segment.end - segment.begin;
    std::uint64_t r = 0;
    for (std::size_t j = segment.begin; j < segment.end; ++j) {
      const auto label = static_cast<std::size_t>(labels[members_[j]]);
      for (std::size_t g = 0; g < label; ++g) r += arrangements * counts[g] / remaining;
      arrangements = arrangements * counts[label] / remaining;
      --counts[label];
      --remaining;
    }
    total += r * radix;
    radix *= segment.arrangements;
  }
  return total;
}

void LabelPermuter::unrank(std::uint64_t rank_value, std::span<int> out) const {
  std::copy(observed_.begin(), observed_.end(), out.begin());
  for (const auto& segment : segments_) {
    std::uint64_t r = rank_value % segment.arrangements;
    rank_value /= segment.arrangements;
    auto counts = segment.counts;
    std::uint64_t arrangements = segment.arrangements;
    std::uint64_t remaining = segment.end - segment.begin;
    for (std::size_t j = segment.begin; j < segment.end; ++j) {
      for (std::size_t g = 0; g < num_groups_; ++g) {
        if (counts[g] == 0) continue;
        const std::uint64_t block = arrangements * counts[g] / remaining;
        if (r < block) {
          out[members_[j]] = static_cast<int>(g);
          arrangements = block;
          --counts[g];
          break;
        }
        r -= block;
      }
      --remaining;
    }
  }
}

bool at_least_as_extreme(double permuted, double observed, Tail tail) {
  if (tail == Tail::two_sided) {
    permuted = std::abs(permuted);
    observed = std::abs(observed);
  }
  return permuted >= observed - 1e-9 * std::max(1.0, std::abs(observed));
}

double permutation_p_value(std::uint64_t exceedances, std::size_t permutations) {
  if (permutations == 0) return std::numeric_limits<double>::quiet_NaN();
  // p = (1 + b) / (1 + P): the observed labeling counts as one of the arrangements.
  return (1.0 + static_cast<double>(exceedances)) / (1.0 + static_cast<double>(permutations));
}

void run_in_parallel(std::size_t count, std::size_t threads, std::size_t chunk,
                     const std::function<void(std::size_t begin, std::size_t end)>& body) {
  if (count == 0) return;
  chunk = std::max<std::size_t>(chunk, 1);
  const std::size_t chunks = (count + chunk - 1) / chunk;
  threads = std::clamp<std::size_t>(threads, 1, chunks);
  std::atomic<std::size_t> next{0};
  std::exception_ptr failure;
  std::mutex failure_mutex;
  auto work = [&] {
    try {
      for (std::size_t c = next++; c < chunks; c = next++) {
        body(c * chunk, std::min(count, (c + 1) * chunk));
      }
    } catch (...) {
      const std::lock_guard lock(failure_mutex);
      if (!failure) failure = std::current_exception();
      next = chunks;
    }
  };
  if (threads == 1) {
    work();
  } else {
    std::vector<std::thread> pool;
    pool.reserve(threads - 1);
    for (std::size_t t = 1; t < threads; ++t) pool.emplace_back(work);
    work();
    for (auto& thread : pool) thread.join();
  }
  if (failure) std::rethrow_exception(failure);
}

std::vector<std::uint64_t> count_exceedances(const LabelPermuter& permuter, std::span<const double> observed, Tail tail,
                                             std::size_t threads, const EvaluatorFactory& make_evaluator,
                                             std::size_t batch_size, std::vector<double>* permuted) {
  const std::size_t m = observed.size();
  const std::size_t n = permuter.size();
  const std::size_t total = permuter.count();
  batch_size = std::max<std::size_t>(batch_size, 1);
  std::vector<std::uint64_t> counts(m, 0);
  std::mutex counts_mutex;
  const std::size_t all_batches = (total + batch_size - 1) / batch_size;
  // This process's batches [first_batch, end_batch): all of them unless processes share the work.
  ProcessGroup* const processes = permuter.processes();
  const IndexRange mine =
      processes != nullptr ? share_of(all_batches, processes->rank(), processes->size()) : IndexRange{0, all_batches};
  const std::size_t first_batch = mine.begin;
  const std::size_t end_batch = mine.end;
  const std::size_t first_permutation = std::min(total, first_batch * batch_size);
  const std::size_t end_permutation = std::min(total, end_batch * batch_size);
  if (permuted != nullptr) permuted->assign((end_permutation - first_permutation) * m, 0.0);
  const std::size_t batches = end_batch - first_batch;
  threads = std::clamp<std::size_t>(threads, 1, std::max<std::size_t>(batches, 1));
  // Each thread keeps its evaluator and buffers; integer counts are merged at the end.
  std::atomic<std::size_t> next{0};
  std::exception_ptr failure;
  auto work = [&] {
    try {
      BatchEvaluator evaluate = make_evaluator();
      std::vector<int> labels(batch_size * n);
      std::vector<double> statistics(batch_size * m);
      std::vector<std::uint64_t> local(m, 0);
      for (std::size_t b = next++; b < batches; b = next++) {
        const std::size_t first = (first_batch + b) * batch_size;
        const std::size_t size = std::min(batch_size, total - first);
        for (std::size_t i = 0; i < size; ++i) {
          permuter.permuted(first + i, std::span<int>(labels.data() + i * n, n));
        }
        evaluate(labels.data(), size, statistics.data());
        if (permuted != nullptr) {
          std::copy_n(statistics.data(), size * m, permuted->data() + (first - first_permutation) * m);
        }
        for (std::size_t i = 0; i < size; ++i) {
          for (std::size_t j = 0; j < m; ++j) {
            if (at_least_as_extreme(statistics[i * m + j], observed[j], tail)) ++local[j];
          }
        }
      }
      const std::lock_guard lock(counts_mutex);
      for (std::size_t j = 0; j < m; ++j) counts[j] += local[j];
    } catch (...) {
      const std::lock_guard lock(counts_mutex);
      if (!failure) failure = std::current_exception();
      next = batches;
    }
  };
  std::vector<std::thread> pool;
  pool.reserve(threads - 1);
  for (std::size_t t = 1; t < threads; ++t) pool.emplace_back(work);
  work();
  for (auto& thread : pool) thread.join();
  if (failure) std::rethrow_exception(failure);
  if (processes != nullptr) {
    processes->sum(std::span<std::uint64_t>(counts));
    if (permuted != nullptr) *permuted = processes->all_gather(std::span<const double>(*permuted));
  }
  return counts;
}

}  // namespace loupe

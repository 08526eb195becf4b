// Permutation tests: group labels rearranged freely or only within strata (e.g.
// decade, archive box), complete enumeration when the distinct arrangements are
// few, p = (1 + b) / (1 + P), and one random stream per permutation derived from
// (seed, permutation index), so results never depend on the number of threads.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <span>
#include <string>
#include <vector>

namespace loupe {

class ProcessGroup;

struct PermutationOptions {
  std::size_t permutations = 999;  // P; 0 computes the statistics only (p-values NaN)
  std::uint64_t seed = 1;
  std::size_t threads = 2;
  // Enumerate every distinct arrangement instead when there are at most P + 1 of them.
  bool complete_enumeration = true;
  // Keep a histogram of each test's permuted statistics in its record (TestRecord::null_distribution), for
  // drawing; it never changes a statistic or a p-value.
  bool keep_null_distribution = false;
  // Several processes (MPI ranks; common/process_group.h) share the permutations:
  // each evaluates a contiguous range of them and the counts and permuted statistics
  // are combined, so every process gets exactly the single-process result. Every
  // process must run the same tests in the same order. Null: this process alone.
  ProcessGroup* processes = nullptr;
};

// One random stream: the splitmix64 generator (Steele, Lea & Flood 2014).
class RandomStream {
 public:
  explicit RandomStream(std::uint64_t seed) : state_(seed) {}
  std::uint64_t next() {
    std::uint64_t z = (state_ += 0x9E3779B97F4A7C15ULL);
    z = (z ^ (z >> 30)) * 0xBF58476D1CE4E5B9ULL;
    z = (z ^ (z >> 27)) * 0x94D049BB133111EBULL;
    return z ^ (z >> 31);
  }
  // Uniform integer in [0, n), 0 < n < 2^32, exactly unbiased (Lemire 2019, multiply and reject).
  std::uint32_t below(std::uint32_t n) {
    std::uint64_t product = (next() >> 32) * static_cast<std::uint64_t>(n);
    auto low = static_cast<std::uint32_t>(product);
    if (low < n) {
      const std::uint32_t threshold = static_cast<std::uint32_t>(0u - n) % n;
      while (low < threshold) {
        product = (next() >> 32) * static_cast<std::uint64_t>(n);
        low = static_cast<std::uint32_t>(product);
      }
    }
    return static_cast<std::uint32_t>(product >> 32);
  }
  // Uniform in [0, 1) with 53 random bits.
  double uniform() { return static_cast<double>(next() >> 11) * 0x1.0p-53; }

 private:
  std::uint64_t state_;
};

// Which use a stream serves, so that permutations and bootstrap draws differ.
enum class StreamPurpose : std::uint64_t { permutation = 1, bootstrap = 2 };

// The seed of stream `index`: splitmix64 mixing of (seed, purpose, index).
// Example: stream_seed(7, permutation, 41) is the same on every thread and machine.
std::uint64_t stream_seed(std::uint64_t seed, StreamPurpose purpose, std::uint64_t index);

// Distinct labelings reachable by permuting within strata:
// prod_s n_s! / prod_g n_{s,g}!, saturating at UINT64_MAX. Empty strata = one stratum.
// Example: labels {0,0,1,1} free -> 4! / (2! 2!) = 6.
std::uint64_t distinct_arrangements(std::span<const int> labels, std::span<const int> strata);

// Produces the labelings a test evaluates. Random mode: permutation i shuffles
// the observed labels within each stratum with stream i. Complete mode: the
// distinct labelings other than the observed one, each exactly once, in a fixed
// order (permutation i is the i-th, by ranking multiset permutations).
class LabelPermuter {
 public:
  // labels: 0..G-1 per document; strata: 0..S-1 per document, or empty for free
  // permutations. Throws loupe::Error when no permutation can change the
  // labeling (every stratum holds a single group), naming strata_name.
  LabelPermuter(std::vector<int> labels, std::vector<int> strata, const PermutationOptions& options,
                const std::string& strata_name);

  std::size_t size() const { return observed_.size(); }
  std::size_t count() const { return count_; }  // P, the permutations run
  bool complete() const { return complete_; }
  std::uint64_t seed() const { return seed_; }
  std::uint64_t arrangements() const { return arrangements_; }  // saturating
  const std::vector<int>& observed() const { return observed_; }
  ProcessGroup* processes() const { return processes_; }  // from the options

  // Writes the labels of permutation `index` (< count()) into out (size()).
  void permuted(std::size_t index, std::span<int> out) const;

  // Complete mode: the rank of a labeling among all arrangements (for tests).
  std::uint64_t rank(std::span<const int> labels) const;
  void unrank(std::uint64_t rank, std::span<int> out) const;

 private:
  struct Segment {                    // one stratum whose labels can move
    std::size_t begin = 0, end = 0;   // into members_
    std::vector<std::size_t> counts;  // per group
    std::uint64_t arrangements = 1;
  };
  std::vector<int> observed_;
  std::vector<std::size_t> members_;  // document indices, stratum by stratum
  std::vector<Segment> segments_;
  std::size_t num_groups_ = 0;
  std::size_t count_ = 0;
  bool complete_ = false;
  std::uint64_t seed_ = 0;
  std::uint64_t arrangements_ = 0;
  std::uint64_t observed_rank_ = 0;
  ProcessGroup* processes_ = nullptr;
};

// Evaluates the statistics of `batch` labelings at once: labels is batch x n
// (row b = labeling b), statistics is batch x m.
using BatchEvaluator = std::function<void(const int* labels, std::size_t batch, double* statistics)>;
// Makes one evaluator per thread (each with its own scratch space).
using EvaluatorFactory = std::function<BatchEvaluator()>;

enum class Tail { upper, two_sided };  // b counts T* >= T, or |T*| >= |T|

// For every statistic j, b_j = the number of permutations whose statistic is at
// least the observed one, with a relative tolerance of 1e-9 so that ties lost to
// rounding still count (vegan 2.6's permutest.betadisper guards the same way with
// an absolute sqrt(machine epsilon): F* >= F - EPS, read from its source).
// Integer counts from `threads` threads: the result is the same for any count.
// With `permuted`, also keeps every permuted statistic: permutation i's m values at [i m, (i + 1) m).
// When the permuter's options name several processes, each evaluates a contiguous
// range of whole batches (so every batch holds the same permutations as in one
// process), the counts are summed and the permuted statistics gathered: every
// process returns the single-process result, bit for bit.
std::vector<std::uint64_t> count_exceedances(const LabelPermuter& permuter, std::span<const double> observed, Tail tail,
                                             std::size_t threads, const EvaluatorFactory& make_evaluator,
                                             std::size_t batch_size = 16, std::vector<double>* permuted = nullptr);

// T* counts as at least as extreme as T.
bool at_least_as_extreme(double permuted, double observed, Tail tail);

// p = (1 + b) / (1 + P) (e.g. Phipson & Smyth 2010); NaN when P = 0.
double permutation_p_value(std::uint64_t exceedances, std::size_t permutations);

// Calls body(begin, end) on consecutive chunks of [0, count) from `threads`
// threads; rethrows the first exception. Chunks write disjoint outputs.
void run_in_parallel(std::size_t count, std::size_t threads, std::size_t chunk,
                     const std::function<void(std::size_t begin, std::size_t end)>& body);

}  // namespace loupe

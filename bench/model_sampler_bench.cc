// Sampler throughput: token updates per second (and per thread) for one Gibbs
// sweep, "sample shards, then merge counts", on a drawn corpus of about 4M
// tokens over 20,000 words (Zipf-shaped word frequencies, 100 true topics),
// at K = 20, 100 and 1000 with 1 and 2 threads, after 10 warm-up sweeps.
// Also reports the memory held a token and the K-sized tables.
//
//   build-model/bench/model_sampler_bench --benchmark_counters_tabular=true --benchmark_repetitions=3
//   (LOUPE_BENCH_TOKENS=N changes the corpus size; LOUPE_BENCH_MH_STEPS the proposals a token)
#include <algorithm>
#include <cstdlib>
#include <map>
#include <memory>

#include <benchmark/benchmark.h>

#include "model/count_merge.h"
#include "model/fit.h"
#include "model/gibbs_sampler.h"
#include "model/synthetic_corpus.h"

namespace loupe {
namespace {

std::uint32_t env_or(const char* name, std::uint32_t fallback) {
  const char* value = std::getenv(name);
  return value != nullptr ? static_cast<std::uint32_t>(std::strtoul(value, nullptr, 10)) : fallback;
}

const Corpus& bench_corpus() {
  static const Corpus corpus = [] {
    SyntheticCorpusSpec spec;
    spec.topic_count = 100;
    spec.vocabulary_size = 20000;
    spec.document_length = 100;
    spec.num_documents = env_or("LOUPE_BENCH_TOKENS", 4000000) / spec.document_length;
    spec.vary_length = true;
    spec.alpha = 0.1;
    spec.topic_word_prior = 0.01;
    spec.word_base = zipf_weights(spec.vocabulary_size, 1.0);
    spec.seed = 2024;
    return draw_lda_corpus(spec).corpus;
  }();
  return corpus;
}

// A warmed-up chain for (K, kernel, shards), kept between benchmark runs.
struct Chain {
  std::unique_ptr<GibbsSampler> sampler;
  SamplerState state;
  std::uint32_t sweep = 0;
};

Chain& warm_chain(std::uint32_t k, SamplerKind kind, std::uint32_t shards) {
  static std::map<std::tuple<std::uint32_t, int, std::uint32_t>, Chain> chains;
  auto& chain = chains[{k, static_cast<int>(kind), shards}];
  if (chain.sampler == nullptr) {
    const Corpus& corpus = bench_corpus();
    chain.sampler = std::make_unique<GibbsSampler>(corpus, k, kind, env_or("LOUPE_BENCH_MH_STEPS", 2), shards);
    chain.state.topics.assign(corpus.num_tokens(), 0);
    chain.state.counts.reset(corpus, k);
    chain.state.alpha.assign(k, 0.1);
    chain.state.beta = 0.01;
    LocalCountMerger merger;
    const ParallelRunner runner(shards);
    for (; chain.sweep <= 10; ++chain.sweep)
      run_sweep(*chain.sampler, merger, corpus, chain.state, 7, chain.sweep, runner);
  }
  return chain;
}

void sweep_benchmark(benchmark::State& bench, SamplerKind kind) {
  const auto k = static_cast<std::uint32_t>(bench.range(0));
  const auto threads = static_cast<std::uint32_t>(bench.range(1));
  const Corpus& corpus = bench_corpus();
  Chain& chain = warm_chain(k, kind, threads);
  LocalCountMerger merger;
  const ParallelRunner runner(threads);
  for (auto _ : bench) {
    run_sweep(*chain.sampler, merger, corpus, chain.state, 7, chain.sweep++, runner);
  }
  const double tokens = static_cast<double>(corpus.num_tokens());
  bench.counters["tokens_per_s"] = benchmark::Counter(tokens, benchmark::Counter::kIsIterationInvariantRate);
  bench.counters["tokens_per_s_per_thread"] =
      benchmark::Counter(tokens / threads, benchmark::Counter::kIsIterationInvariantRate);
  FitOptions options;
  options.topic_count = k;
  options.threads = threads;
  options.sampler = kind;
  const auto memory = estimate_fit_memory(corpus, options);
  bench.counters["bytes_per_token"] = memory.token_state_bytes_per_token;
  bench.counters["tables_MB"] = static_cast<double>(memory.count_table_bytes + memory.workspace_bytes) / 1e6;
  bench.counters["tokens_M"] = tokens / 1e6;
}

void BM_SweepAutomatic(benchmark::State& bench) {
  sweep_benchmark(bench, resolve_sampler(SamplerKind::automatic, static_cast<std::uint32_t>(bench.range(0))));
}
void BM_SweepMetropolisHastings(benchmark::State& bench) { sweep_benchmark(bench, SamplerKind::metropolis_hastings); }
void BM_SweepExact(benchmark::State& bench) { sweep_benchmark(bench, SamplerKind::exact); }

// With --benchmark_repetitions=N, "max" keeps the fastest repetition's rates
// (the least disturbed on a shared machine).
double fastest(const std::vector<double>& values) { return *std::max_element(values.begin(), values.end()); }

BENCHMARK(BM_SweepAutomatic)
    ->ArgsProduct({{20, 100, 1000}, {1, 2}})
    ->ArgNames({"K", "threads"})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime()
    ->ComputeStatistics("max", fastest)
    ->MinTime(3.0);
BENCHMARK(BM_SweepMetropolisHastings)
    ->ArgsProduct({{20, 50}, {1}})
    ->ArgNames({"K", "threads"})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime()
    ->ComputeStatistics("max", fastest)
    ->MinTime(3.0);
BENCHMARK(BM_SweepExact)
    ->ArgsProduct({{50, 100}, {1}})
    ->ArgNames({"K", "threads"})
    ->Unit(benchmark::kMillisecond)
    ->UseRealTime()
    ->ComputeStatistics("max", fastest)
    ->MinTime(3.0);

}  // namespace
}  // namespace loupe

BENCHMARK_MAIN();

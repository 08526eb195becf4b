// Throughput of `loupe near-duplicates`: MinHash signatures of 2-word
// shingles, LSH banding and exact verification, over 100,000 synthetic
// documents (Zipf-like words from a 30,000-word vocabulary without the 100
// commonest, 100 to 400 tokens each) with 1% planted near-copies (5 words
// changed), in documents per second, at the default threshold (0.5) and at 0.8.
#include <benchmark/benchmark.h>

#include <cmath>
#include <vector>

#include "corpus/corpus.h"
#include "graph/near_duplicates.h"
#include "model/random.h"

namespace {

loupe::Corpus synthetic_corpus(std::size_t documents) {
  const std::uint32_t vocabulary = 30000;
  loupe::Xoshiro256 random(7);
  // Zipf-like word draws, P(rank r) ~ 1 / r, over ranks 100 .. 100 + V: the
  // hundred commonest words are left out, as stop-word removal leaves a corpus.
  const auto word = [&] {
    const double u = random.uniform();
    const double rank = 100.0 * std::exp(u * std::log((100.0 + vocabulary) / 100.0));
    return static_cast<loupe::WordId>(std::min<double>(vocabulary - 1, rank - 100.0));
  };
  loupe::Corpus corpus;
  for (std::uint32_t w = 0; w < vocabulary; ++w) corpus.vocabulary.push_back("w" + std::to_string(w));
  corpus.word_frequency.assign(vocabulary, 1);
  corpus.document_frequency.assign(vocabulary, 1);
  std::vector<std::vector<loupe::WordId>> kept;
  for (std::size_t d = 0; d < documents; ++d) {
    std::vector<loupe::WordId> tokens;
    if (d % 100 == 99 && !kept.empty()) {
      tokens = kept[random.below(static_cast<std::uint32_t>(kept.size()))];
      for (int e = 0; e < 5; ++e) tokens[random.below(static_cast<std::uint32_t>(tokens.size()))] = word();
    } else {
      tokens.resize(100 + random.below(300));
      for (auto& t : tokens) t = word();
      if (kept.size() < 1000) kept.push_back(tokens);
    }
    loupe::Document doc;
    doc.id = "d" + std::to_string(d);
    corpus.add_document(std::move(doc), tokens);
  }
  return corpus;
}

void BM_NearDuplicates(benchmark::State& state) {
  const auto n = static_cast<std::size_t>(state.range(0));
  const loupe::Corpus corpus = synthetic_corpus(n);
  loupe::NearDuplicateOptions options;
  options.threads = static_cast<std::size_t>(state.range(1));
  options.threshold = static_cast<double>(state.range(2)) / 100.0;
  std::size_t pairs = 0;
  std::size_t candidates = 0;
  for (auto _ : state) {
    const auto result = loupe::find_near_duplicates(corpus, options);
    pairs = result.pairs.size();
    candidates = result.candidates;
  }
  state.counters["documents_per_second"] =
      benchmark::Counter(static_cast<double>(n), benchmark::Counter::kIsIterationInvariantRate);
  state.counters["tokens"] = static_cast<double>(corpus.num_tokens());
  state.counters["pairs"] = static_cast<double>(pairs);
  state.counters["candidates"] = static_cast<double>(candidates);
}
// Args: documents, threads, threshold in percent.
BENCHMARK(BM_NearDuplicates)
    ->Args({100000, 1, 50})
    ->Args({100000, 2, 50})
    ->Args({100000, 2, 80})
    ->Unit(benchmark::kSecond)
    ->UseRealTime();

}  // namespace

BENCHMARK_MAIN();

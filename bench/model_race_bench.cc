// The C++ half of bench/model_vs_sklearn.py: draws the benchmark corpus, scores
// topic-word matrices by document-completion perplexity (Wallach et al. 2009)
// and races loupe's sampler against a target perplexity. Not a test.
//
//   model_race_bench draw DIR TOKENS VOCABULARY TRUE_TOPICS
//       -> DIR/train.corpus, DIR/heldout.corpus, DIR/train-counts.txt
//   model_race_bench score DIR K ALPHA PHI.f32...        (K x V float32 files)
//       -> "file,perplexity" lines
//   model_race_bench race DIR K ALPHA BETA THREADS EVALUATE_EVERY MAX_SECONDS TARGET SAMPLER MH_STEPS
//       -> "sweep,seconds,perplexity" lines; seconds count sampling only
#include <chrono>
#include <cstdio>
#include <cstdlib>
#include <cstring>
#include <fstream>
#include <map>
#include <string>

#include "common/binary_io.h"
#include "corpus/corpus_file.h"
#include "model/count_merge.h"
#include "model/evaluation.h"
#include "model/gibbs_sampler.h"
#include "model/synthetic_corpus.h"

namespace loupe {
namespace {

int draw(const std::string& dir, std::uint32_t tokens, std::uint32_t vocabulary, std::uint32_t topics) {
  SyntheticCorpusSpec spec;
  spec.topic_count = topics;
  spec.vocabulary_size = vocabulary;
  spec.document_length = 100;
  spec.num_documents = tokens / spec.document_length;
  spec.vary_length = true;
  spec.alpha = 0.1;
  spec.topic_word_prior = 0.01;
  spec.word_base = zipf_weights(vocabulary, 1.0);
  spec.seed = 2024;
  const auto sample = draw_lda_corpus(spec);
  const std::size_t held = sample.corpus.num_documents() / 50;  // 2% held out
  const std::size_t train_docs = sample.corpus.num_documents() - held;
  const Corpus train = corpus_subset(sample.corpus, 0, train_docs);
  const Corpus heldout = corpus_subset(sample.corpus, train_docs, sample.corpus.num_documents());
  write_corpus(train, dir + "/train.corpus");
  write_corpus(heldout, dir + "/heldout.corpus");
  std::ofstream out(dir + "/train-counts.txt");
  out << train.num_documents() << ' ' << vocabulary << '\n';
  for (std::size_t d = 0; d < train.num_documents(); ++d) {
    std::map<WordId, int> counts;
    for (const auto w : train.document_tokens(d)) ++counts[w];
    for (const auto& [w, c] : counts) out << w << ':' << c << ' ';
    out << '\n';
  }
  std::printf("train %zu documents %zu tokens, held out %zu documents %zu tokens, vocabulary %u\n",
              train.num_documents(), train.num_tokens(), heldout.num_documents(), heldout.num_tokens(), vocabulary);
  return 0;
}

double held_out_perplexity(const Corpus& heldout, const TopicWordTable& phi, double alpha, std::size_t threads) {
  const std::vector<double> a(phi.topic_count(), alpha);
  FoldInOptions options;
  options.seed = 11;
  return document_completion_perplexity(phi, a, heldout, options, ParallelRunner(threads)).perplexity;
}

int score(const std::string& dir, std::uint32_t k, double alpha, int files, char** paths) {
  const Corpus heldout = read_corpus(dir + "/heldout.corpus");
  const std::size_t v = heldout.vocabulary_size();
  for (int i = 0; i < files; ++i) {
    const std::string bytes = read_whole_file(paths[i]);
    if (bytes.size() != static_cast<std::size_t>(k) * v * sizeof(float)) {
      std::fprintf(stderr, "%s: expected %u x %zu float32 values\n", paths[i], k, v);
      return 1;
    }
    std::vector<float> phi(static_cast<std::size_t>(k) * v);
    std::memcpy(phi.data(), bytes.data(), bytes.size());
    std::printf("%s,%.6f\n", paths[i],
                held_out_perplexity(heldout, TopicWordTable(phi, k, static_cast<std::uint32_t>(v)), alpha, 2));
    std::fflush(stdout);
  }
  return 0;
}

int race(const std::string& dir, std::uint32_t k, double alpha, double beta, std::uint32_t threads,
         std::uint32_t evaluate_every, double max_seconds, double target, SamplerKind kind, std::uint32_t mh_steps) {
  const Corpus train = read_corpus(dir + "/train.corpus");
  const Corpus heldout = read_corpus(dir + "/heldout.corpus");
  const std::uint32_t v = static_cast<std::uint32_t>(train.vocabulary_size());
  SamplerState state;
  state.topics.assign(train.num_tokens(), 0);
  state.counts.reset(train, k);
  state.alpha.assign(k, alpha);
  state.beta = beta;
  const GibbsSampler sampler(train, k, kind, mh_steps, threads);
  LocalCountMerger merger;
  const ParallelRunner runner(threads);
  double seconds = 0;
  std::printf("sweep,seconds,perplexity\n");
  for (std::uint32_t sweep = 0;; ++sweep) {
    const auto start = std::chrono::steady_clock::now();
    run_sweep(sampler, merger, train, state, 1234, sweep, runner);
    seconds += std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
    if (sweep == 0 || sweep % evaluate_every != 0) continue;
    // phi_kw = (n_wk + b) / (n_k + V b) from the current state.
    std::vector<float> phi(static_cast<std::size_t>(k) * v);
    for (std::size_t w = 0; w < v; ++w) {
      for (std::size_t t = 0; t < k; ++t) {
        phi[t * v + w] =
            static_cast<float>((state.counts.word_topic[w * k + t] + beta) / (state.counts.topic_total[t] + v * beta));
      }
    }
    const double perplexity = held_out_perplexity(heldout, TopicWordTable(phi, k, v), alpha, threads);
    std::printf("%u,%.3f,%.6f\n", sweep, seconds, perplexity);
    std::fflush(stdout);
    if ((target > 0 && perplexity <= target) || seconds >= max_seconds) break;
  }
  return 0;
}

}  // namespace
}  // namespace loupe

int main(int argc, char** argv) {
  using namespace loupe;
  const std::string mode = argc > 1 ? argv[1] : "";
  try {
    if (mode == "draw" && argc == 6) {
      return draw(argv[2], static_cast<std::uint32_t>(std::atol(argv[3])),
                  static_cast<std::uint32_t>(std::atol(argv[4])), static_cast<std::uint32_t>(std::atol(argv[5])));
    }
    if (mode == "score" && argc >= 6) {
      return score(argv[2], static_cast<std::uint32_t>(std::atol(argv[3])), std::atof(argv[4]), argc - 5, argv + 5);
    }
    if (mode == "race" && argc == 12) {
      const std::string kind = argv[10];
      return race(argv[2], static_cast<std::uint32_t>(std::atol(argv[3])), std::atof(argv[4]), std::atof(argv[5]),
                  static_cast<std::uint32_t>(std::atol(argv[6])), static_cast<std::uint32_t>(std::atol(argv[7])),
                  std::atof(argv[8]), std::atof(argv[9]),
                  kind == "exact" ? SamplerKind::exact
                  : kind == "mh"  ? SamplerKind::metropolis_hastings
                                  : SamplerKind::automatic,
                  static_cast<std::uint32_t>(std::atol(argv[11])));
    }
  } catch (const std::exception& e) {
    std::fprintf(stderr, "model_race_bench: %s\n", e.what());
    return 1;
  }
  std::fprintf(stderr, "usage: see the comment at the top of bench/model_race_bench.cc\n");
  return 2;
}

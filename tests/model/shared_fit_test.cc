// fit_model_shared (model/fit.h) and SharedCountMerger (model/count_merge.h), with
// processes simulated by threads (support/thread_process_group.h); the checks
// through real MPI processes are in tests/distributed. The reference is loupe's own
// single-process fit_model on the same corpus.
#include <gtest/gtest.h>

#include <cmath>
#include <numeric>

#include "corpus/corpus_file.h"
#include "model/fit.h"
#include "model/synthetic_corpus.h"
#include "support/temp_folder.h"
#include "support/thread_process_group.h"

namespace loupe {
namespace {

Corpus drawn_corpus() {
  SyntheticCorpusSpec spec;
  spec.topic_count = 5;
  spec.vocabulary_size = 200;
  spec.num_documents = 120;
  spec.document_length = 40;
  spec.vary_length = true;
  spec.seed = 17;
  return draw_lda_corpus(spec).corpus;
}

FitOptions small_fit(SamplerKind kind) {
  FitOptions options;
  options.topic_count = 5;
  options.sweeps = 40;
  options.burn_in = 20;
  options.samples = 4;
  options.sample_lag = 5;
  options.log_likelihood_every = 5;
  options.threads = 2;
  options.sampler = kind;
  return options;
}

// Fits with `processes` threads acting as processes; returns rank 0's model.
Model shared_fit(const std::string& path, std::size_t processes, const FitOptions& options) {
  Model root_model;
  testing::run_as_processes(processes, [&](ProcessGroup& group) {
    const CorpusShare share = read_corpus_share(path, group.rank(), group.size(), group.rank() == 0);
    Model model = fit_model_shared(share, group, options);
    if (group.rank() == 0) {
      root_model = std::move(model);
    } else {
      EXPECT_TRUE(model.chains[0].theta.empty());
      EXPECT_TRUE(model.chains[0].phi.empty());
    }
  });
  return root_model;
}

TEST(SharedFit, OneProcessGivesTheSingleProcessModelWithTheExactKernel) {
  testing::TempFolder folder("shared-fit");
  const Corpus corpus = drawn_corpus();
  const std::string path = folder.file("drawn.corpus");
  write_corpus(corpus, path);
  const FitOptions options = small_fit(SamplerKind::exact);
  const Model alone = fit_model(corpus, options);
  const Model shared = shared_fit(path, 1, options);
  EXPECT_EQ(shared.corpus_fingerprint, alone.corpus_fingerprint);
  EXPECT_EQ(shared.document_ids, alone.document_ids);
  EXPECT_EQ(shared.chains[0].phi, alone.chains[0].phi);
  EXPECT_EQ(shared.chains[0].theta, alone.chains[0].theta);
  ASSERT_EQ(shared.chains[0].trace.size(), alone.chains[0].trace.size());
  for (std::size_t i = 0; i < alone.chains[0].trace.size(); ++i) {
    EXPECT_EQ(shared.chains[0].trace[i].log_likelihood, alone.chains[0].trace[i].log_likelihood);
  }
}

TEST(SharedFit, ThreeProcessesGiveACompleteModelOnRankZero) {
  testing::TempFolder folder("shared-fit");
  const Corpus corpus = drawn_corpus();
  const std::string path = folder.file("drawn.corpus");
  write_corpus(corpus, path);
  for (const SamplerKind kind : {SamplerKind::exact, SamplerKind::metropolis_hastings}) {
    FitOptions options = small_fit(kind);
    options.chains = 2;
    options.tune_priors_every = 5;
    options.asymmetric_alpha = true;
    const Model alone = fit_model(corpus, options);
    const Model shared = shared_fit(path, 3, options);
    EXPECT_EQ(shared.corpus_fingerprint, corpus.fingerprint());
    EXPECT_EQ(shared.num_tokens, corpus.num_tokens());
    EXPECT_EQ(shared.document_ids, alone.document_ids);
    EXPECT_EQ(shared.document_groups, alone.document_groups);
    ASSERT_EQ(shared.chains.size(), 2U);
    for (std::size_t c = 0; c < 2; ++c) {
      ASSERT_EQ(shared.chains[c].theta.size(), corpus.num_documents() * options.topic_count);
      ASSERT_EQ(shared.chains[c].phi.size(), corpus.vocabulary_size() * options.topic_count);
      for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
        const auto row = shared.theta(c, d);
        EXPECT_NEAR(std::accumulate(row.begin(), row.end(), 0.0), 1.0, 1e-4);
      }
      // The chain climbs, and ends near one process's (40 sweeps of 4,800 tokens: chains of either
      // kind differ by a few percent, so this is a sanity check; tests/distributed holds the 1% one).
      EXPECT_EQ(shared.chains[c].alpha.size(), options.topic_count);
      const double ours = shared.chains[c].trace.back().log_likelihood;
      const double reference = alone.chains[c].trace.back().log_likelihood;
      EXPECT_GT(ours, shared.chains[c].trace.front().log_likelihood);
      EXPECT_LT(std::abs(ours - reference) / std::abs(reference), 0.1) << ours << " vs " << reference;
    }
  }
}

TEST(SharedFit, CheckpointsAreRefused) {
  testing::TempFolder folder("shared-fit");
  const std::string path = folder.file("drawn.corpus");
  write_corpus(drawn_corpus(), path);
  FitOptions options = small_fit(SamplerKind::exact);
  options.checkpoint_every = 10;
  options.checkpoint_path = folder.file("fit.checkpoint");
  testing::run_as_processes(1, [&](ProcessGroup& group) {
    const CorpusShare share = read_corpus_share(path, 0, 1, true);
    EXPECT_THROW(fit_model_shared(share, group, options), Error);
  });
}

}  // namespace
}  // namespace loupe

// Checkpoints: resuming gives exactly the model of an uninterrupted run; an
// interrupted run leaves its last checkpoint intact; a checkpoint is refused
// for other settings or another corpus.
#include <atomic>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/binary_io.h"
#include "common/error.h"
#include "model/checkpoint.h"
#include "model/fit.h"
#include "model/model_file.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;

Corpus corpus_for_checkpoints() {
  SyntheticCorpusSpec spec;
  spec.topic_count = 4;
  spec.vocabulary_size = 60;
  spec.num_documents = 50;
  spec.document_length = 25;
  spec.seed = 31;
  return draw_lda_corpus(spec).corpus;
}

FitOptions checkpoint_options(const std::string& path) {
  FitOptions options;
  options.topic_count = 5;
  options.sweeps = 30;
  options.burn_in = 10;
  options.samples = 4;
  options.sample_lag = 5;  // samples at 15, 20, 25, 30: a checkpoint at 20 holds running sums
  options.chains = 2;
  options.threads = 2;
  options.tune_priors_every = 5;
  options.asymmetric_alpha = true;
  options.log_likelihood_every = 5;
  options.checkpoint_every = 10;
  options.checkpoint_path = path;
  return options;
}

void expect_same_model(const Model& a, const Model& b) {
  ASSERT_EQ(a.chains.size(), b.chains.size());
  for (std::size_t c = 0; c < a.chains.size(); ++c) {
    EXPECT_EQ(a.chains[c].phi, b.chains[c].phi);
    EXPECT_EQ(a.chains[c].theta, b.chains[c].theta);
    EXPECT_EQ(a.chains[c].alpha, b.chains[c].alpha);
    EXPECT_EQ(a.chains[c].beta, b.chains[c].beta);
    ASSERT_EQ(a.chains[c].trace.size(), b.chains[c].trace.size());
    for (std::size_t i = 0; i < a.chains[c].trace.size(); ++i) {
      EXPECT_EQ(a.chains[c].trace[i].log_likelihood, b.chains[c].trace[i].log_likelihood);
    }
  }
}

// Stops the fit after `sweep` by raising the flag from the progress callback.
FitControl stop_after(std::uint32_t sweep, std::atomic<bool>& flag) {
  FitControl control;
  control.stop_requested = &flag;
  control.on_progress = [&flag, sweep](const FitProgress& progress) {
    if (progress.sweep == sweep) flag = true;
  };
  return control;
}

TEST(CheckpointTest, ResumingGivesTheUninterruptedResult) {
  test::TempFolder folder;
  const Corpus corpus = corpus_for_checkpoints();
  const Model whole = fit_model(corpus, checkpoint_options(folder.file("unused.ckpt")));

  const std::string path = folder.file("run.ckpt");
  std::atomic<bool> stop{false};
  EXPECT_THROW(fit_model(corpus, checkpoint_options(path), stop_after(23, stop)), FitInterrupted);
  const FitCheckpoint checkpoint = read_checkpoint(path);
  EXPECT_EQ(checkpoint.sweeps_done, 20U);  // the last checkpoint before the stop at 23
  EXPECT_EQ(checkpoint.chains[0].sums.samples_taken, 2U);

  FitControl resume;
  resume.resume_from = path;
  auto options = checkpoint_options(path);
  options.threads = 1;  // with 2 chains on 1 or 2 threads each chain is one shard either way
  const Model resumed = fit_model(corpus, options, resume);
  expect_same_model(whole, resumed);
}

TEST(CheckpointTest, AnInterruptedRunSaysWhereToResume) {
  test::TempFolder folder;
  const std::string path = folder.file("run.ckpt");
  std::atomic<bool> stop{false};
  try {
    fit_model(corpus_for_checkpoints(), checkpoint_options(path), stop_after(14, stop));
    FAIL() << "the fit did not stop";
  } catch (const FitInterrupted& e) {
    EXPECT_THAT(e.what(), HasSubstr("interrupted after sweep 14 of 30"));
    EXPECT_THAT(e.what(),
                HasSubstr("The last checkpoint (sweep 10) is in " + path + "; continue with --resume " + path));
  }
  EXPECT_EQ(read_checkpoint(path).sweeps_done, 10U);  // intact and readable

  std::atomic<bool> stop_early{false};
  auto options = checkpoint_options(path);
  options.checkpoint_every = 0;
  try {
    fit_model(corpus_for_checkpoints(), options, stop_after(3, stop_early));
    FAIL() << "the fit did not stop";
  } catch (const FitInterrupted& e) {
    EXPECT_THAT(e.what(), HasSubstr("No checkpoint was written"));
  }
}

TEST(CheckpointTest, DifferentSettingsOrCorpusAreRefused) {
  test::TempFolder folder;
  const std::string path = folder.file("run.ckpt");
  const Corpus corpus = corpus_for_checkpoints();
  std::atomic<bool> stop{false};
  EXPECT_THROW(fit_model(corpus, checkpoint_options(path), stop_after(12, stop)), FitInterrupted);

  FitControl resume;
  resume.resume_from = path;
  auto options = checkpoint_options(path);
  options.sweeps = 40;
  try {
    fit_model(corpus, options, resume);
    FAIL() << "other settings were accepted";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("--sweeps: the checkpoint has 30, this run asks for 40"));
  }
  Corpus other = corpus;
  other.tokens[5] = (other.tokens[5] + 1) % 60;
  try {
    fit_model(other, checkpoint_options(path), resume);
    FAIL() << "another corpus was accepted";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("this checkpoint was written for another corpus"));
  }
  EXPECT_EQ(checkpoint_option_mismatch(checkpoint_options("a"), checkpoint_options("b")), "");
}

TEST(CheckpointTest, ADamagedCheckpointIsAnError) {
  test::TempFolder folder;
  const std::string path = folder.file("run.ckpt");
  std::atomic<bool> stop{false};
  EXPECT_THROW(fit_model(corpus_for_checkpoints(), checkpoint_options(path), stop_after(12, stop)), FitInterrupted);
  std::string bytes = read_whole_file(path);
  write_file_atomically(path, bytes.substr(0, bytes.size() / 2));
  EXPECT_THROW(read_checkpoint(path), Error);
}

}  // namespace
}  // namespace loupe

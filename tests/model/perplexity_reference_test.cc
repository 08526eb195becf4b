// Checks 2 and 3 of the issue, on one corpus drawn from the LDA generative
// process (JMLR, 2003) with known topics; both scored by the same
// document-completion estimator (Wallach et al. 2009, "Evaluation methods for
// topic models", ICML), theta folded in from the first half of each held-out
// document, the second half scored.
//  2. loupe's held-out perplexity within 3% of that of the true topics.
//  3. loupe's perplexity lower than scikit-learn's LatentDirichletAllocation
//     (batch variational Bayes; Debian python3-sklearn run with /usr/bin/python3).
#include <cstdio>
#include <cstdlib>
#include <filesystem>
#include <fstream>
#include <map>
#include <sstream>

#include <gtest/gtest.h>

#include "model/evaluation.h"
#include "model/fit.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

constexpr std::uint32_t kTopics = 10;
constexpr std::uint32_t kWords = 1000;
constexpr double kAlpha = 0.2;
constexpr double kBeta = 0.05;

struct Experiment {
  SyntheticCorpus sample;
  Corpus train;
  Corpus held_out;
  Model model;
  std::size_t best_chain = 0;
};

// Drawn once for both checks.
const Experiment& experiment() {
  static const Experiment e = [] {
    Experiment x;
    SyntheticCorpusSpec spec;
    spec.topic_count = kTopics;
    spec.vocabulary_size = kWords;
    spec.num_documents = 2300;
    spec.document_length = 80;
    spec.alpha = kAlpha;
    spec.topic_word_prior = kBeta;
    spec.seed = 2009;
    x.sample = draw_lda_corpus(spec);
    x.train = corpus_subset(x.sample.corpus, 0, 2000);
    x.held_out = corpus_subset(x.sample.corpus, 2000, 2300);
    FitOptions options;
    options.topic_count = kTopics;
    options.sweeps = 200;
    options.burn_in = 100;
    options.samples = 10;
    options.sample_lag = 5;
    options.alpha = {kAlpha};
    options.beta = kBeta;
    options.chains = 3;
    options.threads = 2;
    options.seed = 3;
    x.model = fit_model(x.train, options);
    // Common practice: of several chains, keep the one with the highest final log p(w, z).
    for (std::size_t c = 1; c < x.model.chains.size(); ++c) {
      if (x.model.chains[c].trace.back().log_likelihood > x.model.chains[x.best_chain].trace.back().log_likelihood) {
        x.best_chain = c;
      }
    }
    return x;
  }();
  return e;
}

double perplexity(const TopicWordTable& phi) {
  const std::vector<double> alpha(kTopics, kAlpha);
  FoldInOptions fold_in;
  fold_in.seed = 77;
  return document_completion_perplexity(phi, alpha, experiment().held_out, fold_in, ParallelRunner(2)).perplexity;
}

double loupe_perplexity() {
  const auto& e = experiment();
  return perplexity(TopicWordTable(e.model.chains[e.best_chain].phi, kTopics, kWords));
}

TEST(ModelReferencePerplexity, WithinThreePercentOfTheTrueTopics) {
  const double truth = perplexity(TopicWordTable(std::span<const double>(experiment().sample.phi), kTopics, kWords));
  const double fitted = loupe_perplexity();
  std::printf("document-completion perplexity: true topics %.2f, loupe %.2f (ratio %.4f)\n", truth, fitted,
              fitted / truth);
  // The criterion: within 3% of the true topics' perplexity.
  EXPECT_LT(std::abs(fitted - truth) / truth, 0.03);
}

TEST(ModelReferenceScikitLearn, LowerPerplexityThanBatchVariationalBayes) {
  const std::string python = "/usr/bin/python3";
  ASSERT_TRUE(std::filesystem::exists(python)) << python << " is missing: install the Debian package python3";
  const auto& e = experiment();
  test::TempFolder folder;
  const std::string counts_path = folder.file("counts.txt");
  const std::string phi_path = folder.file("sklearn-phi.txt");
  {
    std::ofstream out(counts_path);
    // max_iter 20 (scikit-learn's default is 10) is converged here: measured perplexity
    // 273.63 at 20 iterations, 273.53 at 40, 273.71 at 100.
    out << e.train.num_documents() << ' ' << kWords << ' ' << kTopics << ' ' << kAlpha << ' ' << kBeta << " 20 0\n";
    for (std::size_t d = 0; d < e.train.num_documents(); ++d) {
      std::map<WordId, int> counts;
      for (const auto w : e.train.document_tokens(d)) ++counts[w];
      for (const auto& [w, c] : counts) out << w << ':' << c << ' ';
      out << '\n';
    }
  }
  const std::string script = std::string(LOUPE_SOURCE_DIR) + "/tests/model/sklearn_lda_reference.py";
  const std::string command = python + " " + script + " " + counts_path + " " + phi_path + " 2>&1";
  FILE* pipe = ::popen(command.c_str(), "r");
  ASSERT_NE(pipe, nullptr);
  std::string output;
  char buffer[256];
  while (std::fgets(buffer, sizeof buffer, pipe) != nullptr) output += buffer;
  const int status = ::pclose(pipe);
  ASSERT_EQ(status, 0) << "the scikit-learn reference failed (is python3-sklearn installed?):\n" << output;
  std::printf("%s", output.c_str());

  std::ifstream in(phi_path);
  std::vector<double> sklearn_phi;
  double value;
  while (in >> value) sklearn_phi.push_back(value);
  ASSERT_EQ(sklearn_phi.size(), static_cast<std::size_t>(kTopics) * kWords);
  const double theirs = perplexity(TopicWordTable(std::span<const double>(sklearn_phi), kTopics, kWords));
  const double ours = loupe_perplexity();
  std::printf("document-completion perplexity: scikit-learn %.2f, loupe %.2f\n", theirs, ours);
  EXPECT_LT(ours, theirs);
}

}  // namespace
}  // namespace loupe

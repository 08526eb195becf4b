// Check 1: the "bars" example of Griffiths & Steyvers (2004, PNAS, "Finding
// scientific topics", Figure 2): 25 words on a 5 x 5 grid, 10 topics that are
// its rows and columns, documents of 100 words drawn with alpha = 1.
#include <gtest/gtest.h>

#include "model/fit.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

TEST(ModelReferenceBars, RecoversAllTenBars) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 10;
  spec.vocabulary_size = 25;
  spec.topics = bars_topics(5);
  spec.num_documents = 2000;  // Griffiths & Steyvers (2004) drew 2000 documents
  spec.document_length = 100;
  spec.alpha = 1.0;
  spec.seed = 2004;
  const auto drawn = draw_lda_corpus(spec);

  FitOptions options;
  options.topic_count = 10;
  options.sweeps = 300;
  options.burn_in = 100;
  options.samples = 5;
  options.sample_lag = 5;
  options.alpha = {1.0};
  options.beta = 0.01;
  options.seed = 7;
  options.chains = 4;
  options.threads = 2;
  const Model model = fit_model(drawn.corpus, options);
  // Common practice: of several chains, read the one with the highest final
  // log p(w, z); a chain can keep a few tokens of a word in a wrong bar for a
  // long time, and Hellinger distance is sensitive to such small leaks.
  std::size_t chain = 0;
  for (std::size_t c = 1; c < model.chains.size(); ++c) {
    if (model.chains[c].trace.back().log_likelihood > model.chains[chain].trace.back().log_likelihood) chain = c;
  }

  // Hungarian matching of fitted to true topics on Hellinger distance.
  std::vector<std::vector<double>> cost(10, std::vector<double>(10));
  for (std::size_t i = 0; i < 10; ++i) {
    for (std::size_t j = 0; j < 10; ++j) {
      cost[i][j] = test::hellinger(model.phi(chain, i), std::span<const double>(drawn.phi.data() + j * 25, 25));
    }
  }
  const auto match = test::hungarian(cost);
  for (std::size_t i = 0; i < 10; ++i) {
    // The criterion: every bar recovered with Hellinger distance below 0.1.
    EXPECT_LT(cost[i][match[i]], 0.1) << "fitted topic " << i << " vs bar " << match[i];
  }
}

}  // namespace
}  // namespace loupe

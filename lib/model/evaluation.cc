#include "model/evaluation.h"

#include <cmath>
#include <limits>
#include <numeric>

#include "common/error.h"
#include "model/random.h"

namespace loupe {

namespace {

// std::lgamma may write the global signgam; lgamma_r keeps threads apart.
double log_gamma(double x) {
  int sign = 0;
  return ::lgamma_r(x, &sign);
}

constexpr std::size_t kBlock = 512;

// Sums f(i) for i in [0, n) in blocks of kBlock, the blocks in order.
template <typename F>
double ordered_sum(std::size_t n, const ParallelRunner& runner, F f) {
  const std::size_t blocks = (n + kBlock - 1) / kBlock;
  std::vector<double> partial(blocks, 0.0);
  runner.run(blocks, [&](std::size_t b) {
    double sum = 0;
    const std::size_t end = std::min(n, (b + 1) * kBlock);
    for (std::size_t i = b * kBlock; i < end; ++i) sum += f(i);
    partial[b] = sum;
  });
  return std::accumulate(partial.begin(), partial.end(), 0.0);
}

}  // namespace

namespace {

// log p(z), the documents of `corpus`: blocks, each with its own K counters.
double log_p_z(const Corpus& corpus, const SamplerState& state, const ParallelRunner& runner) {
  const std::size_t k = state.counts.topic_count;
  const double alpha_sum = state.alpha_sum();
  std::vector<double> lgamma_alpha(k);
  for (std::size_t t = 0; t < k; ++t) lgamma_alpha[t] = log_gamma(state.alpha[t]);
  const std::size_t blocks = (corpus.num_documents() + kBlock - 1) / kBlock;
  std::vector<double> partial(blocks, 0.0);
  runner.run(blocks, [&](std::size_t b) {
    std::vector<std::uint32_t> c(k, 0);
    double sum = 0;
    const std::size_t end = std::min(corpus.num_documents(), (b + 1) * kBlock);
    for (std::size_t d = b * kBlock; d < end; ++d) {
      const auto first = corpus.token_offsets[d];
      const auto last = corpus.token_offsets[d + 1];
      for (auto i = first; i < last; ++i) ++c[state.topics[i]];
      double doc = log_gamma(alpha_sum) - log_gamma(static_cast<double>(last - first) + alpha_sum);
      for (auto i = first; i < last; ++i) {
        const Topic t = state.topics[i];
        if (c[t] == 0) continue;  // topic already added for this document
        doc += log_gamma(c[t] + state.alpha[t]) - lgamma_alpha[t];
        c[t] = 0;
      }
      sum += doc;
    }
    partial[b] = sum;
  });
  return std::accumulate(partial.begin(), partial.end(), 0.0);
}

// The word rows of log p(w | z).
double log_p_w_rows(const SamplerState& state, const ParallelRunner& runner) {
  const auto& counts = state.counts;
  const std::size_t k = counts.topic_count;
  const double beta = state.beta;
  const double lgamma_beta = log_gamma(beta);
  return ordered_sum(counts.vocabulary_size, runner, [&](std::size_t w) {
    const std::uint32_t* row = counts.word_topic.data() + w * k;
    double sum = 0;
    for (std::size_t t = 0; t < k; ++t) {
      if (row[t] > 0) sum += log_gamma(row[t] + beta) - lgamma_beta;
    }
    return sum;
  });
}

// The topic totals' part of log p(w | z).
double log_p_w_topics(const SamplerState& state) {
  const auto& counts = state.counts;
  const double v_beta = state.beta * static_cast<double>(counts.vocabulary_size);
  double sum = 0;
  for (std::size_t t = 0; t < counts.topic_count; ++t)
    sum += log_gamma(v_beta) - log_gamma(counts.topic_total[t] + v_beta);
  return sum;
}

}  // namespace

double log_joint_likelihood(const Corpus& corpus, const SamplerState& state, const ParallelRunner& runner) {
  return log_p_z(corpus, state, runner) + log_p_w_rows(state, runner) + log_p_w_topics(state);
}

double log_topic_assignment_likelihood(const Corpus& corpus, const SamplerState& state, const ParallelRunner& runner) {
  return log_p_z(corpus, state, runner);
}

double log_word_likelihood(const SamplerState& state, const ParallelRunner& runner) {
  return log_p_w_rows(state, runner) + log_p_w_topics(state);
}

double gelman_rubin_rhat(const std::vector<std::vector<double>>& traces) {
  const double nan = std::numeric_limits<double>::quiet_NaN();
  const std::size_t m = traces.size();
  if (m < 2) return nan;
  const std::size_t n = traces.front().size();
  if (n < 2) return nan;
  for (const auto& trace : traces) {
    if (trace.size() != n) return nan;
  }
  std::vector<double> means(m);
  double within = 0;
  for (std::size_t j = 0; j < m; ++j) {
    means[j] = std::accumulate(traces[j].begin(), traces[j].end(), 0.0) / static_cast<double>(n);
    double s2 = 0;
    for (const double x : traces[j]) s2 += (x - means[j]) * (x - means[j]);
    within += s2 / static_cast<double>(n - 1);
  }
  within /= static_cast<double>(m);
  const double grand = std::accumulate(means.begin(), means.end(), 0.0) / static_cast<double>(m);
  double between = 0;
  for (const double mean : means) between += (mean - grand) * (mean - grand);
  between *= static_cast<double>(n) / static_cast<double>(m - 1);
  if (!(within > 0)) return nan;
  const double nd = static_cast<double>(n);
  const double pooled = (nd - 1.0) / nd * within + between / nd;
  return std::sqrt(pooled / within);
}

HeldOutScore document_completion_perplexity(const TopicWordTable& phi, std::span<const double> alpha,
                                            const Corpus& corpus, std::span<const std::size_t> documents,
                                            const FoldInOptions& options, const ParallelRunner& runner) {
  const std::size_t k = phi.topic_count();
  if (alpha.size() != k) throw Error("document completion: alpha must have one value per topic");
  std::vector<double> log_likelihood(documents.size(), 0.0);
  std::vector<std::uint64_t> scored(documents.size(), 0);
  runner.run(documents.size(), [&](std::size_t i) {
    const std::size_t d = documents[i];
    const auto tokens = corpus.document_tokens(d);
    const std::size_t observed = tokens.size() / 2;
    if (observed == 0) return;
    const auto theta = fold_in_document(phi, alpha, tokens.first(observed), options, derive_seed(options.seed, {d}));
    double sum = 0;
    for (std::size_t j = observed; j < tokens.size(); ++j) {
      const float* p = phi.word(tokens[j]);
      double mix = 0;
      for (std::size_t t = 0; t < k; ++t) mix += theta[t] * static_cast<double>(p[t]);
      sum += std::log(mix);
    }
    log_likelihood[i] = sum;
    scored[i] = tokens.size() - observed;
  });
  HeldOutScore score;
  for (std::size_t i = 0; i < documents.size(); ++i) {
    score.log_likelihood += log_likelihood[i];
    score.tokens += scored[i];
    score.documents += scored[i] > 0 ? 1 : 0;
  }
  score.perplexity = score.tokens > 0 ? std::exp(-score.log_likelihood / static_cast<double>(score.tokens))
                                      : std::numeric_limits<double>::quiet_NaN();
  return score;
}

HeldOutScore document_completion_perplexity(const TopicWordTable& phi, std::span<const double> alpha,
                                            const Corpus& corpus, const FoldInOptions& options,
                                            const ParallelRunner& runner) {
  std::vector<std::size_t> all(corpus.num_documents());
  std::iota(all.begin(), all.end(), std::size_t{0});
  return document_completion_perplexity(phi, alpha, corpus, all, options, runner);
}

}  // namespace loupe

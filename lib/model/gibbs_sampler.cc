#include "model/gibbs_sampler.h"

#include <algorithm>
#include <cstring>

#include "model/random.h"

namespace loupe {

std::vector<DocumentShard> make_document_shards(const Corpus& corpus, std::size_t count) {
  count = std::max<std::size_t>(count, 1);
  std::vector<DocumentShard> shards;
  const std::size_t d_total = corpus.num_documents();
  const std::uint64_t n = corpus.num_tokens();
  std::size_t d = 0;
  for (std::size_t s = 0; s < count; ++s) {
    const std::uint64_t target = n * (s + 1) / count;
    DocumentShard shard{d, d};
    while (shard.end < d_total && (s + 1 == count || corpus.token_offsets[shard.end + 1] <= target)) ++shard.end;
    // Take at least one document while this shard is behind its share.
    if (shard.end == shard.first && shard.end < d_total && corpus.token_offsets[shard.end] < target) ++shard.end;
    d = shard.end;
    shards.push_back(shard);
  }
  return shards;
}

SamplerKind resolve_sampler(SamplerKind kind, std::uint32_t topic_count) {
  if (kind != SamplerKind::automatic) return kind;
  return topic_count <= kExactKernelMaxTopics ? SamplerKind::exact : SamplerKind::metropolis_hastings;
}

DocumentPrior::DocumentPrior(std::span<const double> values) : alpha(values.begin(), values.end()), table(values) {
  for (const double a : alpha) alpha_sum += a;
}

GibbsSampler::GibbsSampler(const Corpus& corpus, std::uint32_t topic_count, SamplerKind kind, std::uint32_t mh_steps,
                           std::size_t shards, std::size_t first_document)
    : corpus_(corpus),
      topic_count_(topic_count),
      kind_(resolve_sampler(kind, topic_count)),
      mh_steps_(std::max<std::uint32_t>(mh_steps, 1)),
      shards_(make_document_shards(corpus, shards)),
      first_document_(first_document) {}

void GibbsSampler::initialize_shard(SamplerState& state, std::uint64_t chain_seed, std::size_t shard) const {
  const auto& range = shards_[shard];
  for (std::size_t d = range.first; d < range.end; ++d) {
    Xoshiro256 rng(derive_seed(chain_seed, {0, first_document_ + d}));
    for (auto i = corpus_.token_offsets[d]; i < corpus_.token_offsets[d + 1]; ++i) {
      state.topics[i] = static_cast<Topic>(rng.below(topic_count_));
    }
  }
}

void GibbsSampler::sample_shard(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed,
                                std::uint32_t sweep, std::size_t shard, ShardWorkspace& workspace) const {
  const auto& range = shards_[shard];
  if (range.first == range.end) return;
  // The shard's private counts start from the last merge.
  const auto& counts = state.counts;
  workspace.topic_total = counts.topic_total;
  workspace.doc_counts.assign(topic_count_, 0);
  if (kind_ == SamplerKind::exact) {
    workspace.word_topic.resize(counts.word_topic.size());
    std::memcpy(workspace.word_topic.data(), counts.word_topic.data(),
                counts.word_topic.size() * sizeof(std::uint32_t));
    sample_exact(state, prior, chain_seed, sweep, range, workspace);
  } else {
    // Pairs (private count, merged count) side by side: one cache line serves both.
    const std::size_t entries = counts.word_topic.size();
    workspace.word_topic.resize(2 * entries);
    std::uint32_t* pairs = workspace.word_topic.data();
    const std::uint32_t* merged = counts.word_topic.data();
    for (std::size_t e = 0; e < entries; ++e) pairs[2 * e] = pairs[2 * e + 1] = merged[e];
    sample_metropolis_hastings(state, prior, chain_seed, sweep, range, workspace);
  }
}

void GibbsSampler::sample_exact(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed,
                                std::uint32_t sweep, const DocumentShard& range, ShardWorkspace& workspace) const {
  const std::size_t k_topics = topic_count_;
  const double beta = state.beta;
  const double v_beta = beta * static_cast<double>(state.counts.vocabulary_size);
  const double* alpha = prior.alpha.data();
  std::uint32_t* word_topic = workspace.word_topic.data();
  std::uint32_t* topic_total = workspace.topic_total.data();
  std::uint32_t* c = workspace.doc_counts.data();
  // weights[0..K): 1 / (n_k + V beta); weights[K..2K): running sums.
  workspace.weights.resize(2 * k_topics);
  double* inverse_total = workspace.weights.data();
  double* cumulative = inverse_total + k_topics;
  for (std::size_t t = 0; t < k_topics; ++t) inverse_total[t] = 1.0 / (topic_total[t] + v_beta);

  for (std::size_t d = range.first; d < range.end; ++d) {
    const std::uint64_t begin = corpus_.token_offsets[d];
    const std::size_t length = static_cast<std::size_t>(corpus_.token_offsets[d + 1] - begin);
    if (length == 0) continue;
    Xoshiro256 rng(derive_seed(chain_seed, {sweep, first_document_ + d}));
    Topic* z = state.topics.data() + begin;
    const WordId* words = corpus_.tokens.data() + begin;
    for (std::size_t i = 0; i < length; ++i) ++c[z[i]];
    for (std::size_t i = 0; i < length; ++i) {
      std::uint32_t* row = word_topic + static_cast<std::size_t>(words[i]) * k_topics;
      const Topic old_topic = z[i];
      --c[old_topic];
      --row[old_topic];
      inverse_total[old_topic] = 1.0 / (--topic_total[old_topic] + v_beta);
      // p(z = k) ~ (n_dk + alpha_k)(n_wk + beta) / (n_k + V beta), token i removed.
      double total = 0;
      for (std::size_t t = 0; t < k_topics; ++t) {
        total += (c[t] + alpha[t]) * (row[t] + beta) * inverse_total[t];
        cumulative[t] = total;
      }
      const double u = rng.uniform() * total;
      std::size_t t = 0;
      while (t + 1 < k_topics && cumulative[t] <= u) ++t;
      z[i] = static_cast<Topic>(t);
      ++c[t];
      ++row[t];
      inverse_total[t] = 1.0 / (++topic_total[t] + v_beta);
    }
    for (std::size_t i = 0; i < length; ++i) c[z[i]] = 0;
  }
}

void GibbsSampler::sample_metropolis_hastings(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed,
                                              std::uint32_t sweep, const DocumentShard& range,
                                              ShardWorkspace& workspace) const {
  const std::uint32_t k_topics = topic_count_;
  const auto& merged = state.counts;
  const std::uint64_t* word_offsets = merged.word_offsets.data();
  const Topic* pool = merged.word_pool.data();
  std::uint32_t* pairs = workspace.word_topic.data();  // [w][k] = (private count, merged count)
  std::uint32_t* topic_total = workspace.topic_total.data();
  std::uint32_t* c = workspace.doc_counts.data();
  const double* alpha = prior.alpha.data();
  const double beta = state.beta;
  const double v_beta = beta * static_cast<double>(merged.vocabulary_size);
  const double k_beta = beta * static_cast<double>(k_topics);
  // 1 / (n_k + V beta), kept up to date as tokens move.
  workspace.weights.resize(k_topics);
  double* inverse_total = workspace.weights.data();
  for (std::size_t t = 0; t < k_topics; ++t) inverse_total[t] = 1.0 / (topic_total[t] + v_beta);
  // A software pipeline hides the two dependent cache misses of a word
  // proposal (the pool entry, then the count of the topic found there): the
  // uniforms of token i + 2 are drawn and their pool entries fetched, the pool
  // topics of token i + 1 are read and their counts fetched, and token i is
  // sampled. Document proposals read the document's topics when used.
  constexpr std::uint32_t kMaxAhead = 8;
  const std::uint32_t ahead = std::min(mh_steps_, kMaxAhead);
  // A proposal decided ahead: the topic of the document's token `index`
  // (read when used: it may move meanwhile), or `topic` when index < 0.
  struct Pending {
    double u[kMaxAhead];
    std::int32_t index[kMaxAhead];
    Topic topic[kMaxAhead];
  };
  Pending pending[3] = {};

  for (std::size_t d = range.first; d < range.end; ++d) {
    const std::uint64_t begin = corpus_.token_offsets[d];
    const std::size_t length = static_cast<std::size_t>(corpus_.token_offsets[d + 1] - begin);
    if (length == 0) continue;
    Xoshiro256 rng(derive_seed(chain_seed, {sweep, first_document_ + d}));
    Topic* z = state.topics.data() + begin;
    const WordId* words = corpus_.tokens.data() + begin;
    for (std::size_t i = 0; i < length; ++i) ++c[z[i]];
    const double doc_length = static_cast<double>(length);
    const double doc_mass = doc_length + prior.alpha_sum;
    const double inverse_doc_mass_half = 0.5 / doc_mass;

    auto draw_uniforms = [&](std::size_t j, Pending& next) {
      const WordId w = words[j];
      const std::uint64_t offset = word_offsets[w];
      const double n = static_cast<double>(word_offsets[w + 1] - offset);
      for (std::uint32_t step = 0; step < ahead; ++step) {
        const double u = rng.uniform();
        next.u[step] = u;
        if (u >= 0.5) {
          const double x = (2.0 * u - 1.0) * (n + k_beta);
          if (x < n) __builtin_prefetch(pool + offset + static_cast<std::uint64_t>(x));
        }
      }
    };
    auto read_proposals = [&](std::size_t j, Pending& next) {
      const WordId w = words[j];
      const std::uint64_t offset = word_offsets[w];
      const double n = static_cast<double>(word_offsets[w + 1] - offset);
      const std::uint32_t* row = pairs + 2 * static_cast<std::size_t>(w) * k_topics;
      __builtin_prefetch(row + 2 * z[j]);
      for (std::uint32_t step = 0; step < ahead; ++step) {
        const double u = next.u[step];
        Topic t;
        std::int32_t index = -1;
        if (u >= 0.5) {
          const double x = (2.0 * u - 1.0) * (n + k_beta);
          t = x < n ? pool[offset + static_cast<std::uint64_t>(x)] : static_cast<Topic>(rng.below(k_topics));
        } else {
          const double x = 2.0 * u * doc_mass;
          if (x < doc_length) {
            index = static_cast<std::int32_t>(x);
            t = z[index];  // a guess for the prefetch
          } else {
            t = static_cast<Topic>(prior.table.draw(rng));
          }
        }
        next.index[step] = index;
        next.topic[step] = index < 0 ? t : 0;
        __builtin_prefetch(row + 2 * t);
      }
    };
    draw_uniforms(0, pending[0]);
    if (length > 1) draw_uniforms(1, pending[1]);
    read_proposals(0, pending[0]);

    for (std::size_t i = 0; i < length; ++i) {
      const WordId w = words[i];
      std::uint32_t* row = pairs + 2 * static_cast<std::size_t>(w) * k_topics;
      const std::uint64_t pool_begin = word_offsets[w];
      const double n_w = static_cast<double>(word_offsets[w + 1] - pool_begin);
      const double word_mass = n_w + k_beta;
      const double inverse_word_mass_half = 0.5 / word_mass;
      const Topic s0 = z[i];
      // Remove token i: c, the private row and topic_total are now the counts without it.
      --c[s0];
      --row[2 * s0];
      inverse_total[s0] = 1.0 / (--topic_total[s0] + v_beta);
      const Pending& current = pending[i % 3];
      if (i + 2 < length) draw_uniforms(i + 2, pending[(i + 2) % 3]);
      if (i + 1 < length) read_proposals(i + 1, pending[(i + 1) % 3]);

      // Target p(k) ~ (c_k + a_k)(n_wk + b)/(n_k + V b). Proposal: the even
      // mixture q(k) = q_doc(k)/2 + q_word(k)/2 of
      //   q_doc(k)  = (c_k + [k = s0] + a_k) / (N_d + A)   the topic of a random token of d
      //                                                    (token i still shows s0), or alpha
      //   q_word(k) = (m_wk + b) / (n_w + K b)             a random pool entry, or uniform
      // accepted with p(t) q(s) / (p(s) q(t)). The mixture keeps both proposals'
      // strengths: neither can trap a token where the other would move it.
      auto target = [&](Topic k) {
        return (static_cast<double>(c[k]) + alpha[k]) * (static_cast<double>(row[2 * k]) + beta) * inverse_total[k];
      };
      auto proposal = [&](Topic k) {
        return (static_cast<double>(c[k]) + (k == s0 ? 1.0 : 0.0) + alpha[k]) * inverse_doc_mass_half +
               (static_cast<double>(row[2 * k + 1]) + beta) * inverse_word_mass_half;
      };
      Topic s = s0;
      double target_s = target(s);
      double proposal_s = proposal(s);
      // Steps decided ahead, without unpredictable branches.
      for (std::uint32_t step = 0; step < ahead; ++step) {
        const std::int32_t index = current.index[step];
        const Topic from_document = z[index < 0 ? 0 : index];
        const Topic t = index < 0 ? current.topic[step] : from_document;
        const double target_t = target(t);
        const double proposal_t = proposal(t);
        const bool accept = rng.uniform() * target_s * proposal_t < target_t * proposal_s;
        s = accept ? t : s;
        target_s = accept ? target_t : target_s;
        proposal_s = accept ? proposal_t : proposal_s;
      }
      // Steps beyond those, drawn here.
      for (std::uint32_t step = ahead; step < mh_steps_; ++step) {
        const double u = rng.uniform();
        Topic t;
        if (u < 0.5) {
          const double x = 2.0 * u * doc_mass;
          t = x < doc_length ? z[static_cast<std::size_t>(x)] : static_cast<Topic>(prior.table.draw(rng));
        } else {
          const double x = (2.0 * u - 1.0) * word_mass;
          t = x < n_w ? pool[pool_begin + static_cast<std::uint64_t>(x)] : static_cast<Topic>(rng.below(k_topics));
        }
        const double target_t = target(t);
        const double proposal_t = proposal(t);
        if (rng.uniform() * target_s * proposal_t < target_t * proposal_s) {
          s = t;
          target_s = target_t;
          proposal_s = proposal_t;
        }
      }
      z[i] = s;
      ++c[s];
      ++row[2 * s];
      inverse_total[s] = 1.0 / (++topic_total[s] + v_beta);
    }
    for (std::size_t i = 0; i < length; ++i) c[z[i]] = 0;
  }
}

void run_sweep(const GibbsSampler& sampler, CountMerger& merger, const Corpus& corpus, SamplerState& state,
               std::uint64_t chain_seed, std::uint32_t sweep, const ParallelRunner& runner) {
  const std::size_t shards = sampler.shards().size();
  if (sweep == 0) {
    runner.run(shards, [&](std::size_t s) { sampler.initialize_shard(state, chain_seed, s); });
  } else {
    const DocumentPrior prior(state.alpha);
    std::vector<ShardWorkspace> workspaces(shards);
    runner.run(shards, [&](std::size_t s) { sampler.sample_shard(state, prior, chain_seed, sweep, s, workspaces[s]); });
  }
  merger.merge(corpus, state.topics, state.counts, runner);
}

}  // namespace loupe

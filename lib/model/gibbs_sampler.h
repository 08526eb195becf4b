// The per-shard kernels of the collapsed Gibbs sampler for LDA (JMLR, 2003;
// Griffiths & Steyvers 2004). A shard samples its documents against its own
// copy of the topic-word counts, taken from the last merge and updated as its
// tokens move (approximate distributed Gibbs, Newman et al. 2009); with one
// shard this is exact sequential collapsed Gibbs.
//
// Two kernels for the conditional p(z = k) ~ (n_dk + alpha_k)(n_wk + beta)/(n_k + V beta):
//  - exact: computes all K terms; best below a few dozen topics.
//  - Metropolis-Hastings: cost per token independent of K (Yuan et al. 2015;
//    Chen et al. 2016). Each token cycles mh_steps times through
//      a document proposal q(k) ~ n_dk + alpha_k  (the topic of a random token of d)
//      a word proposal     q(k) ~ m_wk + beta     (a random entry of word w's pool,
//                                                  m = the counts of the last merge)
//    each accepted by the exact Metropolis-Hastings ratio.
#pragma once

#include <cstdint>
#include <span>
#include <vector>

#include "corpus/corpus.h"
#include "model/alias_table.h"
#include "model/count_merge.h"
#include "model/lda_options.h"
#include "model/parallel_runner.h"
#include "model/sampler_state.h"

namespace loupe {

// Documents [first, end) of the corpus.
struct DocumentShard {
  std::size_t first = 0;
  std::size_t end = 0;
};

// `count` contiguous shards with about equal numbers of tokens (some may be empty).
std::vector<DocumentShard> make_document_shards(const Corpus& corpus, std::size_t count);

// The exact kernel up to this many topics, Metropolis-Hastings above (see DESIGN.md).
inline constexpr std::uint32_t kExactKernelMaxTopics = 24;

// The kernel `kind` asks for, given K (automatic picks by kExactKernelMaxTopics).
SamplerKind resolve_sampler(SamplerKind kind, std::uint32_t topic_count);

// The alpha part of the document proposal, built once per sweep.
struct DocumentPrior {
  std::vector<double> alpha;
  double alpha_sum = 0;
  AliasTable table;
  explicit DocumentPrior(std::span<const double> values);
};

// A worker's scratch memory, reused from shard to shard: the shard's private
// counts (V x K + K) and one document's counts (K).
struct ShardWorkspace {
  std::vector<std::uint32_t> word_topic;
  std::vector<std::uint32_t> topic_total;
  std::vector<std::uint32_t> doc_counts;
  std::vector<double> weights;
};

class GibbsSampler {
 public:
  // kind must be exact or metropolis_hastings (see resolve_sampler). first_document:
  // the index of corpus's first document in a larger corpus that several processes
  // share (CorpusShare), so that each document keeps its random stream wherever it is sampled.
  GibbsSampler(const Corpus& corpus, std::uint32_t topic_count, SamplerKind kind, std::uint32_t mh_steps,
               std::size_t shards, std::size_t first_document = 0);

  const std::vector<DocumentShard>& shards() const { return shards_; }
  std::uint32_t topic_count() const { return topic_count_; }
  SamplerKind kind() const { return kind_; }

  // Sweep 0: a uniformly random topic for every token of the shard.
  void initialize_shard(SamplerState& state, std::uint64_t chain_seed, std::size_t shard) const;

  // One pass over the tokens of the shard's documents. Reads state.counts
  // (the last merge), writes only the shard's topics. Document d's random
  // numbers come from derive_seed(chain_seed, {sweep, first_document + d}).
  void sample_shard(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed, std::uint32_t sweep,
                    std::size_t shard, ShardWorkspace& workspace) const;

 private:
  void sample_exact(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed, std::uint32_t sweep,
                    const DocumentShard& range, ShardWorkspace& workspace) const;
  void sample_metropolis_hastings(SamplerState& state, const DocumentPrior& prior, std::uint64_t chain_seed,
                                  std::uint32_t sweep, const DocumentShard& range, ShardWorkspace& workspace) const;
  const Corpus& corpus_;
  std::uint32_t topic_count_;
  SamplerKind kind_;
  std::uint32_t mh_steps_;
  std::vector<DocumentShard> shards_;
  std::size_t first_document_ = 0;
};

// One sweep of one chain: sample every shard (in parallel), then merge counts.
// Sweep 0 initialises the topics instead of sampling them.
void run_sweep(const GibbsSampler& sampler, CountMerger& merger, const Corpus& corpus, SamplerState& state,
               std::uint64_t chain_seed, std::uint32_t sweep, const ParallelRunner& runner);

}  // namespace loupe

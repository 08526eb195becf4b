#include "model/checkpoint.h"

#include "common/binary_io.h"
#include "common/error.h"

namespace loupe {

namespace {

constexpr FileFormat kCheckpointFormat{
    {'L', 'O', 'U', 'P', 'E', 'C', 'K', 'P'}, kCheckpointFormatVersion, "checkpoint"};

std::string values(const std::vector<double>& v) {
  if (v.empty()) return "the default";
  std::string text;
  for (std::size_t i = 0; i < v.size(); ++i) text += (i ? "," : "") + std::to_string(v[i]);
  return text;
}

}  // namespace

void write_checkpoint(const std::string& path, const FitOptions& options, std::uint64_t corpus_fingerprint,
                      std::uint32_t sweeps_done, double seconds, const std::vector<ChainProgress>& chains) {
  BinaryWriter out;
  write_fit_options(out, options);
  out.put(corpus_fingerprint);
  out.put(sweeps_done);
  out.put(seconds);
  out.put<std::uint64_t>(chains.size());
  for (const auto& chain : chains) {
    out.put(chain.seed);
    out.put_vector(chain.state.topics);
    out.put_vector(chain.state.alpha);
    out.put(chain.state.beta);
    const auto& sums = chain.sums;
    std::vector<std::uint32_t> sweeps;
    std::vector<double> trace_values;
    for (const auto& point : sums.trace) {
      sweeps.push_back(point.sweep);
      trace_values.push_back(point.log_likelihood);
    }
    out.put_vector(sweeps);
    out.put_vector(trace_values);
    out.put(sums.samples_taken);
    out.put_vector(sums.theta_sum);
    out.put_vector(sums.phi_sum);
    out.put_vector(sums.share_sum);
    out.put_vector(sums.sample_alpha);
    out.put_vector(sums.sample_beta);
  }
  write_binary_file(path, kCheckpointFormat, out.bytes());
}

FitCheckpoint read_checkpoint(const std::string& path) {
  std::uint32_t version = 0;
  const std::string payload = read_binary_file(path, kCheckpointFormat, &version);
  BinaryReader in(payload, path);
  FitCheckpoint checkpoint;
  checkpoint.options = read_fit_options(in);
  checkpoint.corpus_fingerprint = in.get<std::uint64_t>();
  checkpoint.sweeps_done = in.get<std::uint32_t>();
  checkpoint.seconds = in.get<double>();
  const std::size_t k = checkpoint.options.topic_count;
  if (checkpoint.sweeps_done > checkpoint.options.sweeps) in.fail("the sweep count is past the end of the fit");
  const auto chains = in.get<std::uint64_t>();
  if (chains != checkpoint.options.chains) in.fail("the number of chains does not match the settings");
  for (std::uint64_t c = 0; c < chains; ++c) {
    ChainProgress chain;
    chain.seed = in.get<std::uint64_t>();
    chain.state.topics = in.get_vector<Topic>();
    chain.state.alpha = in.get_vector<double>();
    chain.state.beta = in.get<double>();
    const auto sweeps = in.get_vector<std::uint32_t>();
    const auto trace_values = in.get_vector<double>();
    auto& sums = chain.sums;
    sums.samples_taken = in.get<std::uint32_t>();
    sums.theta_sum = in.get_vector<float>();
    sums.phi_sum = in.get_vector<float>();
    sums.share_sum = in.get_vector<double>();
    sums.sample_alpha = in.get_vector<double>();
    sums.sample_beta = in.get_vector<double>();
    for (const auto topic : chain.state.topics) {
      if (topic >= k)
        in.fail("a token has topic " + std::to_string(topic) + ", outside the " + std::to_string(k) + " topics");
    }
    if (chain.state.alpha.size() != k || sums.share_sum.size() != k || sweeps.size() != trace_values.size() ||
        sums.sample_alpha.size() != static_cast<std::size_t>(sums.samples_taken) * k ||
        sums.sample_beta.size() != sums.samples_taken) {
      in.fail("chain " + std::to_string(c + 1) + " has tables of the wrong size");
    }
    for (std::size_t i = 0; i < sweeps.size(); ++i) sums.trace.push_back({sweeps[i], trace_values[i]});
    checkpoint.chains.push_back(std::move(chain));
  }
  if (!in.at_end()) in.fail("extra bytes after the checkpoint");
  return checkpoint;
}

std::string checkpoint_option_mismatch(const FitOptions& stored, const FitOptions& requested) {
  auto differ = [](const char* option, const std::string& a, const std::string& b) {
    return std::string(option) + ": the checkpoint has " + a + ", this run asks for " + b;
  };
#define LOUPE_SAME(field, option)      \
  if (stored.field != requested.field) \
  return differ(option, std::to_string(stored.field), std::to_string(requested.field))
  LOUPE_SAME(topic_count, "--topics");
  LOUPE_SAME(sweeps, "--sweeps");
  LOUPE_SAME(burn_in, "--burn-in");
  LOUPE_SAME(chains, "--chains");
  LOUPE_SAME(seed, "--seed");
  LOUPE_SAME(beta, "--beta");
  LOUPE_SAME(tune_priors_every, "--tune-priors-every");
  LOUPE_SAME(asymmetric_alpha, "--asymmetric-alpha");
  LOUPE_SAME(samples, "--samples");
  LOUPE_SAME(sample_lag, "--sample-lag");
  LOUPE_SAME(log_likelihood_every, "--log-likelihood-every");
  LOUPE_SAME(mh_steps, "--mh-steps");
  if (stored.sampler != requested.sampler)
    return differ("--sampler", std::to_string(static_cast<int>(stored.sampler)),
                  std::to_string(static_cast<int>(requested.sampler)));
#undef LOUPE_SAME
  if (stored.alpha != requested.alpha) return differ("--alpha", values(stored.alpha), values(requested.alpha));
  return "";
}

}  // namespace loupe

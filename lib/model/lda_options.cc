#include "model/lda_options.h"

#include <cmath>
#include <limits>

#include "common/error.h"

namespace loupe {

namespace {

[[noreturn]] void reject(const std::string& what) { throw Error("cannot fit the model: " + what); }

std::string number(double value) {
  std::string text = std::to_string(value);
  while (text.size() > 1 && text.back() == '0') text.pop_back();
  if (!text.empty() && text.back() == '.') text.pop_back();
  return text;
}

}  // namespace

void validate_fit_options(const FitOptions& options, std::size_t documents, std::uint64_t tokens) {
  const auto k = options.topic_count;
  if (documents == 0 || tokens == 0) {
    reject("the corpus is empty (it has " + std::to_string(documents) + " documents and " + std::to_string(tokens) +
           " tokens). Check the ingest filters, or ingest a collection that has text.");
  }
  if (tokens >= std::numeric_limits<std::uint32_t>::max()) {
    reject("the corpus has " + std::to_string(tokens) +
           " tokens; this build counts at most 4294967294. Split the collection.");
  }
  if (k < 2) reject("the number of topics (--topics) is " + std::to_string(k) + "; it must be at least 2.");
  if (k > kMaxTopics) {
    reject("the number of topics (--topics) is " + std::to_string(k) + "; it can be at most " +
           std::to_string(kMaxTopics) + ".");
  }
  if (k > tokens) {
    reject("the number of topics (--topics " + std::to_string(k) +
           ") is larger than the number of tokens in the corpus (" + std::to_string(tokens) +
           "). Choose fewer topics.");
  }
  if (options.sweeps == 0) reject("the number of sweeps (--sweeps) is 0; it must be at least 1.");
  if (options.burn_in >= options.sweeps) {
    reject("the burn-in (--burn-in " + std::to_string(options.burn_in) +
           ") must be smaller than the number of sweeps (--sweeps " + std::to_string(options.sweeps) + ").");
  }
  if (options.chains == 0) reject("the number of chains (--chains) is 0; it must be at least 1.");
  if (options.threads == 0) reject("the number of threads (--threads) is 0; it must be at least 1.");
  if (options.samples == 0) reject("the number of samples averaged (--samples) is 0; it must be at least 1.");
  if (options.sample_lag == 0) reject("the lag between samples (--sample-lag) is 0; it must be at least 1.");
  const std::uint64_t window = static_cast<std::uint64_t>(options.samples - 1) * options.sample_lag;
  if (window >= options.sweeps || options.sweeps - window <= options.burn_in) {
    reject(std::to_string(options.samples) + " samples " + std::to_string(options.sample_lag) +
           " sweeps apart, ending at sweep " + std::to_string(options.sweeps) + ", do not fit after the burn-in of " +
           std::to_string(options.burn_in) + " sweeps. Lower --samples, --sample-lag or --burn-in, or raise --sweeps.");
  }
  if (options.log_likelihood_every == 0) {
    reject("the log-likelihood interval (--log-likelihood-every) is 0; it must be at least 1.");
  }
  if (options.mh_steps == 0) reject("the number of Metropolis-Hastings steps per token is 0; it must be at least 1.");
  if (!(options.beta > 0.0) || !std::isfinite(options.beta)) {
    reject("the topic-word prior beta (--beta " + number(options.beta) + ") must be a positive number.");
  }
  if (options.alpha.size() != 0 && options.alpha.size() != 1 && options.alpha.size() != k) {
    reject("--alpha has " + std::to_string(options.alpha.size()) +
           " values; give one value (symmetric) or one per topic (" + std::to_string(k) + ").");
  }
  for (std::size_t i = 0; i < options.alpha.size(); ++i) {
    const double a = options.alpha[i];
    if (!(a > 0.0) || !std::isfinite(a)) {
      reject("the document-topic prior alpha (--alpha, value " + std::to_string(i + 1) + ": " + number(a) +
             ") must be a positive number.");
    }
  }
  if (options.checkpoint_every > 0 && options.checkpoint_path.empty()) {
    reject("--checkpoint-every needs a checkpoint file (--checkpoint FILE).");
  }
}

void validate_fit_options(const FitOptions& options, const Corpus& corpus) {
  validate_fit_options(options, corpus.num_documents(), corpus.num_tokens());
}

std::vector<double> initial_alpha(const FitOptions& options) {
  const auto k = options.topic_count;
  if (options.alpha.size() == k && k > 1) return options.alpha;
  // Symmetric default 50/K: Griffiths & Steyvers (2004, PNAS), "Finding scientific topics".
  const double value = options.alpha.empty() ? 50.0 / static_cast<double>(k) : options.alpha.front();
  return std::vector<double>(k, value);
}

bool alpha_is_asymmetric(const FitOptions& options) {
  return options.asymmetric_alpha || (options.alpha.size() > 1 && options.alpha.size() == options.topic_count);
}

std::vector<std::uint32_t> retained_sweeps(const FitOptions& options) {
  std::vector<std::uint32_t> result;
  for (std::uint32_t i = options.samples; i-- > 0;) {
    result.push_back(options.sweeps - i * options.sample_lag);
  }
  return result;
}

}  // namespace loupe

#include "common/binary_io.h"

namespace loupe {

void write_fit_options(BinaryWriter& out, const FitOptions& o) {
  out.put(o.topic_count);
  out.put(o.sweeps);
  out.put(o.burn_in);
  out.put(o.chains);
  out.put(o.threads);
  out.put(o.seed);
  out.put_vector(o.alpha);
  out.put(o.beta);
  out.put(o.tune_priors_every);
  out.put<std::uint8_t>(o.asymmetric_alpha ? 1 : 0);
  out.put(o.samples);
  out.put(o.sample_lag);
  out.put(o.log_likelihood_every);
  out.put(static_cast<std::uint8_t>(o.sampler));
  out.put(o.mh_steps);
  out.put(o.checkpoint_every);
  out.put_string(o.checkpoint_path);
}

FitOptions read_fit_options(BinaryReader& in) {
  FitOptions o;
  o.topic_count = in.get<std::uint32_t>();
  o.sweeps = in.get<std::uint32_t>();
  o.burn_in = in.get<std::uint32_t>();
  o.chains = in.get<std::uint32_t>();
  o.threads = in.get<std::uint32_t>();
  o.seed = in.get<std::uint64_t>();
  o.alpha = in.get_vector<double>();
  o.beta = in.get<double>();
  o.tune_priors_every = in.get<std::uint32_t>();
  const auto asymmetric = in.get<std::uint8_t>();
  if (asymmetric > 1) in.fail("a yes/no field holds " + std::to_string(asymmetric));
  o.asymmetric_alpha = asymmetric == 1;
  o.samples = in.get<std::uint32_t>();
  o.sample_lag = in.get<std::uint32_t>();
  o.log_likelihood_every = in.get<std::uint32_t>();
  const auto sampler = in.get<std::uint8_t>();
  if (sampler > 2) in.fail("unknown sampler kind " + std::to_string(sampler));
  o.sampler = static_cast<SamplerKind>(sampler);
  o.mh_steps = in.get<std::uint32_t>();
  o.checkpoint_every = in.get<std::uint32_t>();
  o.checkpoint_path = in.get_string();
  if (o.topic_count < 2 || o.topic_count > kMaxTopics)
    in.fail("the number of topics " + std::to_string(o.topic_count) + " is impossible");
  if (o.chains == 0 || o.sweeps == 0 || o.samples == 0) in.fail("the fit settings are impossible");
  return o;
}

}  // namespace loupe

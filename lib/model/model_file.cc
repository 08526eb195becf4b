#include "model/model_file.h"

#include <cstdio>

#include "common/binary_io.h"
#include "common/error.h"

namespace loupe {

namespace {

constexpr FileFormat kModelFormat{{'L', 'O', 'U', 'P', 'E', 'M', 'D', 'L'}, kModelFormatVersion, "model"};

std::string hex(std::uint64_t value) {
  char buffer[20];
  std::snprintf(buffer, sizeof buffer, "%016llx", static_cast<unsigned long long>(value));
  return buffer;
}

}  // namespace

void write_model(const Model& model, const std::string& path) {
  BinaryWriter out;
  // Where checkpoints went does not change the result: a resumed fit and an
  // uninterrupted one write the same bytes.
  FitOptions options = model.options;
  options.checkpoint_every = 0;
  options.checkpoint_path.clear();
  write_fit_options(out, options);
  out.put(model.corpus_fingerprint);
  out.put(model.num_tokens);
  out.put_strings(model.vocabulary);
  out.put_strings(model.groups);
  out.put_strings(model.document_ids);
  out.put_vector(model.document_groups);
  std::vector<std::uint8_t> roles;
  for (const auto role : model.document_roles) roles.push_back(static_cast<std::uint8_t>(role));
  out.put_vector(roles);
  out.put(model.rhat);
  out.put<std::uint64_t>(model.chains.size());
  for (const auto& chain : model.chains) {
    out.put(chain.seed);
    out.put_vector(chain.alpha);
    out.put(chain.beta);
    out.put_vector(chain.phi);
    out.put_vector(chain.theta);
    out.put_vector(chain.topic_share);
    std::vector<std::uint32_t> sweeps;
    std::vector<double> values;
    for (const auto& point : chain.trace) {
      sweeps.push_back(point.sweep);
      values.push_back(point.log_likelihood);
    }
    out.put_vector(sweeps);
    out.put_vector(values);
  }
  write_binary_file(path, kModelFormat, out.bytes());
}

Model read_model(const std::string& path) {
  std::uint32_t version = 0;
  const std::string payload = read_binary_file(path, kModelFormat, &version);
  BinaryReader in(payload, path);
  Model model;
  model.options = read_fit_options(in);
  model.corpus_fingerprint = in.get<std::uint64_t>();
  model.num_tokens = in.get<std::uint64_t>();
  model.vocabulary = in.get_strings();
  model.groups = in.get_strings();
  model.document_ids = in.get_strings();
  model.document_groups = in.get_vector<std::uint32_t>();
  const auto roles = in.get_vector<std::uint8_t>();
  model.rhat = in.get<double>();
  const std::size_t k = model.options.topic_count;
  const std::size_t v = model.vocabulary.size();
  const std::size_t d = model.document_ids.size();
  if (model.document_groups.size() != d || roles.size() != d) in.fail("the document tables differ in length");
  for (const auto role : roles) {
    if (role > 1) in.fail("unknown document role " + std::to_string(role));
    model.document_roles.push_back(static_cast<DocumentRole>(role));
  }
  for (const auto g : model.document_groups) {
    if (g != kNoGroup && g >= model.groups.size())
      in.fail("a document names group " + std::to_string(g) + " that does not exist");
  }
  const auto chains = in.get<std::uint64_t>();
  if (chains != model.options.chains)
    in.fail("the file holds " + std::to_string(chains) + " chains, its settings say " +
            std::to_string(model.options.chains));
  for (std::uint64_t c = 0; c < chains; ++c) {
    ChainEstimates chain;
    chain.seed = in.get<std::uint64_t>();
    chain.alpha = in.get_vector<double>();
    chain.beta = in.get<double>();
    chain.phi = in.get_vector<float>();
    chain.theta = in.get_vector<float>();
    chain.topic_share = in.get_vector<double>();
    const auto sweeps = in.get_vector<std::uint32_t>();
    const auto values = in.get_vector<double>();
    if (chain.alpha.size() != k || chain.topic_share.size() != k)
      in.fail("chain " + std::to_string(c + 1) + " has the wrong number of topics");
    if (chain.phi.size() != k * v) in.fail("phi of chain " + std::to_string(c + 1) + " does not have K x V values");
    if (chain.theta.size() != d * k) in.fail("theta of chain " + std::to_string(c + 1) + " does not have D x K values");
    if (sweeps.size() != values.size()) in.fail("the trace of chain " + std::to_string(c + 1) + " is inconsistent");
    for (std::size_t i = 0; i < sweeps.size(); ++i) chain.trace.push_back({sweeps[i], values[i]});
    model.chains.push_back(std::move(chain));
  }
  if (!in.at_end()) in.fail("extra bytes after the model");
  return model;
}

void check_model_matches(const Model& model, const Corpus& corpus, const std::string& corpus_path) {
  const auto fingerprint = corpus.fingerprint();
  if (fingerprint != model.corpus_fingerprint) {
    throw Error("the model was fitted on another corpus: " + corpus_path + " has fingerprint " + hex(fingerprint) +
                ", the model records " + hex(model.corpus_fingerprint) +
                ". Use the corpus file the model was fitted on, or fit a new model on this one.");
  }
}

}  // namespace loupe

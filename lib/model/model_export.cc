#include "model/model_export.h"

#include <cstdio>

namespace loupe {

namespace {
// Shortest text that reads back as the same float: 9 significant digits.
void put_number(std::ostream& out, double value) {
  char text[32];
  std::snprintf(text, sizeof text, "%.9g", value);
  out << text;
}
}  // namespace

std::string csv_field(std::string_view text) {
  const bool quote = text.find_first_of(",\"\r\n") != std::string_view::npos ||
                     (!text.empty() && (text.front() == ' ' || text.back() == ' '));
  if (!quote) return std::string(text);
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  out += '"';
  return out;
}

void write_phi_csv(const Model& model, std::size_t chain, std::ostream& out) {
  const std::size_t k = model.topic_count();
  const std::size_t v = model.vocabulary_size();
  out << "word";
  for (std::size_t t = 0; t < k; ++t) out << ",topic_" << t + 1;
  out << '\n';
  const auto& phi = model.chains[chain].phi;
  for (std::size_t w = 0; w < v; ++w) {
    out << csv_field(model.vocabulary[w]);
    for (std::size_t t = 0; t < k; ++t) {
      out << ',';
      put_number(out, phi[t * v + w]);
    }
    out << '\n';
  }
}

void write_theta_csv(const Model& model, std::size_t chain, std::ostream& out) {
  const std::size_t k = model.topic_count();
  out << "document,group";
  for (std::size_t t = 0; t < k; ++t) out << ",topic_" << t + 1;
  out << '\n';
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    out << csv_field(model.document_ids[d]) << ',' << csv_field(model.group_name(d));
    for (const float value : model.theta(chain, d)) {
      out << ',';
      put_number(out, value);
    }
    out << '\n';
  }
}

void write_trace_csv(const Model& model, std::ostream& out) {
  out << "chain,sweep,log_likelihood\n";
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    for (const auto& point : model.chains[c].trace) {
      out << c + 1 << ',' << point.sweep << ',';
      put_number(out, point.log_likelihood);
      out << '\n';
    }
  }
}

void write_topic_priors_csv(const Model& model, std::ostream& out) {
  out << "chain,topic,share,alpha,beta\n";
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    const auto& chain = model.chains[c];
    for (std::size_t t = 0; t < model.topic_count(); ++t) {
      out << c + 1 << ',' << t + 1 << ',';
      put_number(out, chain.topic_share[t]);
      out << ',';
      put_number(out, chain.alpha[t]);
      out << ',';
      put_number(out, chain.beta);
      out << '\n';
    }
  }
}

std::vector<TopicSummary> summarize_topics(const Model& model, std::size_t chain, std::size_t words) {
  std::vector<TopicSummary> topics;
  for (std::size_t t = 0; t < model.topic_count(); ++t) {
    TopicSummary summary;
    summary.chain = chain;
    summary.topic = t;
    summary.share = model.chains[chain].topic_share[t];
    summary.alpha = model.chains[chain].alpha[t];
    for (const auto& [w, weight] : model.top_words(chain, t, words))
      summary.words.emplace_back(model.vocabulary[w], weight);
    topics.push_back(std::move(summary));
  }
  return topics;
}

nlohmann::json topics_json(const std::vector<TopicSummary>& topics) {
  nlohmann::json out = nlohmann::json::array();
  for (const auto& topic : topics) {
    nlohmann::json words = nlohmann::json::array();
    for (const auto& [word, weight] : topic.words) words.push_back({{"word", word}, {"weight", weight}});
    out.push_back({{"chain", topic.chain + 1},
                   {"topic", topic.topic + 1},
                   {"share", topic.share},
                   {"alpha", topic.alpha},
                   {"words", std::move(words)}});
  }
  return out;
}

}  // namespace loupe

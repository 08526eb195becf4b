// A model's estimates as tables for R, Python or a spreadsheet (`loupe export`,
// `loupe topics`): CSV (RFC 4180 quoting) and JSON.
//   phi CSV:   word,topic_1,...,topic_K        one row a word
//   theta CSV: document,group,topic_1,...     one row a document
#pragma once

#include <cstdint>
#include <ostream>
#include <string>
#include <string_view>
#include <vector>

#include <nlohmann/json.hpp>

#include "model/model.h"

namespace loupe {

// A CSV field, quoted when it holds a comma, quote, line break or outer space:
// csv_field("a,b") == "\"a,b\"", csv_field("say \"hi\"") == "\"say \"\"hi\"\"\"".
std::string csv_field(std::string_view text);

void write_phi_csv(const Model& model, std::size_t chain, std::ostream& out);
void write_theta_csv(const Model& model, std::size_t chain, std::ostream& out);
// chain,sweep,log_likelihood for every chain.
void write_trace_csv(const Model& model, std::ostream& out);
// chain,topic,share,alpha,beta for every chain.
void write_topic_priors_csv(const Model& model, std::ostream& out);

// One topic with its n most probable words.
struct TopicSummary {
  std::size_t chain = 0;  // 0-based
  std::size_t topic = 0;  // 0-based
  double share = 0;       // share of tokens
  double alpha = 0;
  std::vector<std::pair<std::string, float>> words;
};
std::vector<TopicSummary> summarize_topics(const Model& model, std::size_t chain, std::size_t words);

// {"chain": 1, "topic": 1, "share": ..., "alpha": ..., "words": [{"word": ..., "weight": ...}]}
// (chains and topics numbered from 1, as printed).
nlohmann::json topics_json(const std::vector<TopicSummary>& topics);

}  // namespace loupe

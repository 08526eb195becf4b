// `loupe topics MODEL`: each topic's most probable words and their weights, as
// a table, CSV or JSON, for one chain or all.
#include <cstdio>
#include <iostream>
#include <memory>

#include "apps/commands.h"
#include "common/error.h"
#include "model/model_export.h"
#include "model/model_file.h"

namespace loupe::cli {

namespace {

struct TopicsArguments {
  std::string model;
  std::string format = "table";
  std::string chain = "1";
  std::size_t words = 10;
};

// "all" -> every chain; "2" -> chain index 1. Chains are numbered from 1.
std::vector<std::size_t> chosen_chains(const std::string& text, std::size_t chains, const std::string& model_path) {
  std::vector<std::size_t> result;
  if (text == "all") {
    for (std::size_t c = 0; c < chains; ++c) result.push_back(c);
    return result;
  }
  std::size_t number = 0;
  try {
    std::size_t used = 0;
    number = std::stoul(text, &used);
    if (used != text.size()) number = 0;
  } catch (const std::exception&) {
    number = 0;
  }
  if (number < 1 || number > chains) {
    throw Error("--chain " + text + ": " + model_path + " has " + std::to_string(chains) +
                (chains == 1 ? " chain" : " chains") + "; give a number from 1 to " + std::to_string(chains) +
                " or all.");
  }
  result.push_back(number - 1);
  return result;
}

std::string percent(double share) {
  char text[16];
  std::snprintf(text, sizeof text, "%5.1f%%", 100 * share);
  return text;
}

std::string weight(double value) {
  char text[24];
  std::snprintf(text, sizeof text, "%.4f", value);
  return text;
}

void print_table(const Model& model, const std::vector<std::size_t>& chains, std::size_t words, std::ostream& out) {
  for (const auto c : chains) {
    out << "Chain " << c + 1 << " of " << model.chains.size() << ": " << model.topic_count()
        << " topics (share of tokens, alpha, top words with p(word | topic))\n";
    for (const auto& topic : summarize_topics(model, c, words)) {
      char head[64];
      std::snprintf(head, sizeof head, "%5zu %s %7.4f  ", topic.topic + 1, percent(topic.share).c_str(), topic.alpha);
      out << head;
      for (std::size_t i = 0; i < topic.words.size(); ++i) {
        out << (i ? ", " : "") << topic.words[i].first << ' ' << weight(topic.words[i].second);
      }
      out << '\n';
    }
    if (c != chains.back()) out << '\n';
  }
}

void print_csv(const Model& model, const std::vector<std::size_t>& chains, std::size_t words, std::ostream& out) {
  out << "chain,topic,share,alpha,rank,word,weight\n";
  for (const auto c : chains) {
    for (const auto& topic : summarize_topics(model, c, words)) {
      for (std::size_t i = 0; i < topic.words.size(); ++i) {
        char numbers[96];
        std::snprintf(numbers, sizeof numbers, "%zu,%zu,%.9g,%.9g,%zu,", c + 1, topic.topic + 1, topic.share,
                      topic.alpha, i + 1);
        char w[32];
        std::snprintf(w, sizeof w, "%.9g", static_cast<double>(topic.words[i].second));
        out << numbers << csv_field(topic.words[i].first) << ',' << w << '\n';
      }
    }
  }
}

void run_topics(const TopicsArguments& args) {
  const Model model = read_model(args.model);
  const auto chains = chosen_chains(args.chain, model.chains.size(), args.model);
  if (args.format == "csv") {
    print_csv(model, chains, args.words, std::cout);
  } else if (args.format == "json") {
    std::vector<TopicSummary> topics;
    for (const auto c : chains) {
      for (auto& topic : summarize_topics(model, c, args.words)) topics.push_back(std::move(topic));
    }
    nlohmann::json out{{"model", args.model},
                       {"chains", model.chains.size()},
                       {"topic_count", model.topic_count()},
                       {"topics", topics_json(topics)}};
    std::cout << out.dump(2) << '\n';
  } else {
    print_table(model, chains, args.words, std::cout);
  }
}

}  // namespace

void add_topics_command(CLI::App& app) {
  auto args = std::make_shared<TopicsArguments>();
  auto* cmd = app.add_subcommand("topics",
                                 "List the topics of a model with their top words and weights.\n"
                                 "  Example: loupe topics letters.model --words 15 --format csv");
  cmd->add_option("MODEL", args->model, "The model file (from `loupe fit`)")->required()->check(CLI::ExistingFile);
  cmd->add_option("--format", args->format, "table, csv or json")
      ->check(CLI::IsMember({"table", "csv", "json"}))
      ->capture_default_str();
  cmd->add_option("--words", args->words, "Top words shown per topic")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--chain", args->chain, "Which chain (1 = the first) or all")->capture_default_str();
  cmd->callback([args] { run_topics(*args); });
}

}  // namespace loupe::cli

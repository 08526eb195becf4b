// End-to-end: `loupe graph` and `loupe near-duplicates` on small files made
// here (a corpus, and a model whose topic profiles cluster by group).
#include <filesystem>
#include <fstream>
#include <sstream>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "cli/run_command.h"
#include "common/binary_io.h"
#include "corpus/corpus_file.h"
#include "graph_test_support.h"
#include "model/model_file.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using testing::quote;
using testing::run_loupe;

// A model for `corpus` whose chains hold the given theta (D x K) each.
Model model_for(const Corpus& corpus, const std::vector<ProfileMatrix>& chains) {
  Model model;
  const auto k = static_cast<std::size_t>(chains.front().cols());
  model.options.topic_count = static_cast<std::uint32_t>(k);
  model.options.chains = static_cast<std::uint32_t>(chains.size());
  record_corpus(model, corpus);
  for (std::size_t c = 0; c < chains.size(); ++c) {
    ChainEstimates chain;
    chain.seed = c + 1;
    chain.alpha.assign(k, 0.1);
    chain.beta = 0.01;
    chain.phi.assign(k * corpus.vocabulary_size(), 1.0f / static_cast<float>(corpus.vocabulary_size()));
    for (Eigen::Index d = 0; d < chains[c].rows(); ++d)
      for (Eigen::Index t = 0; t < chains[c].cols(); ++t) chain.theta.push_back(static_cast<float>(chains[c](d, t)));
    chain.topic_share.assign(k, 1.0 / static_cast<double>(k));
    model.chains.push_back(chain);
  }
  return model;
}

struct StudyFiles {
  testing::TempFolder folder{"graph-cli"};
  std::string corpus_path, model_path;
  std::size_t documents = 0;

  explicit StudyFiles(std::size_t n) : documents(n) {
    std::vector<std::vector<WordId>> tokens(n);
    for (std::size_t d = 0; d < n; ++d)
      for (std::size_t i = 0; i < 30; ++i) tokens[d].push_back(static_cast<WordId>((d * 31 + i * 7) % 50));
    const Corpus corpus = test::corpus_from_tokens(tokens, 50);  // groups a, b by d % 2
    corpus_path = folder.file("study.corpus");
    write_corpus(corpus, corpus_path);
    model_path = folder.file("study.model");
    write_model(model_for(corpus, {test::clustered_profiles(n, 2, 3, 1), test::clustered_profiles(n, 2, 3, 2)}),
                model_path);
  }
};

TEST(GraphCliTest, WritesEveryFormatAndTestsEveryChain) {
  StudyFiles study(80);
  const auto& f = study.folder;
  const auto result =
      run_loupe("graph " + quote(study.model_path) + " --corpus " + quote(study.corpus_path) +
                " --neighbours 5 --permutations 99 --seed 17 --graphml " + quote(f.file("g.graphml")) + " --dot " +
                quote(f.file("g.dot")) + " --edges-csv " + quote(f.file("edges.csv")) + " --nodes-csv " +
                quote(f.file("nodes.csv")) + " --summary-graphml " + quote(f.file("summary.graphml")) + " --json " +
                quote(f.file("graph.json")) + " --csv " + quote(f.file("tests.csv")));
  ASSERT_EQ(result.exit_code, 0) << result.output;
  EXPECT_NE(result.output.find("chain 1"), std::string::npos) << result.output;
  // Both chains' profiles cluster by group (p = 0.01 on each, below): the agreement across chains says so.
  EXPECT_NE(result.output.find("share of neighbours in the own group    above chance on both chains (all chains)"),
            std::string::npos)
      << result.output;
  const auto json = nlohmann::json::parse(read_whole_file(f.file("graph.json")));
  EXPECT_EQ(json["seed"], 17);
  EXPECT_EQ(json["documents"], 80);
  ASSERT_EQ(json["chains"].size(), 2u);
  for (const auto& chain : json["chains"]) {
    ASSERT_EQ(chain["group_tests"].size(), 2u);
    for (const auto& test : chain["group_tests"]) {
      EXPECT_DOUBLE_EQ(test["p_value"].get<double>(), 1.0 / 100.0) << test;  // profiles cluster by group
      EXPECT_EQ(test["seed"], 17);
      EXPECT_EQ(test["permutations"], 99);
    }
  }
  // The edge list has one row per edge of the exported chain (0).
  std::ifstream edges(f.file("edges.csv"));
  std::size_t rows = 0;
  for (std::string line; std::getline(edges, line);) ++rows;
  EXPECT_EQ(rows - 1, json["chains"][0]["edges"].get<std::size_t>());
  const std::string graphml = read_whole_file(f.file("g.graphml"));
  EXPECT_NE(graphml.find("<node id=\"n79\">"), std::string::npos);
  EXPECT_NE(read_whole_file(f.file("g.dot")).find("\"doc0\""), std::string::npos);
  EXPECT_NE(read_whole_file(f.file("summary.graphml")).find("attr.name=\"main_group\""), std::string::npos);
  EXPECT_NE(read_whole_file(f.file("tests.csv")).find("same-group neighbour share permutation test"),
            std::string::npos);
}

TEST(GraphCliTest, ThresholdAndMutualVariants) {
  StudyFiles study(40);
  const auto threshold = run_loupe("graph " + quote(study.model_path) + " --max-distance 0.5 --permutations 0 --json " +
                                   quote(study.folder.file("t.json")));
  ASSERT_EQ(threshold.exit_code, 0) << threshold.output;
  const auto t = nlohmann::json::parse(read_whole_file(study.folder.file("t.json")));
  EXPECT_EQ(t["construction"], "Hellinger distance <= 0.5");
  EXPECT_FALSE(t["chains"][0].contains("group_tests"));
  const auto mutual = run_loupe("graph " + quote(study.model_path) + " -k 3 --mutual --permutations 9 -q");
  EXPECT_EQ(mutual.exit_code, 0) << mutual.output;
  EXPECT_TRUE(mutual.output.empty()) << mutual.output;
  const auto both = run_loupe("graph " + quote(study.model_path) + " -k 3 --max-distance 0.5");
  EXPECT_NE(both.exit_code, 0);
  EXPECT_NE(both.output.find("excludes"), std::string::npos) << both.output;
}

TEST(GraphCliTest, BadInputGivesClearMessages) {
  StudyFiles study(12);
  const std::string model = quote(study.model_path);
  auto r = run_loupe("graph " + model + " --neighbours 12");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("must be below the number of documents (12)"), std::string::npos) << r.output;
  for (const char* bad : {"0", "1.5", "-0.2"}) {
    r = run_loupe("graph " + model + " --max-distance " + bad);
    EXPECT_EQ(r.exit_code, 1) << bad;
    EXPECT_NE(r.output.find("(0, 1]"), std::string::npos) << r.output;
  }
  const std::string missing = study.folder.file("no-such-folder/g.graphml");
  r = run_loupe("graph " + model + " --graphml " + quote(missing));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("no-such-folder"), std::string::npos) << r.output;
  EXPECT_NE(r.output.find("does not exist"), std::string::npos) << r.output;
  r = run_loupe("graph " + model + " --strata decade");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("--corpus"), std::string::npos) << r.output;
  r = run_loupe("graph " + model + " --corpus " + quote(study.corpus_path) + " --strata decade");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("no metadata column named 'decade'"), std::string::npos) << r.output;

  // A model with a single document.
  const Corpus one = test::corpus_from_tokens({{1, 2, 3}}, 5);
  const std::string single = study.folder.file("single.model");
  ProfileMatrix theta(1, 2);
  theta << 0.5, 0.5;
  write_model(model_for(one, {theta}), single);
  r = run_loupe("graph " + quote(single));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("at least 2"), std::string::npos) << r.output;
}

TEST(NearDuplicatesCliTest, FindsTheDemoNearCopyWithTopicDistance) {
  testing::TempFolder folder("near-cli");
  const std::string corpus_path = folder.file("demo.corpus");
  auto r = run_loupe("ingest " + quote(std::string(LOUPE_SOURCE_DIR) + "/demo/harbour-letters") + " -o " +
                     quote(corpus_path) + " -q");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  const Corpus corpus = read_corpus(corpus_path);
  const std::string model_path = folder.file("demo.model");
  write_model(model_for(corpus, {test::random_profiles(corpus.num_documents(), 6, 0.5, 3)}), model_path);
  r = run_loupe("near-duplicates " + quote(corpus_path) + " --model " + quote(model_path) + " --json " +
                quote(folder.file("near.json")) + " --csv " + quote(folder.file("near.csv")));
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_NE(r.output.find("dsp-06"), std::string::npos) << r.output;
  EXPECT_NE(r.output.find("topic H"), std::string::npos) << r.output;
  const auto json = nlohmann::json::parse(read_whole_file(folder.file("near.json")));
  ASSERT_EQ(json["pairs"].size(), 1u) << json.dump(2);
  const auto& pair = json["pairs"][0];
  EXPECT_EQ(pair["first"], "disputed/dsp-06");  // demo/truth.json: near_copy
  EXPECT_EQ(pair["second"], "gannetmouth-roads/gr-1901-007");
  EXPECT_GT(pair["jaccard"].get<double>(), 0.5);
  EXPECT_TRUE(pair["topic_distance"].is_number());
  EXPECT_EQ(json["clusters"].size(), 1u);
  const std::string csv = read_whole_file(folder.file("near.csv"));
  EXPECT_NE(csv.find("disputed/dsp-06,gannetmouth-roads/gr-1901-007,,gannetmouth-roads,"), std::string::npos) << csv;
}

TEST(NearDuplicatesCliTest, BadInputGivesClearMessages) {
  testing::TempFolder folder("near-cli-bad");
  const Corpus corpus = test::corpus_from_tokens({{1, 2, 3, 4}, {1, 2, 3, 4}, {4, 3}}, 6);
  const std::string corpus_path = folder.file("c.corpus");
  write_corpus(corpus, corpus_path);
  for (const char* bad : {"0", "1.2", "-1"}) {
    const auto r = run_loupe("near-duplicates " + quote(corpus_path) + " --threshold " + bad);
    EXPECT_EQ(r.exit_code, 1) << bad;
    EXPECT_NE(r.output.find("(0, 1]"), std::string::npos) << r.output;
  }
  auto r = run_loupe("near-duplicates " + quote(corpus_path) + " --json " + quote(folder.file("missing/out.json")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_NE(r.output.find("does not exist"), std::string::npos) << r.output;
  r = run_loupe("near-duplicates " + quote(corpus_path) + " --threshold 1 -q --json " + quote(folder.file("o.json")));
  ASSERT_EQ(r.exit_code, 0) << r.output;
  const auto json = nlohmann::json::parse(read_whole_file(folder.file("o.json")));
  ASSERT_EQ(json["pairs"].size(), 1u);
  EXPECT_EQ(json["pairs"][0]["first"], "doc0");
  EXPECT_EQ(json["pairs"][0]["second"], "doc1");
}

}  // namespace
}  // namespace loupe

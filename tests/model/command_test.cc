// End to end: `loupe fit`, `loupe topics` and `loupe export` on a corpus file,
// their errors, and Ctrl-C during a fit (the last checkpoint stays intact and
// resuming gives the model of an uninterrupted run).
#include <fcntl.h>
#include <signal.h>
#include <sys/wait.h>
#include <unistd.h>

#include <chrono>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <thread>

#include <gmock/gmock.h>
#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "common/binary_io.h"
#include "corpus/corpus_file.h"
#include "model/checkpoint.h"
#include "model/fit.h"
#include "model/model_file.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;

struct CommandRun {
  int exit_code = -1;
  std::string out;
  std::string err;
};

// Starts `loupe ARGS` with stdout and stderr going to files in `folder`.
pid_t start(const std::vector<std::string>& args, const test::TempFolder& folder) {
  const pid_t pid = ::fork();
  if (pid == 0) {
    const int out = ::open(folder.file("stdout").c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    const int err = ::open(folder.file("stderr").c_str(), O_WRONLY | O_CREAT | O_TRUNC, 0644);
    ::dup2(out, 1);
    ::dup2(err, 2);
    std::vector<char*> argv;
    std::string program = LOUPE_CLI;
    argv.push_back(program.data());
    std::vector<std::string> copies = args;
    for (auto& a : copies) argv.push_back(a.data());
    argv.push_back(nullptr);
    ::execv(program.c_str(), argv.data());
    ::_exit(127);
  }
  return pid;
}

CommandRun finish(pid_t pid, const test::TempFolder& folder) {
  int status = 0;
  ::waitpid(pid, &status, 0);
  CommandRun run;
  run.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : 128 + WTERMSIG(status);
  run.out = read_whole_file(folder.file("stdout"));
  run.err = read_whole_file(folder.file("stderr"));
  return run;
}

CommandRun loupe(const std::vector<std::string>& args, const test::TempFolder& folder) {
  return finish(start(args, folder), folder);
}

Corpus cli_corpus(std::uint32_t documents, std::uint32_t length) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 4;
  spec.vocabulary_size = 120;
  spec.num_documents = documents;
  spec.document_length = length;
  spec.alpha = 0.3;
  spec.num_groups = 3;
  spec.seed = 77;
  Corpus corpus = draw_lda_corpus(spec).corpus;
  corpus.vocabulary[0] = "comma, word";  // exercises CSV quoting
  corpus.documents[1].group = kNoGroup;
  return corpus;
}

std::vector<std::string> lines_of(const std::string& text) {
  std::vector<std::string> lines;
  std::istringstream in(text);
  for (std::string line; std::getline(in, line);) lines.push_back(line);
  return lines;
}

TEST(FitCommandTest, FitTopicsAndExport) {
  test::TempFolder folder;
  const Corpus corpus = cli_corpus(60, 30);
  write_corpus(corpus, folder.file("c.corpus"));
  const std::string model_path = folder.file("c.model");
  auto fit = loupe({"fit",
                    folder.file("c.corpus"),
                    "-o",
                    model_path,
                    "--topics",
                    "4",
                    "--sweeps",
                    "60",
                    "--burn-in",
                    "20",
                    "--chains",
                    "2",
                    "--threads",
                    "2",
                    "--seed",
                    "5",
                    "--alpha",
                    "0.3",
                    "--beta",
                    "0.02",
                    "--samples",
                    "4",
                    "--sample-lag",
                    "5",
                    "--tune-priors-every",
                    "10"},
                   folder);
  ASSERT_EQ(fit.exit_code, 0) << fit.err;
  EXPECT_THAT(fit.out, HasSubstr("Fitted 4 topics on 60 documents"));
  EXPECT_THAT(fit.out, HasSubstr("2 chains x 60 sweeps"));
  EXPECT_THAT(fit.out, HasSubstr("bytes a token"));
  EXPECT_THAT(fit.out, HasSubstr("R-hat"));
  EXPECT_EQ(fit.err, "");  // stderr is not a terminal: no progress bar
  const Model model = read_model(model_path);
  EXPECT_EQ(model.options.seed, 5U);
  EXPECT_EQ(model.options.alpha, std::vector<double>{0.3});
  EXPECT_EQ(model.corpus_fingerprint, corpus.fingerprint());

  auto table = loupe({"topics", model_path, "--words", "5"}, folder);
  ASSERT_EQ(table.exit_code, 0) << table.err;
  EXPECT_THAT(table.out, HasSubstr("Chain 1 of 2: 4 topics"));
  const auto top = model.top_words(0, 0, 1);
  EXPECT_THAT(table.out, HasSubstr(model.vocabulary[top[0].first]));

  auto csv = loupe({"topics", model_path, "--format", "csv", "--words", "3", "--chain", "all"}, folder);
  ASSERT_EQ(csv.exit_code, 0) << csv.err;
  const auto csv_lines = lines_of(csv.out);
  ASSERT_EQ(csv_lines.size(), 1U + 2 * 4 * 3);
  EXPECT_EQ(csv_lines[0], "chain,topic,share,alpha,rank,word,weight");

  auto json = loupe({"topics", model_path, "--format", "json", "--words", "2", "--chain", "2"}, folder);
  ASSERT_EQ(json.exit_code, 0) << json.err;
  const auto parsed = nlohmann::json::parse(json.out);
  EXPECT_EQ(parsed["topic_count"], 4);
  ASSERT_EQ(parsed["topics"].size(), 4U);
  EXPECT_EQ(parsed["topics"][0]["chain"], 2);
  EXPECT_EQ(parsed["topics"][0]["words"].size(), 2U);
  const auto second = model.top_words(1, 0, 1);
  EXPECT_EQ(parsed["topics"][0]["words"][0]["word"], model.vocabulary[second[0].first]);

  auto bad_chain = loupe({"topics", model_path, "--chain", "3"}, folder);
  EXPECT_EQ(bad_chain.exit_code, 1);
  EXPECT_THAT(bad_chain.err, HasSubstr("has 2 chains; give a number from 1 to 2 or all"));

  const std::string out = folder.file("estimates");
  auto exported = loupe({"export", model_path, "-o", out, "--chain", "2"}, folder);
  ASSERT_EQ(exported.exit_code, 0) << exported.err;
  EXPECT_FALSE(std::filesystem::exists(out + "/phi-chain-1.csv"));
  const auto phi = lines_of(read_whole_file(out + "/phi-chain-2.csv"));
  ASSERT_EQ(phi.size(), 1U + 120U);
  EXPECT_EQ(phi[0], "word,topic_1,topic_2,topic_3,topic_4");
  EXPECT_THAT(phi[1], ::testing::StartsWith("\"comma, word\","));
  const auto theta = lines_of(read_whole_file(out + "/theta-chain-2.csv"));
  ASSERT_EQ(theta.size(), 1U + 60U);
  EXPECT_EQ(theta[0], "document,group,topic_1,topic_2,topic_3,topic_4");
  EXPECT_THAT(theta[1], ::testing::StartsWith("doc000000,group-1,"));
  EXPECT_THAT(theta[2], ::testing::StartsWith("doc000001,,"));  // no group
  // theta row 1 holds the model's values.
  std::istringstream row(theta[1]);
  std::string field;
  std::getline(row, field, ',');
  std::getline(row, field, ',');
  std::getline(row, field, ',');
  EXPECT_FLOAT_EQ(std::stof(field), model.theta(1, 0)[0]);
  const auto trace = lines_of(read_whole_file(out + "/log-likelihood-trace.csv"));
  EXPECT_EQ(trace[0], "chain,sweep,log_likelihood");
  EXPECT_EQ(trace.size(), 1U + 2 * 6);  // every 10 sweeps, 2 chains
  EXPECT_EQ(lines_of(read_whole_file(out + "/topics.csv")).size(), 1U + 2 * 4);
}

TEST(FitCommandTest, RunsFourChainsByDefaultSoThatConclusionsCanBeCheckedAcrossThem) {
  test::TempFolder folder;
  write_corpus(cli_corpus(40, 20), folder.file("c.corpus"));
  const auto fit = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("c.model"), "--topics", "3", "--sweeps",
                          "20", "--burn-in", "10", "--samples", "2", "--sample-lag", "5"},
                         folder);
  ASSERT_EQ(fit.exit_code, 0) << fit.err;
  EXPECT_THAT(fit.out, HasSubstr("4 chains x 20 sweeps"));
  EXPECT_EQ(read_model(folder.file("c.model")).chains.size(), 4U);
}

TEST(FitCommandTest, BadInputIsAClearError) {
  test::TempFolder folder;
  write_corpus(cli_corpus(10, 5), folder.file("c.corpus"));
  auto one_topic = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("m"), "--topics", "1"}, folder);
  EXPECT_EQ(one_topic.exit_code, 1);
  EXPECT_THAT(one_topic.err, HasSubstr("loupe: error: cannot fit the model: the number of topics (--topics) is 1"));
  auto too_many = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("m"), "--topics", "51"}, folder);
  EXPECT_THAT(too_many.err, HasSubstr("larger than the number of tokens in the corpus (50)"));
  auto no_sweeps = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("m"), "--sweeps", "0"}, folder);
  EXPECT_THAT(no_sweeps.err, HasSubstr("--sweeps) is 0"));
  auto bad_alpha = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("m"), "--alpha", "0.1,x"}, folder);
  EXPECT_THAT(bad_alpha.err, HasSubstr("\"x\" is not a number"));
  auto negative = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("m"), "--beta", "-1"}, folder);
  EXPECT_THAT(negative.err, HasSubstr("must be a positive number"));
  EXPECT_FALSE(std::filesystem::exists(folder.file("m")));

  write_file_atomically(folder.file("broken.model"),
                        std::string("LOUPEMDL\x01\x00\x00\x00\x64\x00\x00\x00\x00\x00\x00\x00garbage", 27));
  auto broken = loupe({"topics", folder.file("broken.model")}, folder);
  EXPECT_EQ(broken.exit_code, 1);
  EXPECT_THAT(broken.err, HasSubstr("truncated or has extra bytes"));
  auto not_model = loupe({"export", folder.file("c.corpus"), "-o", folder.file("x")}, folder);
  EXPECT_EQ(not_model.exit_code, 1);
  EXPECT_THAT(not_model.err, HasSubstr("not a loupe model file"));
}

TEST(FitCommandTest, CtrlCKeepsTheLastCheckpointAndResumingMatchesAnUninterruptedRun) {
  test::TempFolder folder;
  const Corpus corpus = cli_corpus(100, 100);  // 10,000 tokens
  write_corpus(corpus, folder.file("c.corpus"));
  const std::string checkpoint = folder.file("run.checkpoint");
  const std::vector<std::string> settings{"--topics",  "30", "--sweeps", "120", "--burn-in", "60", "--chains",     "2",
                                          "--threads", "2",  "--seed",   "8",   "--samples", "5",  "--sample-lag", "5"};
  std::vector<std::string> args{"fit",      folder.file("c.corpus"), "-o", folder.file("resumed.model"), "--checkpoint",
                                checkpoint, "--checkpoint-every",    "10"};
  args.insert(args.end(), settings.begin(), settings.end());
  const pid_t pid = start(args, folder);
  // Wait for the first checkpoint, then press Ctrl-C.
  const auto deadline = std::chrono::steady_clock::now() + std::chrono::seconds(120);
  while (!std::filesystem::exists(checkpoint) && std::chrono::steady_clock::now() < deadline) {
    std::this_thread::sleep_for(std::chrono::milliseconds(5));
  }
  ASSERT_TRUE(std::filesystem::exists(checkpoint)) << "no checkpoint appeared";
  ::kill(pid, SIGINT);
  const CommandRun interrupted = finish(pid, folder);
  ASSERT_NE(interrupted.exit_code, 0) << "the fit finished before Ctrl-C arrived: make the corpus larger";
  EXPECT_EQ(interrupted.exit_code, 1) << interrupted.err;
  EXPECT_THAT(interrupted.err, HasSubstr("the fit was interrupted after sweep"));
  EXPECT_THAT(interrupted.err, HasSubstr("continue with --resume " + checkpoint));
  const FitCheckpoint stored = read_checkpoint(checkpoint);  // intact
  EXPECT_EQ(stored.sweeps_done % 10, 0U);
  EXPECT_FALSE(std::filesystem::exists(folder.file("resumed.model")));

  // Resume: the settings come from the checkpoint.
  auto resumed = loupe({"fit", folder.file("c.corpus"), "-o", folder.file("resumed.model"), "--resume", checkpoint,
                        "--threads", "2", "--quiet"},
                       folder);
  ASSERT_EQ(resumed.exit_code, 0) << resumed.err;
  EXPECT_FALSE(std::filesystem::exists(checkpoint));  // removed once the model is written

  std::vector<std::string> whole{"fit", folder.file("c.corpus"), "-o", folder.file("whole.model"), "--quiet"};
  whole.insert(whole.end(), settings.begin(), settings.end());
  auto uninterrupted = loupe(whole, folder);
  ASSERT_EQ(uninterrupted.exit_code, 0) << uninterrupted.err;
  EXPECT_EQ(read_whole_file(folder.file("resumed.model")), read_whole_file(folder.file("whole.model")));
}

}  // namespace
}  // namespace loupe

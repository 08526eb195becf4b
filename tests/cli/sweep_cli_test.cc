// End-to-end tests of `loupe sweep`: on the demo corpus a short sweep prints its
// table and a suggested K with the reason, writes the same JSON on a rerun with
// the same seed, and refuses a bad K list or a single chain with a clear message.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <filesystem>
#include <string>

#include <nlohmann/json.hpp>

#include "cli/run_command.h"
#include "common/binary_io.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;
using testing::quote;
using testing::run_loupe;

const std::string kSource = LOUPE_SOURCE_DIR;
const std::string kQuick = " --sweeps 40 --burn-in 20 --samples 2 --sample-lag 5 --seed 5 -q";

std::string demo_corpus(const testing::TempFolder& folder) {
  const auto corpus = folder.file("demo.corpus");
  const auto r = run_loupe("ingest " + quote(kSource + "/demo/harbour-letters") + " -o " + quote(corpus) + " -q");
  EXPECT_EQ(r.exit_code, 0) << r.output;
  return corpus;
}

TEST(SweepCliTest, PrintsEveryKAndASuggestionAndRerunsTheSame) {
  testing::TempFolder folder("sweep-cli");
  const auto corpus = demo_corpus(folder);
  auto r = run_loupe("sweep " + quote(corpus) + " --topics 3,6:9:3" + kQuick + " -o " + quote(folder.file("a.json")));
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_THAT(r.output, HasSubstr("3 values of K, 2 chains x 40 sweeps each (seed 5)"));
  EXPECT_THAT(r.output, HasSubstr("perplexity"));
  EXPECT_THAT(r.output, HasSubstr("<- suggested"));
  EXPECT_THAT(r.output, HasSubstr("Suggested: K = "));
  EXPECT_THAT(r.output, HasSubstr("A guide, not a verdict"));
  const auto first = nlohmann::json::parse(read_whole_file(folder.file("a.json")));
  ASSERT_EQ(first["results"].size(), 3u);
  EXPECT_EQ(first["topic_counts"], nlohmann::json::parse("[3, 6, 9]"));
  EXPECT_EQ(first["seed"], 5);
  for (const auto& row : first["results"]) {
    EXPECT_GT(row["perplexity"].get<double>(), 1.0);
    EXPECT_LE(row["stable_topics"].get<int>(), row["topics"].get<int>());
  }

  // The same seed gives the same JSON, however many K values run at once.
  r = run_loupe("sweep " + quote(corpus) + " --topics 3,6,9 --parallel 1 --format json" + kQuick);
  ASSERT_EQ(r.exit_code, 0) << r.output;
  auto again = nlohmann::json::parse(r.output);
  EXPECT_EQ(again["results"], first["results"]);
  EXPECT_EQ(again["suggested"], first["suggested"]);

  r = run_loupe("sweep " + quote(corpus) + " --topics 3,6 --format csv" + kQuick);
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_EQ(r.output.rfind("topics,perplexity,", 0), 0u) << r.output;
  EXPECT_THAT(r.output, HasSubstr(",5\n"));  // the seed on every row
}

TEST(SweepCliTest, BadListsAndOneChainAreClearErrors) {
  testing::TempFolder folder("sweep-cli-errors");
  const auto corpus = demo_corpus(folder);
  auto r = run_loupe("sweep " + quote(corpus) + " --topics 1,5" + kQuick);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("K = 1 is too few"));
  r = run_loupe("sweep " + quote(corpus) + " --topics 5,many" + kQuick);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("'many' is not a number of topics"));
  r = run_loupe("sweep " + quote(corpus) + " --topics 5,10000000" + kQuick);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("'10000000' is not a number of topics"));
  r = run_loupe("sweep " + quote(corpus) + " --topics 5,10 --chains 1" + kQuick);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--chains 1"));
  EXPECT_THAT(r.output, HasSubstr("needs at least 2"));
  // Nothing written after a refusal.
  r = run_loupe("sweep " + quote(corpus) + " --topics 1 -o " + quote(folder.file("x.json")) + kQuick);
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_FALSE(std::filesystem::exists(folder.file("x.json")));
}

TEST(SweepCliTest, CtrlCStopsTheSweepAndWritesNothing) {
  testing::TempFolder folder("sweep-cli-interrupt");
  const auto corpus = demo_corpus(folder);
  const auto json = folder.file("sweep.json");
  // SIGINT after 1.5 s, well inside a sweep of 8 K values x 3000 sweeps (about a minute here).
  const auto r = testing::run_command("timeout --preserve-status -s INT 1.5 '" + std::string(LOUPE_CLI) + "' sweep " +
                                      quote(corpus) + " --topics 5:40:5 --sweeps 3000 -o " + quote(json));
  EXPECT_EQ(r.exit_code, 1) << r.output;
  EXPECT_THAT(r.output, HasSubstr("the sweep was interrupted; nothing was written"));
  EXPECT_FALSE(std::filesystem::exists(json));
}

}  // namespace
}  // namespace loupe

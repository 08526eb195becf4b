// End-to-end tests of `loupe --help`, `--version`, `ingest` and `demo` on the bundled demo.
#include <filesystem>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "cli/run_command.h"
#include "common/binary_io.h"
#include "common/version.h"
#include "corpus/corpus_file.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using loupe::testing::quote;
using loupe::testing::run_loupe;
using ::testing::HasSubstr;
using ::testing::Not;

const std::string kDemo = std::string(LOUPE_SOURCE_DIR) + "/demo/harbour-letters";

class IngestCliTest : public ::testing::Test {
 protected:
  std::string path(const std::string& name) const { return (dir_ / name).string(); }
  loupe::testing::TempFolder folder_{"cli"};
  const fs::path& dir_ = folder_.path();
};

TEST_F(IngestCliTest, HelpListsCommandsWithExamplesAndVersionPrints) {
  const auto help = run_loupe("--help");
  EXPECT_EQ(help.exit_code, 0);
  EXPECT_THAT(help.output, HasSubstr("ingest"));
  EXPECT_THAT(help.output, HasSubstr("demo"));
  EXPECT_THAT(help.output, HasSubstr("Example: loupe ingest"));
  const auto version = run_loupe("--version");
  EXPECT_EQ(version.exit_code, 0);
  EXPECT_THAT(version.output, HasSubstr(std::string("loupe ") + kVersion));
}

TEST_F(IngestCliTest, IngestsTheDemoFolderAndItsCsvManifestAlike) {
  const auto folder = run_loupe("ingest " + quote(kDemo) + " -o " + quote(path("folder.corpus")) + " --summary-json " +
                                quote(path("summary.json")));
  ASSERT_EQ(folder.exit_code, 0) << folder.output;
  EXPECT_THAT(folder.output, HasSubstr("Group"));
  EXPECT_THAT(folder.output, HasSubstr("vocabulary of"));
  EXPECT_THAT(folder.output, HasSubstr("stop word"));
  const auto manifest = run_loupe("ingest " + quote(kDemo + "/letters.csv") + " -o " + quote(path("manifest.corpus")));
  ASSERT_EQ(manifest.exit_code, 0) << manifest.output;

  const Corpus a = read_corpus(path("folder.corpus"));
  const Corpus b = read_corpus(path("manifest.corpus"));
  EXPECT_EQ(a.groups.size(), 3u);
  EXPECT_GE(a.num_documents(), 300u);
  EXPECT_EQ(a.groups, b.groups);
  EXPECT_EQ(a.num_documents(), b.num_documents());
  EXPECT_EQ(a.num_tokens(), b.num_tokens());
  EXPECT_EQ(a.vocabulary, b.vocabulary);
  std::size_t disputed = 0;
  for (const auto& d : b.documents) disputed += d.role == DocumentRole::disputed ? 1 : 0;
  EXPECT_GE(disputed, 5u);
  // The manifest's extra columns are kept as metadata.
  EXPECT_THAT(b.metadata_columns, ::testing::Contains("decade"));
  EXPECT_TRUE(fs::exists(path("summary.json")));
}

TEST_F(IngestCliTest, ErrorsGoToStderrWithExitCodeOneAndWriteNothing) {
  const auto missing = run_loupe("ingest " + quote(path("no-such-folder")) + " -o " + quote(path("x.corpus")));
  EXPECT_NE(missing.exit_code, 0);
  EXPECT_THAT(missing.output, HasSubstr("no-such-folder"));
  const auto unwritable = run_loupe("ingest " + quote(kDemo) + " -o " + quote(path("missing-dir/x.corpus")));
  EXPECT_EQ(unwritable.exit_code, 1);
  EXPECT_THAT(unwritable.output, HasSubstr("loupe: error: cannot write"));
  EXPECT_FALSE(fs::exists(path("missing-dir")));
  const auto bad_option =
      run_loupe("ingest " + quote(kDemo) + " -o " + quote(path("y.corpus")) + " --max-document-share 2");
  EXPECT_EQ(bad_option.exit_code, 1);
  EXPECT_THAT(bad_option.output, HasSubstr("--max-document-share must be in (0, 1]"));
  EXPECT_FALSE(fs::exists(path("y.corpus")));
}

TEST_F(IngestCliTest, QuietPrintsNothingOnSuccess) {
  const auto quiet = run_loupe("ingest " + quote(kDemo) + " -o " + quote(path("q.corpus")) + " --quiet");
  EXPECT_EQ(quiet.exit_code, 0);
  EXPECT_THAT(quiet.output, Not(HasSubstr("Group")));
}

TEST_F(IngestCliTest, DemoRunsOnTheBundledScenario) {
  const auto demo = run_loupe("demo --output-dir " + quote(path("study")));
  ASSERT_EQ(demo.exit_code, 0) << demo.output;
  EXPECT_THAT(demo.output, HasSubstr("proper name"));
  EXPECT_TRUE(fs::exists(path("study/corpus.loupe")));
  EXPECT_TRUE(fs::exists(path("study/ingest-summary.json")));
  // The demo's report shows the sweep over K that guides the choice of its 20 topics.
  const std::string report = read_whole_file(path("study/report.html"));
  EXPECT_THAT(report, HasSubstr("data-figure=\"topic-count-sweep\""));
  EXPECT_THAT(report, HasSubstr("Suggested: K = "));
}

}  // namespace
}  // namespace loupe

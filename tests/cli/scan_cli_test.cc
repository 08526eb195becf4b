// End-to-end tests of `loupe scan`: the demo's stitched letter dsp-02 (demo/truth.json:
// Cinderholt Quay, then Gannetmouth Roads from raw word 612 of 1208) is found composite
// near its seam on both chains, with the right office on each side; and the errors
// for texts that cannot be scanned say how to ingest with segments.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <set>
#include <string>

#include <nlohmann/json.hpp>

#include "cli/run_command.h"
#include "common/binary_io.h"
#include "corpus/corpus_file.h"
#include "corpus/text_tokenizer.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;
using testing::quote;
using testing::run_loupe;

const std::string kSource = LOUPE_SOURCE_DIR;
constexpr std::size_t kSegmentWords = 50;

class ScanCliTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    folder_ = new testing::TempFolder("scan-cli");
    corpus_ = folder_->file("demo.corpus");
    model_ = folder_->file("demo.model");
    // The options `loupe demo` uses: proper names dropped, disputed letters in segments.
    auto r = run_loupe("ingest " + quote(kSource + "/demo/harbour-letters") + " -o " + quote(corpus_) +
                       " --drop-proper-names --segment-words " + std::to_string(kSegmentWords) +
                       " --segment-disputed-only -q");
    ASSERT_EQ(r.exit_code, 0) << r.output;
    r = run_loupe("fit " + quote(corpus_) + " -o " + quote(model_) +
                  " --topics 16 --chains 2 --sweeps 200 --burn-in 100 --seed 3 -q");
    ASSERT_EQ(r.exit_code, 0) << r.output;
  }
  static void TearDownTestSuite() {
    delete folder_;
    folder_ = nullptr;
  }
  static testing::TempFolder* folder_;
  static std::string corpus_, model_;
};

testing::TempFolder* ScanCliTest::folder_ = nullptr;
std::string ScanCliTest::corpus_;
std::string ScanCliTest::model_;

// The seam in modelled tokens: every ingest filter decides per word type, so a word
// of the letter is a token exactly when its folded form is in the vocabulary; count
// those before the seam's byte offset (demo/truth.json: composite.seam_byte_offset).
std::size_t tokens_before(const std::string& text, std::size_t byte_offset, const std::set<std::string>& vocabulary) {
  TextTokenizer tokenizer(TokenizerOptions{});
  std::vector<WordToken> words;
  tokenizer.tokenize(std::string_view(text).substr(0, byte_offset), words);
  std::size_t count = 0;
  for (const auto& w : words) count += vocabulary.count(w.text);
  return count;
}

TEST_F(ScanCliTest, FindsTheSeamOfTheStitchedDemoLetter) {
  const std::string json_path = folder_->file("scan.json"), csv_path = folder_->file("scan.csv");
  const auto r = run_loupe("scan " + quote(model_) + " --corpus " + quote(corpus_) + " --seed 11 --json " +
                           quote(json_path) + " --csv " + quote(csv_path));
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_THAT(r.output, HasSubstr("disputed/dsp-02"));
  EXPECT_THAT(r.output, HasSubstr("---- change point (2 of 2 chains) ----"));
  EXPECT_THAT(r.output, HasSubstr("2 of 2 chains find a change point"));
  EXPECT_THAT(r.output, HasSubstr("Across chains: composite (a change of topics) on both chains (all chains)."));
  EXPECT_THAT(r.output, HasSubstr("Set aside"));  // the short letters have too few segments
  EXPECT_THAT(r.output, HasSubstr("statistical evidence, not proof"));

  const auto truth = nlohmann::json::parse(read_whole_file(kSource + "/demo/truth.json"))["composite"];
  const Corpus corpus = read_corpus(corpus_);
  const std::set<std::string> vocabulary(corpus.vocabulary.begin(), corpus.vocabulary.end());
  const std::string letter = read_whole_file(kSource + "/demo/harbour-letters/disputed/dsp-02.txt");
  const std::size_t seam = tokens_before(letter, truth["seam_byte_offset"].get<std::size_t>(), vocabulary);
  const std::size_t total = tokens_before(letter, letter.size(), vocabulary);

  const auto scan = nlohmann::json::parse(read_whole_file(json_path));
  EXPECT_EQ(scan["seed"], 11);
  EXPECT_EQ(scan["exponent_alpha"], 1.0);
  ASSERT_EQ(scan["cautions"].size(), 3u);
  ASSERT_EQ(scan["texts"].size(), 1u);
  const auto& text = scan["texts"][0];
  EXPECT_EQ(text["id"], "disputed/dsp-02");
  // The mapping is whole: the segments hold exactly the letter's counted tokens.
  std::size_t segment_tokens = 0;
  for (const auto& s : text["segments"]) segment_tokens += s["tokens"].get<std::size_t>();
  EXPECT_EQ(segment_tokens, total);
  ASSERT_EQ(text["chains"].size(), 2u);
  for (const auto& chain : text["chains"]) {
    ASSERT_EQ(chain["change_points"].size(), 1u) << chain.dump(2);
    const auto& cp = chain["change_points"][0];
    EXPECT_LE(cp["p_value"].get<double>(), 0.05);
    // Within one segment of the seam.
    const auto after = cp["first_token_after"].get<std::size_t>();
    EXPECT_LE(after, seam + kSegmentWords) << "seam at token " << seam;
    EXPECT_GE(after + kSegmentWords, seam) << "seam at token " << seam;
    ASSERT_EQ(chain["stretches"].size(), 2u);
    EXPECT_EQ(chain["stretches"][0]["nearest_group"], truth["first_office"]);
    EXPECT_EQ(chain["stretches"][1]["nearest_group"], truth["second_office"]);
  }
  const std::string csv = read_whole_file(csv_path);
  EXPECT_EQ(csv.rfind("# Topic evidence", 0), 0u);
  EXPECT_THAT(csv, HasSubstr("disputed/dsp-02,1,1,disputed/dsp-02#001,0,"));

  // The same seed gives the same file.
  const std::string again = folder_->file("again.json");
  ASSERT_EQ(run_loupe("scan " + quote(model_) + " --corpus " + quote(corpus_) + " --seed 11 -q --json " + quote(again))
                .exit_code,
            0);
  EXPECT_EQ(read_whole_file(again), read_whole_file(json_path));
}

TEST_F(ScanCliTest, TextsThatCannotBeScannedGiveClearErrors) {
  const std::string base = "scan " + quote(model_) + " --corpus " + quote(corpus_) + " ";
  auto r = run_loupe(base + "no-such-letter");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("no document no-such-letter"));
  EXPECT_THAT(r.output, HasSubstr("disputed/dsp-02"));  // the segmented texts are listed
  r = run_loupe(base + "gannetmouth-roads/gr-1901-007");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("gannetmouth-roads/gr-1901-007 is not segmented"));
  EXPECT_THAT(r.output, HasSubstr("loupe ingest SOURCE -o CORPUS --segment-words 100"));
  r = run_loupe(base + "disputed/dsp-07");  // a short letter: one segment
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("disputed/dsp-07 has 1 segment"));
  r = run_loupe(base + "--level 0");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--level must be in (0, 1)"));
  // The model must match the corpus.
  const std::string other = folder_->file("plain.corpus");
  ASSERT_EQ(run_loupe("ingest " + quote(kSource + "/demo/harbour-letters") + " -o " + quote(other) + " -q").exit_code,
            0);
  r = run_loupe("scan " + quote(model_) + " --corpus " + quote(other));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("loupe: error:"));
}

TEST(ScanCliNoSegments, ACorpusWithoutSegmentsSaysHowToIngestThem) {
  testing::TempFolder folder("scan-cli-plain");
  const std::string corpus = folder.file("plain.corpus"), model = folder.file("plain.model");
  ASSERT_EQ(run_loupe("ingest " + quote(kSource + "/demo/harbour-letters") + " -o " + quote(corpus) + " -q").exit_code,
            0);
  ASSERT_EQ(run_loupe("fit " + quote(corpus) + " -o " + quote(model) +
                      " --topics 4 --chains 1 --sweeps 20 --burn-in 10 --samples 1 -q")
                .exit_code,
            0);
  const auto r = run_loupe("scan " + quote(model) + " --corpus " + quote(corpus));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("no segmented texts"));
  EXPECT_THAT(r.output, HasSubstr("--segment-words 100"));
  EXPECT_THAT(r.output, HasSubstr("--segment-disputed-only"));
}

}  // namespace
}  // namespace loupe

// End-to-end tests of `loupe stability`: on the demo (three harbour offices, each
// with a theme of its own in the generator's word lists, scripts/demo_vocabulary.py)
// every chain finds each office's theme again, so those topics are stable; the
// JSON record is complete; a one-chain model is refused with the way out.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <string>

#include <nlohmann/json.hpp>

#include "cli/run_command.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;
using testing::quote;
using testing::run_loupe;

const std::string kSource = LOUPE_SOURCE_DIR;

// Ingests the demo into FOLDER/demo.corpus and fits it with FIT_OPTIONS into FOLDER/demo.model.
std::string fitted_demo(const testing::TempFolder& folder, const std::string& fit_options) {
  const auto corpus = folder.file("demo.corpus");
  const auto model = folder.file("demo.model");
  auto r = run_loupe("ingest " + quote(kSource + "/demo/harbour-letters") + " -o " + quote(corpus) + " -q");
  EXPECT_EQ(r.exit_code, 0) << r.output;
  r = run_loupe("fit " + quote(corpus) + " -o " + quote(model) + " " + fit_options + " -q");
  EXPECT_EQ(r.exit_code, 0) << r.output;
  return model;
}

TEST(StabilityCliTest, OfficeThemesAreStableAcrossChains) {
  testing::TempFolder folder("stability-cli");
  const auto model = fitted_demo(folder, "--topics 12 --chains 3 --threads 2 --sweeps 1000 --seed 7");
  auto r = run_loupe("stability " + quote(model) + " --format json");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  const auto out = nlohmann::json::parse(r.output);
  EXPECT_EQ(out["chains"], 3);
  EXPECT_EQ(out["seed"], 7);
  ASSERT_EQ(out["topics"].size(), 12u);
  std::size_t office_topics = 0;
  for (const auto& topic : out["topics"]) {
    const double stability = topic["stability"];
    EXPECT_GE(stability, 0.0);
    EXPECT_LE(stability, 1.0);
    EXPECT_LE(topic["worst_similarity"].get<double>(), stability + 1e-12);
    EXPECT_EQ(topic["matched"][0]["topic"], topic["topic"]);  // chain 1 is the reference
    const std::string words = topic["top_words"];
    // The offices' own themes (demo/README.md): fishing (herring), coal and timber, a lifeboat and customs.
    if (words.find("herring") != std::string::npos || words.find("colliers") != std::string::npos ||
        words.find("lifeboat") != std::string::npos) {
      ++office_topics;
      EXPECT_GE(stability, 0.7) << words;
    }
  }
  EXPECT_GE(office_topics, 3u);

  r = run_loupe("stability " + quote(model));
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_THAT(r.output, HasSubstr("Hungarian algorithm"));
  EXPECT_THAT(r.output, HasSubstr("R-hat"));
}

TEST(StabilityCliTest, OneChainIsRefusedWithTheWayOut) {
  testing::TempFolder folder("stability-cli-one");
  const auto model = fitted_demo(folder, "--topics 5 --chains 1 --sweeps 20 --burn-in 5 --samples 2 --sample-lag 5");
  const auto r = run_loupe("stability " + quote(model));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("at least two chains"));
  EXPECT_THAT(r.output, HasSubstr("--chains 2"));
}

}  // namespace
}  // namespace loupe

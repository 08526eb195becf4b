// Stop words: sets of folded words that ingestion leaves out. The built-in
// English list, or one read from a plain text file (one word per line,
// '#' comments), every word in the same NFKC_Casefold form as the tokens.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <unordered_set>
#include <vector>

namespace loupe {

// The built-in English stop words (the Glasgow Information Retrieval Group
// list as shipped in scikit-learn; see text_stopwords_english.cc): folded,
// sorted, unique. Example entries: "a", "about", ..., "yourselves".
const std::vector<std::string>& builtin_english_stopwords();

// A set of folded words.
class StopWords {
 public:
  static StopWords builtin_english();
  static StopWords none();
  // One word per line; '#' starts a comment; blank lines are ignored; a
  // leading BOM and CRLF line ends are fine; each word is folded. Example line:
  // "Straße   # German" -> "strasse". Throws loupe::Error naming the file and
  // the line for a file that cannot be read, ill-formed UTF-8 or a line with
  // two words.
  static StopWords from_file(const std::string& path);

  bool contains(std::string_view folded_word) const;
  std::size_t size() const;

 private:
  // Lets contains() look a string_view up without building a std::string.
  struct Hash {
    using is_transparent = void;
    std::size_t operator()(std::string_view word) const noexcept { return std::hash<std::string_view>{}(word); }
  };
  std::unordered_set<std::string, Hash, std::equal_to<>> words_;
};

}  // namespace loupe

// Words of a text: Unicode word segmentation (UAX #29, through ICU), then
// NFKC_Casefold, then a length filter. Each word carries two flags from the
// original text (capitalised, sentence-initial) for later filters.
#pragma once

#include <cstddef>
#include <memory>
#include <string>
#include <string_view>
#include <vector>

namespace loupe {

struct TokenizerOptions {
  bool keep_numbers = false;   // keep tokens made of digits (e.g. "1887") that have no letter
  std::size_t min_length = 2;  // in code points, after folding ("é" is 1, "ß" folds to "ss", 2)
};

struct WordToken {
  std::string text;       // NFKC_Casefold form of the word
  bool capitalised;       // first letter of the ORIGINAL word is uppercase/titlecase
  bool sentence_initial;  // first word of the text or of a paragraph, or follows . ! ? (see below)
};

// Splits text into folded words. One tokenizer holds its ICU objects and
// reuses them across calls; it is not thread-safe (use one per thread).
//
// Example: "The harbour's bell rang. Well-known 1887!" ->
//   the (capitalised, sentence_initial), harbour's, bell, rang,
//   well (capitalised, sentence_initial), known        [1887 only with keep_numbers]
//
// sentence_initial is true for the first word of the text, the first word
// after a blank line (two line ends with only white space between; CRLF is
// one line end) or U+2029, and a word after a sentence terminal (. ! ? and
// the other Unicode Sentence_Terminal characters such as U+3002) when only
// white space, quotation marks and brackets stand between. Abbreviations
// ("Mr. Smith") are not recognised: "smith" is marked sentence-initial.
//
// Segmentation is ICU 72's root word rules, i.e. UAX #29 as tailored by CLDR:
// a colon separates letters ("Re:Harbour" -> "re", "harbour"; UAX #29 alone
// keeps "Re:Harbour" whole) and '@' counts as a letter ("ann@example.org" is
// one word). Han and kana runs are split with ICU's dictionary.
class TextTokenizer {
 public:
  explicit TextTokenizer(TokenizerOptions options);
  ~TextTokenizer();
  TextTokenizer(TextTokenizer&&) noexcept;
  TextTokenizer& operator=(TextTokenizer&&) noexcept;
  TextTokenizer(const TextTokenizer&) = delete;
  TextTokenizer& operator=(const TextTokenizer&) = delete;

  // Appends the words of VALID UTF-8 text (a BOM and CRLF line ends are fine)
  // to OUT. A word is a UAX #29 word segment whose rule status is
  // letter/ideo/kana (or number when keep_numbers): segments of only spaces
  // or punctuation are dropped; each word is then folded, then length-filtered.
  // Ill-formed bytes are read as U+FFFD by ICU (check with find_invalid_utf8 first).
  void tokenize(std::string_view utf8, std::vector<WordToken>& out);

  // ICU break iterators index with 32-bit integers, so longer texts are
  // segmented in pieces cut after an ASCII space or line end (1 GiB by
  // default). Tests lower it to check that the cut changes nothing.
  void set_max_piece_bytes(std::size_t bytes);

 private:
  struct Impl;
  std::unique_ptr<Impl> impl_;
};

// NFKC_Casefold (ICU Normalizer2 "nfkc_cf"), UTF-8 in and out; ASCII input is
// just lower-cased. Examples: "Straße" -> "strasse", "\uFB01" (fi ligature) -> "fi",
// "\u216B" (Roman numeral twelve) -> "xii", "ＡＢ" (fullwidth) -> "ab".
std::string fold_case(std::string_view utf8);

// The raw UAX #29 word segmentation of UTF8: boundary byte offsets including
// 0 and utf8.size(). Example: "Hi, you" -> {0, 2, 3, 4, 7}. For the
// conformance test; TextTokenizer::tokenize is the fast path.
std::vector<std::size_t> word_boundaries(std::string_view utf8);

}  // namespace loupe

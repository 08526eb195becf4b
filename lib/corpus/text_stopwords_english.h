// The data of the built-in English stop word list, generated into
// text_stopwords_english.cc by scripts/extract_stopwords.py. Use
// builtin_english_stopwords() (text_stopwords.h) rather than this array.
#pragma once

#include <cstddef>
#include <string_view>

namespace loupe::detail {

// Sorted, unique, lower-case ASCII (so already NFKC_Casefold).
extern const std::string_view kEnglishStopWords[];
extern const std::size_t kEnglishStopWordCount;

}  // namespace loupe::detail

#include "corpus/text_stopwords.h"

#include <algorithm>
#include <fstream>
#include <sstream>

#include "common/error.h"
#include "common/utf8.h"
#include "corpus/text_stopwords_english.h"
#include "corpus/text_tokenizer.h"

namespace loupe {
namespace {

bool is_space(char c) { return c == ' ' || c == '\t' || c == '\r' || c == '\v' || c == '\f'; }

std::string_view trim(std::string_view text) {
  while (!text.empty() && is_space(text.front())) text.remove_prefix(1);
  while (!text.empty() && is_space(text.back())) text.remove_suffix(1);
  return text;
}

}  // namespace

const std::vector<std::string>& builtin_english_stopwords() {
  static const std::vector<std::string> words = [] {
    std::vector<std::string> list;
    list.reserve(detail::kEnglishStopWordCount);
    for (std::size_t i = 0; i < detail::kEnglishStopWordCount; ++i)
      list.push_back(fold_case(detail::kEnglishStopWords[i]));
    std::sort(list.begin(), list.end());
    list.erase(std::unique(list.begin(), list.end()), list.end());
    return list;
  }();
  return words;
}

StopWords StopWords::builtin_english() {
  StopWords set;
  const auto& words = builtin_english_stopwords();
  set.words_.insert(words.begin(), words.end());
  return set;
}

StopWords StopWords::none() { return StopWords{}; }

StopWords StopWords::from_file(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw Error(path + ": cannot open the stop word file; check the path and that it is readable");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw Error(path + ": could not read the stop word file");
  const std::string contents = std::move(buffer).str();

  StopWords set;
  std::string_view rest = strip_utf8_bom(contents);
  for (std::size_t line_number = 1; !rest.empty(); ++line_number) {
    const std::size_t newline = rest.find('\n');
    std::string_view line = rest.substr(0, newline);
    rest.remove_prefix(newline == std::string_view::npos ? rest.size() : newline + 1);

    if (const auto problem = find_invalid_utf8(line)) {
      throw Error(path + ":" + std::to_string(line_number) + ": invalid UTF-8 at byte " +
                  std::to_string(problem->byte_offset + 1) + " of the line (" + problem->description +
                  "); save the stop word file as UTF-8");
    }
    line = trim(line.substr(0, line.find('#')));
    if (line.empty()) continue;
    if (std::any_of(line.begin(), line.end(), is_space)) {
      throw Error(path + ":" + std::to_string(line_number) + ": \"" + std::string(line) +
                  "\" holds more than one word; put one word per line (text after '#' is a comment)");
    }
    set.words_.insert(fold_case(line));
  }
  return set;
}

bool StopWords::contains(std::string_view folded_word) const { return words_.find(folded_word) != words_.end(); }

std::size_t StopWords::size() const { return words_.size(); }

}  // namespace loupe

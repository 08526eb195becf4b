// Throughput of the text pipeline on English-like prose generated from a word
// list: UTF-8 validation, tokenizing (segmentation + folding + flags), and
// tokenizing with a few non-ASCII words mixed in. Target: tokenize >= 30 MB/s.
#include <benchmark/benchmark.h>

#include <cmath>
#include <cstdint>
#include <random>
#include <string>
#include <vector>

#include "common/utf8.h"
#include "corpus/text_tokenizer.h"

namespace {

// English-like prose from a word list: half the words are function words
// drawn Zipf-like (in real English the hundred commonest words make up about
// half of the running text: common practice), the other half content words
// drawn uniformly, which gives about 4.5 letters a word on average.
const std::vector<std::string> kFunctionWords = {
    "the",   "of",   "and",   "to",   "a",    "in",   "that",  "it",   "was",   "he",   "for",   "on",
    "is",    "with", "as",    "his",  "had",  "at",   "by",    "not",  "be",    "from", "but",   "which",
    "this",  "or",   "have",  "they", "she",  "her",  "were",  "all",  "there", "one",  "their", "been",
    "we",    "so",   "would", "no",   "when", "who",  "will",  "more", "if",    "out",  "some",  "into",
    "could", "said", "than",  "what", "them", "only", "other", "upon", "these", "may",  "any",   "very",
};
const std::vector<std::string> kContentWords = {
    "harbour",    "ship",           "captain",    "morning",    "letter",    "council",      "merchant",   "river",
    "church",     "parish",         "evening",    "government", "question",  "committee",    "evidence",   "collection",
    "archive",    "document",       "nothing",    "remembered", "something", "particular",   "themselves", "understood",
    "navigation", "correspondence", "magistrate", "lighthouse", "warehouse", "shipwright's", "well-known", "o'clock",
    "twelve",     "quiet",          "time",       "man",        "people",    "years",        "day",        "house",
    "water",      "town",           "street",     "money",      "cargo",     "voyage",       "storm",      "sailor",
    "widow",      "brother",        "daughter",   "account",    "ledger",    "clerk",        "record",     "report",
    "survey",     "coast",          "island",     "market",     "price",     "wages",        "rent",       "trade",
    "custom",     "duty",           "court",      "judge",      "witness",   "statement",    "found",      "went",
    "came",       "made",           "took",       "gave",       "told",      "thought",      "heard",      "wrote",
    "answered",   "returned",       "arrived",    "departed",   "carried",   "several",      "little",     "great",
    "old",        "young",          "long",       "small",      "large",     "first",        "last",       "next",
    "early",      "late",           "northern",   "southern",   "eastern",   "western",      "English",    "London",
    "Bristol",    "Thomas",         "Mary",       "William",    "Elizabeth", "Sunday",       "January",    "afterwards",
    "however",    "perhaps",        "together",   "between",    "against",   "without",      "under",      "before",
    "1887",
};

// About SIZE bytes of prose: sentences of 6-24 words, the first capitalised,
// commas now and then, ". ", "? " or "! " at the end, quotes in some
// sentences, and a blank line every 6 sentences. With MIXED, about one word
// in 25 is a non-ASCII one (French, German, Greek).
std::string make_prose(std::size_t size, bool mixed) {
  const std::vector<std::string> non_ascii = {"caf\xC3\xA9",
                                              "Stra\xC3\x9F"
                                              "e",
                                              "na\xC3\xAFve",
                                              "\xCE\xBB\xCF\x8C\xCE\xB3\xCE\xBF\xCF\x82",
                                              "\xC3\xA9l\xC3\xA8ve",
                                              "M\xC3\xBCller"};
  std::mt19937 random(42);
  std::uniform_real_distribution<double> uniform(0.0, 1.0);
  const auto n = static_cast<double>(kFunctionWords.size());
  std::string text;
  text.reserve(size + 256);
  int sentence = 0;
  while (text.size() < size) {
    const int length = 6 + static_cast<int>(random() % 19);
    const bool quoted = random() % 5 == 0;
    if (quoted) text += '"';
    for (int w = 0; w < length; ++w) {
      std::string word;
      if (mixed && random() % 25 == 0) {
        word = non_ascii[random() % non_ascii.size()];
      } else if (random() % 2 == 0) {
        // Zipf-like: index = n^u - 1 for u uniform on [0, 1).
        word = kFunctionWords[static_cast<std::size_t>(std::pow(n, uniform(random))) - 1];
      } else {
        word = kContentWords[random() % kContentWords.size()];
      }
      if (w == 0 && word[0] >= 'a' && word[0] <= 'z') word[0] = static_cast<char>(word[0] - 'a' + 'A');
      text += word;
      if (w + 1 < length) text += random() % 8 == 0 ? ", " : " ";
    }
    const auto end = random() % 10;
    text += end == 0 ? "?" : end == 1 ? "!" : ".";
    if (quoted) text += '"';
    text += ++sentence % 6 == 0 ? "\n\n" : " ";
  }
  return text;
}

constexpr std::size_t kTextBytes = std::size_t{4} << 20;  // 4 MiB

void BM_FindInvalidUtf8(benchmark::State& state) {
  const std::string text = make_prose(kTextBytes, state.range(0) != 0);
  for (auto _ : state) {
    auto problem = loupe::find_invalid_utf8(text);
    benchmark::DoNotOptimize(problem);
  }
  state.SetBytesProcessed(static_cast<std::int64_t>(state.iterations()) * static_cast<std::int64_t>(text.size()));
}
BENCHMARK(BM_FindInvalidUtf8)->Arg(0)->Arg(1)->Unit(benchmark::kMillisecond);

void BM_Tokenize(benchmark::State& state) {
  const std::string text = make_prose(kTextBytes, state.range(0) != 0);
  loupe::TextTokenizer tokenizer({});
  std::vector<loupe::WordToken> tokens;
  std::size_t words = 0;
  for (auto _ : state) {
    tokens.clear();
    tokenizer.tokenize(text, tokens);
    words = tokens.size();
    benchmark::DoNotOptimize(tokens.data());
  }
  state.SetBytesProcessed(static_cast<std::int64_t>(state.iterations()) * static_cast<std::int64_t>(text.size()));
  state.counters["words"] = static_cast<double>(words);
}
// Arg 0: plain English prose (the 30 MB/s target); Arg 1: with non-ASCII words.
BENCHMARK(BM_Tokenize)->Arg(0)->Arg(1)->Unit(benchmark::kMillisecond);

// Segmentation alone, for comparison: ICU's word boundaries without folding or flags.
void BM_WordBoundaries(benchmark::State& state) {
  const std::string text = make_prose(kTextBytes, false);
  for (auto _ : state) {
    auto boundaries = loupe::word_boundaries(text);
    benchmark::DoNotOptimize(boundaries.data());
  }
  state.SetBytesProcessed(static_cast<std::int64_t>(state.iterations()) * static_cast<std::int64_t>(text.size()));
}
BENCHMARK(BM_WordBoundaries)->Unit(benchmark::kMillisecond);

}  // namespace

BENCHMARK_MAIN();

// TextTokenizer: which UAX #29 segments become words, how they are folded
// and filtered, and the capitalised / sentence_initial flags.
#include <gtest/gtest.h>
#include <unicode/brkiter.h>
#include <unicode/locid.h>
#include <unicode/utext.h>

#include <memory>

#include <string>
#include <vector>

#include "corpus/text_tokenizer.h"

namespace loupe {
namespace {

std::vector<WordToken> tokenize(std::string_view text, TokenizerOptions options = {}) {
  TextTokenizer tokenizer(options);
  std::vector<WordToken> out;
  tokenizer.tokenize(text, out);
  return out;
}

std::vector<std::string> words_of(std::string_view text, TokenizerOptions options = {}) {
  std::vector<std::string> words;
  for (const WordToken& token : tokenize(text, options)) words.push_back(token.text);
  return words;
}

using Words = std::vector<std::string>;

TEST(TextTokenizer, KeepsLettersAndDropsPunctuationAndSpaces) {
  EXPECT_EQ(words_of("Hello, world!  How are you?"), (Words{"hello", "world", "how", "are", "you"}));
  EXPECT_EQ(words_of(" ... -- !? "), Words{});
  EXPECT_EQ(words_of(""), Words{});
}

TEST(TextTokenizer, DropsNumbersUnlessAsked) {
  const std::string text = "In 1887 there were 3.5 ships and 1,200 men on pier 4b";
  // UAX #29 WB11/WB12 keep "3.5" and "1,200" whole; WB10 joins "4b" into a letter word.
  EXPECT_EQ(words_of(text), (Words{"in", "there", "were", "ships", "and", "men", "on", "pier", "4b"}));
  TokenizerOptions keep;
  keep.keep_numbers = true;
  EXPECT_EQ(words_of(text, keep),
            (Words{"in", "1887", "there", "were", "3.5", "ships", "and", "1,200", "men", "on", "pier", "4b"}));
}

TEST(TextTokenizer, MinLengthCountsCodePointsAfterFolding) {
  // "é" (U+00E9) is one code point (two bytes): dropped at min_length 2.
  EXPECT_EQ(words_of("\xC3\xA9 a \xC3\xA9t\xC3\xA9"), (Words{"\xC3\xA9t\xC3\xA9"}));
  // "ß" folds to "ss", two code points: kept.
  EXPECT_EQ(words_of("\xC3\x9F"), (Words{"ss"}));
  TokenizerOptions one;
  one.min_length = 1;
  EXPECT_EQ(words_of("\xC3\xA9 a I", one), (Words{"\xC3\xA9", "a", "i"}));
  TokenizerOptions four;
  four.min_length = 4;
  // "étés" has 4 code points in 6 bytes; "bell" 4; "the" 3.
  EXPECT_EQ(words_of("the \xC3\xA9t\xC3\xA9s bell", four), (Words{"\xC3\xA9t\xC3\xA9s", "bell"}));
}

TEST(TextTokenizer, FoldsEachWordWithNfkcCasefold) {
  // U+FB01 ligature fi, fullwidth ＨＡＲＢＯＵＲ, Greek capital sigma (UCD CaseFolding.txt /
  // DerivedNormalizationProps.txt).
  EXPECT_EQ(
      words_of("\xEF\xAC\x81nance \xEF\xBC\xA8\xEF\xBC\xA1\xEF\xBC\xB2\xEF\xBC\xA2\xEF\xBC\xAF\xEF\xBC\xB5\xEF\xBC\xB2 "
               "\xCE\xA3\xCE\x9F\xCE\xA6\xCE\x99\xCE\x91"),
      (Words{"finance", "harbour", "\xCF\x83\xCE\xBF\xCF\x86\xCE\xB9\xCE\xB1"}));
  // The soft hyphen (default ignorable) stays inside the segment (WB4) and folding removes it.
  EXPECT_EQ(words_of("har\xC2\xAD"
                     "bour"),
            (Words{"harbour"}));
}

TEST(TextTokenizer, KeepsApostrophesInsideWordsAndSplitsHyphens) {
  // UAX #29 WB6/WB7: U+0027 and U+2019 are MidNumLet, so letters on both sides stay one word.
  EXPECT_EQ(words_of("The harbour's bell, the harbour\xE2\x80\x99s bell"),
            (Words{"the", "harbour's", "bell", "the", "harbour\xE2\x80\x99s", "bell"}));
  // A hyphen is not in any Word_Break class that joins letters (WB999).
  EXPECT_EQ(words_of("well-known sea-faring"), (Words{"well", "known", "sea", "faring"}));
  // A trailing apostrophe is not between letters: it is dropped.
  EXPECT_EQ(words_of("the sailors' rest"), (Words{"the", "sailors", "rest"}));
}

TEST(TextTokenizer, KeepsEmailAddressesWholeAsIcuDoes) {
  // ICU 72's root word rules (CLDR) treat '@' as a letter: an address is one word.
  EXPECT_EQ(words_of("Write to Ann@Example.org today"), (Words{"write", "to", "ann@example.org", "today"}));
}

TEST(TextTokenizer, KeepsIdeographsAndKana) {
  TokenizerOptions one;
  one.min_length = 1;
  // Han and Hiragana segments have ideo/kana rule status; ICU's dictionary
  // splits them, so only check that every character lands in some word.
  const std::string text = "\xE6\x9D\xB1\xE4\xBA\xAC\xE3\x81\xAB\xE8\xA1\x8C\xE3\x81\x8F";  // 東京に行く
  std::string joined;
  for (const auto& w : words_of(text, one)) joined += w;
  EXPECT_EQ(joined, text);
  EXPECT_GE(words_of(text, one).size(), 2u);
}

struct Expected {
  std::string text;
  bool capitalised;
  bool sentence_initial;
};

void expect_tokens(std::string_view text, const std::vector<Expected>& expected) {
  const auto tokens = tokenize(text);
  ASSERT_EQ(tokens.size(), expected.size());
  for (std::size_t i = 0; i < tokens.size(); ++i) {
    EXPECT_EQ(tokens[i].text, expected[i].text) << "token " << i;
    EXPECT_EQ(tokens[i].capitalised, expected[i].capitalised) << "token " << i << " " << tokens[i].text;
    EXPECT_EQ(tokens[i].sentence_initial, expected[i].sentence_initial) << "token " << i << " " << tokens[i].text;
  }
}

TEST(TextTokenizer, MarksCapitalisedAndSentenceInitialWords) {
  // A BOM, CRLF line ends, a blank line, quotes and a closing bracket.
  const std::string text =
      "\xEF\xBB\xBFThe Harbour was quiet. \"Where is Anna?\" asked Tom.\r\n"
      "It rained\r\n"
      "all night.\r\n"
      "\r\n"
      "next morning, the Ship's bell rang (twice!) Then silence: \xC3\x89mile left.";
  expect_tokens(
      text, {
                {"the", true, true},  // first word of the text (after the BOM)
                {"harbour", true, false},  {"was", false, false},
                {"quiet", false, false},   {"where", true, true},  // after '. "'
                {"is", false, false},      {"anna", true, false},
                {"asked", false, true},                            // after '?" ': a terminal, then a closing quote
                {"tom", true, false},      {"it", true, true},     // after '.' and one CRLF
                {"rained", false, false},  {"all", false, false},  // one CRLF is not a paragraph break
                {"night", false, false},   {"next", false, true},  // after a blank line (CRLF CRLF): a new paragraph
                {"morning", false, false}, {"the", false, false},
                {"ship's", true, false},   {"bell", false, false},
                {"rang", false, false},    {"twice", false, false},        // after '(' only: no terminal
                {"then", true, true},                                      // after '!) '
                {"silence", false, false}, {"\xC3\xA9mile", true, false},  // U+00C9 is Lu; after ':' no sentence start
                {"left", false, false},
            });
}

TEST(TextTokenizer, FilteredWordsStillEndTheSentenceStart) {
  // "I" is dropped by min_length 2 and "1887" as a number, but they were the
  // first words of their sentences, so "went" and "was" are not sentence-initial.
  expect_tokens("I went. 1887 was late! A \xC2\xABGood\xC2\xBB year?\n\n\xE2\x80\x94 ok",
                {{"went", false, false},
                 {"was", false, false},
                 {"late", false, false},
                 {"good", true, false},  // "A" was the sentence's first word
                 {"year", false, false},
                 {"ok", false, true}});  // a paragraph starting with a dash is still a paragraph
}

TEST(TextTokenizer, ParagraphSeparatorsAndOtherTerminals) {
  // U+2029 PARAGRAPH SEPARATOR, and U+3002 IDEOGRAPHIC FULL STOP (Sentence_Terminal in the UCD's PropList.txt).
  expect_tokens("one two\xE2\x80\xA9three four\xE3\x80\x82 five six", {{"one", false, true},
                                                                       {"two", false, false},
                                                                       {"three", false, true},
                                                                       {"four", false, false},
                                                                       {"five", false, true},
                                                                       {"six", false, false}});
}

TEST(TextTokenizer, AppendsAndCanBeReused) {
  TextTokenizer tokenizer({});
  std::vector<WordToken> out;
  tokenizer.tokenize("First text.", out);
  tokenizer.tokenize("second text", out);
  ASSERT_EQ(out.size(), 4u);
  EXPECT_EQ(out[2].text, "second");
  EXPECT_TRUE(out[2].sentence_initial);  // each call starts a new text
  EXPECT_FALSE(out[2].capitalised);
}

TEST(TextTokenizer, CuttingALongTextIntoPiecesChangesNothing) {
  std::string text;
  for (int i = 0; i < 200; ++i) {
    text += "The harbour\xE2\x80\x99s bell rang, \"Twice!\" said \xC3\x89mile.\r\n";
    if (i % 7 == 0) text += "\r\n";
    text += "well-known 1887 caf\xC3\xA9s ";
  }
  TokenizerOptions options;
  options.keep_numbers = true;
  TextTokenizer whole(options);
  std::vector<WordToken> expected;
  whole.tokenize(text, expected);
  for (const std::size_t piece : {16u, 37u, 100u, 1000u}) {
    TextTokenizer cut(options);
    cut.set_max_piece_bytes(piece);
    std::vector<WordToken> got;
    cut.tokenize(text, got);
    ASSERT_EQ(got.size(), expected.size()) << "piece " << piece;
    for (std::size_t i = 0; i < got.size(); ++i) {
      ASSERT_EQ(got[i].text, expected[i].text) << "piece " << piece << " token " << i;
      ASSERT_EQ(got[i].capitalised, expected[i].capitalised) << "piece " << piece << " token " << i;
      ASSERT_EQ(got[i].sentence_initial, expected[i].sentence_initial) << "piece " << piece << " token " << i;
    }
  }
}

// tokenize() does not ask ICU for the rule status of a segment that starts
// with ASCII other than [A-Za-z0-9_@], taking it as "none" (from UAX #29 rules
// WB5-WB13b; ICU 72 adds '@' as a letter, found by this very test). Check that
// claim against ICU itself for every such byte followed
// by characters that could join it: letters, digits, '_', marks, ZWJ, the
// keycap sequence, Hebrew, kana and Han.
TEST(TextTokenizer, AsciiThatStartsNoWordNeverStartsAWordSegmentInIcu) {
  UErrorCode status = U_ZERO_ERROR;
  std::unique_ptr<icu::BreakIterator> words(icu::BreakIterator::createWordInstance(icu::Locale::getRoot(), status));
  ASSERT_TRUE(U_SUCCESS(status));
  const std::vector<std::string> followers = {"",
                                              "a",
                                              "Z",
                                              "7",
                                              "_",
                                              "_a",
                                              "'",
                                              "a'b",
                                              ".",
                                              ".5",
                                              ",5",
                                              "\xCC\x81",
                                              "\xCC\x81"
                                              "a",
                                              "\xE2\x80\x8D",
                                              "\xEF\xB8\x8F\xE2\x83\xA3",
                                              "\xD7\x90",
                                              "\xE3\x82\xA2",
                                              "\xE6\x9D\xB1",
                                              "\xC2\xAD"
                                              "a",
                                              " ",
                                              "\r\n"};
  int checked = 0;
  for (int byte = 0; byte < 0x80; ++byte) {
    const char c = static_cast<char>(byte);
    if ((c >= 'A' && c <= 'Z') || (c >= 'a' && c <= 'z') || (c >= '0' && c <= '9') || c == '_' || c == '@') continue;
    for (const std::string& follower : followers) {
      const std::string text = std::string(1, c) + follower;
      UText utext = UTEXT_INITIALIZER;
      utext_openUTF8(&utext, text.data(), static_cast<int64_t>(text.size()), &status);
      words->setText(&utext, status);
      ASSERT_TRUE(U_SUCCESS(status));
      words->first();
      words->next();
      EXPECT_LT(words->getRuleStatus(), UBRK_WORD_NONE_LIMIT)
          << "byte " << byte << " followed by \"" << follower << '"';
      utext_close(&utext);
      ++checked;
    }
  }
  EXPECT_EQ(checked, (128 - 64) * static_cast<int>(followers.size()));
}

}  // namespace
}  // namespace loupe

// UAX #29 word segmentation: word_boundaries() against every case of the
// Unicode Character Database's WordBreakTest.txt (Unicode 15.0, the version
// ICU 72 implements), as installed by Debian's unicode-data package.
#include <gtest/gtest.h>

#include <algorithm>
#include <cstdint>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>
#include <vector>

#include "common/utf8.h"
#include "corpus/text_tokenizer.h"

namespace loupe {
namespace {

constexpr const char* kWordBreakTest = "/usr/share/unicode/auxiliary/WordBreakTest.txt";

struct BreakCase {
  int line_number;
  std::string source_line;  // without the comment
  std::string text;
  std::vector<std::size_t> breaks;
};

// One line of WordBreakTest.txt: "÷ 0041 × 0308 ÷ # comment" means the UTF-8
// of U+0041 U+0308 with breaks at byte 0 and byte 3 and none at byte 1.
BreakCase parse_line(int line_number, const std::string& line) {
  BreakCase result{line_number, line.substr(0, line.find('#')), {}, {}};
  std::istringstream fields(result.source_line);
  std::string field;
  while (fields >> field) {
    if (field == "\xC3\xB7") {  // ÷ DIVISION SIGN: a break here
      result.breaks.push_back(result.text.size());
    } else if (field == "\xC3\x97") {  // × MULTIPLICATION SIGN: no break here
    } else {
      append_utf8(result.text, static_cast<std::uint32_t>(std::stoul(field, nullptr, 16)));
    }
  }
  return result;
}

std::string trim(const std::string& text) {
  const std::size_t first = text.find_first_not_of(" \t");
  const std::size_t last = text.find_last_not_of(" \t");
  return first == std::string::npos ? std::string() : text.substr(first, last - first + 1);
}

// The standard's breaks plus a break before each U+003A COLON and after the
// colon with its trailing U+0308 / U+2060 (Extend / Format, rule WB4).
std::vector<std::size_t> with_breaks_around_colons(const BreakCase& test_case) {
  std::vector<std::size_t> breaks = test_case.breaks;
  const std::string& text = test_case.text;
  for (std::size_t at = text.find(':'); at != std::string::npos; at = text.find(':', at + 1)) {
    breaks.push_back(at);
    std::size_t after = at + 1;
    while (text.compare(after, 2, "\xCC\x88") == 0 || text.compare(after, 3, "\xE2\x81\xA0") == 0) {
      after += text[after] == '\xCC' ? 2 : 3;
    }
    breaks.push_back(after);
  }
  std::sort(breaks.begin(), breaks.end());
  breaks.erase(std::unique(breaks.begin(), breaks.end()), breaks.end());
  return breaks;
}

std::string describe(const std::vector<std::size_t>& offsets) {
  std::string out;
  for (const std::size_t o : offsets) {
    if (!out.empty()) out += ' ';
    out += std::to_string(o);
  }
  return out;
}

TEST(WordBreakConformance, EveryCaseOfTheUnicodeTestFileMatches) {
  std::ifstream in(kWordBreakTest);
  // Fail, never skip: unicode-data is a listed dependency (scripts/debian-packages.txt).
  ASSERT_TRUE(in.good()) << kWordBreakTest << " is missing: install Debian's unicode-data package";

  // Deliberate differences, all from one tailoring: ICU follows CLDR's root
  // segmentation rules (CLDR common/segments/root.xml), which define
  //   $MidLetter = [\p{Word_Break = MidLetter} - [\: \uFE55 \uFF1A]]
  // so a colon between letters separates words ("Re:Harbour" -> "re",
  // "harbour"), where plain UAX #29 rule WB6/WB7 would keep "a:a" whole.
  // We want that for word counts. These cases are checked against the
  // standard's breaks plus a break on each side of the colon (the colon keeps
  // its trailing Extend/Format characters, rule WB4).
  const std::vector<std::string> colon_cases = {
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0041 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0041 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 05D0 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 05D0 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0061 \xC3\x97 2060 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0061 \xC3\x97 2060 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0061 \xC3\xB7 003A \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0061 \xC3\xB7 003A \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0061 \xC3\xB7 0027 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0061 \xC3\xB7 0027 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0061 \xC3\xB7 0027 \xC3\x97 2060 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0061 \xC3\xB7 0027 \xC3\x97 2060 \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0061 \xC3\xB7 002C \xC3\xB7",
      "\xC3\xB7 0061 \xC3\x97 003A \xC3\x97 0308 \xC3\x97 0061 \xC3\xB7 002C \xC3\xB7",
      "\xC3\xB7 0041 \xC3\x97 003A \xC3\x97 0041 \xC3\xB7",
  };
  int colon_cases_seen = 0;

  std::string line;
  int line_number = 0;
  int checked = 0;
  int failed = 0;
  while (std::getline(in, line)) {
    ++line_number;
    if (line.empty() || line[0] == '#') continue;
    const BreakCase test_case = parse_line(line_number, line);
    ASSERT_GE(test_case.breaks.size(), 2u) << "line " << line_number << " has no start and end break";
    ++checked;
    std::vector<std::size_t> expected = test_case.breaks;
    if (std::find(colon_cases.begin(), colon_cases.end(), trim(test_case.source_line)) != colon_cases.end()) {
      ++colon_cases_seen;
      expected = with_breaks_around_colons(test_case);
    }
    const std::vector<std::size_t> got = word_boundaries(test_case.text);
    if (got != expected) {
      ++failed;
      ADD_FAILURE() << kWordBreakTest << ":" << line_number << ": " << test_case.source_line
                    << "\n  expected breaks at bytes " << describe(expected) << "\n  got " << describe(got);
    }
  }
  std::cout << "[ checked  ] " << checked << " cases of " << kWordBreakTest << ", " << failed << " failed\n";
  // WordBreakTest-15.0.0.txt has 1823 cases (counted with grep -c '^÷').
  EXPECT_EQ(checked, 1823);
  EXPECT_EQ(failed, 0);
  EXPECT_EQ(colon_cases_seen, static_cast<int>(colon_cases.size())) << "a listed colon case is no longer in the file";
}

// A hand-made example (common practice: the usual reading of UAX #29 rules
// WB6/WB7 and WB3d) to show what the offsets mean.
TEST(WordBoundaries, SplitsPunctuationAndKeepsApostrophesInsideWords) {
  // "Hi, you" -> "Hi" | "," | " " | "you"
  EXPECT_EQ(word_boundaries("Hi, you"), (std::vector<std::size_t>{0, 2, 3, 4, 7}));
  // "can't  go" -> "can't" | "  " | "go"   (WB6/WB7 keep the apostrophe; WB3d keeps the spaces together)
  EXPECT_EQ(word_boundaries("can't  go"), (std::vector<std::size_t>{0, 5, 7, 9}));
  // "é" as e + U+0301 is one segment of 3 bytes (WB4).
  EXPECT_EQ(word_boundaries("e\xCC\x81"), (std::vector<std::size_t>{0, 3}));
  EXPECT_EQ(word_boundaries(""), (std::vector<std::size_t>{0}));
}

}  // namespace
}  // namespace loupe

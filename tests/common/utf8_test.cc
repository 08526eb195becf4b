// UTF-8 validation and U+FFFD replacement: the offsets and descriptions of
// each kind of ill-formed sequence, the Unicode Standard's examples of
// "U+FFFD Substitution of Maximal Subparts", and random bytes cross-checked
// against ICU's own UTF-8 decoding.
#include <gtest/gtest.h>
#include <unicode/ustring.h>
#include <unicode/utf8.h>

#include <cstdint>
#include <initializer_list>
#include <random>
#include <string>
#include <vector>

#include "common/utf8.h"

namespace loupe {
namespace {

const std::string kFFFD = "\xEF\xBF\xBD";

// Concatenation without operator+ on temporaries (GCC 12 -Wrestrict false positive).
std::string join(std::initializer_list<std::string> parts) {
  std::string out;
  for (const auto& part : parts) out += part;
  return out;
}

std::string repeat_fffd(int times) {
  std::string out;
  for (int i = 0; i < times; ++i) out += kFFFD;
  return out;
}

TEST(FindInvalidUtf8, AcceptsWellFormedText) {
  EXPECT_FALSE(find_invalid_utf8(""));
  EXPECT_FALSE(find_invalid_utf8("plain ASCII, long enough to use the eight-byte path"));
  // U+00E9, U+20AC, U+1F600 and the extremes of each length (Unicode Standard Table 3-7).
  EXPECT_FALSE(find_invalid_utf8("caf\xC3\xA9 \xE2\x82\xAC \xF0\x9F\x98\x80"));
  EXPECT_FALSE(find_invalid_utf8("\xC2\x80\xDF\xBF\xE0\xA0\x80\xEF\xBF\xBF\xED\x9F\xBF\xEE\x80\x80"));
  EXPECT_FALSE(find_invalid_utf8("\xF0\x90\x80\x80\xF4\x8F\xBF\xBF"));  // U+10000 and U+10FFFF
  EXPECT_FALSE(find_invalid_utf8(std::string("a\0b", 3)));              // NUL is well-formed UTF-8
}

struct InvalidCase {
  std::string bytes;
  std::size_t offset;
  std::string description;
};

// One case per kind of ill-formed sequence of the Unicode Standard, section 3.9
// (Table 3-7 lists what is well-formed; everything else is not).
TEST(FindInvalidUtf8, ReportsTheOffsetAndKindOfEachIllFormedSequence) {
  const std::vector<InvalidCase> cases = {
      {"abc\x80", 3, "byte 0x80 is a continuation byte with no lead byte before it"},
      {"0123456789\xBF", 10, "byte 0xBF is a continuation byte with no lead byte before it"},  // after the 8-byte path
      {"ab\xE2\x82", 2, "byte 0xE2 starts a 3-byte sequence but the text ends after 2 bytes"},
      {"\xF0\x9F\x98", 0, "byte 0xF0 starts a 4-byte sequence but the text ends after 3 bytes"},
      {"x\xC3", 1, "byte 0xC3 starts a 2-byte sequence but the text ends after 1 byte"},
      {"caf\xC3"
       "A",
       3, "byte 0xC3 starts a 2-byte sequence but is followed by 0x41"},
      {"\xE2\x82 ", 0, "byte 0xE2 starts a 3-byte sequence but is followed by 0x82 0x20"},
      {"/\xC0\xAF", 1, "byte 0xC0 can only begin an overlong (non-shortest) encoding of an ASCII character"},
      {"\xE0\x80\xAF", 0, "bytes 0xE0 0x80 begin an overlong (non-shortest) encoding"},
      {"\xF0\x80\x80\xAF", 0, "bytes 0xF0 0x80 begin an overlong (non-shortest) encoding"},
      {"ok \xED\xA0\x80", 3, "bytes 0xED 0xA0 begin a UTF-16 surrogate (U+D800..U+DFFF), which UTF-8 must not encode"},
      {"\xED\xBF\xBF", 0, "bytes 0xED 0xBF begin a UTF-16 surrogate (U+D800..U+DFFF), which UTF-8 must not encode"},
      {"\xF4\x90\x80\x80", 0, "bytes 0xF4 0x90 begin a value above U+10FFFF, the largest code point"},
      {"\xF5\x80\x80\x80", 0, "byte 0xF5 never occurs in UTF-8"},
      {"\xC3\xA9\xFF", 2, "byte 0xFF never occurs in UTF-8"},
  };
  for (const InvalidCase& c : cases) {
    const auto problem = find_invalid_utf8(c.bytes);
    ASSERT_TRUE(problem.has_value()) << c.description;
    EXPECT_EQ(problem->byte_offset, c.offset) << c.description;
    EXPECT_EQ(problem->description, c.description);
  }
}

TEST(ReplaceInvalidUtf8, LeavesWellFormedTextAsItIs) {
  std::size_t replaced = 99;
  const std::string text = "caf\xC3\xA9 \xF0\x9F\x98\x80 and more text";
  EXPECT_EQ(replace_invalid_utf8(text, &replaced), text);
  EXPECT_EQ(replaced, 0u);
  EXPECT_EQ(replace_invalid_utf8("", nullptr), "");
}

// The Unicode Standard, version 15.0, section 3.9 "Unicode Encoding Forms",
// subsection "U+FFFD Substitution of Maximal Subparts", Tables 3-8 to 3-12.
// Table numbers, byte sequences and results are from memory of those tables, and
// each one re-derived by hand from Table 3-7 in the comment beside it.
TEST(ReplaceInvalidUtf8, FollowsTheUnicodeStandardMaximalSubpartExamples) {
  struct Example {
    std::string bytes;
    std::string expected;
    std::size_t replacements;
  };
  const std::vector<Example> examples = {
      // Table 3-8 "Use of U+FFFD in UTF-8 Conversion": 61 F1 80 80 E1 80 C2 62 80 63 80 BF 64
      // -> a | F1 80 80 | E1 80 | C2 | b | 80 | c | 80 | BF | d
      {"a\xF1\x80\x80\xE1\x80\xC2"
       "b\x80"
       "c\x80\xBF"
       "d",
       join({"a", repeat_fffd(3), "b", kFFFD, "c", repeat_fffd(2), "d"}), 6},
      // Table 3-9 "U+FFFD for Non-Shortest Form Sequences": C0 AF E0 80 BF F0 81 82 41 -> 8 x FFFD, A
      {"\xC0\xAF\xE0\x80\xBF\xF0\x81\x82"
       "A",
       join({repeat_fffd(8), "A"}), 8},
      // Table 3-10 "U+FFFD for Ill-Formed Sequences for Surrogates": ED A0 80 ED BF BF ED AF 41 -> 8 x FFFD, A
      {"\xED\xA0\x80\xED\xBF\xBF\xED\xAF"
       "A",
       join({repeat_fffd(8), "A"}), 8},
      // Table 3-11 "U+FFFD for Other Ill-Formed Sequences": F4 91 92 93 FF 41 80 BF 42 -> 5 x FFFD, A, 2 x FFFD, B
      {"\xF4\x91\x92\x93\xFF"
       "A\x80\xBF"
       "B",
       join({repeat_fffd(5), "A", repeat_fffd(2), "B"}), 7},
      // Table 3-12 "U+FFFD for Truncated Sequences": E1 80 E2 F0 91 92 F1 BF 41
      // -> E1 80 | E2 | F0 91 92 | F1 BF | A
      {"\xE1\x80\xE2\xF0\x91\x92\xF1\xBF"
       "A",
       join({repeat_fffd(4), "A"}), 4},
  };
  for (const Example& e : examples) {
    std::size_t replaced = 0;
    EXPECT_EQ(replace_invalid_utf8(e.bytes, &replaced), e.expected);
    EXPECT_EQ(replaced, e.replacements);
    EXPECT_FALSE(find_invalid_utf8(replace_invalid_utf8(e.bytes, nullptr)));
  }
}

// Random byte strings, biased towards bytes that occur in UTF-8, checked
// against ICU 72: U8_NEXT (strict since ICU 60) for the first ill-formed
// offset, and u_strFromUTF8WithSub, which substitutes per maximal subpart
// (ICU 60 and later, per its API documentation), for the replacement count.
TEST(Utf8, AgreesWithIcuOnRandomBytes) {
  std::mt19937 random(20240607);  // fixed seed: the same strings every run
  const unsigned char interesting[] = {0x00, 0x41, 0x7F, 0x80, 0x8F, 0x90, 0x9F, 0xA0, 0xBF, 0xC0, 0xC1, 0xC2, 0xDF,
                                       0xE0, 0xE1, 0xEC, 0xED, 0xEE, 0xEF, 0xF0, 0xF1, 0xF3, 0xF4, 0xF5, 0xFF};
  for (int trial = 0; trial < 20000; ++trial) {
    std::string bytes(random() % 24, '\0');
    for (char& b : bytes) {
      b = static_cast<char>((random() % 2) != 0 ? interesting[random() % sizeof(interesting)] : random() % 256);
    }
    // ICU's first ill-formed offset.
    const auto length = static_cast<int32_t>(bytes.size());
    int32_t icu_offset = -1;
    for (int32_t i = 0; i < length;) {
      const int32_t start = i;
      UChar32 c;
#pragma GCC diagnostic push
#pragma GCC diagnostic ignored "-Wconversion"  // inside ICU's macro
      U8_NEXT(bytes.data(), i, length, c);
#pragma GCC diagnostic pop
      if (c < 0) {
        icu_offset = start;
        break;
      }
    }
    const auto problem = find_invalid_utf8(bytes);
    ASSERT_EQ(problem.has_value(), icu_offset >= 0) << "trial " << trial;
    if (problem) {
      ASSERT_EQ(problem->byte_offset, static_cast<std::size_t>(icu_offset)) << "trial " << trial;
    }

    // ICU's substitution count and text, compared through UTF-16.
    std::vector<UChar> utf16(bytes.size() + 1);
    int32_t utf16_length = 0;
    int32_t icu_substitutions = 0;
    UErrorCode status = U_ZERO_ERROR;
    u_strFromUTF8WithSub(utf16.data(), static_cast<int32_t>(utf16.size()), &utf16_length, bytes.data(), length, 0xFFFD,
                         &icu_substitutions, &status);
    ASSERT_TRUE(U_SUCCESS(status)) << u_errorName(status);
    std::size_t replaced = 0;
    const std::string ours = replace_invalid_utf8(bytes, &replaced);
    ASSERT_EQ(replaced, static_cast<std::size_t>(icu_substitutions)) << "trial " << trial;
    std::vector<UChar> ours16(ours.size() + 1);
    int32_t ours16_length = 0;
    status = U_ZERO_ERROR;
    u_strFromUTF8(ours16.data(), static_cast<int32_t>(ours16.size()), &ours16_length, ours.data(),
                  static_cast<int32_t>(ours.size()), &status);
    ASSERT_TRUE(U_SUCCESS(status)) << "our output is not well-formed, trial " << trial;
    ASSERT_EQ(std::u16string(reinterpret_cast<const char16_t*>(ours16.data()), static_cast<std::size_t>(ours16_length)),
              std::u16string(reinterpret_cast<const char16_t*>(utf16.data()), static_cast<std::size_t>(utf16_length)))
        << "trial " << trial;
  }
}

TEST(StripUtf8Bom, RemovesOnlyALeadingByteOrderMark) {
  EXPECT_EQ(strip_utf8_bom("\xEF\xBB\xBFtext"), "text");
  EXPECT_EQ(strip_utf8_bom("text\xEF\xBB\xBF"), "text\xEF\xBB\xBF");
  EXPECT_EQ(strip_utf8_bom("\xEF\xBB"), "\xEF\xBB");
  EXPECT_EQ(strip_utf8_bom(""), "");
}

}  // namespace
}  // namespace loupe

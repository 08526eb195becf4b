// fold_case (NFKC_Casefold) against the Unicode Character Database 15.0 as
// installed by Debian's unicode-data package: hand-picked examples, every
// NFKC_CF mapping of DerivedNormalizationProps.txt, and the full case
// foldings (status C and F) of CaseFolding.txt.
#include <gtest/gtest.h>

#include <cstdint>
#include <fstream>
#include <iostream>
#include <sstream>
#include <string>
#include <unordered_map>
#include <unordered_set>
#include <vector>

#include "common/utf8.h"
#include "corpus/text_tokenizer.h"

namespace loupe {
namespace {

constexpr const char* kDerivedNormalizationProps = "/usr/share/unicode/DerivedNormalizationProps.txt";
constexpr const char* kCaseFolding = "/usr/share/unicode/CaseFolding.txt";

std::string utf8_of(std::uint32_t c) {
  std::string out;
  append_utf8(out, c);
  return out;
}

// "0073 0073" -> "ss"
std::string utf8_of_hex_list(const std::string& hex_list) {
  std::istringstream fields(hex_list);
  std::string field;
  std::string out;
  while (fields >> field) append_utf8(out, static_cast<std::uint32_t>(std::stoul(field, nullptr, 16)));
  return out;
}

std::string trim(const std::string& text) {
  const std::size_t first = text.find_first_not_of(" \t");
  const std::size_t last = text.find_last_not_of(" \t");
  return first == std::string::npos ? std::string() : text.substr(first, last - first + 1);
}

// Splits "a ; b ; c # comment" into trimmed fields.
std::vector<std::string> ucd_fields(const std::string& line) {
  std::vector<std::string> fields;
  std::istringstream in(line.substr(0, line.find('#')));
  std::string field;
  while (std::getline(in, field, ';')) fields.push_back(trim(field));
  return fields;
}

// "0041" -> {0x41, 0x41}; "E0000..E0FFF" -> {0xE0000, 0xE0FFF}
std::pair<std::uint32_t, std::uint32_t> code_point_range(const std::string& field) {
  const std::size_t dots = field.find("..");
  const auto first = static_cast<std::uint32_t>(std::stoul(field.substr(0, dots), nullptr, 16));
  const auto last =
      dots == std::string::npos ? first : static_cast<std::uint32_t>(std::stoul(field.substr(dots + 2), nullptr, 16));
  return {first, last};
}

std::string hex_of(std::string_view utf8) {
  std::string out;
  for (const char c : utf8) {
    static constexpr char kDigits[] = "0123456789ABCDEF";
    const auto byte = static_cast<unsigned char>(c);
    if (!out.empty()) out += ' ';
    out += kDigits[byte >> 4];
    out += kDigits[byte & 0x0F];
  }
  return out;
}

// The code points of DerivedNormalizationProps.txt lines "X ; PROPERTY; VALUE".
std::unordered_set<std::uint32_t> code_points_with(const std::string& property, const std::string& value) {
  std::ifstream in(kDerivedNormalizationProps);
  std::unordered_set<std::uint32_t> result;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    const auto fields = ucd_fields(line);
    if (fields.size() < 3 || fields[1] != property || fields[2] != value) continue;
    const auto [first, last] = code_point_range(fields[0]);
    for (std::uint32_t c = first; c <= last; ++c) result.insert(c);
  }
  return result;
}

// DerivedNormalizationProps.txt NFKC_CF section: code point -> UTF-8 of its
// NFKC_Casefold; code points not listed map to themselves.
std::unordered_map<std::uint32_t, std::string> nfkc_casefold_mappings() {
  std::ifstream in(kDerivedNormalizationProps);
  std::unordered_map<std::uint32_t, std::string> mapping;
  std::string line;
  while (std::getline(in, line)) {
    if (line.empty() || line[0] == '#') continue;
    const auto fields = ucd_fields(line);
    if (fields.size() < 3 || fields[1] != "NFKC_CF") continue;
    const auto [first, last] = code_point_range(fields[0]);
    for (std::uint32_t c = first; c <= last; ++c) mapping[c] = utf8_of_hex_list(fields[2]);
  }
  return mapping;
}

bool is_surrogate(std::uint32_t c) { return c >= 0xD800 && c <= 0xDFFF; }

TEST(FoldCase, ExamplesFromTheUnicodeCharacterDatabase) {
  // CaseFolding.txt: "00DF; F; 0073 0073; # LATIN SMALL LETTER SHARP S"
  EXPECT_EQ(fold_case("\xC3\x9F"), "ss");
  EXPECT_EQ(fold_case("Stra\xC3\x9F"
                      "e"),
            "strasse");
  // CaseFolding.txt: "FB01; F; 0066 0069; # LATIN SMALL LIGATURE FI"
  EXPECT_EQ(fold_case("\xEF\xAC\x81"), "fi");
  // CaseFolding.txt: "03A3; C; 03C3; # GREEK CAPITAL LETTER SIGMA"
  EXPECT_EQ(fold_case("\xCE\xA3"), "\xCF\x83");
  // CaseFolding.txt: "03C2; C; 03C3; # GREEK SMALL LETTER FINAL SIGMA"
  EXPECT_EQ(fold_case("\xCF\x82"), "\xCF\x83");
  // DerivedNormalizationProps.txt: "216B ; NFKC_CF; 0078 0069 0069 # ROMAN NUMERAL TWELVE"
  EXPECT_EQ(fold_case("\xE2\x85\xAB"), "xii");
  // DerivedNormalizationProps.txt: "FF21 ; NFKC_CF; 0061 # FULLWIDTH LATIN CAPITAL LETTER A"
  EXPECT_EQ(fold_case("\xEF\xBC\xA1"), "a");
  // CaseFolding.txt: "0130; F; 0069 0307; # LATIN CAPITAL LETTER I WITH DOT ABOVE" (not the Turkic T line)
  EXPECT_EQ(fold_case("\xC4\xB0"), "i\xCC\x87");
  // DerivedNormalizationProps.txt: "00AD ; NFKC_CF; # SOFT HYPHEN" (default ignorable: removed)
  EXPECT_EQ(fold_case("har\xC2\xAD"
                      "bour"),
            "harbour");
  // DerivedNormalizationProps.txt: "00C5 ; NFKC_CF; 00E5": decomposed A + U+030A recomposes to U+00E5.
  EXPECT_EQ(fold_case("A\xCC\x8A"), "\xC3\xA5");
  // ASCII only lower-cases letters (DerivedNormalizationProps.txt maps 0041..005A and nothing else below 0080).
  EXPECT_EQ(fold_case("Harbour's 1887-Bell!"), "harbour's 1887-bell!");
  EXPECT_EQ(fold_case(""), "");
}

// Every mapping of DerivedNormalizationProps.txt's NFKC_CF section, and the
// identity for every code point it leaves out ("@missing: 0000..10FFFF;
// NFKC_CF; <code point>"), surrogates aside (they have no UTF-8 form).
TEST(FoldCase, MatchesEveryNfkcCasefoldMappingOfTheUcd) {
  ASSERT_TRUE(std::ifstream(kDerivedNormalizationProps).good())
      << kDerivedNormalizationProps << " is missing: install Debian's unicode-data package";
  const auto mapping = nfkc_casefold_mappings();
  // The Unicode 15.0 file lists a few thousand code points (ranges expanded); a
  // sanity floor so that a parser fault cannot pass as agreement.
  ASSERT_GT(mapping.size(), 10000u);

  std::size_t mismatches = 0;
  for (std::uint32_t c = 0; c <= 0x10FFFF; ++c) {
    if (is_surrogate(c)) continue;
    const std::string input = utf8_of(c);
    const auto found = mapping.find(c);
    const std::string& expected = found == mapping.end() ? input : found->second;
    const std::string got = fold_case(input);
    if (got != expected && ++mismatches <= 20) {
      ADD_FAILURE() << "U+" << std::hex << std::uppercase << c << ": expected bytes " << hex_of(expected) << ", got "
                    << hex_of(got);
    }
  }
  std::cout << "[ checked  ] 1,112,064 code points, " << mapping.size() << " with an NFKC_CF mapping in "
            << kDerivedNormalizationProps << "\n";
  EXPECT_EQ(mismatches, 0u);
}

// CaseFolding.txt full folding (status C and F) for characters that NFKC
// leaves alone (not NFKC_QC=N in DerivedNormalizationProps.txt): there
// NFKC_Casefold is the full case folding, put back in NFC. When the folding
// holds a mark that may compose with what precedes it (NFC_QC=M), NFC can
// recompose it ("1FD6; F; 03B9 0342" is U+1FD6 again), so those are checked
// against the NFKC_CF field of DerivedNormalizationProps.txt instead.
TEST(FoldCase, AgreesWithTheFullCaseFoldingOfCaseFoldingTxt) {
  ASSERT_TRUE(std::ifstream(kDerivedNormalizationProps).good())
      << kDerivedNormalizationProps << " is missing: install Debian's unicode-data package";
  const auto changed_by_nfkc = code_points_with("NFKC_QC", "N");
  const auto may_compose = code_points_with("NFC_QC", "M");
  const auto nfkc_cf = nfkc_casefold_mappings();
  ASSERT_GT(changed_by_nfkc.size(), 1000u);
  ASSERT_GT(may_compose.size(), 50u);

  std::string line;
  std::ifstream folding(kCaseFolding);
  ASSERT_TRUE(folding.good()) << kCaseFolding << " is missing: install Debian's unicode-data package";
  std::size_t checked = 0;
  std::size_t recomposed = 0;
  std::size_t mismatches = 0;
  while (std::getline(folding, line)) {
    if (line.empty() || line[0] == '#') continue;
    const auto fields = ucd_fields(line);
    if (fields.size() < 3 || (fields[1] != "C" && fields[1] != "F")) continue;
    const auto c = static_cast<std::uint32_t>(std::stoul(fields[0], nullptr, 16));
    if (changed_by_nfkc.count(c) != 0) continue;
    ++checked;
    std::string expected = utf8_of_hex_list(fields[2]);
    std::istringstream folded_code_points(fields[2]);
    std::string hex;
    bool composable = false;
    while (folded_code_points >> hex)
      composable |= may_compose.count(static_cast<std::uint32_t>(std::stoul(hex, nullptr, 16))) != 0;
    if (composable) {
      ++recomposed;
      const auto found = nfkc_cf.find(c);
      expected = found == nfkc_cf.end() ? utf8_of(c) : found->second;
    }
    const std::string got = fold_case(utf8_of(c));
    if (got != expected) {
      ++mismatches;
      ADD_FAILURE() << kCaseFolding << ": " << fields[0] << "; " << fields[1] << "; " << fields[2] << " -> got bytes "
                    << hex_of(got);
    }
  }
  std::cout << "[ checked  ] " << checked << " C/F foldings of " << kCaseFolding << " (" << recomposed
            << " of them through NFKC_CF because NFC may recompose them)\n";
  EXPECT_GT(checked, 1000u);
  EXPECT_EQ(mismatches, 0u);
}

}  // namespace
}  // namespace loupe

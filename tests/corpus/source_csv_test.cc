// Tests for parse_delimited, the RFC 4180 reader (lib/corpus/source_csv.h).
// Each case names the rule of RFC 4180 ("Common Format and MIME Type for CSV
// Files", section 2) it checks; cases beyond the RFC say "our choice".
#include "corpus/source_csv.h"

#include <chrono>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/error.h"

namespace loupe {
namespace {

using ::testing::ElementsAre;
using ::testing::HasSubstr;

using Fields = std::vector<std::string>;

std::vector<Fields> fields_of(const std::vector<CsvRecord>& records) {
  std::vector<Fields> out;
  for (const auto& r : records) out.push_back(r.fields);
  return out;
}

std::vector<std::size_t> lines_of(const std::vector<CsvRecord>& records) {
  std::vector<std::size_t> out;
  for (const auto& r : records) out.push_back(r.line);
  return out;
}

std::string parse_error(std::string_view text, char separator = ',') {
  try {
    parse_delimited(text, separator, "t.csv");
  } catch (const Error& e) {
    return e.what();
  }
  ADD_FAILURE() << "no loupe::Error for: " << text;
  return {};
}

TEST(ParseDelimited, EmbeddedCommasInQuotedField) {
  // RFC 4180, section 2, rule 6: fields containing commas are enclosed in double quotes.
  const auto records = parse_delimited("a,\"b,c\",d\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a", "b,c", "d"}));
}

TEST(ParseDelimited, EscapedDoubleQuotes) {
  // RFC 4180, section 2, rule 7: a double quote inside a quoted field is written as two.
  const auto records = parse_delimited("\"say \"\"hi\"\"\",\"\"\"\"\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"say \"hi\"", "\""}));
}

TEST(ParseDelimited, LineBreaksInsideQuotesAreDataAndCountedForLines) {
  // RFC 4180, section 2, rule 6: fields containing line breaks are enclosed in double quotes.
  const auto records = parse_delimited("id,text\n1,\"two\nlines\"\n2,\"crlf\r\ninside\"\n3,x\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"id", "text"}, Fields{"1", "two\nlines"},
                                              Fields{"2", "crlf\r\ninside"}, Fields{"3", "x"}));
  // Physical lines where each record starts: 1, 2, 4, 6.
  EXPECT_THAT(lines_of(records), ElementsAre(1u, 2u, 4u, 6u));
}

TEST(ParseDelimited, CrlfRecordEnds) {
  // RFC 4180, section 2, rule 1: each record is on its own line, ended by CRLF.
  const auto records = parse_delimited("a,b\r\nc,d\r\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a", "b"}, Fields{"c", "d"}));
  EXPECT_THAT(lines_of(records), ElementsAre(1u, 2u));
}

TEST(ParseDelimited, LfRecordEnds) {
  // RFC 4180, section 2, rule 1 names CRLF; LF alone is accepted too (common practice).
  const auto records = parse_delimited("a,b\nc,d\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a", "b"}, Fields{"c", "d"}));
}

TEST(ParseDelimited, MixedAndLoneCrLineBreaks) {
  // Our choice: a lone CR (old Macintosh files) also ends a record and a line.
  const auto records = parse_delimited("a\rb\r\nc\nd", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a"}, Fields{"b"}, Fields{"c"}, Fields{"d"}));
  EXPECT_THAT(lines_of(records), ElementsAre(1u, 2u, 3u, 4u));
}

TEST(ParseDelimited, NoFinalLineBreak) {
  // RFC 4180, section 2, rule 2: the last record may or may not have an ending line break.
  const auto with_break = parse_delimited("a,b\nc,d\n", ',', "t.csv");
  const auto without_break = parse_delimited("a,b\nc,d", ',', "t.csv");
  EXPECT_EQ(fields_of(with_break), fields_of(without_break));
  EXPECT_EQ(without_break.size(), 2u);
  // A quoted last field without a final line break.
  EXPECT_THAT(fields_of(parse_delimited("a,\"b\"", ',', "t.csv")), ElementsAre(Fields{"a", "b"}));
}

TEST(ParseDelimited, SpacesArePartOfTheField) {
  // RFC 4180, section 2, rule 4: spaces are considered part of a field and should not be ignored.
  const auto records = parse_delimited(" a , b,c \n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{" a ", " b", "c "}));
}

TEST(ParseDelimited, EmptyLastFieldAndEmptyFields) {
  // RFC 4180, section 2, rule 4: the last field must not be followed by a comma,
  // so a trailing comma means one more, empty, field.
  EXPECT_THAT(fields_of(parse_delimited("a,b,\n", ',', "t.csv")), ElementsAre(Fields{"a", "b", ""}));
  EXPECT_THAT(fields_of(parse_delimited("a,b,", ',', "t.csv")), ElementsAre(Fields{"a", "b", ""}));
  EXPECT_THAT(fields_of(parse_delimited(",,\n", ',', "t.csv")), ElementsAre(Fields{"", "", ""}));
  EXPECT_THAT(fields_of(parse_delimited("\"\",x\n", ',', "t.csv")), ElementsAre(Fields{"", "x"}));
}

TEST(ParseDelimited, HeaderIsAnOrdinaryRecord) {
  // RFC 4180, section 2, rule 3: an optional header line has the same format as records.
  const auto records = parse_delimited("\"id\",\"text\"\n1,x\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"id", "text"}, Fields{"1", "x"}));
}

TEST(ParseDelimited, ByteOrderMarkSkipped) {
  // Our choice (spreadsheets write it): a UTF-8 BOM at the very start is not data.
  const auto records = parse_delimited("\xEF\xBB\xBFid,text\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"id", "text"}));
  // Elsewhere it is data.
  EXPECT_THAT(fields_of(parse_delimited("a,\xEF\xBB\xBF"
                                        "b",
                                        ',', "t.csv")),
              ElementsAre(Fields{"a",
                                 "\xEF\xBB\xBF"
                                 "b"}));
}

TEST(ParseDelimited, EmptyInputHasNoRecordsAndBlankLineIsOneEmptyField) {
  EXPECT_TRUE(parse_delimited("", ',', "t.csv").empty());
  EXPECT_TRUE(parse_delimited("\xEF\xBB\xBF", ',', "t.csv").empty());
  // RFC 4180, section 2, rule 1: a line break ends a record, so "a\n\nb" has an empty middle record.
  const auto records = parse_delimited("a\n\nb\n", ',', "t.csv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a"}, Fields{""}, Fields{"b"}));
  EXPECT_THAT(lines_of(records), ElementsAre(1u, 2u, 3u));
}

TEST(ParseDelimited, TabSeparatorUsesTheSameQuotingRules) {
  // Our choice: TSV follows RFC 4180, section 2, rules 5-7 with a tab as separator.
  const auto records = parse_delimited("a\t\"b\tc\"\t\"d \"\"e\"\"\"\n", '\t', "t.tsv");
  EXPECT_THAT(fields_of(records), ElementsAre(Fields{"a", "b\tc", "d \"e\""}));
  // Commas are plain data in TSV.
  EXPECT_THAT(fields_of(parse_delimited("a,b\tc\n", '\t', "t.tsv")), ElementsAre(Fields{"a,b", "c"}));
}

TEST(ParseDelimited, QuoteInsideUnquotedFieldIsKept) {
  // RFC 4180, section 2, rule 5 forbids this; our choice is to keep the quote as data.
  EXPECT_THAT(fields_of(parse_delimited("5\" floppy,x\n", ',', "t.csv")), ElementsAre(Fields{"5\" floppy", "x"}));
}

TEST(ParseDelimited, UnterminatedQuoteAtEndOfFileNamesTheLine) {
  // RFC 4180, section 2, rule 7: a quoted field ends with a double quote; here it never does.
  const std::string message = parse_error("id,text\n1,ok\n2,\"never\nclosed\n");
  EXPECT_THAT(message, HasSubstr("t.csv line 3"));
  EXPECT_THAT(message, HasSubstr("never closed"));
  EXPECT_THAT(message, HasSubstr("ends on line 4"));
  // The same at the very end of the text, on line 1.
  EXPECT_THAT(parse_error("a,\""), HasSubstr("t.csv line 1:"));
}

TEST(ParseDelimited, UnterminatedQuoteAfterEarlierMultilineField) {
  // RFC 4180, section 2, rule 6: the line break inside the first quoted field counts as a physical line.
  const std::string message = parse_error("\"a\nb\",x\nc,\"d\n");
  EXPECT_THAT(message, HasSubstr("t.csv line 3:"));
}

TEST(ParseDelimited, StrayCharacterAfterClosingQuote) {
  // RFC 4180, section 2, rule 7: after the closing quote comes a separator or a line break.
  const std::string message = parse_error("id,text\n1,\"ab\"c,d\n");
  EXPECT_THAT(message, HasSubstr("t.csv line 2:"));
  EXPECT_THAT(message, HasSubstr("'c' follows the closing quote"));
}

TEST(ParseDelimited, StrayCharacterAfterMultilineQuotedFieldNamesBothLines) {
  // RFC 4180, section 2, rules 6-7: the record starts on line 2, the stray space is on line 4.
  const std::string message = parse_error("id,text\n1,\"one\ntwo\nthree\" ,x\n");
  EXPECT_THAT(message, HasSubstr("t.csv line 4 (in the record that starts on line 2)"));
  EXPECT_THAT(message, HasSubstr("a space follows the closing quote"));
}

TEST(ParseDelimited, LargeInputIsLinear) {
  // Not a benchmark: a sanity bound that catches quadratic behaviour.
  std::string text = "id,group,text,year\n";
  for (int i = 0; i < 200000; ++i) {
    text += std::to_string(i) + ",alice,\"a text, with \"\"quotes\"\" and\na line break\",1851\n";
  }
  const auto start = std::chrono::steady_clock::now();
  const auto records = parse_delimited(text, ',', "big.csv");
  const double seconds = std::chrono::duration<double>(std::chrono::steady_clock::now() - start).count();
  ASSERT_EQ(records.size(), 200001u);
  EXPECT_EQ(records.back().line, 400000u);  // 1 header line + 2 lines a record
  EXPECT_EQ(records.back().fields[2], "a text, with \"quotes\" and\na line break");
  EXPECT_LT(seconds, 5.0) << "parsing " << text.size() << " bytes took " << seconds << " s";
}

}  // namespace
}  // namespace loupe

// Tests for manifest sources (CSV, TSV, JSON Lines) read by list_sources:
// the happy paths on fixtures/sources/manifests/ and one test per error on
// fixtures/sources/bad/. Expected values are read off the fixture files.
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/error.h"
#include "corpus/source_listing.h"
#include "corpus/source_manifest.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::AllOf;
using ::testing::ElementsAre;
using ::testing::HasSubstr;
using ::testing::Not;

const std::string kFixtures = std::string(LOUPE_SOURCE_DIR) + "/fixtures/sources";
const std::string kManifests = kFixtures + "/manifests";
const std::string kBad = kFixtures + "/bad";

std::string listing_error(const std::string& source, const SourceOptions& options = {}) {
  try {
    list_sources(source, options);
  } catch (const Error& e) {
    return e.what();
  }
  ADD_FAILURE() << "no loupe::Error for " << source;
  return {};
}

std::vector<std::string> ids_of(const SourceListing& listing) {
  std::vector<std::string> ids;
  for (const auto& e : listing.entries) ids.push_back(e.id);
  return ids;
}

// A fresh folder under the system's temporary folder, removed at the end.
using TempFolder = loupe::testing::TempFolder;

// ---- happy paths ----------------------------------------------------------

TEST(ManifestCsv, ListsRowsInFileOrderWithRolesGroupsAndMetadata) {
  const std::string source = kManifests + "/letters.csv";
  const SourceListing listing = list_sources(source);
  EXPECT_TRUE(listing.is_manifest);
  EXPECT_EQ(listing.source, source);
  // Header "ID, Group ,Role,text,path,year,place": reserved names matched ignoring case and spaces.
  EXPECT_THAT(listing.metadata_columns, ElementsAre("year", "place"));
  ASSERT_THAT(ids_of(listing), ElementsAre("a1", "a2", "b1", "x1"));

  const auto& a1 = listing.entries[0];
  EXPECT_EQ(a1.group, "alice");
  EXPECT_EQ(a1.role, DocumentRole::known);
  EXPECT_FALSE(a1.has_inline_text);
  EXPECT_EQ(a1.path, kManifests + "/texts/a1.txt");
  EXPECT_EQ(a1.origin, source + " line 2");
  EXPECT_THAT(a1.metadata, ElementsAre("1851", "Bath, Somerset"));

  const auto& a2 = listing.entries[1];  // inline text with a comma, doubled quotes and a line break
  EXPECT_TRUE(a2.has_inline_text);
  EXPECT_EQ(a2.text, "She wrote: \"Come at once,\nbefore the rain.\"");
  EXPECT_EQ(a2.role, DocumentRole::known);  // empty role means known
  EXPECT_EQ(a2.origin, source + " line 3");
  EXPECT_THAT(a2.metadata, ElementsAre("1852", "London"));

  const auto& b1 = listing.entries[2];  // starts on line 5 because a2 spans two lines
  EXPECT_EQ(b1.origin, source + " line 5");
  EXPECT_EQ(b1.group, "bob");                        // " bob " trimmed
  EXPECT_EQ(b1.role, DocumentRole::known);           // "KNOWN"
  EXPECT_EQ(b1.path, kManifests + "/texts/b1.txt");  // "./texts/../texts/b1.txt" normalised
  EXPECT_THAT(b1.metadata, ElementsAre("1849", ""));

  const auto& x1 = listing.entries[3];
  EXPECT_EQ(x1.role, DocumentRole::disputed);
  EXPECT_EQ(x1.group, "");
  EXPECT_THAT(x1.metadata, ElementsAre("", " Unknown \"place\""));  // metadata kept as written

  EXPECT_EQ(load_source_text(a1), "Dear sister, the rain has not stopped.\n");
  EXPECT_EQ(load_source_text(a2), a2.text);
}

TEST(ManifestTsv, SameQuotingRulesWithTabs) {
  const std::string source = kManifests + "/letters.tsv";
  const SourceListing listing = list_sources(source);
  EXPECT_THAT(listing.metadata_columns, ElementsAre("note"));
  ASSERT_THAT(ids_of(listing), ElementsAre("a1", "b2", "x1"));
  EXPECT_EQ(listing.entries[0].path, kManifests + "/texts/a1.txt");
  EXPECT_THAT(listing.entries[0].metadata, ElementsAre("first"));
  EXPECT_TRUE(listing.entries[1].has_inline_text);
  EXPECT_EQ(listing.entries[1].text, "A tab\there, and a line\nbreak");
  EXPECT_THAT(listing.entries[1].metadata, ElementsAre("said \"no\""));
  EXPECT_EQ(listing.entries[2].origin, source + " line 5");
  EXPECT_EQ(listing.entries[2].role, DocumentRole::disputed);
}

TEST(ManifestJsonLines, StringsNumbersNullsAndUnionOfKeys) {
  const std::string source = kManifests + "/letters.jsonl";
  const SourceListing listing = list_sources(source);
  // Keys other than the reserved ones, in first-seen order across lines.
  EXPECT_THAT(listing.metadata_columns, ElementsAre("year", "weight"));
  ASSERT_THAT(ids_of(listing), ElementsAre("a1", "7", "x1"));  // the number 7 becomes "7"
  EXPECT_EQ(listing.entries[0].path, kManifests + "/texts/a1.txt");
  EXPECT_THAT(listing.entries[0].metadata, ElementsAre("1851", ""));  // weight absent
  EXPECT_EQ(listing.entries[1].text, "Inline \"quoted\" text,\nover two lines.");
  EXPECT_THAT(listing.entries[1].metadata, ElementsAre("", "0.5"));
  EXPECT_EQ(listing.entries[2].origin, source + " line 4");  // line 3 is blank
  EXPECT_EQ(listing.entries[2].group, "");
  EXPECT_EQ(listing.entries[2].role, DocumentRole::disputed);
  EXPECT_THAT(listing.entries[2].metadata, ElementsAre("", ""));  // year is null
}

TEST(ManifestFormatOption, OverridesTheExtension) {
  // bad/manifest.dat is a valid CSV whose extension says nothing.
  EXPECT_THAT(listing_error(kBad + "/manifest.dat"),
              AllOf(HasSubstr("manifest.dat"), HasSubstr("'.dat'"), HasSubstr(".csv, .tsv, .jsonl or .ndjson")));
  SourceOptions options;
  options.format = ManifestFormat::csv;
  const SourceListing listing = list_sources(kBad + "/manifest.dat", options);
  ASSERT_THAT(ids_of(listing), ElementsAre("a1"));
  EXPECT_EQ(listing.entries[0].text, "Fine.");
  // Read as TSV the same bytes are one column per line, so the id column is missing.
  options.format = ManifestFormat::tsv;
  EXPECT_THAT(listing_error(kBad + "/manifest.dat", options), HasSubstr("no 'id' column"));
}

TEST(ManifestCsv, CrlfByteOrderMarkBlankLinesAndUnnamedEmptyColumns) {
  TempFolder folder;
  const std::string source =
      folder.write("m.csv", "\xEF\xBB\xBFid,group,text,\r\na1,alice,\"one\r\ntwo\",\r\n\r\na2,bob,three,\r\n");
  const SourceListing listing = list_sources(source);
  ASSERT_THAT(ids_of(listing), ElementsAre("a1", "a2"));
  EXPECT_TRUE(listing.metadata_columns.empty());  // the unnamed, empty 4th column is dropped
  EXPECT_EQ(listing.entries[0].text, "one\r\ntwo");
  EXPECT_EQ(listing.entries[1].origin, source + " line 5");
}

TEST(ManifestCsv, TextPreferredOverPathAndGroupOptionalWhenAllDisputed) {
  TempFolder folder;
  folder.write("b.txt", "from the file\n");
  const std::string source =
      folder.write("m.csv", "id,role,text,path\nx1,disputed,inline,missing.txt\nx2,disputed,,b.txt\n");
  const SourceListing listing = list_sources(source);
  ASSERT_EQ(listing.entries.size(), 2u);
  EXPECT_TRUE(listing.entries[0].has_inline_text);  // text wins; the missing path is not checked
  EXPECT_FALSE(listing.entries[1].has_inline_text);
  EXPECT_EQ(load_source_text(listing.entries[1]), "from the file\n");
}

TEST(ManifestPaths, AllowOutsidePathsAcceptsAndResolvesEscapingPath) {
  SourceOptions options;
  options.allow_outside_paths = true;
  const SourceListing listing = list_sources(kBad + "/escaping_path.csv", options);
  ASSERT_EQ(listing.entries.size(), 2u);
  EXPECT_EQ(listing.entries[1].path, kFixtures + "/folder/alice/a1.txt");
}

TEST(ManifestPaths, RelativeSourcePathResolvesAgainstTheManifestFolder) {
  const fs::path previous = fs::current_path();
  fs::current_path(kFixtures);
  SourceListing listing;
  try {
    listing = list_sources("manifests/letters.csv");
  } catch (...) {
    fs::current_path(previous);
    throw;
  }
  fs::current_path(previous);
  EXPECT_EQ(listing.entries[0].path, kManifests + "/texts/a1.txt");
  EXPECT_EQ(listing.entries[0].origin, "manifests/letters.csv line 2");
}

// ---- errors ----------------------------------------------------------------

TEST(ManifestErrors, MissingSource) {
  EXPECT_THAT(listing_error(kFixtures + "/no-such-manifest.csv"),
              AllOf(HasSubstr("no-such-manifest.csv"), HasSubstr("no such file or folder")));
}

TEST(ManifestErrors, MissingIdColumnNamesColumnsFound) {
  EXPECT_THAT(
      listing_error(kBad + "/missing_id_column.csv"),
      AllOf(HasSubstr("missing_id_column.csv: no 'id' column"), HasSubstr("Columns found: 'name', 'group', 'text'")));
}

TEST(ManifestErrors, MissingTextAndPathColumns) {
  EXPECT_THAT(
      listing_error(kBad + "/missing_text_column.csv"),
      AllOf(HasSubstr("neither a 'text' nor a 'path' column"), HasSubstr("Columns found: 'id', 'group', 'body'")));
}

TEST(ManifestErrors, NoGroupColumnWithAKnownRow) {
  EXPECT_THAT(listing_error(kBad + "/no_group_column.csv"),
              AllOf(HasSubstr("no 'group' column"), HasSubstr("no_group_column.csv line 3"),
                    HasSubstr("Columns found: 'id', 'role', 'text'")));
}

TEST(ManifestErrors, DuplicateColumn) {
  EXPECT_THAT(listing_error(kBad + "/duplicate_column.csv"),
              AllOf(HasSubstr("'GROUP' appears twice"), HasSubstr("columns 2 and 4")));
}

TEST(ManifestErrors, UnnamedColumnWithValues) {
  TempFolder folder;
  const std::string source = folder.write("m.csv", "id,group,text,\na1,alice,x,\na2,alice,y,oops\n");
  EXPECT_THAT(listing_error(source), AllOf(HasSubstr("m.csv line 3"), HasSubstr("column 4 has no name")));
}

TEST(ManifestErrors, HeaderOnly) {
  EXPECT_THAT(listing_error(kBad + "/header_only.csv"),
              HasSubstr("header_only.csv: the manifest has a header but no rows"));
}

TEST(ManifestErrors, UnterminatedQuoteNamesTheLine) {
  EXPECT_THAT(listing_error(kBad + "/unterminated_quote.csv"),
              AllOf(HasSubstr("unterminated_quote.csv line 3"), HasSubstr("never closed")));
}

TEST(ManifestErrors, StrayCharacterAfterQuoteNamesBothLines) {
  EXPECT_THAT(listing_error(kBad + "/stray_after_quote.csv"),
              AllOf(HasSubstr("stray_after_quote.csv line 3 (in the record that starts on line 2)"),
                    HasSubstr("'x' follows the closing quote")));
}

TEST(ManifestErrors, WrongFieldCountCsv) {
  EXPECT_THAT(
      listing_error(kBad + "/wrong_field_count.csv"),
      AllOf(HasSubstr("wrong_field_count.csv line 3: 4 fields, but the header has 3 columns"), HasSubstr("commas")));
}

TEST(ManifestErrors, WrongFieldCountTsv) {
  EXPECT_THAT(
      listing_error(kBad + "/wrong_field_count.tsv"),
      AllOf(HasSubstr("wrong_field_count.tsv line 3: 4 fields, but the header has 3 columns"), HasSubstr("tabs")));
}

TEST(ManifestErrors, DuplicateIdsListsEveryIdWithItsLines) {
  const std::string message = listing_error(kBad + "/duplicate_ids.csv");
  EXPECT_THAT(message, AllOf(HasSubstr("2 ids are used more than once"), HasSubstr("'a' (lines 2, 4)"),
                             HasSubstr("'b' (lines 3, 5, 6)"), Not(HasSubstr("'c'"))));
}

TEST(ManifestErrors, UnknownRoleNamesLineValueAndAllowedValues) {
  EXPECT_THAT(listing_error(kBad + "/unknown_role.csv"),
              AllOf(HasSubstr("unknown_role.csv line 3"), HasSubstr("unknown role 'suspect'"),
                    HasSubstr("'known' and 'disputed'")));
}

TEST(ManifestErrors, KnownDocumentWithEmptyGroup) {
  EXPECT_THAT(listing_error(kBad + "/empty_group.csv"),
              AllOf(HasSubstr("empty_group.csv line 3"), HasSubstr("'a2' is known but its group is empty")));
}

TEST(ManifestErrors, RowWithNeitherTextNorPath) {
  EXPECT_THAT(listing_error(kBad + "/neither_text_nor_path.csv"),
              AllOf(HasSubstr("neither_text_nor_path.csv line 3"), HasSubstr("neither text nor a path")));
}

TEST(ManifestErrors, EmptyId) {
  TempFolder folder;
  const std::string source = folder.write("m.csv", "id,group,text\na1,alice,x\n  ,alice,y\n");
  EXPECT_THAT(listing_error(source), AllOf(HasSubstr("m.csv line 3"), HasSubstr("id is empty")));
}

TEST(ManifestErrors, EscapingPathNamesLinePathAndOption) {
  EXPECT_THAT(listing_error(kBad + "/escaping_path.csv"),
              AllOf(HasSubstr("escaping_path.csv line 3"), HasSubstr("'../folder/alice/a1.txt'"),
                    HasSubstr("outside the manifest's folder"), HasSubstr("allow_outside_paths")));
  SourceOptions options;
  options.outside_paths_option = "--let-paths-leave";
  EXPECT_THAT(listing_error(kBad + "/escaping_path.csv", options), HasSubstr("turn on --let-paths-leave"));
}

TEST(ManifestErrors, AbsolutePathOutsideTheFolderEscapes) {
  TempFolder folder;
  const std::string source = folder.write("sub/m.csv", "id,group,path\na1,alice," + kManifests + "/texts/a1.txt\n");
  EXPECT_THAT(listing_error(source), AllOf(HasSubstr("m.csv line 2"), HasSubstr("outside the manifest's folder")));
  // An absolute path inside the folder is fine.
  const std::string inside = folder.write("sub/in.txt", "x");
  const std::string ok = folder.write("sub/ok.csv", "id,group,path\na1,alice," + inside + "\n");
  EXPECT_EQ(list_sources(ok).entries[0].path, inside);
}

TEST(ManifestErrors, MissingFilesAllListedInOneMessage) {
  const std::string message = listing_error(kBad + "/missing_files.csv");
  EXPECT_THAT(
      message,
      AllOf(HasSubstr("missing_files.csv: 3 of the listed files are missing"),
            HasSubstr("line 2: texts/gone1.txt (" + kBad + "/texts/gone1.txt)"), HasSubstr("line 4: texts/gone2.txt"),
            HasSubstr("line 5: texts (" + kBad + "/texts, a folder, not a file)"), Not(HasSubstr("ok.txt"))));
}

TEST(ManifestErrors, ManyMissingFilesShowTwentyAndCountTheRest) {
  TempFolder folder;
  std::string csv = "id,group,path\n";
  for (int i = 1; i <= 25; ++i) {
    const std::string n = std::to_string(i);
    csv.append("d").append(n).append(",g,gone").append(n).append(".txt\n");
  }
  const std::string message = listing_error(folder.write("m.csv", csv));
  EXPECT_THAT(message, AllOf(HasSubstr("25 of the listed files are missing"), HasSubstr("line 21: gone20.txt"),
                             Not(HasSubstr("gone21.txt")), HasSubstr("... and 5 more")));
}

TEST(ManifestErrors, InvalidUtf8NamesLineAndByte) {
  // bad/latin1.csv: "id,group,text\n" (14 bytes) + "a1,alice,Fine.\n" (15) + "a2,alice,caf" (12): the 42nd byte.
  EXPECT_THAT(listing_error(kBad + "/latin1.csv"),
              AllOf(HasSubstr("latin1.csv line 3: invalid UTF-8 at byte 41 of the file")));
}

TEST(ManifestErrors, JsonLineNotAnObject) {
  EXPECT_THAT(listing_error(kBad + "/not_object.jsonl"),
              AllOf(HasSubstr("not_object.jsonl line 2"), HasSubstr("JSON array, not a JSON object")));
}

TEST(ManifestErrors, JsonLineNotJsonGivesParserMessage) {
  const std::string message = listing_error(kBad + "/bad_json.jsonl");
  EXPECT_THAT(message, AllOf(HasSubstr("bad_json.jsonl line 3"), HasSubstr("not valid JSON"), HasSubstr("syntax error"),
                             HasSubstr("column"), Not(HasSubstr("at line 1"))));
}

TEST(ManifestErrors, JsonBooleanField) {
  EXPECT_THAT(listing_error(kBad + "/boolean_field.jsonl"),
              AllOf(HasSubstr("boolean_field.jsonl line 1"), HasSubstr("\"checked\" is a boolean")));
}

TEST(ManifestErrors, EmptyJsonLines) {
  TempFolder folder;
  EXPECT_THAT(listing_error(folder.write("m.jsonl", "\n  \n")), HasSubstr("m.jsonl: the manifest is empty"));
}

TEST(ManifestErrors, LoadSourceTextNamesTheFileAndWhereItWasListed) {
  SourceEntry entry;
  entry.path = kBad + "/texts/removed-since-listing.txt";
  entry.origin = "letters.csv line 12";
  try {
    load_source_text(entry);
    FAIL() << "no loupe::Error";
  } catch (const Error& e) {
    EXPECT_THAT(std::string(e.what()),
                AllOf(HasSubstr("removed-since-listing.txt"), HasSubstr("listed at letters.csv line 12")));
  }
}

}  // namespace
}  // namespace loupe

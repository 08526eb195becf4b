// Tests for folder sources (one sub-folder per group) read by list_sources,
// on fixtures/sources/folder/ and its broken variants, and for the UTF-8
// helpers in lib/corpus/source_utf8.h.
#include <filesystem>
#include <fstream>
#include <string>
#include <vector>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/error.h"
#include "corpus/source_listing.h"
#include "corpus/source_utf8.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::AllOf;
using ::testing::Contains;
using ::testing::ElementsAre;
using ::testing::HasSubstr;
using ::testing::Not;

const std::string kFixtures = std::string(LOUPE_SOURCE_DIR) + "/fixtures/sources";
const std::string kFolder = kFixtures + "/folder";

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

using TempFolder = loupe::testing::TempFolder;

TEST(FolderSource, ListsGroupsAndDisputedSortedByGroupThenFile) {
  const SourceListing listing = list_sources(kFolder);
  EXPECT_FALSE(listing.is_manifest);
  EXPECT_TRUE(listing.metadata_columns.empty());
  // Disputed documents have an empty group, so they sort first; b2.TXT counts as .txt.
  ASSERT_THAT(ids_of(listing), ElementsAre("disputed/x1", "alice/a1", "alice/a2", "bob/b1", "bob/b2"));

  const auto& x1 = listing.entries[0];
  EXPECT_EQ(x1.group, "");
  EXPECT_EQ(x1.role, DocumentRole::disputed);
  EXPECT_EQ(x1.path, kFolder + "/disputed/x1.txt");

  const auto& a1 = listing.entries[1];
  EXPECT_EQ(a1.group, "alice");
  EXPECT_EQ(a1.role, DocumentRole::known);
  EXPECT_FALSE(a1.has_inline_text);
  EXPECT_EQ(a1.path, kFolder + "/alice/a1.txt");
  EXPECT_EQ(a1.origin, kFolder + "/alice/a1.txt");
  EXPECT_TRUE(a1.metadata.empty());
  EXPECT_EQ(listing.entries[4].group, "bob");
  EXPECT_EQ(load_source_text(a1), "Dear sister, the rain has not stopped.\n");

  // Ignored: about.md (top level), alice/.hidden.txt, alice/notes.md; the sub-folder alice/drafts is noted.
  EXPECT_EQ(listing.ignored_files, 3u);
  EXPECT_THAT(listing.notes, Contains(AllOf(HasSubstr("alice: sub-folder(s) ignored (drafts)"))));
  EXPECT_THAT(listing.notes, Contains(HasSubstr("1 file(s) directly in the source folder ignored")));
}

TEST(FolderSource, TrailingSlashAndOtherDisputedFolderName) {
  SourceOptions options;
  options.disputed_folder = "bob";  // now bob's files are the disputed ones, and "disputed" is a group
  const SourceListing listing = list_sources(kFolder + "/", options);
  ASSERT_THAT(ids_of(listing), ElementsAre("bob/b1", "bob/b2", "alice/a1", "alice/a2", "disputed/x1"));
  EXPECT_EQ(listing.entries[0].role, DocumentRole::disputed);
  EXPECT_EQ(listing.entries[0].group, "");
  EXPECT_EQ(listing.entries[4].group, "disputed");
  EXPECT_EQ(listing.entries[4].role, DocumentRole::known);
  EXPECT_EQ(listing.entries[2].path, kFolder + "/alice/a1.txt");
}

TEST(FolderSource, NoGroupSubFolders) {
  // bad/folder_no_groups has only a disputed folder and a stray file.
  EXPECT_THAT(listing_error(kFixtures + "/bad/folder_no_groups"),
              AllOf(HasSubstr("folder_no_groups: no group sub-folders"), HasSubstr("'disputed' sub-folder")));
}

TEST(FolderSource, EmptyGroupIsNamed) {
  EXPECT_THAT(listing_error(kFixtures + "/bad/folder_empty_group"),
              AllOf(HasSubstr("the group folder bob holds no .txt files"), Not(HasSubstr("alice"))));
}

TEST(FolderSource, SeveralEmptyGroupsAllNamed) {
  TempFolder folder;
  folder.write("a/one.txt", "x");
  folder.write("b/readme.md", "x");
  folder.write("c/.hidden.txt", "x");
  EXPECT_THAT(listing_error(folder.str()), HasSubstr("the group folders b, c hold no .txt files"));
}

TEST(FolderSource, EmptyDisputedFolderIsOnlyANote) {
  TempFolder folder;
  folder.write("a/one.txt", "x");
  fs::create_directories(folder.str() + "/disputed");
  const SourceListing listing = list_sources(folder.str());
  EXPECT_THAT(ids_of(listing), ElementsAre("a/one"));
  EXPECT_THAT(listing.notes, Contains(HasSubstr("disputed folder holds no .txt files")));
}

TEST(FolderSource, TwoFilesGivingTheSameIdAreAnError) {
  TempFolder folder;
  folder.write("a/one.txt", "x");
  folder.write("a/one.TXT", "y");
  EXPECT_THAT(listing_error(folder.str()), AllOf(HasSubstr("gives the id 'a/one'"), HasSubstr("one.t")));
}

TEST(FolderSource, NonUtf8NameIsAnError) {
  TempFolder folder;
  folder.write("a/one.txt", "x");
  folder.write("caf\xE9/two.txt", "y");
  EXPECT_THAT(listing_error(folder.str()), AllOf(HasSubstr("not valid UTF-8"), HasSubstr("at byte 3 of the name")));
}

TEST(FolderSource, MissingFolder) {
  EXPECT_THAT(listing_error(kFixtures + "/no-such-folder"), AllOf(HasSubstr("no-such-folder: no such file or folder")));
}

TEST(FolderSource, LoadSourceTextOfAFolderIsAnError) {
  SourceEntry entry;
  entry.path = kFolder;
  entry.origin = "letters.csv line 3";
  EXPECT_THROW(load_source_text(entry), Error);
}

TEST(SourceUtf8, LineOfOffsetCountsEveryLineEnd) {
  EXPECT_EQ(line_of_offset("a\nb\r\nc\rd", 7), 4u);
  EXPECT_EQ(line_of_offset("a\nb\r\nc\rd", 0), 1u);
  EXPECT_EQ(line_of_offset("a\nb\r\nc\rd", 3), 2u);
}

}  // namespace
}  // namespace loupe

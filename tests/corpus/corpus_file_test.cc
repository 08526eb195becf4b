// Tests for the corpus file: round trip, damage detection, safe writes.
#include "corpus/corpus_file.h"

#include <filesystem>
#include <fstream>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/binary_io.h"
#include "common/error.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::ThrowsMessage;

Corpus small_corpus() {
  Corpus c;
  c.vocabulary = {"herring", "pier", "coal"};
  c.word_frequency = {3, 1, 2};
  c.document_frequency = {2, 1, 1};
  c.groups = {"north", "south"};
  c.metadata_columns = {"year"};
  Document a{"a", 0, DocumentRole::known, {"1887"}, "", 0, 0, 0};
  Document b{"b#001", 1, DocumentRole::disputed, {"1901"}, "b", 0, 2, 0};
  const std::vector<WordId> ta{0, 0, 1}, tb{2, 2, 0};
  c.add_document(a, ta);
  c.add_document(b, tb);
  c.build_record = {{"note", "test"}};
  return c;
}

class CorpusFileTest : public ::testing::Test {
 protected:
  std::string path(const std::string& name) const { return (dir_ / name).string(); }
  loupe::testing::TempFolder folder_{"corpus-file"};
  const fs::path& dir_ = folder_.path();
};

TEST_F(CorpusFileTest, RoundTripKeepsEverything) {
  const Corpus c = small_corpus();
  write_corpus(c, path("c.corpus"));
  const Corpus back = read_corpus(path("c.corpus"));
  EXPECT_EQ(back.vocabulary, c.vocabulary);
  EXPECT_EQ(back.tokens, c.tokens);
  EXPECT_EQ(back.token_offsets, c.token_offsets);
  EXPECT_EQ(back.documents[1].parent_id, "b");
  EXPECT_EQ(back.documents[1].segment_count, 2u);
  EXPECT_EQ(back.documents[1].role, DocumentRole::disputed);
  EXPECT_EQ(back.documents[1].metadata[0], "1901");
  EXPECT_EQ(back.build_record["note"], "test");
  EXPECT_EQ(back.fingerprint(), c.fingerprint());
}

TEST_F(CorpusFileTest, FingerprintChangesWithAnyToken) {
  Corpus c = small_corpus();
  const auto before = c.fingerprint();
  c.tokens[4] = 1;
  EXPECT_NE(c.fingerprint(), before);
}

TEST_F(CorpusFileTest, TruncatedOrCorruptedFileIsAnErrorNotACrash) {
  write_corpus(small_corpus(), path("c.corpus"));
  const std::string bytes = read_whole_file(path("c.corpus"));
  for (std::size_t keep : {std::size_t{0}, std::size_t{10}, bytes.size() / 2, bytes.size() - 1}) {
    write_file_atomically(path("cut.corpus"), std::string_view(bytes).substr(0, keep));
    EXPECT_THROW(read_corpus(path("cut.corpus")), Error) << "kept " << keep << " bytes";
  }
  std::string damaged = bytes;
  damaged[40] = static_cast<char>(damaged[40] ^ 0x20);
  write_file_atomically(path("bad.corpus"), damaged);
  EXPECT_THAT([&] { read_corpus(path("bad.corpus")); }, ThrowsMessage<Error>(HasSubstr("checksum mismatch")));
}

TEST_F(CorpusFileTest, UnwritablePathKeepsThePreviousFile) {
  write_corpus(small_corpus(), path("c.corpus"));
  const std::string before = read_whole_file(path("c.corpus"));
  EXPECT_THAT([&] { write_corpus(small_corpus(), path("missing/c.corpus")); },
              ThrowsMessage<Error>(HasSubstr("does not exist")));
  fs::permissions(dir_, fs::perms::owner_read | fs::perms::owner_exec);
  if (::geteuid() != 0) {  // root ignores folder permissions; the case above covers it
    EXPECT_THROW(write_corpus(small_corpus(), path("c.corpus")), Error);
  }
  fs::permissions(dir_, fs::perms::owner_all);
  EXPECT_EQ(read_whole_file(path("c.corpus")), before);
}

TEST_F(CorpusFileTest, ValidateCatchesInconsistentData) {
  Corpus c = small_corpus();
  c.tokens[0] = 99;
  EXPECT_THAT([&] { c.validate("x"); }, ThrowsMessage<Error>(HasSubstr("outside the vocabulary")));
}

}  // namespace
}  // namespace loupe

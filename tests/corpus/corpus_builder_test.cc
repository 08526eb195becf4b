// Tests for ingestion as a whole: sources -> filters -> pruning -> segments -> Corpus.
#include "corpus/corpus_builder.h"

#include <filesystem>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::ElementsAre;
using ::testing::HasSubstr;
using ::testing::ThrowsMessage;

class CorpusBuilderTest : public ::testing::Test {
 protected:
  void write(const std::string& relative, const std::string& text) { folder_.write(relative, text); }
  std::string root() const { return folder_.str(); }
  static IngestOptions loose() {
    IngestOptions o;
    o.min_documents = 1;
    return o;
  }
  static std::vector<std::string> words_of(const Corpus& c, std::size_t d) {
    std::vector<std::string> out;
    for (const auto w : c.document_tokens(d)) out.push_back(c.vocabulary[w]);
    return out;
  }
  static std::size_t find(const Corpus& c, const std::string& id) {
    for (std::size_t d = 0; d < c.num_documents(); ++d)
      if (c.documents[d].id == id) return d;
    ADD_FAILURE() << "no document " << id;
    return 0;
  }
  loupe::testing::TempFolder folder_{"builder"};
  const fs::path& root_ = folder_.path();
};

TEST_F(CorpusBuilderTest, FolderSourceGivesGroupsRolesAndFoldedWords) {
  write("north/a.txt", "The herring nets were mended at the quay.");
  write("north/b.txt", "Herring and ice, herring and salt.");
  write("south/c.txt", "Coal dues and timber tonnage.");
  write("disputed/d.txt", "Timber and herring arrived.");
  IngestReport report;
  const Corpus c = build_corpus(root(), loose(), &report);
  EXPECT_THAT(c.groups, ElementsAre("north", "south"));
  ASSERT_EQ(c.num_documents(), 4u);
  const auto d = find(c, "disputed/d");
  EXPECT_EQ(c.documents[d].role, DocumentRole::disputed);
  EXPECT_EQ(c.documents[d].group, kNoGroup);
  EXPECT_EQ(c.groups[c.documents[find(c, "north/a")].group], "north");
  // Built-in stop words ("the", "and", "at", "were") are gone; case is folded.
  EXPECT_THAT(words_of(c, find(c, "north/a")), ElementsAre("herring", "nets", "mended", "quay"));
  EXPECT_THAT(words_of(c, find(c, "north/b")), ElementsAre("herring", "ice", "herring", "salt"));
  // Most frequent word first: herring (4 tokens, 3 documents).
  EXPECT_EQ(c.vocabulary[0], "herring");
  EXPECT_EQ(c.word_frequency[0], 4u);
  EXPECT_EQ(c.document_frequency[0], 3u);
  EXPECT_EQ(report.source_documents, 4u);
  EXPECT_EQ(report.disputed_documents, 1u);
  ASSERT_EQ(report.groups.size(), 2u);
  EXPECT_EQ(report.groups[0].documents, 2u);
  EXPECT_EQ(report.groups[0].tokens, 8u);
  EXPECT_EQ(report.tokens_kept, c.num_tokens());
}

TEST_F(CorpusBuilderTest, PrunesRareCommonAndBeyondTheVocabularyLimit) {
  // 20 documents: "pier" in all (share 1.0 > 0.9), "dredging" in one (too few),
  // "tide" in 10, "storm" in 5, "buoy" in 3.
  for (int i = 0; i < 20; ++i) {
    std::string text = "pier";
    if (i < 10) text += " tide";
    if (i < 5) text += " storm";
    if (i < 3) text += " buoy";
    if (i == 0) text += " dredging";
    write((i % 2 ? "a/" : "b/") + std::to_string(i) + ".txt", text);
  }
  IngestOptions o;  // min_documents 2, max_document_share 0.9
  o.max_vocabulary = 2;
  IngestReport report;
  const Corpus c = build_corpus(root(), o, &report);
  EXPECT_THAT(c.vocabulary, ElementsAre("tide", "storm"));
  std::map<std::string, std::size_t> dropped(report.words_dropped.begin(), report.words_dropped.end());
  EXPECT_EQ(dropped["in too few documents"], 1u);   // dredging
  EXPECT_EQ(dropped["in too many documents"], 1u);  // pier
  EXPECT_EQ(dropped["vocabulary limit"], 1u);       // buoy
  std::map<std::string, std::size_t> tokens(report.tokens_dropped.begin(), report.tokens_dropped.end());
  EXPECT_EQ(tokens["in too many documents"], 20u);
  // Documents whose words were all dropped are excluded and listed.
  EXPECT_EQ(c.num_documents(), 10u);
  EXPECT_EQ(report.empty_documents.size(), 10u);
  EXPECT_FALSE(report.warnings.empty());
}

TEST_F(CorpusBuilderTest, ShareFilterNeedsEnoughDocumentsAndSaysSo) {
  write("a/1.txt", "pier tide");
  write("b/2.txt", "pier storm");
  IngestOptions o = loose();
  IngestReport report;
  const Corpus c = build_corpus(root(), o, &report);
  EXPECT_EQ(c.vocabulary[0], "pier");
  ASSERT_FALSE(report.warnings.empty());
  EXPECT_THAT(report.warnings[0], HasSubstr("--max-document-share was not applied"));
}

TEST_F(CorpusBuilderTest, KeepAndDropListsOverrideFilters) {
  write("src/a/1.txt", "The pier and the lighthouse.");
  write("src/b/2.txt", "The pier was painted.");
  write("keep.txt", "# kept though a stop word\nThe\n");
  IngestOptions o = loose();
  o.keep_words_file = (root_ / "keep.txt").string();
  o.drop_words = {"PIER"};
  const Corpus c = build_corpus((root_ / "src").string(), o, nullptr);
  EXPECT_THAT(words_of(c, find(c, "a/1")), ElementsAre("the", "the", "lighthouse"));
  EXPECT_THAT(words_of(c, find(c, "b/2")), ElementsAre("the", "painted"));
}

TEST_F(CorpusBuilderTest, DropsWordsCapitalisedMidSentence) {
  // "Harrow" is a clerk's name: capitalised wherever it is not sentence-initial.
  // "Storm" starts sentences but is lower-case elsewhere: not a name.
  write("a/1.txt", "Storm came. Mr Harrow saw the storm. The storm passed, said Harrow.");
  write("b/2.txt", "Storm again. Ask Harrow about the storm and the harrow of Captain Harrow.");
  IngestOptions o = loose();
  o.drop_proper_names = true;
  IngestReport report;
  const Corpus c = build_corpus(root(), o, &report);
  EXPECT_THAT(report.proper_names_dropped, ::testing::Contains("harrow"));
  EXPECT_THAT(report.proper_names_dropped, ::testing::Not(::testing::Contains("storm")));
  for (const auto& w : c.vocabulary) EXPECT_NE(w, "harrow");
  EXPECT_THAT(c.vocabulary, ::testing::Contains("storm"));
}

TEST_F(CorpusBuilderTest, CutsLongDocumentsIntoSegments) {
  std::string long_text, medium_text;
  for (int i = 0; i < 25; ++i) long_text += "word" + std::string(1, static_cast<char>('a' + i)) + " ";
  for (int i = 0; i < 24; ++i) medium_text += "word" + std::string(1, static_cast<char>('a' + i)) + " ";
  write("a/long.txt", long_text);
  write("a/medium.txt", medium_text);
  write("b/short.txt", "worda wordb");
  IngestOptions o = loose();
  o.segment_words = 10;
  IngestReport report;
  const Corpus c = build_corpus(root(), o, &report);
  // 25 tokens -> 10 + 10 + 5 (a remainder of half a segment stands alone);
  // 24 tokens -> 10 + 14 (a shorter remainder joins the last piece).
  const auto l3 = find(c, "a/long#003");
  EXPECT_EQ(c.document_length(find(c, "a/long#001")), 10u);
  EXPECT_EQ(c.document_length(l3), 5u);
  EXPECT_EQ(c.documents[l3].parent_id, "a/long");
  EXPECT_EQ(c.documents[l3].segment_index, 2u);
  EXPECT_EQ(c.documents[l3].segment_count, 3u);
  EXPECT_EQ(c.documents[l3].first_token, 20u);
  EXPECT_EQ(c.document_length(find(c, "a/medium#002")), 14u);
  EXPECT_FALSE(c.documents[find(c, "b/short")].is_segment());
  EXPECT_EQ(c.num_documents(), 6u);
  EXPECT_EQ(report.segmented_documents, 2u);
  EXPECT_EQ(report.groups[0].documents, 2u);  // segments count once, under their parent
}

TEST_F(CorpusBuilderTest, InvalidUtf8NamesEveryFileAndByteOrIsReplacedOrSkipped) {
  write("a/good.txt", "harbour pier");
  write("a/bad1.txt", "harbour \xC3\x28 pier");
  write("b/bad2.txt", "\xEF\xBB\xBFpier \xFF");
  try {
    build_corpus(root(), loose(), nullptr);
    FAIL() << "expected an error";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("2 document(s) are not valid UTF-8"));
    EXPECT_THAT(e.what(), HasSubstr("bad1.txt: invalid UTF-8 at byte 8"));
    EXPECT_THAT(e.what(), HasSubstr("bad2.txt: invalid UTF-8 at byte 8"));  // offset counts the BOM
    EXPECT_THAT(e.what(), HasSubstr("--invalid-utf8 replace"));
  }
  IngestOptions replace = loose();
  replace.invalid_utf8 = InvalidUtf8Policy::replace;
  IngestReport report;
  Corpus c = build_corpus(root(), replace, &report);
  EXPECT_EQ(c.num_documents(), 3u);
  EXPECT_EQ(report.invalid_utf8_replaced.size(), 2u);
  IngestOptions skip = loose();
  skip.invalid_utf8 = InvalidUtf8Policy::skip;
  c = build_corpus(root(), skip, &report);
  EXPECT_EQ(c.num_documents(), 1u);
  EXPECT_THAT(report.invalid_utf8_skipped, ElementsAre("a/bad1", "b/bad2"));
}

TEST_F(CorpusBuilderTest, NothingLeftIsAClearError) {
  write("a/1.txt", "the and of");
  write("b/2.txt", "it is");
  EXPECT_THAT([&] { build_corpus(root(), loose(), nullptr); },
              ThrowsMessage<Error>(HasSubstr("no words are left after filtering")));
}

TEST_F(CorpusBuilderTest, BadOptionValuesAreNamed) {
  write("a/1.txt", "pier");
  IngestOptions o;
  o.max_document_share = 1.5;
  EXPECT_THAT([&] { build_corpus(root(), o, nullptr); }, ThrowsMessage<Error>(HasSubstr("--max-document-share")));
  o = IngestOptions();
  o.segment_words = 1;
  EXPECT_THAT([&] { build_corpus(root(), o, nullptr); }, ThrowsMessage<Error>(HasSubstr("--segment-words")));
}

TEST_F(CorpusBuilderTest, SameInputGivesTheSameCorpusAndFile) {
  write("a/1.txt", "Herring nets and herring boats.");
  write("b/2.txt", "Coal and timber, timber and coal.");
  write("b/3.txt", "Nets of timber.");
  const Corpus first = build_corpus(root(), loose(), nullptr);
  const Corpus second = build_corpus(root(), loose(), nullptr);
  EXPECT_EQ(first.fingerprint(), second.fingerprint());
  fs::create_directories(root_ / "out");
  write_corpus(first, (root_ / "out/one.corpus").string());
  write_corpus(second, (root_ / "out/two.corpus").string());
  EXPECT_EQ(read_whole_file((root_ / "out/one.corpus").string()), read_whole_file((root_ / "out/two.corpus").string()));
  const Corpus back = read_corpus((root_ / "out/one.corpus").string());
  EXPECT_EQ(back.fingerprint(), first.fingerprint());
  EXPECT_EQ(back.build_record, first.build_record);
  EXPECT_EQ(back.documents[0].id, first.documents[0].id);
}

}  // namespace
}  // namespace loupe

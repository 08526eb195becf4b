// Tests for joining segments back into their source documents (corpus/corpus_segments.h).
#include "corpus/corpus_segments.h"

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "corpus/corpus_builder.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

using ::testing::ElementsAre;

std::vector<std::string> words_of(const Corpus& c, std::size_t d) {
  std::vector<std::string> out;
  for (const auto w : c.document_tokens(d)) out.push_back(c.vocabulary[w]);
  return out;
}

TEST(CorpusSegments, JoiningGivesBackTheUncutCorpus) {
  loupe::testing::TempFolder folder("segments");
  std::string long_text;
  for (int i = 0; i < 25; ++i) long_text += "word" + std::string(1, static_cast<char>('a' + i)) + " ";
  folder.write("a/long.txt", long_text);
  folder.write("b/short.txt", "worda wordb wordc");
  folder.write("disputed/odd.txt", long_text + " wordz wordy");
  IngestOptions options;
  options.min_documents = 1;
  const Corpus whole = build_corpus(folder.str(), options, nullptr);
  options.segment_words = 10;
  const Corpus cut = build_corpus(folder.str(), options, nullptr);
  ASSERT_GT(cut.num_documents(), whole.num_documents());

  const JoinedCorpus joined = join_segments(cut);
  ASSERT_EQ(joined.corpus.num_documents(), whole.num_documents());
  for (std::size_t d = 0; d < whole.num_documents(); ++d) {
    EXPECT_EQ(joined.corpus.documents[d].id, whole.documents[d].id);
    EXPECT_EQ(joined.corpus.documents[d].group, whole.documents[d].group);
    EXPECT_EQ(joined.corpus.documents[d].role, whole.documents[d].role);
    EXPECT_FALSE(joined.corpus.documents[d].is_segment());
    EXPECT_EQ(words_of(joined.corpus, d), words_of(whole, d)) << whole.documents[d].id;
  }
  EXPECT_EQ(joined.corpus.vocabulary, cut.vocabulary);
  ASSERT_EQ(joined.whole_of.size(), cut.num_documents());
  for (std::size_t d = 0; d < cut.num_documents(); ++d) {
    const auto& document = cut.documents[d];
    EXPECT_EQ(joined.corpus.documents[joined.whole_of[d]].id, document.is_segment() ? document.parent_id : document.id);
  }
  joined.corpus.validate("joined");
}

TEST(CorpusSegments, SegmentsAreJoinedInSegmentOrderWhereverTheyStand) {
  Corpus c;
  c.vocabulary = {"x", "y", "z"};
  c.word_frequency = {1, 1, 1};
  c.document_frequency = {1, 1, 1};
  auto segment = [](const std::string& id, std::uint32_t index, std::uint64_t first_token) {
    Document d;
    d.id = id;
    d.parent_id = "a";
    d.segment_index = index;
    d.segment_count = 2;
    d.first_token = first_token;
    return d;
  };
  const Document second = segment("a#002", 1, 2), first = segment("a#001", 0, 0);
  Document plain;
  plain.id = "b";
  const std::vector<WordId> xy{0, 1}, z{2}, none{};
  c.add_document(second, z);
  c.add_document(plain, none);
  c.add_document(first, xy);
  const JoinedCorpus joined = join_segments(c);
  ASSERT_EQ(joined.corpus.num_documents(), 2u);
  EXPECT_EQ(joined.corpus.documents[0].id, "a");
  EXPECT_THAT(words_of(joined.corpus, 0), ElementsAre("x", "y", "z"));
  EXPECT_EQ(joined.corpus.documents[1].id, "b");
  EXPECT_THAT(joined.whole_of, ElementsAre(0u, 1u, 0u));
}

}  // namespace
}  // namespace loupe

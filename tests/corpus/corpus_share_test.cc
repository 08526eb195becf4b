// read_corpus_share (corpus/corpus_file.h): each process's share of a corpus file,
// checked against read_corpus of the same file.
#include <gtest/gtest.h>

#include <fstream>
#include <iterator>

#include "common/error.h"
#include "corpus/corpus_file.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

// Documents of lengths 3, 0, 5, 1, 7, 2 over 6 words, in groups a/b.
Corpus small_corpus() {
  Corpus corpus;
  corpus.vocabulary = {"w0", "w1", "w2", "w3", "w4", "w5"};
  corpus.word_frequency.assign(6, 0);
  corpus.document_frequency.assign(6, 0);
  corpus.groups = {"a", "b"};
  corpus.metadata_columns = {"box"};
  const std::vector<std::size_t> lengths{3, 0, 5, 1, 7, 2};
  WordId next = 0;
  for (std::size_t d = 0; d < lengths.size(); ++d) {
    Document doc;
    doc.id = "doc" + std::to_string(d);
    doc.group = static_cast<std::uint32_t>(d % 2);
    doc.metadata = {"box " + std::to_string(d / 3)};
    std::vector<WordId> words;
    for (std::size_t i = 0; i < lengths[d]; ++i) {
      words.push_back(next);
      ++corpus.word_frequency[next];
      next = (next + 1) % 6;
    }
    corpus.add_document(doc, words);
  }
  return corpus;
}

TEST(CorpusShare, TheSharesPutTogetherAreTheCorpus) {
  testing::TempFolder folder("share");
  const Corpus corpus = small_corpus();
  const std::string path = folder.file("small.corpus");
  write_corpus(corpus, path);
  for (std::size_t ranks = 1; ranks <= corpus.num_documents(); ++ranks) {
    std::vector<WordId> tokens;
    std::vector<std::string> ids;
    for (std::size_t rank = 0; rank < ranks; ++rank) {
      const CorpusShare share = read_corpus_share(path, rank, ranks, rank == 0);
      EXPECT_EQ(share.first_document, ids.size());
      EXPECT_EQ(share.first_token, tokens.size());
      EXPECT_EQ(share.total_documents, corpus.num_documents());
      EXPECT_EQ(share.total_tokens, corpus.num_tokens());
      EXPECT_GE(share.corpus.num_documents(), 1U) << ranks << " processes, process " << rank;
      EXPECT_EQ(share.corpus.vocabulary, corpus.vocabulary);
      EXPECT_EQ(share.corpus.groups, corpus.groups);
      tokens.insert(tokens.end(), share.corpus.tokens.begin(), share.corpus.tokens.end());
      for (const auto& doc : share.corpus.documents) ids.push_back(doc.id);
      if (rank == 0) {
        EXPECT_EQ(share.fingerprint, corpus.fingerprint());
        ASSERT_EQ(share.all_documents.size(), corpus.num_documents());
        EXPECT_EQ(share.all_documents.back().metadata, corpus.documents.back().metadata);
      } else {
        EXPECT_TRUE(share.all_documents.empty());
      }
    }
    EXPECT_EQ(tokens, corpus.tokens) << ranks << " processes";
    ASSERT_EQ(ids.size(), corpus.num_documents());
    for (std::size_t d = 0; d < ids.size(); ++d) EXPECT_EQ(ids[d], corpus.documents[d].id);
  }
}

TEST(CorpusShare, BoundsFollowTheTokens) {
  // The header's example.
  EXPECT_EQ(document_share_bounds({0, 10, 20, 30, 40}, 2), (std::vector<std::size_t>{0, 2, 4}));
  // One long document first: the other shares still get one document each.
  EXPECT_EQ(document_share_bounds({0, 100, 101, 102}, 3), (std::vector<std::size_t>{0, 1, 2, 3}));
}

TEST(CorpusShare, MoreProcessesThanDocumentsIsAnErrorNamingTheFile) {
  testing::TempFolder folder("share");
  const std::string path = folder.file("small.corpus");
  write_corpus(small_corpus(), path);
  try {
    read_corpus_share(path, 0, 7, true);
    FAIL() << "no error";
  } catch (const Error& e) {
    const std::string message = e.what();
    EXPECT_NE(message.find(path), std::string::npos) << message;
    EXPECT_NE(message.find("has 6 documents but the fit was started on 7 processes"), std::string::npos) << message;
    EXPECT_NE(message.find("at most 6 processes"), std::string::npos) << message;
  }
}

TEST(CorpusShare, DamagedFilesAreErrors) {
  testing::TempFolder folder("share");
  const std::string path = folder.file("small.corpus");
  write_corpus(small_corpus(), path);
  std::ifstream in(path, std::ios::binary);
  std::string bytes{std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
  // The last token's word id 5 becomes 4 (file end: checksum 8 bytes, build record "{}" with its
  // 8-byte length, then the last token's 4 bytes): still a word of the vocabulary, so only the
  // process that verifies the checksum (rank 0, whole_corpus) sees the damage.
  std::string flipped = bytes;
  flipped[flipped.size() - 22] = static_cast<char>(flipped[flipped.size() - 22] ^ 0x01);
  const std::string damaged = folder.write("damaged.corpus", flipped);
  EXPECT_THROW(read_corpus_share(damaged, 0, 2, true), Error);
  EXPECT_NO_THROW(read_corpus_share(damaged, 1, 2, false));
  const std::string truncated = folder.write("truncated.corpus", bytes.substr(0, bytes.size() / 2));
  EXPECT_THROW(read_corpus_share(truncated, 1, 2, false), Error);
  EXPECT_THROW(read_corpus_share(folder.file("missing.corpus"), 0, 1, true), Error);
}

}  // namespace
}  // namespace loupe

// The model file: a round trip keeps everything; damaged, truncated, foreign
// and newer files are clear errors; a model is refused for another corpus.
#include <cstring>
#include <fstream>

#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include "common/binary_io.h"
#include "common/error.h"
#include "model/fit.h"
#include "model/model_file.h"
#include "model/synthetic_corpus.h"
#include "test_support.h"

namespace loupe {
namespace {

using ::testing::HasSubstr;

Model small_model(Corpus* corpus_out = nullptr) {
  SyntheticCorpusSpec spec;
  spec.topic_count = 3;
  spec.vocabulary_size = 30;
  spec.num_documents = 20;
  spec.document_length = 15;
  spec.seed = 5;
  Corpus corpus = draw_lda_corpus(spec).corpus;
  corpus.documents[3].role = DocumentRole::disputed;
  corpus.documents[4].group = kNoGroup;
  FitOptions options;
  options.topic_count = 3;
  options.sweeps = 12;
  options.burn_in = 4;
  options.samples = 2;
  options.sample_lag = 3;
  options.chains = 2;
  options.alpha = {0.2, 0.3, 0.4};
  Model model = fit_model(corpus, options);
  if (corpus_out != nullptr) *corpus_out = corpus;
  return model;
}

std::string error_of(const std::string& path) {
  try {
    read_model(path);
  } catch (const Error& e) {
    return e.what();
  }
  return "";
}

std::string read_bytes(const std::string& path) { return read_whole_file(path); }

void write_bytes(const std::string& path, const std::string& bytes) {
  std::ofstream out(path, std::ios::binary | std::ios::trunc);
  out.write(bytes.data(), static_cast<std::streamsize>(bytes.size()));
}

TEST(ModelFileTest, RoundTripKeepsEverything) {
  test::TempFolder folder;
  const Model model = small_model();
  write_model(model, folder.file("m.loupe-model"));
  const Model back = read_model(folder.file("m.loupe-model"));
  EXPECT_EQ(back.options.topic_count, 3U);
  EXPECT_EQ(back.options.alpha, model.options.alpha);
  EXPECT_EQ(back.corpus_fingerprint, model.corpus_fingerprint);
  EXPECT_EQ(back.vocabulary, model.vocabulary);
  EXPECT_EQ(back.document_ids, model.document_ids);
  EXPECT_EQ(back.document_groups, model.document_groups);
  EXPECT_EQ(back.document_roles, model.document_roles);
  EXPECT_EQ(back.document_roles[3], DocumentRole::disputed);
  EXPECT_EQ(back.group_name(4), "");
  ASSERT_EQ(back.chains.size(), 2U);
  for (std::size_t c = 0; c < 2; ++c) {
    EXPECT_EQ(back.chains[c].seed, model.chains[c].seed);
    EXPECT_EQ(back.chains[c].phi, model.chains[c].phi);
    EXPECT_EQ(back.chains[c].theta, model.chains[c].theta);
    EXPECT_EQ(back.chains[c].alpha, model.chains[c].alpha);
    EXPECT_EQ(back.chains[c].topic_share, model.chains[c].topic_share);
    ASSERT_EQ(back.chains[c].trace.size(), model.chains[c].trace.size());
    EXPECT_EQ(back.chains[c].trace.back().sweep, 12U);
    EXPECT_EQ(back.chains[c].trace.back().log_likelihood, model.chains[c].trace.back().log_likelihood);
  }
  // rhat is NaN-safe compared.
  EXPECT_TRUE(back.rhat == model.rhat || (std::isnan(back.rhat) && std::isnan(model.rhat)));
}

TEST(ModelFileTest, ACorruptedByteIsACheckumError) {
  test::TempFolder folder;
  const std::string path = folder.file("m.loupe-model");
  write_model(small_model(), path);
  std::string bytes = read_bytes(path);
  bytes[bytes.size() / 2] ^= 0x20;
  write_bytes(path, bytes);
  EXPECT_THAT(error_of(path), HasSubstr("checksum mismatch: the file is corrupted"));
}

TEST(ModelFileTest, ATruncatedFileIsAnError) {
  test::TempFolder folder;
  const std::string path = folder.file("m.loupe-model");
  write_model(small_model(), path);
  const std::string bytes = read_bytes(path);
  write_bytes(path, bytes.substr(0, bytes.size() - 100));
  EXPECT_THAT(error_of(path), HasSubstr("truncated"));
  write_bytes(path, bytes.substr(0, 10));
  EXPECT_THAT(error_of(path), HasSubstr("not a loupe model file"));
}

TEST(ModelFileTest, ANewerFormatVersionIsRefused) {
  test::TempFolder folder;
  const std::string path = folder.file("m.loupe-model");
  write_model(small_model(), path);
  std::string bytes = read_bytes(path);
  const std::uint32_t newer = kModelFormatVersion + 1;
  std::memcpy(bytes.data() + 8, &newer, sizeof newer);  // the version follows the 8-byte magic
  write_bytes(path, bytes);
  EXPECT_THAT(error_of(path), HasSubstr("model file format version 2 is newer than this loupe reads (version 1)"));
}

TEST(ModelFileTest, OtherFilesAreNotModels) {
  test::TempFolder folder;
  write_bytes(folder.file("notes.txt"), "just some text that is long enough to have a header");
  EXPECT_THAT(error_of(folder.file("notes.txt")), HasSubstr("not a loupe model file"));
  EXPECT_THAT(error_of(folder.file("missing")), HasSubstr("no such file"));
}

TEST(ModelFileTest, AnInconsistentPayloadIsReportedWithItsByte) {
  // A well-formed wrapper around a payload that stops short: the reader names the byte.
  test::TempFolder folder;
  const std::string path = folder.file("m.loupe-model");
  const std::vector<char> payload{3, 0, 0, 0};  // K = 3, then nothing
  const FileFormat format{{'L', 'O', 'U', 'P', 'E', 'M', 'D', 'L'}, kModelFormatVersion, "model"};
  write_binary_file(path, format, payload);
  EXPECT_THAT(error_of(path), HasSubstr("corrupt at byte"));
}

TEST(ModelFileTest, AModelIsRefusedForAnotherCorpus) {
  Corpus corpus;
  const Model model = small_model(&corpus);
  EXPECT_NO_THROW(check_model_matches(model, corpus, "train.corpus"));
  Corpus other = corpus;
  other.tokens[0] = other.tokens[0] == 0 ? 1 : 0;
  try {
    check_model_matches(model, other, "other.corpus");
    FAIL() << "a different corpus was accepted";
  } catch (const Error& e) {
    EXPECT_THAT(e.what(), HasSubstr("the model was fitted on another corpus: other.corpus has fingerprint"));
  }
}

}  // namespace
}  // namespace loupe

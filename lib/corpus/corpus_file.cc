#include "corpus/corpus_file.h"

#include "common/binary_io.h"
#include "common/error.h"

namespace loupe {

namespace {
constexpr FileFormat kCorpusFormat{{'L', 'O', 'U', 'P', 'E', 'C', 'R', 'P'}, kCorpusFormatVersion, "corpus"};
}  // namespace

void write_corpus(const Corpus& corpus, const std::string& path) {
  BinaryWriter out;
  out.put_strings(corpus.vocabulary);
  out.put_vector(corpus.word_frequency);
  out.put_vector(corpus.document_frequency);
  out.put_strings(corpus.groups);
  out.put_strings(corpus.metadata_columns);
  out.put<std::uint64_t>(corpus.documents.size());
  for (const auto& doc : corpus.documents) {
    out.put_string(doc.id);
    out.put<std::uint32_t>(doc.group);
    out.put<unsigned char>(static_cast<unsigned char>(doc.role));
    out.put_strings(doc.metadata);
    out.put_string(doc.parent_id);
    out.put<std::uint32_t>(doc.segment_index);
    out.put<std::uint32_t>(doc.segment_count);
    out.put<std::uint64_t>(doc.first_token);
  }
  out.put_vector(corpus.token_offsets);
  out.put_vector(corpus.tokens);
  out.put_string(corpus.build_record.dump());
  write_binary_file(path, kCorpusFormat, out.bytes());
}

Corpus read_corpus(const std::string& path) {
  std::uint32_t version = 0;
  const std::string payload = read_binary_file(path, kCorpusFormat, &version);
  BinaryReader in(payload, path);
  Corpus corpus;
  corpus.vocabulary = in.get_strings();
  corpus.word_frequency = in.get_vector<std::uint64_t>();
  corpus.document_frequency = in.get_vector<std::uint32_t>();
  corpus.groups = in.get_strings();
  corpus.metadata_columns = in.get_strings();
  const auto num_documents = in.get<std::uint64_t>();
  if (num_documents > payload.size()) in.fail("the document count is impossible");
  corpus.documents.resize(num_documents);
  for (auto& doc : corpus.documents) {
    doc.id = in.get_string();
    doc.group = in.get<std::uint32_t>();
    const auto role = in.get<unsigned char>();
    if (role > 1) in.fail("unknown document role " + std::to_string(role));
    doc.role = static_cast<DocumentRole>(role);
    doc.metadata = in.get_strings();
    doc.parent_id = in.get_string();
    doc.segment_index = in.get<std::uint32_t>();
    doc.segment_count = in.get<std::uint32_t>();
    doc.first_token = in.get<std::uint64_t>();
  }
  corpus.token_offsets = in.get_vector<std::uint64_t>();
  corpus.tokens = in.get_vector<WordId>();
  const std::string record = in.get_string();
  corpus.build_record = nlohmann::json::parse(record, nullptr, /*allow_exceptions=*/false);
  if (corpus.build_record.is_discarded()) in.fail("the build record is not valid JSON");
  if (!in.at_end()) in.fail("extra bytes after the corpus");
  corpus.validate(path);
  return corpus;
}

}  // namespace loupe

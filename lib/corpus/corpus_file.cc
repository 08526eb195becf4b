#include "corpus/corpus_file.h"

#include <algorithm>

#include "common/binary_io.h"
#include "common/error.h"

namespace loupe {

namespace {
constexpr FileFormat kCorpusFormat{{'L', 'O', 'U', 'P', 'E', 'C', 'R', 'P'}, kCorpusFormatVersion, "corpus"};

// The corpus file up to the document table, read into CORPUS (documents into DOCUMENTS), from a reader that
// holds the payload (BinaryReader) or streams it (BinaryFileReader); PAYLOAD_SIZE bounds the document count.
template <typename Reader>
void read_corpus_head(Reader& in, std::uint64_t payload_size, Corpus& corpus, std::vector<Document>& documents) {
  corpus.vocabulary = in.get_strings();
  corpus.word_frequency = in.template get_vector<std::uint64_t>();
  corpus.document_frequency = in.template get_vector<std::uint32_t>();
  corpus.groups = in.get_strings();
  corpus.metadata_columns = in.get_strings();
  const auto num_documents = in.template get<std::uint64_t>();
  if (num_documents > payload_size) in.fail("the document count is impossible");
  documents.resize(num_documents);
  for (auto& doc : documents) {
    doc.id = in.get_string();
    doc.group = in.template get<std::uint32_t>();
    const auto role = in.template get<unsigned char>();
    if (role > 1) in.fail("unknown document role " + std::to_string(role));
    doc.role = static_cast<DocumentRole>(role);
    doc.metadata = in.get_strings();
    doc.parent_id = in.get_string();
    doc.segment_index = in.template get<std::uint32_t>();
    doc.segment_count = in.template get<std::uint32_t>();
    doc.first_token = in.template get<std::uint64_t>();
  }
}

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
  read_corpus_head(in, payload.size(), corpus, corpus.documents);
  corpus.token_offsets = in.get_vector<std::uint64_t>();
  corpus.tokens = in.get_vector<WordId>();
  const std::string record = in.get_string();
  corpus.build_record = nlohmann::json::parse(record, nullptr, /*allow_exceptions=*/false);
  if (corpus.build_record.is_discarded()) in.fail("the build record is not valid JSON");
  if (!in.at_end()) in.fail("extra bytes after the corpus");
  corpus.validate(path);
  return corpus;
}

std::vector<std::size_t> document_share_bounds(const std::vector<std::uint64_t>& token_offsets, std::size_t ranks) {
  const std::size_t documents = token_offsets.size() - 1;
  const std::uint64_t tokens = token_offsets.back();
  std::vector<std::size_t> bounds(ranks + 1, 0);
  bounds[ranks] = documents;
  for (std::size_t r = 1; r < ranks; ++r) {
    const std::uint64_t target = tokens * r / ranks;
    auto d = static_cast<std::size_t>(std::lower_bound(token_offsets.begin(), token_offsets.end(), target) -
                                      token_offsets.begin());
    // At least one document for this share and for each of those after it.
    d = std::max(d, bounds[r - 1] + 1);
    d = std::min(d, documents - (ranks - r));
    bounds[r] = d;
  }
  return bounds;
}

CorpusShare read_corpus_share(const std::string& path, std::size_t rank, std::size_t ranks, bool whole_corpus) {
  BinaryFileReader in(path, kCorpusFormat);
  CorpusShare share;
  Corpus& corpus = share.corpus;
  std::vector<Document> documents;
  read_corpus_head(in, in.payload_size(), corpus, documents);
  const std::uint64_t num_documents = documents.size();
  const std::vector<std::uint64_t> offsets = in.get_vector<std::uint64_t>();
  const std::uint64_t token_count = in.get_count(sizeof(WordId));
  const std::uint64_t tokens_at = in.offset();
  if (offsets.size() != num_documents + 1 || offsets.front() != 0 || offsets.back() != token_count) {
    throw Error(path +
                ": inconsistent corpus: document offsets do not match the documents and tokens. Rebuild it with `loupe "
                "ingest`.");
  }
  for (std::size_t d = 0; d < num_documents; ++d) {
    if (offsets[d] > offsets[d + 1]) {
      throw Error(path + ": inconsistent corpus: document offsets decrease at document " + std::to_string(d) +
                  ". Rebuild it with `loupe ingest`.");
    }
  }
  if (num_documents < ranks) {
    throw Error(path + ": the corpus has " + std::to_string(num_documents) + " document" +
                (num_documents == 1 ? "" : "s") + " but the fit was started on " + std::to_string(ranks) +
                " processes; each process needs at least one document. Start it on at most " +
                std::to_string(num_documents) + " processes (mpirun -np " + std::to_string(num_documents) +
                "), or fit without mpirun.");
  }
  const auto bounds = document_share_bounds(offsets, ranks);
  const std::size_t first = bounds[rank];
  const std::size_t end = bounds[rank + 1];
  share.first_document = first;
  share.total_documents = num_documents;
  share.first_token = offsets[first];
  share.total_tokens = token_count;
  // Only this share's tokens.
  in.skip(offsets[first] * sizeof(WordId));
  corpus.tokens.resize(offsets[end] - offsets[first]);
  if (!corpus.tokens.empty()) in.read(corpus.tokens.data(), corpus.tokens.size() * sizeof(WordId));
  in.skip((token_count - offsets[end]) * sizeof(WordId));
  const std::string record = in.get_string();
  corpus.build_record = nlohmann::json::parse(record, nullptr, /*allow_exceptions=*/false);
  if (corpus.build_record.is_discarded()) in.fail("the build record is not valid JSON");
  if (!in.at_end()) in.fail("extra bytes after the corpus");

  corpus.token_offsets.assign(end - first + 1, 0);
  for (std::size_t d = first; d <= end; ++d) corpus.token_offsets[d - first] = offsets[d] - offsets[first];
  corpus.documents.assign(documents.begin() + static_cast<std::ptrdiff_t>(first),
                          documents.begin() + static_cast<std::ptrdiff_t>(end));
  corpus.validate(path);
  if (whole_corpus) {
    for (const auto& doc : documents) {
      if (doc.group != kNoGroup && doc.group >= corpus.groups.size()) {
        throw Error(path + ": inconsistent corpus: document " + doc.id +
                    " has an unknown group. Rebuild it with `loupe ingest`.");
      }
    }
    // One pass over the file: its checksum, and the fingerprint over every token.
    Fnv1a64 fingerprint = fingerprint_before_tokens(corpus.vocabulary, corpus.groups, documents, offsets);
    const std::uint64_t tokens_end = tokens_at + token_count * sizeof(WordId);
    in.verify_checksum([&](std::uint64_t at, const char* bytes, std::size_t size) {
      const std::uint64_t from = std::max(at, tokens_at);
      const std::uint64_t to = std::min<std::uint64_t>(at + size, tokens_end);
      if (from < to) fingerprint.update(bytes + (from - at), static_cast<std::size_t>(to - from));
    });
    share.fingerprint = fingerprint.digest();
    share.all_documents = std::move(documents);
  }
  return share;
}

}  // namespace loupe

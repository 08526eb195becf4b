// The Corpus: the validated, compact output of ingestion that every later stage
// reads. Tokens are word ids in one flat array with per-document offsets (CSR).
#pragma once

#include <cstdint>
#include <limits>
#include <span>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "common/checksum.h"
#include "corpus/document_role.h"

namespace loupe {

using WordId = std::uint32_t;
inline constexpr std::uint32_t kNoGroup = std::numeric_limits<std::uint32_t>::max();

struct Document {
  std::string id;                  // unique within the corpus
  std::uint32_t group = kNoGroup;  // index into Corpus::groups, kNoGroup when none
  DocumentRole role = DocumentRole::known;
  std::vector<std::string> metadata;  // aligned with Corpus::metadata_columns
  // Segments: a long source document split into consecutive pieces. For a
  // segment, parent_id names the source document, segment_index is its place
  // (0-based) among segment_count pieces, and first_token is the position of its
  // first token in the parent's token stream. Not a segment: segment_count == 0.
  std::string parent_id;
  std::uint32_t segment_index = 0;
  std::uint32_t segment_count = 0;
  std::uint64_t first_token = 0;

  bool is_segment() const { return segment_count > 0; }
};

class Corpus {
 public:
  // Word ids index vocabulary; word_frequency[w] counts w's tokens in the
  // corpus and document_frequency[w] the source documents that contain it.
  std::vector<std::string> vocabulary;
  std::vector<std::uint64_t> word_frequency;
  std::vector<std::uint32_t> document_frequency;

  std::vector<std::string> groups;            // group names, sorted
  std::vector<std::string> metadata_columns;  // extra manifest columns, in order
  std::vector<Document> documents;

  // CSR layout: document d owns tokens[token_offsets[d] .. token_offsets[d+1]).
  std::vector<std::uint64_t> token_offsets{0};
  std::vector<WordId> tokens;

  // How the corpus was built (ingest options, sources, dropped items): JSON.
  nlohmann::json build_record = nlohmann::json::object();

  std::size_t num_documents() const { return documents.size(); }
  std::size_t num_tokens() const { return tokens.size(); }
  std::size_t vocabulary_size() const { return vocabulary.size(); }
  std::span<const WordId> document_tokens(std::size_t d) const {
    return {tokens.data() + token_offsets[d], tokens.data() + token_offsets[d + 1]};
  }
  std::size_t document_length(std::size_t d) const {
    return static_cast<std::size_t>(token_offsets[d + 1] - token_offsets[d]);
  }

  // Appends a document and its tokens (word ids must be < vocabulary_size()).
  void add_document(Document document, std::span<const WordId> words);

  // A hash of the vocabulary, the documents (id, group, role) and every token.
  // A model records it; using a model with another corpus is refused.
  std::uint64_t fingerprint() const;

  // Checks the invariants (offsets, word ids, group indices, metadata widths);
  // throws loupe::Error naming what is wrong. Used after reading a file.
  void validate(const std::string& where) const;
};

// The documents `documents` of `corpus` (in that order) with its vocabulary, groups and metadata columns,
// word and document frequencies recounted. Throws loupe::Error for an index outside the corpus.
// Example: for held-out evaluation, every tenth document in one corpus and the rest in another.
Corpus corpus_of_documents(const Corpus& corpus, std::span<const std::size_t> documents);

// The hash Corpus::fingerprint computes before it adds the tokens' bytes, for a
// reader that streams the tokens instead of holding them (read_corpus_share).
Fnv1a64 fingerprint_before_tokens(const std::vector<std::string>& vocabulary, const std::vector<std::string>& groups,
                                  const std::vector<Document>& documents, std::span<const std::uint64_t> token_offsets);

}  // namespace loupe

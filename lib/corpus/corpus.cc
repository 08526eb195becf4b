#include "corpus/corpus.h"

#include <string>
#include <vector>

#include "common/checksum.h"
#include "common/error.h"

namespace loupe {

void Corpus::add_document(Document document, std::span<const WordId> words) {
  documents.push_back(std::move(document));
  tokens.insert(tokens.end(), words.begin(), words.end());
  token_offsets.push_back(tokens.size());
}

Fnv1a64 fingerprint_before_tokens(const std::vector<std::string>& vocabulary, const std::vector<std::string>& groups,
                                  const std::vector<Document>& documents,
                                  std::span<const std::uint64_t> token_offsets) {
  Fnv1a64 h;
  h.update_value<std::uint64_t>(vocabulary.size());
  for (const auto& word : vocabulary) h.update(word);
  h.update_value<std::uint64_t>(documents.size());
  for (const auto& doc : documents) {
    h.update(doc.id);
    h.update(doc.group == kNoGroup ? std::string_view() : std::string_view(groups[doc.group]));
    h.update_value(static_cast<unsigned char>(doc.role));
  }
  h.update(token_offsets.data(), token_offsets.size() * sizeof(token_offsets[0]));
  return h;
}

std::uint64_t Corpus::fingerprint() const {
  Fnv1a64 h = fingerprint_before_tokens(vocabulary, groups, documents, token_offsets);
  h.update(tokens.data(), tokens.size() * sizeof(tokens[0]));
  return h.digest();
}

void Corpus::validate(const std::string& where) const {
  auto fail = [&](const std::string& what) {
    throw Error(where + ": inconsistent corpus: " + what + ". Rebuild it with `loupe ingest`.");
  };
  const auto v = vocabulary.size();
  if (word_frequency.size() != v || document_frequency.size() != v) fail("vocabulary tables differ in size");
  if (token_offsets.size() != documents.size() + 1) fail("document offsets do not match the documents");
  if (token_offsets.front() != 0 || token_offsets.back() != tokens.size())
    fail("document offsets do not cover the tokens");
  for (std::size_t d = 0; d + 1 < token_offsets.size(); ++d) {
    if (token_offsets[d] > token_offsets[d + 1]) fail("document offsets decrease at document " + std::to_string(d));
  }
  for (const auto w : tokens) {
    if (w >= v) fail("a token's word id " + std::to_string(w) + " is outside the vocabulary");
  }
  for (const auto& doc : documents) {
    if (doc.group != kNoGroup && doc.group >= groups.size()) fail("document " + doc.id + " has an unknown group");
    if (doc.metadata.size() != metadata_columns.size())
      fail("document " + doc.id + " has the wrong number of metadata fields");
  }
}

Corpus corpus_of_documents(const Corpus& corpus, std::span<const std::size_t> documents) {
  Corpus out;
  out.vocabulary = corpus.vocabulary;
  out.groups = corpus.groups;
  out.metadata_columns = corpus.metadata_columns;
  const std::size_t v = corpus.vocabulary_size();
  out.word_frequency.assign(v, 0);
  out.document_frequency.assign(v, 0);
  std::vector<std::size_t> last_seen(v, static_cast<std::size_t>(-1));
  for (const std::size_t d : documents) {
    if (d >= corpus.num_documents()) {
      throw Error("document " + std::to_string(d) + " is outside the corpus of " +
                  std::to_string(corpus.num_documents()) + " documents");
    }
    const auto words = corpus.document_tokens(d);
    const std::size_t index = out.num_documents();
    out.add_document(corpus.documents[d], words);
    for (const auto w : words) {
      ++out.word_frequency[w];
      if (last_seen[w] != index) {
        last_seen[w] = index;
        ++out.document_frequency[w];
      }
    }
  }
  return out;
}

}  // namespace loupe

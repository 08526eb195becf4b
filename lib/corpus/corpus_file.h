// Reading and writing the binary corpus file (`loupe ingest -o FILE`).
// Versioned and checksummed; a damaged or truncated file is an error, never a crash.
#pragma once

#include <cstdint>
#include <string>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

inline constexpr std::uint32_t kCorpusFormatVersion = 1;

// Writes atomically (temporary file, then rename): a failed write leaves any
// previous file at PATH untouched.
void write_corpus(const Corpus& corpus, const std::string& path);

// Reads and validates; throws loupe::Error that names the file and the problem.
Corpus read_corpus(const std::string& path);

// One process's share of a corpus, for a fit spread over several processes (MPI):
// the whole vocabulary, groups and columns, and a contiguous range of documents with
// their tokens, so that no process holds the tokens of the others.
struct CorpusShare {
  Corpus corpus;                   // the share's documents and tokens (offsets from 0), the whole vocabulary
  std::size_t first_document = 0;  // index in the whole corpus of corpus.documents[0]
  std::size_t total_documents = 0;
  std::uint64_t first_token = 0;  // index in the whole corpus of the share's first token
  std::uint64_t total_tokens = 0;
  // Filled only when read with `whole_corpus` (the process that writes the model):
  std::vector<Document> all_documents;  // every document, in corpus order
  std::uint64_t fingerprint = 0;        // Corpus::fingerprint() of the whole corpus
};

// The share of process `rank` of `ranks`: contiguous document ranges holding about
// equal numbers of tokens, at least one document each. Reads the vocabulary, the
// document table and offsets, and of the tokens only its own range. With
// `whole_corpus` it also streams the whole file once to verify its checksum and to
// compute the fingerprint (memory stays that of one share); without, the share's
// word ids are still checked. Throws loupe::Error naming the file when it cannot be
// read, is damaged, or has fewer documents than there are processes.
CorpusShare read_corpus_share(const std::string& path, std::size_t rank, std::size_t ranks, bool whole_corpus);

// The first document of each of `ranks` shares, and the document count last (ranks + 1
// values): split where the token offsets pass k/ranks of the tokens, one document at least
// a share. Example: offsets {0, 10, 20, 30, 40}, 2 shares -> {0, 2, 4}. Needs ranks <= documents.
std::vector<std::size_t> document_share_bounds(const std::vector<std::uint64_t>& token_offsets, std::size_t ranks);

}  // namespace loupe

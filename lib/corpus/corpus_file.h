// Reading and writing the binary corpus file (`loupe ingest -o FILE`).
// Versioned and checksummed; a damaged or truncated file is an error, never a crash.
#pragma once

#include <string>

#include "corpus/corpus.h"

namespace loupe {

inline constexpr std::uint32_t kCorpusFormatVersion = 1;

// Writes atomically (temporary file, then rename): a failed write leaves any
// previous file at PATH untouched.
void write_corpus(const Corpus& corpus, const std::string& path);

// Reads and validates; throws loupe::Error that names the file and the problem.
Corpus read_corpus(const std::string& path);

}  // namespace loupe

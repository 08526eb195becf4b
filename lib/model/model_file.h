// The model file (`loupe fit -o MODEL`): binary, versioned and checksummed
// (common/binary_io.h). It records the fingerprint of the corpus it was fitted
// on; check_model_matches() refuses a model used with another corpus.
#pragma once

#include <string>

#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe {

inline constexpr std::uint32_t kModelFormatVersion = 1;

// Atomic: a failed write leaves any earlier file at PATH as it was.
void write_model(const Model& model, const std::string& path);

// Throws loupe::Error naming the file for a missing, foreign, newer, truncated,
// corrupted or inconsistent file.
Model read_model(const std::string& path);

// Throws loupe::Error when `corpus` (read from corpus_path) is not the corpus
// the model was fitted on.
void check_model_matches(const Model& model, const Corpus& corpus, const std::string& corpus_path);

}  // namespace loupe

// Segments joined back into their source documents: the corpus as it was before `--segment-words` cut it,
// for stages that judge whole documents (near-duplicates in `loupe analyze`).
#pragma once

#include <cstdint>
#include <vector>

#include "corpus/corpus.h"

namespace loupe {

struct JoinedCorpus {
  Corpus corpus;  // one document a source document, in order of first appearance
  // Per document of the segmented corpus: its row in `corpus`.
  std::vector<std::uint32_t> whole_of;
};

// Each source document's segments become one document again: id = parent_id, its tokens the segments' tokens
// in segment order (so exactly the tokens it had before cutting), group, role and metadata of its first
// segment. Documents that are not segments are copied as they are; vocabulary, frequencies, groups, metadata
// columns and the build record are kept. Example: a#001 (x y), b, a#002 (z) -> a (x y z), b.
JoinedCorpus join_segments(const Corpus& corpus);

}  // namespace loupe

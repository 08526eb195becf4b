#include "corpus/corpus_segments.h"

#include <algorithm>
#include <map>
#include <string>

namespace loupe {

JoinedCorpus join_segments(const Corpus& corpus) {
  JoinedCorpus joined;
  Corpus& out = joined.corpus;
  out.vocabulary = corpus.vocabulary;
  out.word_frequency = corpus.word_frequency;
  out.document_frequency = corpus.document_frequency;
  out.groups = corpus.groups;
  out.metadata_columns = corpus.metadata_columns;
  out.build_record = corpus.build_record;
  // The rows of each whole document, in corpus order; segments then sorted by their index.
  std::vector<std::vector<std::size_t>> parts;
  std::map<std::string, std::uint32_t> parent_row;
  joined.whole_of.resize(corpus.num_documents());
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const Document& document = corpus.documents[d];
    std::uint32_t row = static_cast<std::uint32_t>(parts.size());
    if (document.is_segment()) {
      const auto [it, inserted] = parent_row.try_emplace(document.parent_id, row);
      row = it->second;
      if (inserted) parts.emplace_back();
    } else {
      parts.emplace_back();
    }
    parts[row].push_back(d);
    joined.whole_of[d] = row;
  }
  std::vector<WordId> words;
  for (auto& rows : parts) {
    std::stable_sort(rows.begin(), rows.end(), [&](std::size_t a, std::size_t b) {
      return corpus.documents[a].segment_index < corpus.documents[b].segment_index;
    });
    Document whole = corpus.documents[rows.front()];
    if (whole.is_segment()) {
      whole.id = whole.parent_id;
      whole.parent_id.clear();
      whole.segment_index = 0;
      whole.segment_count = 0;
      whole.first_token = 0;
    }
    words.clear();
    for (const auto d : rows) {
      const auto tokens = corpus.document_tokens(d);
      words.insert(words.end(), tokens.begin(), tokens.end());
    }
    out.add_document(std::move(whole), words);
  }
  return joined;
}

}  // namespace loupe

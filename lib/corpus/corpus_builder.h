// Ingestion: turns a folder or manifest of texts into a Corpus. Reads every
// source, validates UTF-8, segments and folds words, filters and prunes the
// vocabulary, optionally cuts long texts into segments, and reports what it dropped.
#pragma once

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "corpus/corpus.h"
#include "corpus/source_listing.h"
#include "corpus/text_tokenizer.h"

namespace loupe {

enum class InvalidUtf8Policy { fail, replace, skip };

struct IngestOptions {
  SourceOptions sources;
  InvalidUtf8Policy invalid_utf8 = InvalidUtf8Policy::fail;
  TokenizerOptions tokenizer;
  // "english" (built-in list), "none", or the path of a file with one word a line.
  std::string stop_words = "english";
  // Vocabulary pruning, applied in this order after stop words:
  std::size_t min_documents = 2;    // keep words found in at least this many source documents
  double max_document_share = 0.9;  // drop words found in more than this share of them
  std::size_t max_vocabulary = 0;   // keep only the most frequent words (0: no limit)
  // Proper-name pruning: drop words capitalised in more than proper_name_share of
  // their occurrences that do not start a sentence (at least proper_name_min_seen such).
  bool drop_proper_names = false;
  double proper_name_share = 0.5;
  std::size_t proper_name_min_seen = 2;
  std::vector<std::string> keep_words;  // never dropped by any filter (folded before use)
  std::vector<std::string> drop_words;  // always dropped
  std::string keep_words_file;          // more of each, one word a line ("" for none)
  std::string drop_words_file;
  // Fixed-length segments: documents longer than segment_words tokens (after all
  // filtering) become consecutive segments; a last piece shorter than half a
  // segment joins the one before it. 0 turns segmenting off.
  std::size_t segment_words = 0;
  bool segment_disputed_only = false;

  // Checks ranges; throws loupe::Error naming the option.
  void validate() const;
  nlohmann::json to_json() const;
};

struct GroupSummary {
  std::string name;
  std::size_t documents = 0;
  std::size_t tokens = 0;
};

// What ingestion kept and dropped, and why: printed by `loupe ingest`.
struct IngestReport {
  std::string source;
  std::size_t source_documents = 0;  // entries listed in the source
  std::size_t corpus_documents = 0;  // documents in the corpus (segments count one each)
  std::size_t disputed_documents = 0;
  std::size_t segmented_documents = 0;  // source documents cut into segments
  std::size_t input_bytes = 0;
  std::size_t words_seen = 0;  // word tokens before any filter
  std::size_t tokens_kept = 0;
  std::size_t distinct_words_seen = 0;
  std::size_t vocabulary_size = 0;
  std::vector<GroupSummary> groups;
  // Tokens dropped by reason: "stop word", "drop list", "proper name",
  // "in too few documents", "in too many documents", "vocabulary limit".
  std::vector<std::pair<std::string, std::size_t>> tokens_dropped;
  std::vector<std::pair<std::string, std::size_t>> words_dropped;  // distinct words, same reasons
  std::vector<std::string> proper_names_dropped;                   // the words, most frequent first
  std::vector<std::string> empty_documents;                        // excluded: nothing left after filtering
  std::vector<std::string> invalid_utf8_replaced;                  // documents with bytes replaced by U+FFFD
  std::vector<std::string> invalid_utf8_skipped;                   // documents left out
  std::vector<std::string> warnings;

  nlohmann::json to_json() const;
};

// Called now and then with bytes read so far and the total.
using IngestProgress = std::function<void(std::size_t bytes_done, std::size_t bytes_total)>;

// Throws loupe::Error for bad input (see source_listing.h for the source checks).
Corpus build_corpus(const std::string& source, const IngestOptions& options, IngestReport* report,
                    const IngestProgress& progress = {});

}  // namespace loupe

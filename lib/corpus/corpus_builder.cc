#include "corpus/corpus_builder.h"

#include <algorithm>
#include <filesystem>
#include <map>
#include <numeric>
#include <string_view>
#include <unordered_map>
#include <unordered_set>

#include "common/error.h"
#include "common/utf8.h"
#include "common/version.h"
#include "corpus/text_stopwords.h"

namespace loupe {

namespace {

constexpr std::size_t kMinDocumentsForShareFilter = 20;
constexpr std::size_t kMaxProblemsListed = 20;

// Reasons a word leaves the vocabulary, in the order filters apply.
enum class DropReason : unsigned char {
  kept = 0,
  stop_word,
  drop_list,
  proper_name,
  too_few_documents,
  too_many_documents,
  vocabulary_limit,
};
constexpr const char* kReasonNames[] = {"kept",
                                        "stop word",
                                        "drop list",
                                        "proper name",
                                        "in too few documents",
                                        "in too many documents",
                                        "vocabulary limit"};
constexpr std::size_t kReasonCount = sizeof(kReasonNames) / sizeof(kReasonNames[0]);

struct WordStats {
  std::uint64_t frequency = 0;
  std::uint32_t documents = 0;
  std::uint32_t last_document = UINT32_MAX;
  std::uint32_t not_sentence_initial = 0;
  std::uint32_t capitalised_not_sentence_initial = 0;
};

struct StringHash {
  using is_transparent = void;
  std::size_t operator()(std::string_view s) const { return std::hash<std::string_view>{}(s); }
};

// Every distinct folded word seen, with its statistics, in first-seen order.
class WordTable {
 public:
  std::uint32_t intern(const std::string& word) {
    auto it = ids_.find(std::string_view(word));
    if (it != ids_.end()) return it->second;
    const auto id = static_cast<std::uint32_t>(words_.size());
    words_.push_back(word);
    stats_.emplace_back();
    ids_.emplace(word, id);
    return id;
  }
  const std::string& word(std::uint32_t id) const { return words_[id]; }
  WordStats& stats(std::uint32_t id) { return stats_[id]; }
  const WordStats& stats(std::uint32_t id) const { return stats_[id]; }
  std::size_t size() const { return words_.size(); }

 private:
  std::unordered_map<std::string, std::uint32_t, StringHash, std::equal_to<>> ids_;
  std::vector<std::string> words_;
  std::vector<WordStats> stats_;
};

// A source document that survived reading: its entry and its span in the
// flat array of raw word ids.
struct ReadDocument {
  const SourceEntry* entry;
  std::size_t begin;
  std::size_t end;
};

std::string describe_list(const std::vector<std::string>& items) {
  std::string out;
  const auto shown = std::min(items.size(), kMaxProblemsListed);
  for (std::size_t i = 0; i < shown; ++i) out += "\n  " + items[i];
  if (items.size() > shown) out += "\n  ... and " + std::to_string(items.size() - shown) + " more";
  return out;
}

StopWords load_stop_words(const std::string& spec) {
  if (spec == "english") return StopWords::builtin_english();
  if (spec == "none" || spec.empty()) return StopWords::none();
  return StopWords::from_file(spec);
}

std::unordered_set<std::string> fold_all(const std::vector<std::string>& words) {
  std::unordered_set<std::string> out;
  for (const auto& w : words) out.insert(fold_case(w));
  return out;
}

std::string segment_id(const std::string& parent, std::size_t index) {
  std::string number = std::to_string(index + 1);
  if (number.size() < 3) number.insert(0, 3 - number.size(), '0');
  return parent + "#" + number;
}

}  // namespace

void IngestOptions::validate() const {
  if (tokenizer.min_length < 1) throw Error("--min-word-length must be at least 1.");
  if (min_documents < 1) throw Error("--min-documents must be at least 1.");
  if (!(max_document_share > 0.0 && max_document_share <= 1.0)) {
    throw Error("--max-document-share must be in (0, 1]; got " + std::to_string(max_document_share) + ".");
  }
  if (!(proper_name_share >= 0.0 && proper_name_share < 1.0)) {
    throw Error("--proper-name-share must be in [0, 1); got " + std::to_string(proper_name_share) + ".");
  }
  if (segment_words == 1) throw Error("--segment-words must be 0 (off) or at least 2.");
}

nlohmann::json IngestOptions::to_json() const {
  const char* policy = invalid_utf8 == InvalidUtf8Policy::fail      ? "fail"
                       : invalid_utf8 == InvalidUtf8Policy::replace ? "replace"
                                                                    : "skip";
  return {
      {"disputed_folder", sources.disputed_folder},
      {"allow_outside_paths", sources.allow_outside_paths},
      {"invalid_utf8", policy},
      {"keep_numbers", tokenizer.keep_numbers},
      {"min_word_length", tokenizer.min_length},
      {"stop_words", stop_words},
      {"min_documents", min_documents},
      {"max_document_share", max_document_share},
      {"max_vocabulary", max_vocabulary},
      {"drop_proper_names", drop_proper_names},
      {"proper_name_share", proper_name_share},
      {"proper_name_min_seen", proper_name_min_seen},
      {"keep_words", keep_words},
      {"drop_words", drop_words},
      {"keep_words_file", keep_words_file},
      {"drop_words_file", drop_words_file},
      {"segment_words", segment_words},
      {"segment_disputed_only", segment_disputed_only},
  };
}

nlohmann::json IngestReport::to_json() const {
  nlohmann::json out;
  out["source"] = source;
  out["source_documents"] = source_documents;
  out["corpus_documents"] = corpus_documents;
  out["disputed_documents"] = disputed_documents;
  out["segmented_documents"] = segmented_documents;
  out["input_bytes"] = input_bytes;
  out["words_seen"] = words_seen;
  out["tokens_kept"] = tokens_kept;
  out["distinct_words_seen"] = distinct_words_seen;
  out["vocabulary_size"] = vocabulary_size;
  out["groups"] = nlohmann::json::array();
  for (const auto& g : groups)
    out["groups"].push_back({{"group", g.name}, {"documents", g.documents}, {"tokens", g.tokens}});
  out["tokens_dropped"] = nlohmann::json::object();
  for (const auto& [reason, n] : tokens_dropped) out["tokens_dropped"][reason] = n;
  out["words_dropped"] = nlohmann::json::object();
  for (const auto& [reason, n] : words_dropped) out["words_dropped"][reason] = n;
  out["proper_names_dropped"] = proper_names_dropped;
  out["empty_documents"] = empty_documents;
  out["invalid_utf8_replaced"] = invalid_utf8_replaced;
  out["invalid_utf8_skipped"] = invalid_utf8_skipped;
  out["warnings"] = warnings;
  return out;
}

Corpus build_corpus(const std::string& source, const IngestOptions& options, IngestReport* report_out,
                    const IngestProgress& progress) {
  options.validate();
  IngestReport report;
  report.source = source;
  const SourceListing listing = list_sources(source, options.sources);
  report.source_documents = listing.entries.size();

  const StopWords stop_words = load_stop_words(options.stop_words);
  const auto keep_listed = fold_all(options.keep_words);
  const auto drop_listed = fold_all(options.drop_words);
  const StopWords keep_file =
      options.keep_words_file.empty() ? StopWords::none() : StopWords::from_file(options.keep_words_file);
  const StopWords drop_file =
      options.drop_words_file.empty() ? StopWords::none() : StopWords::from_file(options.drop_words_file);
  auto is_kept = [&](const std::string& w) { return keep_listed.count(w) > 0 || keep_file.contains(w); };
  auto is_dropped = [&](const std::string& w) { return drop_listed.count(w) > 0 || drop_file.contains(w); };

  std::size_t bytes_total = 0;
  for (const auto& entry : listing.entries) {
    std::error_code ec;
    bytes_total += entry.has_inline_text ? entry.text.size()
                                         : static_cast<std::size_t>(std::filesystem::file_size(entry.path, ec));
  }

  // Pass 1: read, validate and tokenize every document; intern every word.
  TextTokenizer tokenizer(options.tokenizer);
  WordTable table;
  std::vector<std::uint32_t> raw_tokens;
  std::vector<ReadDocument> read_documents;
  read_documents.reserve(listing.entries.size());
  std::vector<std::string> utf8_errors;
  std::vector<WordToken> words;
  std::size_t bytes_done = 0;
  for (const auto& entry : listing.entries) {
    std::string text = load_source_text(entry);
    bytes_done += text.size();
    const std::string_view body = strip_utf8_bom(text);
    const std::size_t bom = text.size() - body.size();
    std::string replaced;
    std::string_view valid = body;
    if (const auto problem = find_invalid_utf8(body)) {
      const std::string where = entry.has_inline_text ? entry.origin + " (text field)" : entry.origin;
      switch (options.invalid_utf8) {
        case InvalidUtf8Policy::fail:
          utf8_errors.push_back(where + ": invalid UTF-8 at byte " + std::to_string(problem->byte_offset + bom) + ": " +
                                problem->description);
          continue;
        case InvalidUtf8Policy::skip:
          report.invalid_utf8_skipped.push_back(entry.id);
          continue;
        case InvalidUtf8Policy::replace: {
          std::size_t count = 0;
          replaced = replace_invalid_utf8(body, &count);
          valid = replaced;
          report.invalid_utf8_replaced.push_back(entry.id);
          break;
        }
      }
    }
    if (!utf8_errors.empty()) continue;  // only validate the rest; the run will fail
    words.clear();
    tokenizer.tokenize(valid, words);
    const auto doc_index = static_cast<std::uint32_t>(read_documents.size());
    const std::size_t begin = raw_tokens.size();
    for (const auto& w : words) {
      const auto id = table.intern(w.text);
      auto& s = table.stats(id);
      ++s.frequency;
      if (s.last_document != doc_index) {
        s.last_document = doc_index;
        ++s.documents;
      }
      if (!w.sentence_initial) {
        ++s.not_sentence_initial;
        if (w.capitalised) ++s.capitalised_not_sentence_initial;
      }
      raw_tokens.push_back(id);
    }
    read_documents.push_back({&entry, begin, raw_tokens.size()});
    if (progress) progress(bytes_done, bytes_total);
  }
  report.input_bytes = bytes_done;
  if (!utf8_errors.empty()) {
    throw Error(std::to_string(utf8_errors.size()) + " document(s) are not valid UTF-8:" + describe_list(utf8_errors) +
                "\nConvert them to UTF-8, or pass --invalid-utf8 replace (bad bytes become U+FFFD) "
                "or --invalid-utf8 skip (leave those documents out).");
  }
  report.words_seen = raw_tokens.size();
  report.distinct_words_seen = table.size();

  // Pass 2: decide each word's fate, filter by filter.
  std::vector<DropReason> fate(table.size(), DropReason::kept);
  const std::size_t num_read = read_documents.size();
  const bool share_filter = num_read >= kMinDocumentsForShareFilter && options.max_document_share < 1.0;
  if (!share_filter && options.max_document_share < 1.0 && num_read > 0) {
    report.warnings.push_back("--max-document-share was not applied: it needs at least " +
                              std::to_string(kMinDocumentsForShareFilter) + " documents, and there are " +
                              std::to_string(num_read) + ".");
  }
  for (std::uint32_t id = 0; id < table.size(); ++id) {
    const std::string& word = table.word(id);
    if (is_kept(word)) continue;
    const auto& s = table.stats(id);
    if (is_dropped(word)) {
      fate[id] = DropReason::drop_list;
    } else if (stop_words.contains(word)) {
      fate[id] = DropReason::stop_word;
    } else if (options.drop_proper_names && s.not_sentence_initial >= options.proper_name_min_seen &&
               static_cast<double>(s.capitalised_not_sentence_initial) >
                   options.proper_name_share * static_cast<double>(s.not_sentence_initial)) {
      fate[id] = DropReason::proper_name;
    } else if (s.documents < options.min_documents) {
      fate[id] = DropReason::too_few_documents;
    } else if (share_filter &&
               static_cast<double>(s.documents) > options.max_document_share * static_cast<double>(num_read)) {
      fate[id] = DropReason::too_many_documents;
    }
  }
  // Kept words, most frequent first (ties by byte order): frequent words get
  // small ids, which keeps the sampler's hot rows together.
  std::vector<std::uint32_t> kept;
  for (std::uint32_t id = 0; id < table.size(); ++id) {
    if (fate[id] == DropReason::kept) kept.push_back(id);
  }
  auto by_frequency = [&](std::uint32_t a, std::uint32_t b) {
    const auto fa = table.stats(a).frequency, fb = table.stats(b).frequency;
    return fa != fb ? fa > fb : table.word(a) < table.word(b);
  };
  std::sort(kept.begin(), kept.end(), by_frequency);
  if (options.max_vocabulary > 0 && kept.size() > options.max_vocabulary) {
    for (std::size_t i = options.max_vocabulary; i < kept.size(); ++i) {
      if (!is_kept(table.word(kept[i]))) fate[kept[i]] = DropReason::vocabulary_limit;
    }
    std::erase_if(kept, [&](std::uint32_t id) { return fate[id] != DropReason::kept; });
  }

  std::vector<std::size_t> tokens_by_reason(kReasonCount, 0), words_by_reason(kReasonCount, 0);
  std::vector<std::uint32_t> proper_names;
  for (std::uint32_t id = 0; id < table.size(); ++id) {
    const auto r = static_cast<std::size_t>(fate[id]);
    tokens_by_reason[r] += table.stats(id).frequency;
    ++words_by_reason[r];
    if (fate[id] == DropReason::proper_name) proper_names.push_back(id);
  }
  for (std::size_t r = 1; r < kReasonCount; ++r) {
    report.tokens_dropped.emplace_back(kReasonNames[r], tokens_by_reason[r]);
    report.words_dropped.emplace_back(kReasonNames[r], words_by_reason[r]);
  }
  std::sort(proper_names.begin(), proper_names.end(), by_frequency);
  for (const auto id : proper_names) report.proper_names_dropped.push_back(table.word(id));

  // Pass 3: the corpus, with final word ids and optional segments.
  Corpus corpus;
  constexpr WordId kDropped = UINT32_MAX;
  std::vector<WordId> final_id(table.size(), kDropped);
  for (std::size_t i = 0; i < kept.size(); ++i) {
    final_id[kept[i]] = static_cast<WordId>(i);
    corpus.vocabulary.push_back(table.word(kept[i]));
  }
  corpus.word_frequency.assign(kept.size(), 0);
  corpus.document_frequency.assign(kept.size(), 0);
  corpus.metadata_columns = listing.metadata_columns;

  std::map<std::string, std::uint32_t> group_index;
  for (const auto& doc : read_documents) {
    if (!doc.entry->group.empty()) group_index.emplace(doc.entry->group, 0);
  }
  for (auto& [name, index] : group_index) {
    index = static_cast<std::uint32_t>(corpus.groups.size());
    corpus.groups.push_back(name);
  }

  std::vector<WordId> doc_tokens;
  std::vector<std::uint32_t> last_seen(kept.size(), UINT32_MAX);
  for (std::uint32_t d = 0; d < read_documents.size(); ++d) {
    const auto& doc = read_documents[d];
    const SourceEntry& entry = *doc.entry;
    doc_tokens.clear();
    for (std::size_t t = doc.begin; t < doc.end; ++t) {
      const WordId w = final_id[raw_tokens[t]];
      if (w == kDropped) continue;
      doc_tokens.push_back(w);
      ++corpus.word_frequency[w];
      if (last_seen[w] != d) {
        last_seen[w] = d;
        ++corpus.document_frequency[w];
      }
    }
    if (doc_tokens.empty()) {
      report.empty_documents.push_back(entry.id);
      continue;
    }
    Document base;
    base.id = entry.id;
    base.group = entry.group.empty() ? kNoGroup : group_index.at(entry.group);
    base.role = entry.role;
    base.metadata = entry.metadata;
    const std::size_t n = doc_tokens.size();
    const std::size_t seg = options.segment_words;
    const bool cut = seg > 0 && n > seg && (!options.segment_disputed_only || entry.role == DocumentRole::disputed);
    if (!cut) {
      corpus.add_document(std::move(base), doc_tokens);
      continue;
    }
    // Pieces of `seg` tokens; a remainder shorter than seg/2 joins the last piece.
    std::size_t pieces = n / seg;
    if (n % seg >= (seg + 1) / 2) ++pieces;
    ++report.segmented_documents;
    for (std::size_t p = 0; p < pieces; ++p) {
      const std::size_t first = p * seg;
      const std::size_t last = p + 1 == pieces ? n : first + seg;
      Document piece = base;
      piece.id = segment_id(entry.id, p);
      piece.parent_id = entry.id;
      piece.segment_index = static_cast<std::uint32_t>(p);
      piece.segment_count = static_cast<std::uint32_t>(pieces);
      piece.first_token = first;
      corpus.add_document(std::move(piece),
                          std::span<const WordId>(doc_tokens.data() + first, doc_tokens.data() + last));
    }
  }
  if (!report.empty_documents.empty()) {
    report.warnings.push_back(
        std::to_string(report.empty_documents.size()) +
        " document(s) had no words left after filtering and were left out: " + describe_list(report.empty_documents));
  }
  if (corpus.num_documents() == 0 || corpus.vocabulary_size() == 0) {
    throw Error(source + ": no words are left after filtering (" + std::to_string(report.words_seen) +
                " words read from " + std::to_string(num_read) +
                " documents). Loosen the filters: e.g. --min-documents 1, --stop-words none, or a smaller "
                "--min-word-length.");
  }

  // Per-group summary; a group whose documents were all left out is named.
  report.groups.resize(corpus.groups.size());
  for (std::size_t g = 0; g < corpus.groups.size(); ++g) report.groups[g].name = corpus.groups[g];
  std::vector<std::size_t> group_documents(corpus.groups.size(), 0);
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const auto& doc = corpus.documents[d];
    if (doc.role == DocumentRole::disputed) ++report.disputed_documents;
    if (doc.group == kNoGroup) continue;
    report.groups[doc.group].tokens += corpus.document_length(d);
    if (!doc.is_segment() || doc.segment_index == 0) ++report.groups[doc.group].documents;
  }
  for (const auto& g : report.groups) {
    if (g.documents == 0) report.warnings.push_back("group '" + g.name + "' has no documents left after filtering.");
  }
  report.corpus_documents = corpus.num_documents();
  report.tokens_kept = corpus.num_tokens();
  report.vocabulary_size = corpus.vocabulary_size();

  corpus.build_record = {
      {"loupe_version", kVersion},
      {"source", source},
      {"options", options.to_json()},
      {"summary", report.to_json()},
  };
  corpus.validate(source);
  if (report_out) *report_out = std::move(report);
  return corpus;
}

}  // namespace loupe

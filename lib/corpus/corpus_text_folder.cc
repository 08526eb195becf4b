#include "corpus/corpus_text_folder.h"

#include <algorithm>
#include <filesystem>
#include <fstream>
#include <map>
#include <numeric>
#include <sstream>
#include <unordered_map>

#include "common/error.h"
#include "common/utf8.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;

bool ends_with_txt(const std::string& name) {
  if (name.size() < 5) return false;
  std::string tail = name.substr(name.size() - 4);
  for (auto& c : tail) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  return tail == ".txt";
}

std::string read_bytes(const fs::path& path) {
  std::ifstream in(path, std::ios::binary);
  if (!in) throw Error(path.string() + ": cannot be read. Check that the file exists and is readable.");
  std::ostringstream buffer;
  buffer << in.rdbuf();
  if (in.bad()) throw Error(path.string() + ": reading failed part way. Check the file and the disk.");
  return buffer.str();
}

}  // namespace

Corpus read_text_folder(const std::string& folder, const TokenizerOptions& tokenizer_options) {
  std::error_code ec;
  if (!fs::is_directory(folder, ec)) {
    throw Error(folder + ": not a folder. Pass a folder holding the disputed texts as .txt files.");
  }
  fs::path root = fs::absolute(fs::path(folder)).lexically_normal();
  if (root.filename().empty()) root = root.parent_path();
  const std::string label = root.filename().string();

  std::vector<std::string> names;
  for (const auto& item : fs::directory_iterator(root)) {
    const std::string name = item.path().filename().string();
    if (name.empty() || name.front() == '.' || !item.is_regular_file() || !ends_with_txt(name)) continue;
    if (find_invalid_utf8(name)) {
      throw Error(item.path().string() + ": the file name is not valid UTF-8. Rename the file.");
    }
    names.push_back(name);
  }
  std::sort(names.begin(), names.end());
  if (names.empty()) {
    throw Error(folder + ": holds no .txt files. Put each disputed text in this folder as a .txt file (UTF-8).");
  }

  // Pass 1: words of every file, interned in order of first appearance.
  TextTokenizer tokenizer(tokenizer_options);
  std::unordered_map<std::string, WordId> ids;
  std::vector<std::string> words_by_id;
  std::vector<std::vector<WordId>> documents;
  std::vector<WordToken> words;
  for (const auto& name : names) {
    const fs::path path = root / name;
    const std::string bytes = read_bytes(path);
    const std::string_view body = strip_utf8_bom(bytes);
    if (const auto problem = find_invalid_utf8(body)) {
      throw Error((fs::path(folder) / name).string() + ": invalid UTF-8 at byte " +
                  std::to_string(problem->byte_offset + (bytes.size() - body.size())) + ": " + problem->description +
                  ". Save the file as UTF-8.");
    }
    words.clear();
    tokenizer.tokenize(body, words);
    std::vector<WordId> tokens;
    tokens.reserve(words.size());
    for (auto& word : words) {
      const auto [it, inserted] = ids.emplace(word.text, static_cast<WordId>(words_by_id.size()));
      if (inserted) words_by_id.push_back(word.text);
      tokens.push_back(it->second);
    }
    documents.push_back(std::move(tokens));
  }

  // Vocabulary order: frequency descending, ties in byte order (as ingestion).
  std::vector<std::uint64_t> frequency(words_by_id.size(), 0);
  std::vector<std::uint32_t> document_frequency(words_by_id.size(), 0);
  for (const auto& tokens : documents) {
    std::vector<WordId> distinct(tokens);
    std::sort(distinct.begin(), distinct.end());
    distinct.erase(std::unique(distinct.begin(), distinct.end()), distinct.end());
    for (const auto w : tokens) ++frequency[w];
    for (const auto w : distinct) ++document_frequency[w];
  }
  std::vector<WordId> order(words_by_id.size());
  std::iota(order.begin(), order.end(), WordId{0});
  std::sort(order.begin(), order.end(), [&](WordId a, WordId b) {
    return frequency[a] != frequency[b] ? frequency[a] > frequency[b] : words_by_id[a] < words_by_id[b];
  });
  std::vector<WordId> new_id(order.size());
  Corpus corpus;
  for (std::size_t i = 0; i < order.size(); ++i) {
    new_id[order[i]] = static_cast<WordId>(i);
    corpus.vocabulary.push_back(words_by_id[order[i]]);
    corpus.word_frequency.push_back(frequency[order[i]]);
    corpus.document_frequency.push_back(document_frequency[order[i]]);
  }
  for (std::size_t d = 0; d < documents.size(); ++d) {
    for (auto& w : documents[d]) w = new_id[w];
    Document document;
    document.id = label + "/" + names[d].substr(0, names[d].size() - 4);
    document.role = DocumentRole::disputed;
    corpus.add_document(std::move(document), documents[d]);
  }
  corpus.build_record = {{"source", folder}, {"kind", "text folder"}};
  corpus.validate(folder);
  return corpus;
}

}  // namespace loupe

#include "corpus/source_folder.h"

#include <algorithm>
#include <filesystem>
#include <map>

#include "common/error.h"
#include "common/utf8.h"
#include "corpus/source_utf8.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;

constexpr std::size_t kMaxListed = 20;  // longest list of names shown in one message

bool is_hidden(const std::string& name) { return !name.empty() && name.front() == '.'; }

// "a1.txt" and "A1.TXT" are documents; ".txt" alone is hidden, not a document.
bool has_txt_extension(const std::string& name) {
  if (name.size() < 4) return false;
  std::string extension = name.substr(name.size() - 4);
  for (auto& c : extension) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  return extension == ".txt";
}

void require_utf8_name(const fs::path& path, const std::string& name) {
  if (const auto bad = find_invalid_utf8(name)) {
    throw Error(path.string() + ": the name is not valid UTF-8 (at byte " + std::to_string(bad->byte_offset) +
                " of the name: " + bad->description +
                "). Rename it using UTF-8; loupe uses folder and file names as group names and ids.");
  }
}

struct FolderContents {
  std::vector<std::string> txt_files;  // file names, sorted
  std::vector<std::string> sub_folders;
  std::size_t ignored_files = 0;
};

FolderContents read_group_folder(const fs::path& folder) {
  FolderContents contents;
  for (const auto& item : fs::directory_iterator(folder)) {
    const std::string name = item.path().filename().string();
    const bool hidden = is_hidden(name);
    if (item.is_directory()) {
      if (!hidden) contents.sub_folders.push_back(name);
    } else if (!hidden && item.is_regular_file() && has_txt_extension(name)) {
      require_utf8_name(item.path(), name);
      contents.txt_files.push_back(name);
    } else {
      ++contents.ignored_files;
    }
  }
  std::sort(contents.txt_files.begin(), contents.txt_files.end());
  std::sort(contents.sub_folders.begin(), contents.sub_folders.end());
  return contents;
}

std::string name_list(const std::vector<std::string>& names) {
  std::string out;
  for (std::size_t k = 0; k < names.size() && k < kMaxListed; ++k) out += (k ? ", " : "") + names[k];
  if (names.size() > kMaxListed) out += " and " + std::to_string(names.size() - kMaxListed) + " more";
  return out;
}

}  // namespace

SourceListing list_folder(const std::string& source, const SourceOptions& options) {
  fs::path root = fs::absolute(fs::path(source)).lexically_normal();
  if (root.filename().empty()) root = root.parent_path();  // "letters/" -> "letters"

  SourceListing listing;
  listing.source = source;
  std::vector<std::string> groups;
  bool has_disputed_folder = false;
  std::size_t top_level_files = 0;
  for (const auto& item : fs::directory_iterator(root)) {
    const std::string name = item.path().filename().string();
    if (item.is_directory()) {
      if (is_hidden(name)) continue;  // .git and the like
      if (!options.disputed_folder.empty() && name == options.disputed_folder) {
        has_disputed_folder = true;
      } else {
        require_utf8_name(item.path(), name);
        groups.push_back(name);
      }
    } else {
      ++top_level_files;
    }
  }
  if (groups.empty()) {
    throw Error(source +
                ": no group sub-folders. A folder source holds one sub-folder per group, each with "
                "that group's .txt files (for example " +
                source + "/alice/letter1.txt)" +
                (options.disputed_folder.empty()
                     ? std::string()
                     : ", and optionally a '" + options.disputed_folder + "' sub-folder of disputed documents") +
                ". Or pass a manifest file (.csv, .tsv, .jsonl).");
  }
  std::sort(groups.begin(), groups.end());
  listing.ignored_files = top_level_files;
  if (top_level_files > 0) {
    listing.notes.push_back(
        source + ": " + std::to_string(top_level_files) +
        " file(s) directly in the source folder ignored; documents go in one sub-folder per group.");
  }

  // Disputed documents have an empty group, so in (group, file name) order they come first.
  std::vector<std::pair<std::string, std::string>> folders;  // (group, folder name)
  if (has_disputed_folder) folders.emplace_back(std::string(), options.disputed_folder);
  for (const auto& group : groups) folders.emplace_back(group, group);

  std::vector<std::string> empty_groups;
  std::map<std::string, std::string> file_of_id;
  for (const auto& [group, folder_name] : folders) {
    const fs::path folder = root / folder_name;
    const FolderContents contents = read_group_folder(folder);
    listing.ignored_files += contents.ignored_files;
    if (contents.ignored_files > 0) {
      listing.notes.push_back((fs::path(source) / folder_name).string() + ": " +
                              std::to_string(contents.ignored_files) + " hidden or non-.txt file(s) ignored.");
    }
    if (!contents.sub_folders.empty()) {
      listing.notes.push_back((fs::path(source) / folder_name).string() + ": sub-folder(s) ignored (" +
                              name_list(contents.sub_folders) +
                              "); only .txt files directly inside a group folder are read.");
    }
    if (contents.txt_files.empty()) {
      if (group.empty()) {
        listing.notes.push_back((fs::path(source) / folder_name).string() +
                                ": the disputed folder holds no .txt files.");
      } else {
        empty_groups.push_back(folder_name);
      }
      continue;
    }
    for (const auto& file_name : contents.txt_files) {
      SourceEntry entry;
      entry.id = folder_name + "/" + file_name.substr(0, file_name.size() - 4);
      entry.group = group;
      entry.role = group.empty() ? DocumentRole::disputed : DocumentRole::known;
      entry.path = (folder / file_name).string();
      entry.origin = (fs::path(source) / folder_name / file_name).string();
      if (auto [it, inserted] = file_of_id.emplace(entry.id, entry.origin); !inserted) {
        throw Error(entry.origin + ": gives the id '" + entry.id + "', as " + it->second +
                    " does (ids are the folder name and the file name without .txt). Rename one of the files.");
      }
      listing.entries.push_back(std::move(entry));
    }
  }
  if (!empty_groups.empty()) {
    throw Error(source + ": " + (empty_groups.size() == 1 ? "the group folder " : "the group folders ") +
                name_list(empty_groups) + (empty_groups.size() == 1 ? " holds" : " hold") +
                " no .txt files. Put each group's documents in its folder as .txt files, or remove the "
                "empty folder.");
  }
  return listing;
}

}  // namespace loupe

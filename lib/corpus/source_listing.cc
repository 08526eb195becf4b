#include "corpus/source_listing.h"

#include <filesystem>

#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/source_folder.h"
#include "corpus/source_manifest.h"

namespace loupe {

namespace fs = std::filesystem;

SourceListing list_sources(const std::string& source, const SourceOptions& options) {
  std::error_code status_error;
  const auto status = fs::status(fs::path(source), status_error);
  if (!fs::exists(status)) {
    throw Error(source +
                ": no such file or folder. Pass a folder with one sub-folder per group, or a "
                "manifest file (.csv, .tsv, .jsonl).");
  }
  try {
    if (fs::is_directory(status)) return list_folder(source, options);
    if (fs::is_regular_file(status)) return list_manifest(source, options);
  } catch (const fs::filesystem_error& e) {
    throw Error(source + ": cannot list the source (" + e.what() + "). Check that it can be read.");
  }
  throw Error(source +
              ": neither a folder nor a regular file. Pass a folder with one sub-folder per group, or "
              "a manifest file (.csv, .tsv, .jsonl).");
}

std::string load_source_text(const SourceEntry& entry) {
  if (entry.has_inline_text) return entry.text;
  const std::string listed_at =
      entry.origin.empty() || entry.origin == entry.path ? std::string() : " (listed at " + entry.origin + ")";
  std::error_code status_error;
  if (fs::is_directory(fs::path(entry.path), status_error)) {
    throw Error(entry.path + listed_at + ": is a folder, not a text file. List the text file instead.");
  }
  try {
    return read_whole_file(entry.path);
  } catch (const Error& e) {
    if (listed_at.empty()) throw;
    throw Error(std::string(e.what()) + listed_at);
  }
}

}  // namespace loupe

// What a study's sources hold, listed and checked before any text is read: a
// folder with one sub-folder per group, or a manifest (CSV, TSV, JSON Lines)
// with one row per document. Every problem is reported with its file and line.
#pragma once

#include <cstddef>
#include <string>
#include <vector>

#include "corpus/document_role.h"

namespace loupe {

enum class ManifestFormat { by_extension, csv, tsv, jsonl };

struct SourceOptions {
  std::string disputed_folder = "disputed";  // folder sources: sub-folder holding disputed documents
  ManifestFormat format = ManifestFormat::by_extension;
  bool allow_outside_paths = false;  // manifests: allow paths that leave the manifest's folder
  // How the user turns allow_outside_paths on (the command line puts its
  // option's name here); used only in the message for an escaping path.
  std::string outside_paths_option = "allow_outside_paths";
};

struct SourceEntry {
  std::string id;     // folder sources: "GROUP/FILE-STEM"; manifests: the id field
  std::string group;  // may be empty only for disputed documents
  DocumentRole role = DocumentRole::known;
  bool has_inline_text = false;
  std::string text;                   // the inline text (manifest `text` field) when has_inline_text
  std::string path;                   // the file holding the text otherwise (absolute, normalised)
  std::string origin;                 // for messages: "letters.csv line 12", or the file's path
  std::vector<std::string> metadata;  // aligned with SourceListing::metadata_columns
};

struct SourceListing {
  std::string source;  // the path given
  bool is_manifest = false;
  std::vector<std::string> metadata_columns;  // manifest columns other than id/group/role/text/path, in file order
  // Folder sources sorted by group then file name (byte order; disputed
  // documents have an empty group and so come first); manifests in file order.
  std::vector<SourceEntry> entries;
  std::size_t ignored_files = 0;   // folder sources: hidden, non-.txt, or not inside a group folder
  std::vector<std::string> notes;  // things skipped on purpose, worth telling the user
};

// Lists and checks a source (a folder or a manifest file; see the header
// comment). Throws loupe::Error for: a missing source; a folder with no group
// sub-folders, or a group folder without *.txt files; a manifest with a
// missing required column (id; group unless every row is disputed; text or
// path), malformed quoting, a row with the wrong number of fields, duplicate
// ids, an unknown role, a known document without a group, a row with neither
// text nor path, a path leaving the manifest's folder (unless
// allow_outside_paths), listed files that are missing (all of them, in one
// message), a JSON Lines line that is not a JSON object, or bytes that are not
// UTF-8.
//
// Manifest details: header names are matched case-insensitively after
// trimming spaces; id, group and path values are trimmed of surrounding
// spaces and tabs, text and metadata values are kept as written. A row uses
// `text` when it is non-empty, else `path`. Blank lines are skipped.
SourceListing list_sources(const std::string& source, const SourceOptions& options = {});

// The raw bytes of an entry: its inline text, or its file's contents.
// Throws loupe::Error naming the file (and where it was listed).
std::string load_source_text(const SourceEntry& entry);

}  // namespace loupe

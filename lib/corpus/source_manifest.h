// Manifest sources: one row per document in a CSV, TSV or JSON Lines file.
// The three formats are first read into one ManifestTable (named columns, rows
// with their line numbers); list_manifest then checks the rows and lists them.
#pragma once

#include <string>
#include <string_view>
#include <vector>

#include "corpus/source_csv.h"
#include "corpus/source_listing.h"

namespace loupe {

struct ManifestTable {
  std::vector<std::string> columns;  // header names as written (CSV/TSV) or keys in first-seen order (JSONL)
  std::vector<CsvRecord> rows;       // each row has exactly columns.size() fields; absent JSONL keys are ""
};

// CSV or TSV with a header row. Blank lines are skipped; a row whose field
// count differs from the header's throws loupe::Error with its line.
ManifestTable read_delimited_table(std::string_view bytes, char separator, const std::string& file_name);

// One JSON object a line; values must be strings, numbers (kept as their JSON
// text: 1851 -> "1851", 0.5 -> "0.5") or null (read as ""). Blank lines are
// skipped. Example: {"id":"a1","group":"alice","year":1851}.
ManifestTable read_json_lines_table(std::string_view bytes, const std::string& file_name);

// Reads, checks and lists the manifest at SOURCE (see list_sources).
SourceListing list_manifest(const std::string& source, const SourceOptions& options);

}  // namespace loupe

#include "corpus/source_manifest.h"

#include <algorithm>
#include <filesystem>
#include <optional>
#include <unordered_map>

#include <nlohmann/json.hpp>

#include "common/binary_io.h"
#include "common/error.h"
#include "common/utf8.h"
#include "corpus/source_utf8.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;

constexpr std::string_view kUtf8ByteOrderMark = "\xEF\xBB\xBF";
constexpr std::size_t kMaxListed = 20;  // longest list of problems shown in one message

std::string_view trim_blanks(std::string_view text) {
  while (!text.empty() && (text.front() == ' ' || text.front() == '\t')) text.remove_prefix(1);
  while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.remove_suffix(1);
  return text;
}

// " ID " -> "id": how header names are matched.
std::string column_key(std::string_view name) {
  std::string key(trim_blanks(name));
  for (auto& c : key) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  return key;
}

std::string quoted_list(const std::vector<std::string>& names) {
  if (names.empty()) return "(none)";
  std::string out;
  for (const auto& name : names) {
    if (!out.empty()) out += ", ";
    out += "'" + name + "'";
  }
  return out;
}

std::string at_line(const std::string& file_name, std::size_t line) {
  return file_name + " line " + std::to_string(line);
}

bool is_blank_record(const CsvRecord& record) { return record.fields.size() == 1 && record.fields[0].empty(); }

ManifestFormat format_from_extension(const std::string& source) {
  std::string extension = fs::path(source).extension().string();
  for (auto& c : extension) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  if (extension == ".csv") return ManifestFormat::csv;
  if (extension == ".tsv") return ManifestFormat::tsv;
  if (extension == ".jsonl" || extension == ".ndjson") return ManifestFormat::jsonl;
  throw Error(source + ": cannot tell the manifest format from the extension '" + extension +
              "'. Name the file .csv, .tsv, .jsonl or .ndjson, choose the format explicitly, or pass a "
              "folder with one sub-folder per group.");
}

// Where each reserved column sits in a table, and what the other columns are.
struct ColumnLayout {
  std::optional<std::size_t> id, group, role, text, path;
  std::vector<std::size_t> metadata;  // table column indexes, in file order
};

ColumnLayout lay_out_columns(const ManifestTable& table, const std::string& file_name) {
  ColumnLayout layout;
  std::unordered_map<std::string, std::size_t> seen;
  for (std::size_t c = 0; c < table.columns.size(); ++c) {
    const std::string key = column_key(table.columns[c]);
    if (key.empty()) {
      // Spreadsheets often save trailing empty columns: an unnamed column is
      // dropped when it holds nothing, and is an error otherwise.
      for (const auto& row : table.rows) {
        if (!row.fields[c].empty()) {
          throw Error(at_line(file_name, row.line) + ": column " + std::to_string(c + 1) +
                      " has no name in the header but holds a value here. Name the column in the header row, "
                      "or delete it.");
        }
      }
      continue;
    }
    if (auto [it, inserted] = seen.emplace(key, c); !inserted) {
      throw Error(file_name + ": the column '" + std::string(trim_blanks(table.columns[c])) +
                  "' appears twice (columns " + std::to_string(it->second + 1) + " and " + std::to_string(c + 1) +
                  "; names are compared ignoring case and surrounding spaces). Rename or delete one of them.");
    }
    if (key == "id")
      layout.id = c;
    else if (key == "group")
      layout.group = c;
    else if (key == "role")
      layout.role = c;
    else if (key == "text")
      layout.text = c;
    else if (key == "path")
      layout.path = c;
    else
      layout.metadata.push_back(c);
  }
  const std::string found = "Columns found: " + quoted_list(table.columns) + ".";
  if (!layout.id) {
    throw Error(file_name + ": no 'id' column. " + found +
                " A manifest needs the columns id, group, and text or path (role is optional).");
  }
  if (!layout.text && !layout.path) {
    throw Error(file_name +
                ": neither a 'text' nor a 'path' column, so there is no way to find each document's "
                "text. " +
                found + " Add a text column (the text itself) or a path column (its file).");
  }
  if (!layout.group) {
    // Without a group column every row must be disputed.
    for (const auto& row : table.rows) {
      // An unknown role is reported later, with its value, by the row checks.
      const auto role = layout.role ? parse_role(row.fields[*layout.role]) : DocumentRole::known;
      if (role == DocumentRole::known) {
        throw Error(file_name + ": no 'group' column, but " + at_line(file_name, row.line) +
                    " is not marked disputed (a row without a role is known). " + found +
                    " Add a group column, or mark every row disputed in a role column.");
      }
    }
  }
  return layout;
}

// "a.txt" against /data -> /data/a.txt. Lexical only: ".." is resolved in the
// text of the path, and symbolic links are not followed, so a link inside the
// folder that points outside it is not treated as escaping.
fs::path resolve_listed_path(const fs::path& folder, std::string_view value) {
  return (folder / fs::path(std::string(value))).lexically_normal();
}

bool is_inside(const fs::path& path, const fs::path& folder) {
  const fs::path relative = path.lexically_relative(folder);
  if (relative.empty()) return false;
  const auto first = *relative.begin();
  return first != ".." && first != ".";
}

std::string json_value_text(const nlohmann::json& value, const std::string& key, const std::string& where) {
  if (value.is_string()) return value.get<std::string>();
  if (value.is_number()) return value.dump();
  if (value.is_null()) return std::string();
  throw Error(where + ": the field \"" + key + "\" is " +
              (value.is_boolean() ? "a boolean" : std::string("an ") + value.type_name()) +
              "; manifest fields must be strings or numbers. Write it as a string.");
}

}  // namespace

ManifestTable read_delimited_table(std::string_view bytes, char separator, const std::string& file_name) {
  std::vector<CsvRecord> records = parse_delimited(bytes, separator, file_name);
  auto first = std::find_if(records.begin(), records.end(), [](const CsvRecord& r) { return !is_blank_record(r); });
  if (first == records.end()) {
    throw Error(file_name +
                ": the manifest is empty. Its first line must be a header naming the columns "
                "(id, group, and text or path), followed by one row per document.");
  }
  ManifestTable table;
  table.columns = std::move(first->fields);
  const std::size_t width = table.columns.size();
  const std::string separator_name = separator == '\t' ? "tabs" : "commas";
  table.rows.reserve(static_cast<std::size_t>(records.end() - first) - 1);
  for (auto it = first + 1; it != records.end(); ++it) {
    if (is_blank_record(*it)) continue;
    if (it->fields.size() != width) {
      throw Error(at_line(file_name, it->line) + ": " + std::to_string(it->fields.size()) +
                  " fields, but the header has " + std::to_string(width) + " columns (" + quoted_list(table.columns) +
                  "). Put the field that contains " + separator_name + " in double quotes, or add the missing fields.");
    }
    table.rows.push_back(std::move(*it));
  }
  return table;
}

ManifestTable read_json_lines_table(std::string_view bytes, const std::string& file_name) {
  if (bytes.substr(0, 3) == kUtf8ByteOrderMark) bytes.remove_prefix(3);
  ManifestTable table;
  std::unordered_map<std::string, std::size_t> column_of_key;
  std::size_t line = 0;
  std::size_t start = 0;
  while (start < bytes.size()) {
    ++line;
    std::size_t end = bytes.find('\n', start);
    if (end == std::string_view::npos) end = bytes.size();
    std::string_view text = bytes.substr(start, end - start);
    start = end + 1;
    if (!text.empty() && text.back() == '\r') text.remove_suffix(1);
    if (trim_blanks(text).empty()) continue;

    const std::string where = at_line(file_name, line);
    nlohmann::json object;
    try {
      object = nlohmann::json::parse(text.begin(), text.end());
    } catch (const nlohmann::json::parse_error& e) {
      // nlohmann's message reads "[json.exception.parse_error.101] parse error
      // at line 1, column 5: ..."; the line is always 1 here, so keep the rest.
      std::string message = e.what();
      if (auto bracket = message.find("] "); bracket != std::string::npos) message.erase(0, bracket + 2);
      if (auto one = message.find("at line 1, "); one != std::string::npos) message.erase(one, 11);
      throw Error(where + ": not valid JSON (" + message +
                  "). Each line of a JSON Lines manifest must be one JSON object, such as "
                  "{\"id\": \"a1\", \"group\": \"alice\", \"path\": \"a1.txt\"}.");
    }
    if (!object.is_object()) {
      throw Error(where + ": this line is JSON " + std::string(object.is_boolean() ? "boolean" : object.type_name()) +
                  ", not a JSON object. Each line must be one object, such as "
                  "{\"id\": \"a1\", \"group\": \"alice\", \"path\": \"a1.txt\"}.");
    }
    CsvRecord row;
    row.line = line;
    row.fields.resize(table.columns.size());
    for (const auto& [key, value] : object.items()) {
      auto [it, inserted] = column_of_key.emplace(key, table.columns.size());
      if (inserted) {
        table.columns.push_back(key);
        row.fields.emplace_back();
      }
      row.fields[it->second] = json_value_text(value, key, where);
    }
    table.rows.push_back(std::move(row));
  }
  for (auto& row : table.rows) row.fields.resize(table.columns.size());  // keys first seen later are "" here
  if (table.rows.empty()) {
    throw Error(file_name +
                ": the manifest is empty. Write one JSON object a line, such as "
                "{\"id\": \"a1\", \"group\": \"alice\", \"path\": \"a1.txt\"}.");
  }
  return table;
}

SourceListing list_manifest(const std::string& source, const SourceOptions& options) {
  const fs::path manifest_path = fs::absolute(fs::path(source)).lexically_normal();
  const fs::path folder = manifest_path.parent_path();
  const std::string bytes = read_whole_file(source);

  if (const auto bad = find_invalid_utf8(bytes)) {
    throw Error(at_line(source, line_of_offset(bytes, bad->byte_offset)) + ": invalid UTF-8 at byte " +
                std::to_string(bad->byte_offset) + " of the file (" + bad->description +
                "). Save the manifest as UTF-8 (spreadsheet programs offer "
                "\"CSV UTF-8\" when saving).");
  }

  const ManifestFormat format =
      options.format == ManifestFormat::by_extension ? format_from_extension(source) : options.format;
  // TSV follows the same quoting rules as CSV, with a tab as separator. This
  // is our choice (TSV has no standard for quoting): a field holding a tab or
  // a line break, or starting with a quote, must then be quoted.
  ManifestTable table = format == ManifestFormat::jsonl
                            ? read_json_lines_table(bytes, source)
                            : read_delimited_table(bytes, format == ManifestFormat::tsv ? '\t' : ',', source);
  if (table.rows.empty()) {
    throw Error(source + ": the manifest has a header but no rows. Add one row per document.");
  }
  const ColumnLayout layout = lay_out_columns(table, source);

  SourceListing listing;
  listing.source = source;
  listing.is_manifest = true;
  for (std::size_t c : layout.metadata) listing.metadata_columns.emplace_back(trim_blanks(table.columns[c]));
  listing.entries.reserve(table.rows.size());

  struct MissingFile {
    std::size_t line;
    std::string listed;
    std::string resolved;
    bool is_folder;
  };
  std::vector<MissingFile> missing;
  std::vector<std::size_t> line_of_entry;
  line_of_entry.reserve(table.rows.size());

  for (auto& row : table.rows) {
    SourceEntry entry;
    entry.origin = at_line(source, row.line);
    const std::string& where = entry.origin;
    entry.id = std::string(trim_blanks(row.fields[*layout.id]));
    if (entry.id.empty()) {
      throw Error(where + ": the id is empty. Give every document a unique id.");
    }
    if (layout.role) {
      const auto role = parse_role(row.fields[*layout.role]);
      if (!role) {
        throw Error(where + ": unknown role '" + row.fields[*layout.role] +
                    "'. The allowed roles are 'known' and 'disputed' (an empty role means known).");
      }
      entry.role = *role;
    }
    if (layout.group) entry.group = std::string(trim_blanks(row.fields[*layout.group]));
    if (entry.group.empty() && entry.role == DocumentRole::known) {
      throw Error(where + ": the document '" + entry.id +
                  "' is known but its group is empty. Give its group, or mark it disputed in the role column.");
    }
    if (layout.text && !row.fields[*layout.text].empty()) {
      entry.has_inline_text = true;
      entry.text = std::move(row.fields[*layout.text]);
    } else {
      const std::string_view listed = layout.path ? trim_blanks(row.fields[*layout.path]) : std::string_view();
      if (listed.empty()) {
        throw Error(where + ": the document '" + entry.id + "' has neither text nor a path. Fill in " +
                    (layout.text && layout.path ? "its text or its path."
                     : layout.text              ? "its text."
                                                : "its path."));
      }
      const fs::path resolved = resolve_listed_path(folder, listed);
      if (!options.allow_outside_paths && !is_inside(resolved, folder)) {
        throw Error(where + ": the path '" + std::string(listed) + "' leads outside the manifest's folder " +
                    folder.string() + " (to " + resolved.string() + "). Move the file inside that folder, or turn on " +
                    options.outside_paths_option + " to allow paths outside it.");
      }
      entry.path = resolved.string();
      std::error_code status_error;
      const auto status = fs::status(resolved, status_error);
      if (!fs::is_regular_file(status)) {
        missing.push_back({row.line, std::string(listed), entry.path, fs::is_directory(status)});
      }
    }
    entry.metadata.reserve(layout.metadata.size());
    for (std::size_t c : layout.metadata) entry.metadata.push_back(std::move(row.fields[c]));
    std::vector<std::string>().swap(row.fields);  // keep the peak memory near one copy of the manifest

    line_of_entry.push_back(row.line);
    listing.entries.push_back(std::move(entry));
  }

  // Duplicate ids, each with every line it is on, in first-seen order. The
  // views point into listing.entries, which no longer grows.
  std::unordered_map<std::string_view, std::size_t> first_entry_of_id;
  first_entry_of_id.reserve(listing.entries.size());
  std::unordered_map<std::string_view, std::vector<std::size_t>> lines_of_duplicate;
  std::vector<std::string_view> duplicate_ids;
  for (std::size_t k = 0; k < listing.entries.size(); ++k) {
    const std::string_view id = listing.entries[k].id;
    const auto [it, inserted] = first_entry_of_id.emplace(id, k);
    if (inserted) continue;
    auto& lines = lines_of_duplicate[id];
    if (lines.empty()) {
      duplicate_ids.push_back(id);
      lines.push_back(line_of_entry[it->second]);
    }
    lines.push_back(line_of_entry[k]);
  }
  std::sort(duplicate_ids.begin(), duplicate_ids.end(),
            [&](std::string_view a, std::string_view b) { return first_entry_of_id[a] < first_entry_of_id[b]; });
  std::vector<std::string> duplicates;
  for (const std::string_view id : duplicate_ids) {
    const auto& lines = lines_of_duplicate[id];
    std::string item;
    item.append("'").append(id).append("' (lines ");
    for (std::size_t k = 0; k < lines.size(); ++k) item.append(k ? ", " : "").append(std::to_string(lines[k]));
    duplicates.push_back(item.append(")"));
  }
  if (!duplicates.empty()) {
    std::string message = source + ": " + std::to_string(duplicates.size()) +
                          (duplicates.size() == 1 ? " id is" : " ids are") + " used more than once:";
    for (std::size_t k = 0; k < duplicates.size() && k < kMaxListed; ++k) message += "\n  " + duplicates[k];
    if (duplicates.size() > kMaxListed) {
      message += "\n  ... and " + std::to_string(duplicates.size() - kMaxListed) + " more";
    }
    throw Error(message + "\nEvery document needs its own id.");
  }

  if (!missing.empty()) {
    std::string message = source + ": " + std::to_string(missing.size()) + " of the listed files " +
                          (missing.size() == 1 ? "is" : "are") + " missing:";
    for (std::size_t k = 0; k < missing.size() && k < kMaxListed; ++k) {
      const auto& m = missing[k];
      message += "\n  line " + std::to_string(m.line) + ": " + m.listed + " (" + m.resolved +
                 (m.is_folder ? ", a folder, not a file)" : ")");
    }
    if (missing.size() > kMaxListed) message += "\n  ... and " + std::to_string(missing.size() - kMaxListed) + " more";
    throw Error(message + "\nPaths are read relative to the manifest's folder " + folder.string() +
                ". Fix the paths or add the files.");
  }
  return listing;
}

}  // namespace loupe

#include "corpus/source_csv.h"

#include <cstdio>
#include <stdexcept>

#include "common/error.h"

namespace loupe {
namespace {

constexpr std::string_view kUtf8ByteOrderMark = "\xEF\xBB\xBF";

// Counts line breaks (LF, CRLF, lone CR) in TEXT. A CR that is the last byte
// of TEXT but is followed by LF outside it is counted here; the caller makes
// sure the LF is not counted again (quoted data always ends at a quote).
std::size_t count_line_breaks(std::string_view text) {
  std::size_t breaks = 0;
  for (std::size_t i = 0; i < text.size(); ++i) {
    if (text[i] == '\n') {
      ++breaks;
    } else if (text[i] == '\r' && (i + 1 == text.size() || text[i + 1] != '\n')) {
      ++breaks;
    }
  }
  return breaks;
}

// "'x'" for a printable ASCII character, "byte 0xNN" otherwise.
std::string describe_character(char c) {
  const auto byte = static_cast<unsigned char>(c);
  if (byte >= 0x21 && byte < 0x7F) return std::string("'") + c + "'";
  if (byte == ' ') return "a space";
  char buffer[16];
  std::snprintf(buffer, sizeof(buffer), "byte 0x%02X", byte);
  return buffer;
}

}  // namespace

std::vector<CsvRecord> parse_delimited(std::string_view text, char separator, const std::string& file_name) {
  if (separator == '"' || separator == '\n' || separator == '\r') {
    throw std::invalid_argument("parse_delimited: the separator cannot be a quote or a line break");
  }
  std::vector<CsvRecord> records;
  const std::size_t n = text.size();
  std::size_t i = text.substr(0, 3) == kUtf8ByteOrderMark ? 3 : 0;
  std::size_t line = 1;

  while (i < n) {
    CsvRecord record;
    record.line = line;
    bool record_done = false;
    while (!record_done) {
      std::string& field = record.fields.emplace_back();
      if (i < n && text[i] == '"') {
        // RFC 4180, section 2, rules 5-7: a quoted field runs to the next quote
        // that is not doubled; it may hold separators and line breaks.
        const std::size_t opening_line = line;
        ++i;
        for (;;) {
          const std::size_t quote = text.find('"', i);
          if (quote == std::string_view::npos) {
            std::string_view rest = text.substr(i);
            if (!rest.empty() && rest.back() == '\n') rest.remove_suffix(1);  // a final line break ends the last line
            if (!rest.empty() && rest.back() == '\r') rest.remove_suffix(1);
            const std::size_t last_line = line + count_line_breaks(rest);
            throw Error(file_name + " line " + std::to_string(opening_line) +
                        ": a quoted field opened on this line is never closed (the file ends on line " +
                        std::to_string(last_line) +
                        "). Add the closing quote, and write a quote inside a quoted field as two quotes (\"\").");
          }
          const std::string_view chunk = text.substr(i, quote - i);
          line += count_line_breaks(chunk);
          field.append(chunk);
          i = quote + 1;
          if (i < n && text[i] == '"') {  // "" is one quote character
            field.push_back('"');
            ++i;
            continue;
          }
          break;
        }
        if (i < n && text[i] != separator && text[i] != '\n' && text[i] != '\r') {
          std::string where = file_name + " line " + std::to_string(line);
          if (line != record.line) where += " (in the record that starts on line " + std::to_string(record.line) + ")";
          throw Error(where + ": " + describe_character(text[i]) +
                      " follows the closing quote of a field; a quoted field must end at a separator or a line break. "
                      "Write a quote inside a quoted field as two quotes (\"\"), or quote the whole field.");
        }
      } else {
        const std::size_t start = i;
        while (i < n && text[i] != separator && text[i] != '\n' && text[i] != '\r') ++i;
        field.assign(text.substr(start, i - start));
      }
      // Here i is at a separator, a line break or the end of the text.
      if (i == n) {
        record_done = true;
      } else if (text[i] == separator) {
        ++i;  // RFC 4180, section 2, rule 4: a separator after the last field means one more (empty) field
      } else {
        // RFC 4180, section 2, rule 1: CRLF ends a record; LF and a lone CR are accepted too.
        if (text[i] == '\r' && i + 1 < n && text[i + 1] == '\n') ++i;
        ++i;
        ++line;
        record_done = true;
      }
    }
    records.push_back(std::move(record));
  }
  return records;
}

}  // namespace loupe

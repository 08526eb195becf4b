// The RFC 4180 reader for manifests: splits CSV (or TSV with the same quoting
// rules) into records of fields, keeping the physical line each record starts
// on so that every later error can name it. Usable alone.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

namespace loupe {

struct CsvRecord {
  std::vector<std::string> fields;
  std::size_t line = 0;  // 1-based physical line where the record starts
};

// Parses RFC 4180 CSV with SEPARATOR ',' or '\t':
//   - quoted fields with "" escapes; separators and line breaks inside quotes;
//   - records end with CRLF or LF (a lone CR is accepted as a line break too);
//   - the final line break is optional; a UTF-8 byte order mark at the start
//     is skipped; spaces are part of the field.
// Example: "id,text\r\n7,\"a \"\"b\"\",\nc\"\n" ->
//   {["id","text"] line 1}, {["7","a \"b\",\nc"] line 2}.
// Lenient where RFC 4180 forbids but nothing is ambiguous: a quote inside an
// unquoted field (5" floppy) is kept as a plain character.
// Throws loupe::Error naming FILE_NAME and the line for an unterminated quoted
// field or a character after a closing quote. Linear in the input size.
std::vector<CsvRecord> parse_delimited(std::string_view text, char separator, const std::string& file_name);

}  // namespace loupe

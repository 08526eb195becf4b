// Line numbers for messages about what sources list (manifest bytes): a bad
// byte is reported with its line so the user can fix the file before any text is read.
// The UTF-8 check itself is common/utf8.h.
#pragma once

#include <cstddef>
#include <string_view>

namespace loupe {

// 1-based line number of byte OFFSET in TEXT (lines end at LF, CRLF or lone CR).
std::size_t line_of_offset(std::string_view text, std::size_t offset);

}  // namespace loupe

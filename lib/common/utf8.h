// Strict UTF-8 checks for document text: find the first ill-formed sequence
// (with its byte offset and a plain-words description), or replace every
// ill-formed sequence by U+FFFD the way the Unicode Standard recommends.
#pragma once

#include <cstddef>
#include <optional>
#include <string>
#include <string_view>

namespace loupe {

// Where a byte string stops being well-formed UTF-8, and why.
// Example: "caf\xC3A" -> {3, "byte 0xC3 starts a 2-byte sequence but is followed by 0x41"}.
struct Utf8Problem {
  std::size_t byte_offset;  // offset of the first byte of the ill-formed sequence
  std::string description;
};

// First ill-formed sequence of BYTES, or nullopt when BYTES is well-formed
// UTF-8. Strict (Unicode Standard, Table 3-7 "Well-Formed UTF-8 Byte
// Sequences"): overlong forms, surrogates (U+D800..U+DFFF) and values above
// U+10FFFF are errors. Runs of ASCII are checked eight bytes at a time.
std::optional<Utf8Problem> find_invalid_utf8(std::string_view bytes);

// BYTES with each maximal subpart of an ill-formed sequence replaced by one
// U+FFFD (Unicode Standard section 3.9, "U+FFFD Substitution of Maximal
// Subparts"). REPLACED, when not null, receives the number of U+FFFD written.
// Example: "a\xF1\x80\x80\xE1\x80\xC2" "b" -> "a\uFFFD\uFFFD\uFFFDb", 3 replaced.
std::string replace_invalid_utf8(std::string_view bytes, std::size_t* replaced);

// Appends the UTF-8 encoding of code point C (at most U+10FFFF) to OUT.
// Example: 0x20AC -> "\xE2\x82\xAC" (the euro sign).
void append_utf8(std::string& out, char32_t c);

// BYTES without a leading UTF-8 byte order mark (EF BB BF), if it has one.
std::string_view strip_utf8_bom(std::string_view bytes);

}  // namespace loupe

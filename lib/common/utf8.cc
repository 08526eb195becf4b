#include "common/utf8.h"

#include <cstdint>
#include <cstring>

namespace loupe {
namespace {

// What one step of the decoder found at a position.
struct SequenceCheck {
  std::size_t length;  // well-formed: bytes of the sequence; ill-formed: bytes of its maximal subpart (>= 1)
  bool well_formed;
};

// The allowed range of the second byte after LEAD, and the sequence length,
// from the Unicode Standard, Table 3-7 "Well-Formed UTF-8 Byte Sequences".
// Returns length 0 for a byte that cannot start a multi-byte sequence.
struct LeadRule {
  std::size_t length;
  unsigned char second_low;
  unsigned char second_high;
};

LeadRule lead_rule(unsigned char lead) {
  if (lead >= 0xC2 && lead <= 0xDF) return {2, 0x80, 0xBF};
  if (lead == 0xE0) return {3, 0xA0, 0xBF};
  if (lead == 0xED) return {3, 0x80, 0x9F};
  if (lead >= 0xE1 && lead <= 0xEF) return {3, 0x80, 0xBF};
  if (lead == 0xF0) return {4, 0x90, 0xBF};
  if (lead >= 0xF1 && lead <= 0xF3) return {4, 0x80, 0xBF};
  if (lead == 0xF4) return {4, 0x80, 0x8F};
  return {0, 0, 0};
}

bool is_continuation(unsigned char byte) { return (byte & 0xC0) == 0x80; }

// Checks the non-ASCII sequence starting at BYTES[0] (AVAILABLE >= 1 bytes).
// Ill-formed: LENGTH is the maximal subpart, i.e. the longest prefix of a
// well-formed sequence, or 1 when BYTES[0] cannot start one.
// Example: E1 80 41 -> {2, false}; E1 80 80 -> {3, true}; 80 -> {1, false}.
SequenceCheck check_sequence(const unsigned char* bytes, std::size_t available) {
  const LeadRule rule = lead_rule(bytes[0]);
  if (rule.length == 0) return {1, false};
  std::size_t matched = 1;
  while (matched < rule.length && matched < available) {
    const unsigned char byte = bytes[matched];
    const bool in_range = matched == 1 ? (byte >= rule.second_low && byte <= rule.second_high) : is_continuation(byte);
    if (!in_range) return {matched, false};
    ++matched;
  }
  return {matched, matched == rule.length};
}

std::string hex_byte(unsigned char byte) {
  static constexpr char kDigits[] = "0123456789ABCDEF";
  std::string out = "0x";
  out += kDigits[byte >> 4];
  out += kDigits[byte & 0x0F];
  return out;
}

// Plain words for the ill-formed sequence at BYTES[0], whose maximal subpart
// has SUBPART bytes. Example: C3 41 -> "byte 0xC3 starts a 2-byte sequence but is followed by 0x41".
std::string describe_problem(const unsigned char* bytes, std::size_t available, std::size_t subpart) {
  const unsigned char lead = bytes[0];
  std::string out = "byte ";
  out += hex_byte(lead);
  if (is_continuation(lead)) return out += " is a continuation byte with no lead byte before it";
  if (lead == 0xC0 || lead == 0xC1)
    return out += " can only begin an overlong (non-shortest) encoding of an ASCII character";
  const LeadRule rule = lead_rule(lead);
  if (rule.length == 0) return out += " never occurs in UTF-8";
  if (subpart == available) {
    out += " starts a ";
    out += std::to_string(rule.length);
    out += "-byte sequence but the text ends after ";
    out += std::to_string(subpart);
    return out += subpart == 1 ? " byte" : " bytes";
  }
  const unsigned char bad = bytes[subpart];
  if (subpart == 1 && is_continuation(bad) && (lead == 0xE0 || lead == 0xF0 || lead == 0xED || lead == 0xF4)) {
    out = "bytes ";
    out += hex_byte(lead);
    out += ' ';
    out += hex_byte(bad);
    if (lead == 0xED) return out += " begin a UTF-16 surrogate (U+D800..U+DFFF), which UTF-8 must not encode";
    if (lead == 0xF4) return out += " begin a value above U+10FFFF, the largest code point";
    return out += " begin an overlong (non-shortest) encoding";
  }
  out += " starts a ";
  out += std::to_string(rule.length);
  out += "-byte sequence but is followed by";
  for (std::size_t k = 1; k <= subpart; ++k) {
    out += ' ';
    out += hex_byte(bytes[k]);
  }
  return out;
}

constexpr std::uint64_t kHighBits = 0x8080808080808080ULL;

// Bytes from I on that are ASCII, checked eight at a time.
std::size_t skip_ascii(const unsigned char* bytes, std::size_t size, std::size_t i) {
  while (i + 8 <= size) {
    std::uint64_t word;
    std::memcpy(&word, bytes + i, 8);
    if ((word & kHighBits) != 0) break;
    i += 8;
  }
  while (i < size && bytes[i] < 0x80) ++i;
  return i;
}

}  // namespace

std::optional<Utf8Problem> find_invalid_utf8(std::string_view text) {
  const auto* bytes = reinterpret_cast<const unsigned char*>(text.data());
  const std::size_t size = text.size();
  std::size_t i = 0;
  while (true) {
    i = skip_ascii(bytes, size, i);
    if (i >= size) return std::nullopt;
    const SequenceCheck check = check_sequence(bytes + i, size - i);
    if (!check.well_formed) return Utf8Problem{i, describe_problem(bytes + i, size - i, check.length)};
    i += check.length;
  }
}

std::string replace_invalid_utf8(std::string_view text, std::size_t* replaced) {
  static constexpr std::string_view kReplacement = "\xEF\xBF\xBD";  // U+FFFD
  const auto* bytes = reinterpret_cast<const unsigned char*>(text.data());
  const std::size_t size = text.size();
  std::string out;
  out.reserve(size);
  std::size_t count = 0;
  std::size_t run_start = 0;  // start of the well-formed run not yet copied
  std::size_t i = 0;
  while (true) {
    i = skip_ascii(bytes, size, i);
    if (i >= size) break;
    const SequenceCheck check = check_sequence(bytes + i, size - i);
    if (!check.well_formed) {
      out.append(text.data() + run_start, i - run_start);
      out.append(kReplacement);
      ++count;
      run_start = i + check.length;
    }
    i += check.length;
  }
  out.append(text.data() + run_start, size - run_start);
  if (replaced != nullptr) *replaced = count;
  return out;
}

std::string_view strip_utf8_bom(std::string_view bytes) {
  if (bytes.size() >= 3 && bytes.substr(0, 3) == "\xEF\xBB\xBF") bytes.remove_prefix(3);
  return bytes;
}

void append_utf8(std::string& out, char32_t c) {
  if (c < 0x80) {
    out += static_cast<char>(c);
  } else if (c < 0x800) {
    out += static_cast<char>(0xC0 | (c >> 6));
    out += static_cast<char>(0x80 | (c & 0x3F));
  } else if (c < 0x10000) {
    out += static_cast<char>(0xE0 | (c >> 12));
    out += static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (c & 0x3F));
  } else {
    out += static_cast<char>(0xF0 | (c >> 18));
    out += static_cast<char>(0x80 | ((c >> 12) & 0x3F));
    out += static_cast<char>(0x80 | ((c >> 6) & 0x3F));
    out += static_cast<char>(0x80 | (c & 0x3F));
  }
}

}  // namespace loupe

// The role a document plays in a study: a known member of its group, or a
// disputed text whose group is the question (attribution, composite scans).
#pragma once

#include <optional>
#include <string>
#include <string_view>

namespace loupe {

enum class DocumentRole : unsigned char { known = 0, disputed = 1 };

inline const char* role_name(DocumentRole role) { return role == DocumentRole::known ? "known" : "disputed"; }

// "known" / "disputed" (case-insensitive, surrounding spaces ignored); an empty
// value means known. Returns nullopt for anything else.
inline std::optional<DocumentRole> parse_role(std::string_view text) {
  while (!text.empty() && (text.front() == ' ' || text.front() == '\t')) text.remove_prefix(1);
  while (!text.empty() && (text.back() == ' ' || text.back() == '\t')) text.remove_suffix(1);
  std::string lower(text);
  for (auto& c : lower) c = static_cast<char>(c >= 'A' && c <= 'Z' ? c - 'A' + 'a' : c);
  if (lower.empty() || lower == "known") return DocumentRole::known;
  if (lower == "disputed") return DocumentRole::disputed;
  return std::nullopt;
}

}  // namespace loupe

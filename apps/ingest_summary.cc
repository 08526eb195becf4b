#include "apps/ingest_summary.h"

#include <algorithm>
#include <cstdio>
#include <iomanip>

#include "apps/progress_bar.h"

namespace loupe::cli {

namespace {
std::string percent(std::size_t part, std::size_t whole) {
  char buffer[16];
  std::snprintf(buffer, sizeof buffer, "%.1f%%",
                whole ? 100.0 * static_cast<double>(part) / static_cast<double>(whole) : 0.0);
  return buffer;
}
}  // namespace

void print_ingest_summary(const IngestReport& report, double seconds, std::ostream& out) {
  out << "Read " << format_count(report.source_documents) << " documents ("
      << format_bytes(static_cast<double>(report.input_bytes)) << ") from " << report.source;
  if (seconds > 0) {
    out << " in " << std::fixed << std::setprecision(1) << seconds << " s";
    out.unsetf(std::ios::floatfield);
  }
  out << "\n\n";
  std::size_t width = 24;
  for (const auto& g : report.groups) width = std::max(width, g.name.size() + 4);
  out << std::left << std::setw(static_cast<int>(width)) << "Group" << std::right << std::setw(11) << "documents"
      << std::setw(13) << "tokens"
      << "\n";
  std::size_t documents = 0, tokens = 0;
  for (const auto& g : report.groups) {
    out << "  " << std::left << std::setw(static_cast<int>(width - 2)) << g.name << std::right << std::setw(11)
        << format_count(g.documents) << std::setw(13) << format_count(g.tokens) << "\n";
    documents += g.documents;
    tokens += g.tokens;
  }
  if (report.tokens_kept > tokens) {
    out << "  " << std::left << std::setw(static_cast<int>(width - 2)) << "(no group: disputed)" << std::right
        << std::setw(11) << "" << std::setw(13) << format_count(report.tokens_kept - tokens) << "\n";
  }
  out << "\nCorpus: " << format_count(report.corpus_documents) << " documents";
  if (report.disputed_documents) out << " (" << format_count(report.disputed_documents) << " disputed)";
  if (report.segmented_documents) out << ", " << format_count(report.segmented_documents) << " cut into segments";
  out << ", " << format_count(report.tokens_kept) << " tokens, vocabulary of " << format_count(report.vocabulary_size)
      << " words (of " << format_count(report.distinct_words_seen) << " distinct words seen)\n";
  out << "Dropped (" << format_count(report.words_seen - report.tokens_kept) << " of "
      << format_count(report.words_seen) << " word tokens):\n";
  for (std::size_t i = 0; i < report.tokens_dropped.size(); ++i) {
    const auto& [reason, n] = report.tokens_dropped[i];
    if (n == 0) continue;
    out << "  " << std::left << std::setw(24) << reason << std::right << std::setw(13) << format_count(n) << " tokens "
        << std::setw(7) << percent(n, report.words_seen) << "   " << format_count(report.words_dropped[i].second)
        << " distinct words\n";
  }
  if (!report.proper_names_dropped.empty()) {
    out << "  proper names, most frequent first:";
    const auto shown = std::min<std::size_t>(report.proper_names_dropped.size(), 12);
    for (std::size_t i = 0; i < shown; ++i) out << " " << report.proper_names_dropped[i];
    if (report.proper_names_dropped.size() > shown) out << " ...";
    out << "\n";
  }
  if (!report.invalid_utf8_replaced.empty())
    out << "Invalid UTF-8 replaced by U+FFFD in " << report.invalid_utf8_replaced.size() << " document(s)\n";
  if (!report.invalid_utf8_skipped.empty())
    out << "Left out for invalid UTF-8: " << report.invalid_utf8_skipped.size() << " document(s)\n";
  for (const auto& w : report.warnings) out << "warning: " << w << "\n";
}

}  // namespace loupe::cli

// `loupe ingest SOURCE -o FILE`: folders or a manifest of texts -> corpus file.
#include <iostream>

#include "apps/commands.h"
#include "apps/ingest_summary.h"
#include "apps/progress_bar.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_builder.h"
#include "corpus/corpus_file.h"

namespace loupe::cli {

namespace {

struct IngestArguments {
  std::string source;
  std::string output;
  std::string format = "auto";
  std::string invalid_utf8 = "fail";
  std::string summary_json;
  bool quiet = false;
  IngestOptions options;
};

void add_ingest_options(CLI::App& cmd, IngestArguments& a) {
  auto& o = a.options;
  cmd.add_option("--format", a.format, "Manifest format when the extension does not say")
      ->check(CLI::IsMember({"auto", "csv", "tsv", "jsonl"}))
      ->capture_default_str();
  cmd.add_option("--disputed-folder", o.sources.disputed_folder,
                 "Folder sources: the sub-folder that holds disputed documents")
      ->capture_default_str();
  cmd.add_flag("--allow-outside-paths", o.sources.allow_outside_paths,
               "Manifests: allow document paths outside the manifest's folder");
  cmd.add_option("--invalid-utf8", a.invalid_utf8,
                 "What to do with a document that is not valid UTF-8: fail, replace (with U+FFFD) or skip it")
      ->check(CLI::IsMember({"fail", "replace", "skip"}))
      ->capture_default_str();
  cmd.add_flag("--keep-numbers", o.tokenizer.keep_numbers, "Keep words made only of digits (e.g. years)");
  cmd.add_option("--min-word-length", o.tokenizer.min_length, "Drop words shorter than this (in characters)")
      ->capture_default_str();
  cmd.add_option("--stop-words", o.stop_words, "Stop words: english (built-in list), none, or a file, one word a line")
      ->capture_default_str();
  cmd.add_option("--min-documents", o.min_documents, "Drop words found in fewer documents than this")
      ->capture_default_str();
  cmd.add_option("--max-document-share", o.max_document_share,
                 "Drop words found in more than this share of documents (applied from 20 documents up)")
      ->capture_default_str();
  cmd.add_option("--max-vocabulary", o.max_vocabulary, "Keep only this many most frequent words (0: no limit)")
      ->capture_default_str();
  cmd.add_flag("--drop-proper-names", o.drop_proper_names,
               "Drop words capitalised in most of their occurrences that do not start a sentence (names of people "
               "and places)");
  cmd.add_option("--proper-name-share", o.proper_name_share,
                 "With --drop-proper-names: the share of capitalised occurrences above which a word is a name")
      ->capture_default_str();
  cmd.add_option("--keep-words", o.keep_words_file, "File of words never dropped, one a line")
      ->check(CLI::ExistingFile);
  cmd.add_option("--drop-words", o.drop_words_file, "File of words always dropped, one a line")
      ->check(CLI::ExistingFile);
  cmd.add_option("--segment-words", o.segment_words,
                 "Cut documents longer than this many tokens into consecutive segments (0: off)")
      ->capture_default_str();
  cmd.add_flag("--segment-disputed-only", o.segment_disputed_only, "With --segment-words: cut only disputed documents");
  cmd.add_option("--summary-json", a.summary_json, "Also write the summary as JSON to this file");
  cmd.add_flag("-q,--quiet", a.quiet, "Print nothing but errors");
}

void finish_options(IngestArguments& a) {
  auto& o = a.options;
  o.sources.outside_paths_option = "--allow-outside-paths";
  o.sources.format = a.format == "csv"     ? ManifestFormat::csv
                     : a.format == "tsv"   ? ManifestFormat::tsv
                     : a.format == "jsonl" ? ManifestFormat::jsonl
                                           : ManifestFormat::by_extension;
  o.invalid_utf8 = a.invalid_utf8 == "replace" ? InvalidUtf8Policy::replace
                   : a.invalid_utf8 == "skip"  ? InvalidUtf8Policy::skip
                                               : InvalidUtf8Policy::fail;
}

}  // namespace

// Shared by `ingest` and `demo`: build, write, summarise.
IngestReport run_ingest(const std::string& source, const IngestOptions& options, const std::string& output,
                        const std::string& summary_json, bool quiet) {
  ProgressBar bar("reading", quiet);
  IngestReport report;
  const Corpus corpus = build_corpus(source, options, &report, [&](std::size_t done, std::size_t total) {
    const double seconds = std::max(bar.elapsed_seconds(), 1e-9);
    bar.update(static_cast<double>(done), static_cast<double>(total),
               format_bytes(static_cast<double>(done) / seconds) + "/s");
  });
  bar.finish();
  write_corpus(corpus, output);
  if (!summary_json.empty()) write_file_atomically(summary_json, report.to_json().dump(2) + "\n");
  if (!quiet) {
    print_ingest_summary(report, bar.elapsed_seconds(), std::cout);
    std::cout << "Wrote " << output << "\n";
  } else {
    for (const auto& w : report.warnings) std::cerr << "warning: " << w << "\n";
  }
  return report;
}

void add_ingest_command(CLI::App& app) {
  auto args = std::make_shared<IngestArguments>();
  auto* cmd = app.add_subcommand("ingest",
                                 "Read folders or a manifest of texts into a corpus file.\n"
                                 "  Example: loupe ingest letters/ -o letters.corpus");
  cmd->add_option("SOURCE", args->source,
                  "A folder with one sub-folder of .txt files per group, or a manifest (.csv, .tsv, .jsonl)")
      ->required()
      ->check(CLI::ExistingPath);
  cmd->add_option("-o,--output", args->output, "The corpus file to write")->required();
  add_ingest_options(*cmd, *args);
  cmd->callback([args] {
    finish_options(*args);
    run_ingest(args->source, args->options, args->output, args->summary_json, args->quiet);
  });
}

}  // namespace loupe::cli

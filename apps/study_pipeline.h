// The whole study in one call, for `loupe analyze` and `loupe demo`: ingest, fit, compare, attribute, scan,
// graph, near-duplicates and the report, in process, into one study folder that appears complete or not at
// all. The study options read from and write to a study file (JSON) that reproduces the run exactly.
#pragma once

#include <cstddef>
#include <cstdint>
#include <ostream>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "analysis/anosim.h"
#include "analysis/attribution.h"
#include "corpus/corpus_builder.h"
#include "graph/graph_study.h"
#include "graph/near_duplicates.h"
#include "model/lda_options.h"

namespace loupe::cli {

// The version of the study file's layout (its "study_format" key).
inline constexpr int kStudyFormat = 1;

// Every option of every stage: what the study file records.
struct StudyOptions {
  std::string source;  // a folder or a manifest, as an absolute path

  // Ingest (as `loupe ingest`); disputed documents are cut into 50-token segments by default, for the scan.
  std::string manifest_format = "auto";  // auto, csv, tsv, jsonl
  std::string invalid_utf8 = "fail";     // fail, replace, skip
  IngestOptions ingest = default_ingest();

  // Fit (as `loupe fit`): 4 chains by default.
  FitOptions fit = default_fit();
  std::string sampler = "auto";  // auto, exact, mh

  std::size_t topic_words = 10;  // top words listed per topic

  // Choosing K (as `loupe sweep`), run before the fit when `topics` lists K values; the fit keeps fit.topic_count.
  struct Sweep {
    std::vector<std::uint32_t> topics;  // empty: no sweep
    std::uint32_t chains = 2;
    std::uint32_t sweeps = 300;
  } sweep;

  struct Compare {
    std::size_t permutations = 999;
    std::size_t bootstrap = 999;
    std::uint64_t seed = 1;
    std::string strata;  // metadata column; "" = free permutations
    bool include_disputed = false;
    bool weight_by_length = false;
    std::string pairwise_adjustment = "bh";  // bh, holm, none
    std::size_t anosim_limit = kAnosimDefaultMaxDocuments;
  } compare;

  struct Attribute {
    double none_level = kDefaultNoneLevel;
    std::size_t min_tokens = AttributionOptions{}.min_tokens;
    std::size_t neighbours = 5;
    std::size_t permutations = 999;
    std::uint64_t seed = 1;
    std::string candidates_column;
  } attribute;

  struct Scan {
    double level = 0.05;
    std::size_t permutations = 999;
    std::size_t min_segments = 2;
    std::uint64_t seed = 1;
    double none_level = kDefaultNoneLevel;
  } scan;

  GraphStudyOptions graph;  // threads and chain are not study options (threads never change results)
  std::size_t layout_iterations = 100;

  struct NearDuplicates {
    double threshold = NearDuplicateOptions{}.threshold;
    std::size_t shingle_words = NearDuplicateOptions{}.shingle_words;
    std::size_t hashes = NearDuplicateOptions{}.num_hashes;
    std::size_t rows_per_band = 0;  // 0: chosen from the threshold
    std::uint64_t seed = 1;
  } near_duplicates;

  double level = 0.05;  // the conclusions: a test "finds" a difference at p <= level

  static IngestOptions default_ingest();
  static FitOptions default_fit();
};

// The study file: {"study_format": 1, "source": ..., "ingest": {...}, "sweep": {...}, "fit": {...}, "topics": {...},
// "compare": {...}, "attribute": {...}, "scan": {...}, "graph": {...}, "near_duplicates": {...},
// "conclusions": {...}} with every option written out.
nlohmann::json study_to_json(const StudyOptions& options);
// Missing keys keep their defaults. Throws loupe::Error naming `file` and the key for an unknown key (listing
// the known ones), a value of the wrong type, or a newer study format.
StudyOptions study_from_json(const nlohmann::json& json, const std::string& file);
StudyOptions read_study_file(const std::string& path);

// Checks every option's range before any work, naming the `loupe analyze` option. Throws loupe::Error.
void validate_study(const StudyOptions& options);

struct StudyRunSettings {
  std::string output_dir;
  bool overwrite = false;   // replace an existing study folder (only one that holds a study; an empty one always)
  bool quiet = false;       // no progress bars
  std::size_t threads = 2;  // for the stages whose results never depend on it (the fit's are in the options)
};

struct StudyOutcome {
  nlohmann::json results;          // what results.json holds
  std::string output_dir;          // as given
  std::vector<std::string> files;  // the files of the study folder, sorted
  std::vector<std::string> notes;  // stages not run, and why
  bool replaced_previous = false;  // an earlier study was replaced
};

// Runs every stage and writes the study folder (see the top of the file). Throws loupe::Error for bad input,
// an existing folder without `overwrite`, or a folder that cannot be written; then nothing at output_dir changes.
StudyOutcome run_study(const StudyOptions& options, const StudyRunSettings& settings);

// The short summary for the terminal: the corpus and model in a line each, the conclusions that hold in all
// chains first, the cautions, and where the report is.
void print_study_summary(const StudyOutcome& outcome, std::ostream& out);

}  // namespace loupe::cli

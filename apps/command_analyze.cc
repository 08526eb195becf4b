// `loupe analyze SOURCE -o STUDY_DIR`: the whole study in one command (ingest, fit, compare, attribute, scan,
// graph, near-duplicates, report) into one folder, with a study file that reruns it exactly
// (`loupe analyze --study STUDY_DIR/study.json -o AGAIN`).
#include <filesystem>
#include <iostream>
#include <memory>
#include <sstream>
#include <thread>

#include "analysis/topic_count_sweep.h"
#include "apps/commands.h"
#include "apps/study_pipeline.h"
#include "common/error.h"

namespace loupe::cli {
namespace {

struct AnalyzeArguments {
  std::string source;
  std::string output;
  std::string study_file;
  std::string alpha;
  std::string sweep_topics;
  bool overwrite = false;
  bool quiet = false;
  std::size_t threads = std::max(1U, std::thread::hardware_concurrency());
  std::uint64_t seed = 1;
  std::size_t permutations = 999;
  std::string strata;
  StudyOptions study;
  // The options that a study file sets; with --study none of them may be given.
  std::vector<CLI::Option*> study_options;
};

std::vector<double> parse_alpha(const std::string& text) {
  std::vector<double> values;
  std::stringstream stream(text);
  std::string item;
  while (std::getline(stream, item, ',')) {
    try {
      std::size_t used = 0;
      values.push_back(std::stod(item, &used));
      if (used != item.size()) throw std::invalid_argument(item);
    } catch (const std::exception&) {
      throw Error("--alpha " + text + ": \"" + item +
                  "\" is not a number. Give one value, or one per topic separated by commas.");
    }
  }
  return values;
}

std::string absolute(const std::string& path) {
  return path.empty() ? path : std::filesystem::absolute(path).lexically_normal().string();
}

void add_study_options(CLI::App& cmd, AnalyzeArguments& a) {
  StudyOptions& s = a.study;
  auto& i = s.ingest;
  auto& f = s.fit;
  auto track = [&](CLI::Option* option, const char* group) {
    option->group(group);
    a.study_options.push_back(option);
    return option;
  };
  // Defaults shared by several stages.
  const char* all = "Every stage";
  track(cmd.add_option("--seed", a.seed, "Seed of every stage not given its own seed below"), all)
      ->capture_default_str();
  track(cmd.add_option("--permutations", a.permutations, "Permutations of every test not given its own count below"),
        all)
      ->capture_default_str();
  track(cmd.add_option("--strata", a.strata,
                       "Permute group labels only among documents sharing this metadata column's value (compare and "
                       "graph tests)"),
        all);
  track(cmd.add_option("--level", s.level, "A test finds something in a chain when its p-value is at most this")
            ->capture_default_str(),
        all);

  const char* read = "Reading (as loupe ingest)";
  track(cmd.add_option("--format", s.manifest_format, "Manifest format when the extension does not say")
            ->check(CLI::IsMember({"auto", "csv", "tsv", "jsonl"}))
            ->capture_default_str(),
        read);
  track(cmd.add_option("--disputed-folder", i.sources.disputed_folder,
                       "Folder sources: the sub-folder that holds disputed documents")
            ->capture_default_str(),
        read);
  track(cmd.add_flag("--allow-outside-paths", i.sources.allow_outside_paths,
                     "Manifests: allow document paths outside the manifest's folder"),
        read);
  track(cmd.add_option("--invalid-utf8", s.invalid_utf8, "A document that is not valid UTF-8: fail, replace or skip")
            ->check(CLI::IsMember({"fail", "replace", "skip"}))
            ->capture_default_str(),
        read);
  track(cmd.add_flag("--keep-numbers", i.tokenizer.keep_numbers, "Keep words made only of digits"), read);
  track(cmd.add_option("--min-word-length", i.tokenizer.min_length, "Drop words shorter than this")
            ->capture_default_str(),
        read);
  track(cmd.add_option("--stop-words", i.stop_words, "english, none, or a file with one word a line")
            ->capture_default_str(),
        read);
  track(cmd.add_option("--min-documents", i.min_documents, "Drop words found in fewer documents than this")
            ->capture_default_str(),
        read);
  track(cmd.add_option("--max-document-share", i.max_document_share,
                       "Drop words found in more than this share of documents (from 20 documents up)")
            ->capture_default_str(),
        read);
  track(cmd.add_option("--max-vocabulary", i.max_vocabulary, "Keep only this many most frequent words (0: all)")
            ->capture_default_str(),
        read);
  track(cmd.add_flag("--drop-proper-names", i.drop_proper_names,
                     "Drop words capitalised in most occurrences that do not start a sentence"),
        read);
  track(cmd.add_option("--proper-name-share", i.proper_name_share,
                       "With --drop-proper-names: the capitalised share above which a word is a name")
            ->capture_default_str(),
        read);
  track(cmd.add_option("--keep-words", i.keep_words_file, "File of words never dropped")->check(CLI::ExistingFile),
        read);
  track(cmd.add_option("--drop-words", i.drop_words_file, "File of words always dropped")->check(CLI::ExistingFile),
        read);
  track(cmd.add_option("--segment-words", i.segment_words,
                       "Cut documents longer than this many tokens into segments, for the composite scan (0: off)")
            ->capture_default_str(),
        read);
  track(cmd.add_flag("--segment-disputed-only,!--segment-every-document", i.segment_disputed_only,
                     "Cut only disputed documents (the default), or every long document"),
        read);

  const char* fit = "Fitting (as loupe fit)";
  track(cmd.add_option("--topics", f.topic_count, "Number of topics K")->capture_default_str(), fit);
  track(cmd.add_option("--sweeps", f.sweeps, "Gibbs sweeps per chain")->capture_default_str(), fit);
  track(cmd.add_option("--burn-in", f.burn_in, "Sweeps before samples are kept")->capture_default_str(), fit);
  track(
      cmd.add_option("--chains", f.chains, "Independent chains; conclusions say how many agree")->capture_default_str(),
      fit);
  track(cmd.add_option("--fit-seed", f.seed, "Master seed of the chains (default: --seed)"), fit);
  track(cmd.add_option("--fit-threads", f.threads,
                       "Threads of the fit (0: one a chain, so the model never depends on the machine)")
            ->capture_default_str(),
        fit);
  track(cmd.add_option("--alpha", a.alpha, "Document-topic prior: one value, or K values separated by commas"), fit);
  track(cmd.add_option("--beta", f.beta, "Topic-word prior")->capture_default_str(), fit);
  track(cmd.add_option("--tune-priors-every", f.tune_priors_every, "Re-estimate alpha and beta every N sweeps (0: off)")
            ->capture_default_str(),
        fit);
  track(cmd.add_flag("--asymmetric-alpha", f.asymmetric_alpha, "With --tune-priors-every: one alpha per topic"), fit);
  track(cmd.add_option("--samples", f.samples, "States averaged into theta and phi")->capture_default_str(), fit);
  track(cmd.add_option("--sample-lag", f.sample_lag, "Sweeps between averaged states")->capture_default_str(), fit);
  track(cmd.add_option("--log-likelihood-every", f.log_likelihood_every, "Trace log p(w, z) every N sweeps")
            ->capture_default_str(),
        fit);
  track(cmd.add_option("--sampler", s.sampler, "exact, mh or auto")
            ->check(CLI::IsMember({"auto", "exact", "mh"}))
            ->capture_default_str(),
        fit);
  track(cmd.add_option("--mh-steps", f.mh_steps, "Metropolis-Hastings proposals a token per sweep")
            ->capture_default_str(),
        fit);
  track(cmd.add_option("--topic-words", s.topic_words, "Top words listed per topic")->capture_default_str(), fit);

  const char* sweep = "Choosing the number of topics (as loupe sweep), before the fit";
  track(cmd.add_option("--sweep-topics", a.sweep_topics,
                       "Fit these numbers of topics first and report a suggested K (e.g. 5:40:5); the study's model "
                       "still uses --topics"),
        sweep);
  track(cmd.add_option("--sweep-chains", s.sweep.chains, "Chains at every K of the sweep (at least 2)")
            ->capture_default_str(),
        sweep);
  track(cmd.add_option("--sweep-sweeps", s.sweep.sweeps, "Gibbs sweeps per chain at every K of the sweep")
            ->capture_default_str(),
        sweep);

  const char* compare = "Comparing groups (as loupe compare)";
  track(cmd.add_option("--compare-permutations", s.compare.permutations,
                       "Permutations per test (default: --permutations)"),
        compare);
  track(cmd.add_option("--bootstrap", s.compare.bootstrap, "Bootstrap draws for the 95% intervals")
            ->capture_default_str(),
        compare);
  track(cmd.add_option("--compare-seed", s.compare.seed, "Seed of the permutations and bootstrap (default: --seed)"),
        compare);
  track(cmd.add_flag("--include-disputed", s.compare.include_disputed,
                     "Count disputed documents with a group in their group"),
        compare);
  track(cmd.add_flag("--weight-by-length", s.compare.weight_by_length,
                     "Weight documents by length in profiles and distinctive topics"),
        compare);
  track(cmd.add_option("--pairwise-adjustment", s.compare.pairwise_adjustment, "bh, holm or none")
            ->check(CLI::IsMember({"bh", "holm", "none"}, CLI::ignore_case))
            ->capture_default_str(),
        compare);
  track(cmd.add_option("--anosim-limit", s.compare.anosim_limit, "Run ANOSIM only up to this many documents")
            ->capture_default_str(),
        compare);

  const char* attribute = "Attributing disputed documents (as loupe attribute)";
  track(cmd.add_option("--none-level", s.attribute.none_level,
                       "'None of the candidates' when every p-value is at or below this (also for scanned segments)")
            ->capture_default_str(),
        attribute);
  track(cmd.add_option("--min-tokens", s.attribute.min_tokens, "Shorter documents are too short to judge")
            ->capture_default_str(),
        attribute);
  track(
      cmd.add_option("--attribute-neighbours", s.attribute.neighbours, "Known documents in the nearest-neighbour vote")
          ->capture_default_str(),
      attribute);
  track(cmd.add_option("--attribute-permutations", s.attribute.permutations,
                       "Permutations for the test of calibration accuracy (default: --permutations)"),
        attribute);
  track(cmd.add_option("--attribute-seed", s.attribute.seed, "Seed of the calibration permutations (default: --seed)"),
        attribute);
  track(cmd.add_option("--candidates-column", s.attribute.candidates_column,
                       "A manifest column listing each disputed document's candidate groups, separated by ';'"),
        attribute);

  const char* scan = "Scanning segmented texts (as loupe scan)";
  track(cmd.add_option("--scan-level", s.scan.level, "Keep a change point while its p-value is at most this")
            ->capture_default_str(),
        scan);
  track(cmd.add_option("--scan-permutations", s.scan.permutations,
                       "Permutations a step of the change-point search (default: --permutations)"),
        scan);
  track(cmd.add_option("--min-segments", s.scan.min_segments, "Segments on each side of a change point, at least")
            ->capture_default_str(),
        scan);
  track(cmd.add_option("--scan-seed", s.scan.seed, "Seed of the scan's permutations (default: --seed)"), scan);

  const char* graph = "Similarity graph (as loupe graph)";
  auto* k = track(cmd.add_option("--graph-neighbours", s.graph.neighbours, "Join each document to its k nearest")
                      ->capture_default_str(),
                  graph);
  auto* limit = track(cmd.add_option("--max-distance", s.graph.max_distance,
                                     "Instead of neighbours: join pairs with Hellinger distance at most this"),
                      graph);
  k->excludes(limit);
  track(cmd.add_flag("--mutual", s.graph.mutual, "Keep an edge only when each is among the other's k nearest"), graph)
      ->excludes(limit);
  track(cmd.add_option("--graph-permutations", s.graph.permutations,
                       "Permutations for the group-mixing tests (default: --permutations)"),
        graph);
  track(cmd.add_option("--graph-seed", s.graph.seed, "Seed of the tests, Louvain and the layout (default: --seed)"),
        graph);
  track(cmd.add_option("--resolution", s.graph.resolution, "Louvain resolution")->capture_default_str(), graph);
  track(
      cmd.add_option("--layout-iterations", s.layout_iterations, "Cooling steps of the layout")->capture_default_str(),
      graph);

  const char* near = "Near-duplicates (as loupe near-duplicates)";
  track(cmd.add_option("--near-duplicate-threshold", s.near_duplicates.threshold,
                       "Smallest Jaccard similarity of two documents' shingle sets")
            ->capture_default_str(),
        near);
  track(cmd.add_option("--shingle-words", s.near_duplicates.shingle_words, "Words per shingle")->capture_default_str(),
        near);
  track(cmd.add_option("--hashes", s.near_duplicates.hashes, "MinHash signature length")->capture_default_str(), near);
  track(cmd.add_option("--rows-per-band", s.near_duplicates.rows_per_band, "LSH rows per band (0: chosen)")
            ->capture_default_str(),
        near);
  track(cmd.add_option("--near-duplicate-seed", s.near_duplicates.seed, "Seed of the hash functions (default: --seed)"),
        near);
}

// The options from the command line: --seed, --permutations and --strata fill what was not given separately.
StudyOptions options_from_command_line(const CLI::App& cmd, AnalyzeArguments& a) {
  StudyOptions s = a.study;
  auto unset = [&](const char* name) { return cmd.count(name) == 0; };
  if (unset("--fit-seed")) s.fit.seed = a.seed;
  if (unset("--compare-seed")) s.compare.seed = a.seed;
  if (unset("--attribute-seed")) s.attribute.seed = a.seed;
  if (unset("--scan-seed")) s.scan.seed = a.seed;
  if (unset("--graph-seed")) s.graph.seed = a.seed;
  if (unset("--near-duplicate-seed")) s.near_duplicates.seed = a.seed;
  if (unset("--compare-permutations")) s.compare.permutations = a.permutations;
  if (unset("--attribute-permutations")) s.attribute.permutations = a.permutations;
  if (unset("--scan-permutations")) s.scan.permutations = a.permutations;
  if (unset("--graph-permutations")) s.graph.permutations = a.permutations;
  s.compare.strata = a.strata;
  s.graph.strata = a.strata;
  s.scan.none_level = s.attribute.none_level;
  s.graph.threshold_graph = cmd.count("--max-distance") > 0;
  if (!a.alpha.empty()) s.fit.alpha = parse_alpha(a.alpha);
  if (!a.sweep_topics.empty()) s.sweep.topics = parse_topic_counts(a.sweep_topics, "--sweep-topics");
  s.source = absolute(a.source);
  s.ingest.keep_words_file = absolute(s.ingest.keep_words_file);
  s.ingest.drop_words_file = absolute(s.ingest.drop_words_file);
  if (s.ingest.stop_words != "english" && s.ingest.stop_words != "none") {
    s.ingest.stop_words = absolute(s.ingest.stop_words);
  }
  return s;
}

void run_analyze(const CLI::App& cmd, AnalyzeArguments& a) {
  StudyOptions options;
  if (!a.study_file.empty()) {
    for (const CLI::Option* option : a.study_options) {
      if (option->count() > 0) {
        throw Error(option->get_name() + ": with --study the options come from the study file " + a.study_file +
                    "; change them there, or leave out --study.");
      }
    }
    options = read_study_file(a.study_file);
    if (!a.source.empty()) options.source = absolute(a.source);
  } else {
    if (a.source.empty()) {
      throw Error("give SOURCE (a folder or manifest of texts) or --study FILE (a study file from an earlier run).");
    }
    options = options_from_command_line(cmd, a);
  }
  StudyRunSettings settings;
  settings.output_dir = a.output;
  settings.overwrite = a.overwrite;
  settings.quiet = a.quiet;
  settings.threads = a.threads;
  const StudyOutcome outcome = run_study(options, settings);
  if (!a.quiet) print_study_summary(outcome, std::cout);
}

}  // namespace

void add_analyze_command(CLI::App& app) {
  auto args = std::make_shared<AnalyzeArguments>();
  auto* cmd = app.add_subcommand("analyze",
                                 "Run a whole study in one command: ingest, fit, compare, attribute, scan, graph, "
                                 "near-duplicates and an HTML report, into one folder.\n"
                                 "  Example: loupe analyze letters.csv -o letters-study --topics 20");
  cmd->add_option("SOURCE", args->source,
                  "A folder with one sub-folder of .txt files per group, or a manifest (.csv, .tsv, .jsonl)");
  cmd->add_option("-o,--output-dir", args->output, "The study folder to write; it appears complete or not at all")
      ->required();
  cmd->add_option("--study", args->study_file,
                  "Rerun the study a study file records (STUDY_DIR/study.json), with exactly its options")
      ->check(CLI::ExistingFile);
  cmd->add_flag("--overwrite", args->overwrite, "Replace an existing study folder (only once the new one is complete)");
  cmd->add_option("--threads", args->threads, "Threads for the tests (never changes the results)")
      ->capture_default_str();
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  add_study_options(*cmd, *args);
  cmd->callback([cmd, args] { run_analyze(*cmd, *args); });
}

}  // namespace loupe::cli

#include "apps/study_pipeline.h"

#include <fcntl.h>
#include <signal.h>
#include <unistd.h>

#include <algorithm>
#include <atomic>
#include <cctype>
#include <cerrno>
#include <chrono>
#include <cmath>
#include <cstdio>
#include <ctime>
#include <filesystem>
#include <map>
#include <memory>
#include <set>

#include "analysis/attribution_cautions.h"
#include "analysis/chain_agreement.h"
#include "analysis/composite_scan.h"
#include "analysis/group_comparison.h"
#include "analysis/multiple_testing.h"
#include "analysis/topic_alignment.h"
#include "analysis/topic_coherence.h"
#include "analysis/topic_count_sweep.h"
#include "apps/interrupt_guard.h"
#include "apps/progress_bar.h"
#include "common/binary_io.h"
#include "common/checksum.h"
#include "common/error.h"
#include "common/number_text.h"
#include "common/version.h"
#include "corpus/corpus_file.h"
#include "corpus/corpus_segments.h"
#include "corpus/source_listing.h"
#include "graph/graph_export.h"
#include "graph/graph_layout.h"
#include "model/fit.h"
#include "model/gibbs_sampler.h"
#include "model/model_export.h"
#include "model/model_file.h"
#include "report/study_report.h"

namespace loupe::cli {

namespace fs = std::filesystem;
using nlohmann::json;

// ---------------------------------------------------------------------------
// Defaults and the study file.

IngestOptions StudyOptions::default_ingest() {
  IngestOptions o;
  // Disputed documents in 50-token segments, so the composite scan has segments to compare: a letter of
  // about 480 modelled tokens gets 10; with 5 no change point's p-value can fall below about 0.2.
  o.segment_words = 50;
  o.segment_disputed_only = true;
  return o;
}

FitOptions StudyOptions::default_fit() {
  FitOptions o;
  o.chains = 4;
  o.threads = 0;  // 0: one thread a chain, so the model never depends on the machine
  return o;
}

namespace {

constexpr const char* kCorpusFile = "corpus.loupe";
constexpr const char* kModelFile = "model.loupe";
constexpr const char* kStudyFile = "study.json";
constexpr const char* kResultsFile = "results.json";
constexpr const char* kReportFile = "report.html";

// Reads one section of the study file, remembering the keys it knows, so that an unknown one is named.
class SectionReader {
 public:
  SectionReader(const json& object, std::string where, std::string file)
      : object_(object), where_(std::move(where)), file_(std::move(file)) {
    if (!object_.is_object()) {
      throw Error(file_ + ": " + (where_.empty() ? std::string("the study file") : "\"" + where_ + "\"") +
                  " must be a JSON object {...}, not " + object_.dump() + ".");
    }
  }

  template <typename T>
  void read(const std::string& key, T& value) {
    known_.insert(key);
    const auto it = object_.find(key);
    if (it == object_.end()) return;
    assign(*it, key, value);
  }
  const json* section(const std::string& key) {
    known_.insert(key);
    const auto it = object_.find(key);
    return it == object_.end() ? nullptr : &*it;
  }
  // Throws for a key that was never asked for.
  void finish() const {
    for (const auto& [key, value] : object_.items()) {
      if (known_.count(key)) continue;
      std::string known;
      for (const auto& k : known_) known += (known.empty() ? "" : ", ") + k;
      throw Error(file_ + ": unknown key \"" + name(key) + "\" in the study file. The keys of " +
                  (where_.empty() ? std::string("the study file") : "\"" + where_ + "\"") + " are: " + known +
                  ". Remove the key or correct its name.");
    }
  }

 private:
  std::string name(const std::string& key) const { return where_.empty() ? key : where_ + "." + key; }
  [[noreturn]] void wrong(const std::string& key, const json& value, const char* wanted) const {
    throw Error(file_ + ": \"" + name(key) + "\" must be " + wanted + ", not " + value.dump() + ".");
  }
  void assign(const json& v, const std::string& key, bool& out) const {
    if (!v.is_boolean()) wrong(key, v, "true or false");
    out = v.get<bool>();
  }
  void assign(const json& v, const std::string& key, std::string& out) const {
    if (!v.is_string()) wrong(key, v, "a string");
    out = v.get<std::string>();
  }
  void assign(const json& v, const std::string& key, double& out) const {
    if (!v.is_number()) wrong(key, v, "a number");
    out = v.get<double>();
  }
  void assign(const json& v, const std::string& key, std::uint64_t& out) const {
    if (!v.is_number_unsigned()) wrong(key, v, "a whole number, 0 or more");
    out = v.get<std::uint64_t>();
  }
  void assign(const json& v, const std::string& key, std::uint32_t& out) const {
    if (!v.is_number_unsigned() || v.get<std::uint64_t>() > 0xFFFFFFFFull) {
      wrong(key, v, "a whole number from 0 to 4294967295");
    }
    out = v.get<std::uint32_t>();
  }
  void assign(const json& v, const std::string& key, std::vector<double>& out) const {
    if (!v.is_array()) wrong(key, v, "a list of numbers");
    out.clear();
    for (const auto& item : v) {
      if (!item.is_number()) wrong(key, v, "a list of numbers");
      out.push_back(item.get<double>());
    }
  }
  void assign(const json& v, const std::string& key, std::vector<std::uint32_t>& out) const {
    if (!v.is_array()) wrong(key, v, "a list of whole numbers");
    out.clear();
    for (const auto& item : v) {
      if (!item.is_number_unsigned() || item.get<std::uint64_t>() > 0xFFFFFFFFull) {
        wrong(key, v, "a list of whole numbers");
      }
      out.push_back(item.get<std::uint32_t>());
    }
  }
  void assign(const json& v, const std::string& key, std::vector<std::string>& out) const {
    if (!v.is_array()) wrong(key, v, "a list of strings");
    out.clear();
    for (const auto& item : v) {
      if (!item.is_string()) wrong(key, v, "a list of strings");
      out.push_back(item.get<std::string>());
    }
  }

  const json& object_;
  std::string where_;
  std::string file_;
  std::set<std::string> known_;
};

}  // namespace

json study_to_json(const StudyOptions& o) {
  const auto& i = o.ingest;
  const auto& f = o.fit;
  return {{"study_format", kStudyFormat},
          {"loupe_version", kVersion},
          {"source", o.source},
          {"ingest",
           {{"format", o.manifest_format},
            {"invalid_utf8", o.invalid_utf8},
            {"disputed_folder", i.sources.disputed_folder},
            {"allow_outside_paths", i.sources.allow_outside_paths},
            {"keep_numbers", i.tokenizer.keep_numbers},
            {"min_word_length", i.tokenizer.min_length},
            {"stop_words", i.stop_words},
            {"min_documents", i.min_documents},
            {"max_document_share", i.max_document_share},
            {"max_vocabulary", i.max_vocabulary},
            {"drop_proper_names", i.drop_proper_names},
            {"proper_name_share", i.proper_name_share},
            {"proper_name_min_seen", i.proper_name_min_seen},
            {"keep_words", i.keep_words},
            {"drop_words", i.drop_words},
            {"keep_words_file", i.keep_words_file},
            {"drop_words_file", i.drop_words_file},
            {"segment_words", i.segment_words},
            {"segment_disputed_only", i.segment_disputed_only}}},
          {"sweep", {{"topics", o.sweep.topics}, {"chains", o.sweep.chains}, {"sweeps", o.sweep.sweeps}}},
          {"fit",
           {{"topics", f.topic_count},
            {"sweeps", f.sweeps},
            {"burn_in", f.burn_in},
            {"chains", f.chains},
            {"threads", f.threads},
            {"seed", f.seed},
            {"alpha", f.alpha},
            {"beta", f.beta},
            {"tune_priors_every", f.tune_priors_every},
            {"asymmetric_alpha", f.asymmetric_alpha},
            {"samples", f.samples},
            {"sample_lag", f.sample_lag},
            {"log_likelihood_every", f.log_likelihood_every},
            {"sampler", o.sampler},
            {"mh_steps", f.mh_steps}}},
          {"topics", {{"words", o.topic_words}}},
          {"compare",
           {{"permutations", o.compare.permutations},
            {"bootstrap", o.compare.bootstrap},
            {"seed", o.compare.seed},
            {"strata", o.compare.strata},
            {"include_disputed", o.compare.include_disputed},
            {"weight_by_length", o.compare.weight_by_length},
            {"pairwise_adjustment", o.compare.pairwise_adjustment},
            {"anosim_limit", o.compare.anosim_limit}}},
          {"attribute",
           {{"none_level", o.attribute.none_level},
            {"min_tokens", o.attribute.min_tokens},
            {"neighbours", o.attribute.neighbours},
            {"permutations", o.attribute.permutations},
            {"seed", o.attribute.seed},
            {"candidates_column", o.attribute.candidates_column}}},
          {"scan",
           {{"level", o.scan.level},
            {"permutations", o.scan.permutations},
            {"min_segments", o.scan.min_segments},
            {"seed", o.scan.seed},
            {"none_level", o.scan.none_level}}},
          {"graph",
           {{"neighbours", o.graph.neighbours},
            {"max_distance", o.graph.threshold_graph ? o.graph.max_distance : 0.0},
            {"mutual", o.graph.mutual},
            {"permutations", o.graph.permutations},
            {"seed", o.graph.seed},
            {"strata", o.graph.strata},
            {"resolution", o.graph.resolution},
            {"layout_iterations", o.layout_iterations}}},
          {"near_duplicates",
           {{"threshold", o.near_duplicates.threshold},
            {"shingle_words", o.near_duplicates.shingle_words},
            {"hashes", o.near_duplicates.hashes},
            {"rows_per_band", o.near_duplicates.rows_per_band},
            {"seed", o.near_duplicates.seed}}},
          {"conclusions", {{"level", o.level}}}};
}

StudyOptions study_from_json(const json& root, const std::string& file) {
  StudyOptions o;
  SectionReader top(root, "", file);
  std::uint64_t format = kStudyFormat;
  top.read("study_format", format);
  if (format > static_cast<std::uint64_t>(kStudyFormat)) {
    throw Error(file + ": study format " + std::to_string(format) + " was written by a newer loupe (this one reads " +
                std::to_string(kStudyFormat) + "). Run it with that version.");
  }
  std::string version;
  top.read("loupe_version", version);  // a record; any version is read
  top.read("source", o.source);
  if (const json* s = top.section("ingest")) {
    SectionReader r(*s, "ingest", file);
    auto& i = o.ingest;
    r.read("format", o.manifest_format);
    r.read("invalid_utf8", o.invalid_utf8);
    r.read("disputed_folder", i.sources.disputed_folder);
    r.read("allow_outside_paths", i.sources.allow_outside_paths);
    r.read("keep_numbers", i.tokenizer.keep_numbers);
    r.read("min_word_length", i.tokenizer.min_length);
    r.read("stop_words", i.stop_words);
    r.read("min_documents", i.min_documents);
    r.read("max_document_share", i.max_document_share);
    r.read("max_vocabulary", i.max_vocabulary);
    r.read("drop_proper_names", i.drop_proper_names);
    r.read("proper_name_share", i.proper_name_share);
    r.read("proper_name_min_seen", i.proper_name_min_seen);
    r.read("keep_words", i.keep_words);
    r.read("drop_words", i.drop_words);
    r.read("keep_words_file", i.keep_words_file);
    r.read("drop_words_file", i.drop_words_file);
    r.read("segment_words", i.segment_words);
    r.read("segment_disputed_only", i.segment_disputed_only);
    r.finish();
  }
  if (const json* s = top.section("sweep")) {
    SectionReader r(*s, "sweep", file);
    r.read("topics", o.sweep.topics);
    r.read("chains", o.sweep.chains);
    r.read("sweeps", o.sweep.sweeps);
    r.finish();
  }
  if (const json* s = top.section("fit")) {
    SectionReader r(*s, "fit", file);
    auto& f = o.fit;
    r.read("topics", f.topic_count);
    r.read("sweeps", f.sweeps);
    r.read("burn_in", f.burn_in);
    r.read("chains", f.chains);
    r.read("threads", f.threads);
    r.read("seed", f.seed);
    r.read("alpha", f.alpha);
    r.read("beta", f.beta);
    r.read("tune_priors_every", f.tune_priors_every);
    r.read("asymmetric_alpha", f.asymmetric_alpha);
    r.read("samples", f.samples);
    r.read("sample_lag", f.sample_lag);
    r.read("log_likelihood_every", f.log_likelihood_every);
    r.read("sampler", o.sampler);
    r.read("mh_steps", f.mh_steps);
    r.finish();
  }
  if (const json* s = top.section("topics")) {
    SectionReader r(*s, "topics", file);
    r.read("words", o.topic_words);
    r.finish();
  }
  if (const json* s = top.section("compare")) {
    SectionReader r(*s, "compare", file);
    r.read("permutations", o.compare.permutations);
    r.read("bootstrap", o.compare.bootstrap);
    r.read("seed", o.compare.seed);
    r.read("strata", o.compare.strata);
    r.read("include_disputed", o.compare.include_disputed);
    r.read("weight_by_length", o.compare.weight_by_length);
    r.read("pairwise_adjustment", o.compare.pairwise_adjustment);
    r.read("anosim_limit", o.compare.anosim_limit);
    r.finish();
  }
  if (const json* s = top.section("attribute")) {
    SectionReader r(*s, "attribute", file);
    r.read("none_level", o.attribute.none_level);
    r.read("min_tokens", o.attribute.min_tokens);
    r.read("neighbours", o.attribute.neighbours);
    r.read("permutations", o.attribute.permutations);
    r.read("seed", o.attribute.seed);
    r.read("candidates_column", o.attribute.candidates_column);
    r.finish();
  }
  if (const json* s = top.section("scan")) {
    SectionReader r(*s, "scan", file);
    r.read("level", o.scan.level);
    r.read("permutations", o.scan.permutations);
    r.read("min_segments", o.scan.min_segments);
    r.read("seed", o.scan.seed);
    r.read("none_level", o.scan.none_level);
    r.finish();
  }
  if (const json* s = top.section("graph")) {
    SectionReader r(*s, "graph", file);
    r.read("neighbours", o.graph.neighbours);
    r.read("max_distance", o.graph.max_distance);
    r.read("mutual", o.graph.mutual);
    r.read("permutations", o.graph.permutations);
    r.read("seed", o.graph.seed);
    r.read("strata", o.graph.strata);
    r.read("resolution", o.graph.resolution);
    r.read("layout_iterations", o.layout_iterations);
    r.finish();
    o.graph.threshold_graph = o.graph.max_distance > 0;
  }
  if (const json* s = top.section("near_duplicates")) {
    SectionReader r(*s, "near_duplicates", file);
    r.read("threshold", o.near_duplicates.threshold);
    r.read("shingle_words", o.near_duplicates.shingle_words);
    r.read("hashes", o.near_duplicates.hashes);
    r.read("rows_per_band", o.near_duplicates.rows_per_band);
    r.read("seed", o.near_duplicates.seed);
    r.finish();
  }
  if (const json* s = top.section("conclusions")) {
    SectionReader r(*s, "conclusions", file);
    r.read("level", o.level);
    r.finish();
  }
  top.finish();
  if (o.source.empty()) {
    throw Error(file + ": the study file names no \"source\" (the folder or manifest the study reads). Add it.");
  }
  return o;
}

StudyOptions read_study_file(const std::string& path) {
  const std::string text = read_whole_file(path);
  json root;
  try {
    root = json::parse(text);
  } catch (const json::parse_error& e) {
    throw Error(path + ": not a valid JSON study file (at byte " + std::to_string(e.byte) +
                "). Use the study.json that `loupe analyze` writes, or correct the file.");
  }
  return study_from_json(root, path);
}

void validate_study(const StudyOptions& o) {
  o.ingest.validate();
  auto one_of = [](const std::string& value, std::initializer_list<const char*> choices, const char* option) {
    std::string list;
    for (const char* c : choices) {
      if (value == c) return;
      list += (list.empty() ? "" : ", ") + std::string(c);
    }
    throw Error(std::string(option) + " " + value + ": choose one of " + list + ".");
  };
  one_of(o.manifest_format, {"auto", "csv", "tsv", "jsonl"}, "--format");
  one_of(o.invalid_utf8, {"fail", "replace", "skip"}, "--invalid-utf8");
  one_of(o.sampler, {"auto", "exact", "mh"}, "--sampler");
  parse_adjustment(o.compare.pairwise_adjustment);
  if (o.topic_words < 1) throw Error("--topic-words must be at least 1 (10 is usual).");
  if (!(o.attribute.none_level > 0 && o.attribute.none_level < 1)) {
    throw Error("--none-level must be in (0, 1) (0.05 is usual); got " + std::to_string(o.attribute.none_level) + ".");
  }
  if (o.attribute.neighbours < 1) throw Error("--attribute-neighbours must be at least 1 (5 is usual).");
  if (!(o.scan.level > 0 && o.scan.level < 1)) {
    throw Error("--scan-level must be in (0, 1) (0.05 is usual); got " + std::to_string(o.scan.level) + ".");
  }
  if (o.scan.permutations < 1) throw Error("--scan-permutations must be at least 1 (999 is usual).");
  if (o.scan.min_segments < 2) {
    throw Error("--min-segments must be at least 2 (the statistic compares distances within each side); got " +
                std::to_string(o.scan.min_segments) + ".");
  }
  if (o.graph.neighbours < 1) throw Error("--graph-neighbours must be at least 1 (10 is usual).");
  if (o.graph.threshold_graph && !(o.graph.max_distance > 0 && o.graph.max_distance <= 1)) {
    throw Error("--max-distance must lie in (0, 1] (Hellinger distances run from 0 to 1), not " +
                std::to_string(o.graph.max_distance) + ".");
  }
  if (!(o.graph.resolution > 0)) throw Error("--resolution must be above 0 (1 is usual).");
  if (!(o.near_duplicates.threshold > 0 && o.near_duplicates.threshold <= 1)) {
    throw Error("--near-duplicate-threshold must lie in (0, 1] (0.5 is usual); got " +
                std::to_string(o.near_duplicates.threshold) + ".");
  }
  if (o.near_duplicates.shingle_words < 1) throw Error("--shingle-words must be at least 1 (2 is usual).");
  if (o.near_duplicates.hashes < 1) throw Error("--hashes must be at least 1 (128 is usual).");
  if (o.near_duplicates.rows_per_band > o.near_duplicates.hashes) {
    throw Error("--rows-per-band " + std::to_string(o.near_duplicates.rows_per_band) + " cannot exceed --hashes " +
                std::to_string(o.near_duplicates.hashes) + ".");
  }
  if (!(o.level > 0 && o.level < 1)) {
    throw Error("--level must be in (0, 1) (0.05 is usual); got " + std::to_string(o.level) + ".");
  }
  if (!o.sweep.topics.empty()) {
    if (o.sweep.chains < 2) {
      throw Error("--sweep-chains " + std::to_string(o.sweep.chains) +
                  ": the sweep measures how stable topics are across chains, which needs at least 2.");
    }
    if (o.sweep.sweeps < 10) {
      throw Error("--sweep-sweeps " + std::to_string(o.sweep.sweeps) + " is too few to fit a model; use 100 or more.");
    }
    for (const auto k : o.sweep.topics) {
      if (k < 2) {
        throw Error("--sweep-topics: K = " + std::to_string(k) + " is too few; a topic model needs at least 2 topics.");
      }
    }
  }
}

namespace {

// The fit options of the sweep at every K: the study's fit with the sweep's chains and sweeps, burn-in the
// first 40% of them, and a symmetric prior (50/K unless one value is given).
TopicCountSweepOptions resolved_sweep(const StudyOptions& o, std::size_t threads) {
  TopicCountSweepOptions sweep;
  sweep.topic_counts = o.sweep.topics;
  std::sort(sweep.topic_counts.begin(), sweep.topic_counts.end());
  sweep.fit = o.fit;
  sweep.fit.chains = o.sweep.chains;
  sweep.fit.sweeps = o.sweep.sweeps;
  sweep.fit.burn_in = o.sweep.sweeps * 2 / 5;
  sweep.fit.samples = std::min<std::uint32_t>(5, std::max<std::uint32_t>(1, o.fit.samples));
  sweep.fit.sample_lag =
      std::max<std::uint32_t>(1, std::min<std::uint32_t>(10, (o.sweep.sweeps - sweep.fit.burn_in) / sweep.fit.samples));
  sweep.fit.threads = 1;
  sweep.fit.checkpoint_every = 0;
  sweep.fit.checkpoint_path.clear();
  sweep.fit.sampler = o.sampler == "exact" ? SamplerKind::exact
                      : o.sampler == "mh"  ? SamplerKind::metropolis_hastings
                                           : SamplerKind::automatic;
  if (sweep.fit.alpha.size() > 1) sweep.fit.alpha.clear();  // K values fit one K only
  sweep.parallel_fits = std::max<std::size_t>(threads, 1);
  return sweep;
}

}  // namespace

// ---------------------------------------------------------------------------
// Running a study.

namespace {

std::string utc_now() {
  const std::time_t now = std::chrono::system_clock::to_time_t(std::chrono::system_clock::now());
  std::tm parts{};
  gmtime_r(&now, &parts);
  char text[32];
  std::strftime(text, sizeof text, "%Y-%m-%dT%H:%M:%SZ", &parts);
  return text;
}

std::string hex64(std::uint64_t value) {
  char text[17];
  std::snprintf(text, sizeof text, "%016llx", static_cast<unsigned long long>(value));
  return text;
}

json number_or_null(double value) { return std::isfinite(value) ? json(value) : json(nullptr); }

std::string fixed(double value, int decimals) { return fixed_decimals(value, decimals, "-"); }

std::string short_number(double value) {
  if (!std::isfinite(value)) return "-";
  char text[32];
  std::snprintf(text, sizeof text, "%.3g", value);
  return text;
}

std::string range_text(double low, double high) {
  const std::string a = short_number(low), b = short_number(high);
  return a == b ? a : a + " to " + b;
}

std::string of_chains(std::size_t count, std::size_t chains) {
  return std::to_string(count) + " of " + std::to_string(chains) + (chains == 1 ? " chain" : " chains");
}

// "all chains", "most chains" or "split": how many chains back a statement.
std::string agreement(std::size_t backing, std::size_t chains) {
  return agreement_label(agreement_of(backing, chains));
}

class Stopwatch {
 public:
  double seconds() const { return std::chrono::duration<double>(std::chrono::steady_clock::now() - start_).count(); }

 private:
  std::chrono::steady_clock::time_point start_ = std::chrono::steady_clock::now();
};

// The study folder: everything is written into a temporary sibling, which replaces the target at the end.
class StudyFolder {
 public:
  StudyFolder(const std::string& given, bool overwrite) {
    fs::path target = fs::absolute(fs::path(given)).lexically_normal();
    if (!target.has_filename()) target = target.parent_path();
    target_ = target;
    std::error_code ec;
    const auto status = fs::status(target_, ec);
    if (fs::exists(status)) {
      if (!fs::is_directory(status)) {
        throw Error(given + " exists and is not a folder. Choose another study folder with -o.");
      }
      if (!overwrite && !fs::is_empty(target_, ec)) {
        throw Error(given +
                    " already exists. Add --overwrite to replace it (the old study stays until the new one is "
                    "complete), or choose another folder with -o.");
      }
      if (!looks_like_study(target_)) {
        throw Error(given + " is a folder that holds no loupe study (no " + kStudyFile +
                    "); --overwrite replaces only study folders. Choose an empty or new folder with -o.");
      }
      replacing_ = true;
    }
    const fs::path parent = target_.parent_path();
    fs::create_directories(parent, ec);
    if (ec || !fs::is_directory(parent)) {
      throw Error("cannot create the folder " + parent.string() + " for the study " + given + ": " +
                  (ec ? ec.message() : std::string("it is not a folder")) +
                  ". Choose a folder you can write to with -o.");
    }
    const std::string stem = "." + target_.filename().string() + ".loupe-";
    remove_leftovers(parent, stem);
    temporary_ = parent / (stem + "partial-" + std::to_string(::getpid()));
    fs::remove_all(temporary_, ec);
    if (!fs::create_directory(temporary_, ec) || ec) {
      throw Error("cannot write in " + parent.string() + " (" + (ec ? ec.message() : std::string("refused")) +
                  "), where the study " + given + " would go. Choose a folder you can write to with -o.");
    }
    // A probe: some folders accept a new folder but no files in it.
    try {
      write_file_atomically((temporary_ / ".write-test").string(), "");
      fs::remove(temporary_ / ".write-test", ec);
    } catch (const Error&) {
      fs::remove_all(temporary_, ec);
      throw Error("cannot write files in " + parent.string() + ", where the study " + given +
                  " would go. Choose a folder you can write to with -o.");
    }
    old_ = parent / (stem + "old-" + std::to_string(::getpid()));
  }
  ~StudyFolder() {
    std::error_code ignored;
    if (!committed_) fs::remove_all(temporary_, ignored);
  }
  StudyFolder(const StudyFolder&) = delete;
  StudyFolder& operator=(const StudyFolder&) = delete;

  std::string file(const std::string& name) const { return (temporary_ / name).string(); }
  bool replacing() const { return replacing_; }

  // Moves the finished study into place; an existing study is swapped out first and then removed.
  void commit() {
    std::error_code ec;
    if (replacing_) {
      // One atomic swap where the file system offers it: at every moment the folder holds a whole study.
      if (::renameat2(AT_FDCWD, temporary_.c_str(), AT_FDCWD, target_.c_str(), RENAME_EXCHANGE) == 0) {
        committed_ = true;
        fs::remove_all(temporary_, ec);  // now the old study
        return;
      }
      fs::remove_all(old_, ec);
      fs::rename(target_, old_, ec);
      if (ec) throw Error("cannot move the old study " + target_.string() + " aside: " + ec.message() + ".");
      fs::rename(temporary_, target_, ec);
      if (ec) {
        std::error_code ignored;
        fs::rename(old_, target_, ignored);
        throw Error("cannot move the new study into " + target_.string() + ": " + ec.message() + ".");
      }
      committed_ = true;
      fs::remove_all(old_, ec);
      return;
    }
    fs::rename(temporary_, target_, ec);
    if (ec) throw Error("cannot move the new study into " + target_.string() + ": " + ec.message() + ".");
    committed_ = true;
  }

 private:
  // Folders a killed run left beside the study (".NAME.loupe-partial-PID", "-old-PID"), whose process is gone.
  static void remove_leftovers(const fs::path& parent, const std::string& stem) {
    std::error_code ec;
    for (const auto& entry : fs::directory_iterator(parent, ec)) {
      const std::string name = entry.path().filename().string();
      if (name.rfind(stem, 0) != 0) continue;
      const auto dash = name.rfind('-');
      const std::string pid = name.substr(dash + 1);
      if (pid.empty() || pid.size() > 9 || pid.find_first_not_of("0123456789") != std::string::npos) continue;
      const auto process = static_cast<pid_t>(std::stol(pid));
      if (process != ::getpid() && ::kill(process, 0) != 0 && errno == ESRCH) {
        std::error_code ignored;
        fs::remove_all(entry.path(), ignored);
      }
    }
  }

  static bool looks_like_study(const fs::path& folder) {
    std::error_code ec;
    if (fs::is_empty(folder, ec)) return true;
    for (const char* name : {kStudyFile, kResultsFile, kCorpusFile}) {
      if (fs::exists(folder / name, ec)) return true;
    }
    return false;
  }

  fs::path target_, temporary_, old_;
  bool replacing_ = false;
  bool committed_ = false;
};

// A progress line for a stage ("[3/8] comparing groups"), drawn on a terminal only.
class StageProgress {
 public:
  StageProgress(std::size_t stages, bool quiet) : stages_(stages), quiet_(quiet) {}
  ProgressBar& start(const std::string& name) {
    ++stage_;
    bar_ = std::make_unique<ProgressBar>("[" + std::to_string(stage_) + "/" + std::to_string(stages_) + "] " + name,
                                         quiet_);
    bar_->update(0, 1);
    return *bar_;
  }
  void finish() {
    if (bar_) bar_->finish();
    bar_.reset();
    if (InterruptGuard::stop_requested().load())
      throw Error("interrupted: the study was stopped and nothing was written.");
  }

 private:
  std::size_t stages_;
  bool quiet_;
  std::size_t stage_ = 0;
  std::unique_ptr<ProgressBar> bar_;
};

json file_record(const std::string& path, const std::string& shown) {
  const std::string bytes = read_whole_file(path);
  return {{"path", shown}, {"bytes", bytes.size()}, {"fnv1a64", hex64(fnv1a64(bytes.data(), bytes.size()))}};
}

// Checksums of every file the study reads: the manifest, each listed text, word lists.
json input_checksums(const StudyOptions& options, const SourceListing& listing) {
  const fs::path source(options.source);
  const fs::path base = listing.is_manifest ? source.parent_path() : source;
  auto shown = [&](const std::string& path) {
    const auto relative = fs::path(path).lexically_relative(base);
    return relative.empty() || *relative.begin() == ".." ? path : relative.generic_string();
  };
  json files = json::array();
  Fnv1a64 all;
  auto add = [&](const std::string& path) {
    json record = file_record(path, shown(path));
    all.update(record["path"].get<std::string>());
    all.update(record["fnv1a64"].get<std::string>());
    files.push_back(std::move(record));
  };
  if (listing.is_manifest) add(options.source);
  for (const auto& entry : listing.entries) {
    if (!entry.has_inline_text) add(entry.path);
  }
  for (const auto* path : {&options.ingest.keep_words_file, &options.ingest.drop_words_file}) {
    if (!path->empty()) add(*path);
  }
  const auto& stop = options.ingest.stop_words;
  if (stop != "english" && stop != "none") add(stop);
  return {{"source", options.source},
          {"kind", listing.is_manifest ? "manifest" : "folder"},
          {"paths_relative_to", base.string()},
          {"files", files},
          {"all_files_fnv1a64", hex64(all.digest())}};
}

IngestOptions resolved_ingest(const StudyOptions& o) {
  IngestOptions i = o.ingest;
  i.sources.outside_paths_option = "--allow-outside-paths";
  i.sources.format = o.manifest_format == "csv"     ? ManifestFormat::csv
                     : o.manifest_format == "tsv"   ? ManifestFormat::tsv
                     : o.manifest_format == "jsonl" ? ManifestFormat::jsonl
                                                    : ManifestFormat::by_extension;
  i.invalid_utf8 = o.invalid_utf8 == "replace" ? InvalidUtf8Policy::replace
                   : o.invalid_utf8 == "skip"  ? InvalidUtf8Policy::skip
                                               : InvalidUtf8Policy::fail;
  return i;
}

FitOptions resolved_fit(const StudyOptions& o) {
  FitOptions f = o.fit;
  if (f.threads == 0) f.threads = std::max<std::uint32_t>(f.chains, 1);
  f.sampler = o.sampler == "exact" ? SamplerKind::exact
              : o.sampler == "mh"  ? SamplerKind::metropolis_hastings
                                   : SamplerKind::automatic;
  return f;
}

// SOURCE must be a folder or a manifest; say so before anything else.
void check_source(const StudyOptions& o) {
  std::error_code ec;
  const auto status = fs::status(o.source, ec);
  if (!fs::exists(status)) {
    throw Error("SOURCE " + o.source +
                " does not exist. Pass a folder with one sub-folder of .txt files per group, or a manifest "
                "(.csv, .tsv, .jsonl).");
  }
  if (fs::is_directory(status)) return;
  std::string extension = fs::path(o.source).extension().string();
  std::transform(extension.begin(), extension.end(), extension.begin(),
                 [](unsigned char c) { return static_cast<char>(std::tolower(c)); });
  const bool manifest_extension =
      extension == ".csv" || extension == ".tsv" || extension == ".jsonl" || extension == ".ndjson";
  if (!fs::is_regular_file(status) || (o.manifest_format == "auto" && !manifest_extension)) {
    throw Error("SOURCE " + o.source +
                " is neither a folder nor a manifest. Pass a folder with one sub-folder of .txt files per group, "
                "or a manifest named .csv, .tsv or .jsonl (or give its format with --format csv|tsv|jsonl).");
  }
}

// The topics of chain 1 as `loupe topics --format json` writes them, with each group's mean topic shares.
json topics_json_of(const Model& model, const Corpus& corpus, std::size_t words) {
  const std::size_t k = model.topic_count();
  json out{{"model", kModelFile},
           {"chains", model.chains.size()},
           {"topic_count", k},
           {"topics", topics_json(summarize_topics(model, 0, words))}};
  json shares = json::object();
  for (std::size_t g = 0; g < corpus.groups.size(); ++g) {
    std::vector<double> mean(k, 0.0);
    std::size_t count = 0;
    for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
      const auto& document = corpus.documents[d];
      if (document.group != g || document.role != DocumentRole::known) continue;
      const auto theta = model.theta(0, d);
      for (std::size_t t = 0; t < k; ++t) mean[t] += static_cast<double>(theta[t]);
      ++count;
    }
    if (count == 0) continue;
    for (auto& m : mean) m /= static_cast<double>(count);
    shares[corpus.groups[g]] = mean;
  }
  out["group_shares"] = shares;
  out["group_shares_note"] = "mean topic shares of each group's known documents, chain 1";
  {
    // Each topic's coherence from document co-occurrence of its 10 most probable words (analysis/topic_coherence.h).
    const std::size_t coherence_words = 10;
    std::vector<std::vector<WordId>> top_words(k);
    for (std::size_t t = 0; t < k; ++t) {
      for (const auto& [word, weight] : model.top_words(0, t, coherence_words)) top_words[t].push_back(word);
    }
    const TopicCoherence coherence = topic_coherence(corpus, top_words);
    for (auto& topic : out["topics"]) {
      const auto t = topic["topic"].get<std::size_t>() - 1;
      topic["coherence_npmi"] = coherence.npmi[t];
      topic["coherence_umass"] = coherence.umass[t];
    }
    out["coherence_note"] =
        "mean over pairs of each topic's 10 most probable words: NPMI (Bouma 2009) and UMass "
        "(Mimno et al. 2011, mean rather than sum) from document co-occurrence in the corpus";
  }
  if (model.chains.size() >= 2) {
    // Each topic of chain 1 with its stability across chains (analysis/topic_alignment.h).
    const AlignmentOptions alignment_options;
    const ChainAlignment alignment = align_chains(model, alignment_options);
    std::size_t stable = 0;
    for (auto& topic : out["topics"]) {
      const auto t = topic["topic"].get<std::size_t>() - 1;
      topic["stability"] = alignment.stability[t];
      topic["stable"] = static_cast<bool>(alignment.stable[t]);
      stable += alignment.stable[t] ? 1 : 0;
    }
    json redundant = json::array();
    const double redundancy_threshold = 0.5;
    for (const auto& p : redundant_topic_pairs(model, 0, redundancy_threshold)) {
      redundant.push_back({{"topic_a", p.topic_a + 1}, {"topic_b", p.topic_b + 1}, {"hellinger", p.hellinger}});
    }
    out["stability"] = {{"stable_topics", stable},
                        {"stable_threshold", alignment_options.stable_threshold},
                        {"redundancy_threshold", redundancy_threshold},
                        {"redundant_pairs", redundant},
                        {"note",
                         "each chain's topics matched to chain 1's by the Hungarian algorithm on Hellinger distances; "
                         "stability = mean similarity (1 - Hellinger) of the matched topics over the other chains"}};
  }
  return out;
}

json model_json(const Model& model, const FitOptions& fit) {
  json traces = json::array();
  json chains = json::array();
  const double tokens = static_cast<double>(std::max<std::uint64_t>(model.num_tokens, 1));
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    const auto& chain = model.chains[c];
    json trace = json::array();
    for (const auto& point : chain.trace)
      trace.push_back({{"sweep", point.sweep}, {"log_likelihood", point.log_likelihood}});
    traces.push_back(trace);
    double alpha_sum = 0;
    for (const double a : chain.alpha) alpha_sum += a;
    const double last = chain.trace.empty() ? std::nan("") : chain.trace.back().log_likelihood;
    chains.push_back({{"chain", c + 1},
                      {"seed", chain.seed},
                      {"final_log_likelihood", number_or_null(last)},
                      {"final_log_likelihood_per_token", number_or_null(last / tokens)},
                      {"alpha_sum", alpha_sum},
                      {"beta", chain.beta}});
  }
  return {{"file", kModelFile},
          {"topics", model.topic_count()},
          {"chains", model.chains.size()},
          {"rhat", number_or_null(model.rhat)},
          {"rhat_note", "Gelman-Rubin R-hat of the log-likelihood traces after burn-in; below 1.1 the chains agree"},
          {"converged", std::isfinite(model.rhat) ? json(model.rhat < 1.1) : json(nullptr)},
          {"sweeps", fit.sweeps},
          {"burn_in", fit.burn_in},
          {"samples", fit.samples},
          {"sample_lag", fit.sample_lag},
          {"seed", fit.seed},
          {"threads", fit.threads},
          {"sampler", resolve_sampler(fit.sampler, fit.topic_count) == SamplerKind::exact ? "exact conditional"
                                                                                          : "Metropolis-Hastings"},
          {"documents", model.num_documents()},
          {"tokens", model.num_tokens},
          {"vocabulary", model.vocabulary_size()},
          {"per_chain", chains},
          {"traces", traces}};
}

// theta of chain `chain` for the joined documents: each one the token-weighted mean of its segments.
ProfileMatrix joined_profiles(const Model& model, std::size_t chain, const Corpus& corpus, const JoinedCorpus& joined) {
  const auto k = static_cast<Eigen::Index>(model.topic_count());
  ProfileMatrix theta = ProfileMatrix::Zero(static_cast<Eigen::Index>(joined.corpus.num_documents()), k);
  std::vector<double> weight(joined.corpus.num_documents(), 0.0);
  for (std::size_t d = 0; d < corpus.num_documents(); ++d) {
    const auto row = static_cast<Eigen::Index>(joined.whole_of[d]);
    const double w = static_cast<double>(std::max<std::size_t>(corpus.document_length(d), 1));
    const auto shares = model.theta(chain, d);
    for (Eigen::Index t = 0; t < k; ++t) theta(row, t) += w * static_cast<double>(shares[static_cast<std::size_t>(t)]);
    weight[joined.whole_of[d]] += w;
  }
  for (Eigen::Index r = 0; r < theta.rows(); ++r) theta.row(r) /= weight[static_cast<std::size_t>(r)];
  return theta;
}

// The layout of the exported graph scaled into [0, 1] (one scale for both axes, centred), with its edges.
json drawing_json(const DocumentGraph& graph, bool laid_out, std::size_t chain) {
  json nodes = json::array(), edges = json::array();
  const std::size_t n = boost::num_vertices(graph);
  if (!laid_out) {
    return {{"chain", chain},
            {"nodes", nodes},
            {"edges", edges},
            {"note", "no drawing: more than " + std::to_string(kMaxLayoutDocuments) + " documents"}};
  }
  double min_x = 0, max_x = 0, min_y = 0, max_y = 0;
  for (std::size_t v = 0; v < n; ++v) {
    if (v == 0 || graph[v].x < min_x) min_x = graph[v].x;
    if (v == 0 || graph[v].x > max_x) max_x = graph[v].x;
    if (v == 0 || graph[v].y < min_y) min_y = graph[v].y;
    if (v == 0 || graph[v].y > max_y) max_y = graph[v].y;
  }
  const double scale = std::max({max_x - min_x, max_y - min_y, 1e-12});
  const double centre_x = 0.5 * (min_x + max_x), centre_y = 0.5 * (min_y + max_y);
  for (std::size_t v = 0; v < n; ++v) {
    const auto& d = graph[v];
    nodes.push_back({{"id", d.id},
                     {"group", d.group.empty() ? json(nullptr) : json(d.group)},
                     {"role", d.role},
                     {"community", d.community == kUnassigned ? json(nullptr) : json(d.community)},
                     {"x", std::clamp(0.5 + (d.x - centre_x) / scale, 0.0, 1.0)},
                     {"y", std::clamp(0.5 + (d.y - centre_y) / scale, 0.0, 1.0)}});
  }
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    edges.push_back(
        {{"source", boost::source(e, graph)}, {"target", boost::target(e, graph)}, {"weight", graph[e].weight}});
  }
  return {{"chain", chain},
          {"layout", "Fruchterman-Reingold, scaled into [0, 1] with one scale for both axes"},
          {"community_numbering", "Louvain communities of this chain, numbered from 0 as in the GraphML"},
          {"nodes", nodes},
          {"edges", edges}};
}

// ---------------------------------------------------------------------------
// Conclusions: what holds across chains.

struct Conclusion {
  std::string text;
  std::string agreement;
};

void conclude_groups_differ(const GroupComparison& comparison, double level, std::vector<Conclusion>& out) {
  const std::size_t chains = comparison.chains.size();
  std::size_t differ = 0, spread = 0, tested = 0;
  std::vector<double> f, r2, p;
  for (const auto& chain : comparison.chains) {
    for (const auto& r : chain.records) {
      if (r.comparison != "all groups" || !std::isfinite(r.p_value)) continue;
      if (r.method == "PERMANOVA") {
        ++tested;
        differ += r.p_value <= level ? 1 : 0;
        f.push_back(r.statistic);
        r2.push_back(r.effect_size);
        p.push_back(r.p_value);
      } else if (r.method == "PERMDISP") {
        spread += r.p_value <= level ? 1 : 0;
      }
    }
  }
  if (tested == 0) return;
  const Spread fs = spread_of(f), r2s = spread_of(r2), ps = spread_of(p);
  const std::string numbers = "PERMANOVA pseudo-F " + range_text(fs.min, fs.max) + ", R² " +
                              range_text(r2s.min, r2s.max) + ", p " + range_text(ps.min, ps.max);
  if (2 * differ >= chains && differ > 0) {
    out.push_back({"The groups differ in their topics: PERMANOVA p <= " + short_number(level) + " in " +
                       of_chains(differ, chains) + " (" + numbers + ").",
                   agreement(differ, chains)});
  } else {
    out.push_back({"No difference between the groups' topics was found at p <= " + short_number(level) + " in " +
                       of_chains(chains - differ, chains) + " (" + numbers + ").",
                   agreement(chains - differ, chains)});
  }
  // Said only when some chain finds it: a difference in spread is a caution on PERMANOVA.
  if (2 * spread >= chains && spread > 0) {
    out.push_back({"The groups differ in spread (PERMDISP p <= " + short_number(level) + " in " +
                       of_chains(spread, chains) +
                       "): part of PERMANOVA's difference may be one of spread, not of location.",
                   agreement(spread, chains)});
  } else if (spread > 0) {
    out.push_back({"The groups do not differ in spread in " + of_chains(chains - spread, chains) +
                       " (PERMDISP p <= " + short_number(level) + " in " + of_chains(spread, chains) + ").",
                   agreement(chains - spread, chains)});
  }
}

// Topics more common in a group than in the rest (q <= level, a positive median difference) on at least
// half the chains, topics numbered as chain 1's (aligned on the others); the three largest per group.
void conclude_distinctive_topics(const GroupComparison& comparison, const Model& model, double level,
                                 std::vector<Conclusion>& out) {
  if (!comparison.topics_aligned && comparison.chains.size() > 1) return;  // topic numbers differ by chain
  const std::size_t chains = comparison.chains.size();
  std::map<std::string, std::vector<const ChainSummary*>> by_group;
  std::vector<const ChainSummary*> summaries;
  std::vector<ChainSummary> single;  // one chain: the summaries leave out per-topic tests
  if (!comparison.topics_aligned) {
    std::vector<TestRecord> per_topic;
    for (const auto& r : comparison.chains.front().records) {
      if (r.topic >= 0) per_topic.push_back(r);
    }
    single = summarize_by_test(per_topic, level);
    for (const auto& s : single) summaries.push_back(&s);
  } else {
    for (const auto& s : comparison.summaries) summaries.push_back(&s);
  }
  const std::string suffix = " vs rest";
  for (const ChainSummary* s : summaries) {
    if (s->method != "distinctive topic" || s->topic < 0 || !(s->statistic.median > 0)) continue;
    if (s->significance.conclusion.rfind("p <= ", 0) != 0 || 2 * s->significance.backing < chains) continue;
    if (s->comparison.size() <= suffix.size()) continue;
    by_group[s->comparison.substr(0, s->comparison.size() - suffix.size())].push_back(s);
  }
  for (auto& [group, list] : by_group) {
    std::stable_sort(list.begin(), list.end(), [](const ChainSummary* a, const ChainSummary* b) {
      if (a->significance.backing != b->significance.backing) return a->significance.backing > b->significance.backing;
      return a->statistic.median > b->statistic.median;
    });
    for (std::size_t i = 0; i < std::min<std::size_t>(list.size(), 3); ++i) {
      const ChainSummary& s = *list[i];
      std::string words;
      for (const auto& [word, p] : model.top_words(0, static_cast<std::size_t>(s.topic), 4)) {
        words += (words.empty() ? "" : ", ") + model.vocabulary[word];
      }
      out.push_back({"Topic " + std::to_string(s.topic + 1) + " (" + words + ") is more common in " + group +
                         " than in the other groups: difference in mean share " +
                         range_text(s.statistic.min, s.statistic.max) + ", q <= " + short_number(level) + " in " +
                         describe_backing(s.significance.backing, chains) + ".",
                     agreement(s.significance.backing, chains)});
    }
  }
}

void conclude_attribution(const Attribution& a, std::vector<Conclusion>& out) {
  for (const auto& d : a.documents) {
    const std::size_t chains = std::max<std::size_t>(d.chains.size(), 1);
    const auto backing = static_cast<std::size_t>(std::lround(d.agreement * static_cast<double>(chains)));
    const std::string label = a.verdict_label(d.modal_verdict);
    std::string text;
    if (d.modal_verdict < a.group_names.size()) {
      text = d.id + " resembles " + label + " (" + of_chains(backing, chains) + "; conformal p-value " +
             range_text(d.p_value_min, d.p_value_max) + ").";
    } else if (d.modal_verdict == a.group_names.size()) {
      text = d.id + " resembles none of the candidate groups (" + of_chains(backing, chains) +
             "; every candidate's p-value at or below " + short_number(a.options.none_level) + ").";
    } else {
      text = d.id + " is " + label + ".";
    }
    out.push_back({text, d.chains.empty() ? "all chains" : agreement(backing, chains)});
  }
}

void conclude_scan(const CompositeScan& scan, std::vector<Conclusion>& out) {
  for (const auto& t : scan.texts) {
    const std::size_t chains = t.chains.size();
    if (chains == 0) continue;
    if (2 * t.chains_with_change > chains) {
      std::string text =
          t.text.id + " looks composite: its topics change before segment " +
          (t.first_position_min == t.first_position_max
               ? std::to_string(t.first_position_min + 1) + " (token " + std::to_string(t.first_token_min) + ")"
               : std::to_string(t.first_position_min + 1) + " to " + std::to_string(t.first_position_max + 1) +
                     " (tokens " + std::to_string(t.first_token_min) + " to " + std::to_string(t.first_token_max) +
                     ")") +
          " in " + of_chains(t.chains_with_change, chains);
      for (const auto& c : t.chains) {
        if (c.change_points.change_points.empty() || c.stretches.size() < 2) continue;
        text += "; nearest group before it: " + scan.group_names[c.stretches.front().nearest] +
                ", after it: " + scan.group_names[c.stretches.back().nearest] + " (chain " +
                std::to_string(c.chain + 1) + ")";
        break;
      }
      out.push_back({text + ".", agreement(t.chains_with_change, chains)});
    } else {
      out.push_back({t.text.id + " shows no change of topics along its segments (a change point in " +
                         of_chains(t.chains_with_change, chains) + ").",
                     agreement(chains - t.chains_with_change, chains)});
    }
  }
}

void conclude_copies(const NearDuplicateResult& result, const Corpus& corpus, std::vector<Conclusion>& out) {
  if (result.pairs.empty()) {
    out.push_back({"No near-copies: no two documents share " + short_number(result.options.threshold) +
                       " or more of their " + std::to_string(result.options.shingle_words) +
                       "-word shingles (this does not depend on the model).",
                   "all chains"});
    return;
  }
  const std::size_t shown = std::min<std::size_t>(result.pairs.size(), 10);
  for (std::size_t i = 0; i < shown; ++i) {
    const auto& p = result.pairs[i];
    std::string text = corpus.documents[p.first].id + " and " + corpus.documents[p.second].id +
                       " are near-copies: Jaccard similarity " + fixed(p.jaccard, 2) + " of their " +
                       std::to_string(result.options.shingle_words) + "-word shingles";
    if (std::isfinite(p.topic_distance)) text += ", topic Hellinger distance " + fixed(p.topic_distance, 3);
    out.push_back({text + " (this does not depend on the model).", "all chains"});
  }
  if (result.pairs.size() > shown) {
    out.push_back({std::to_string(result.pairs.size() - shown) + " more near-copy pairs are listed in the tables.",
                   "all chains"});
  }
}

void conclude_mixing(const GraphStudy& graph, double level, std::vector<Conclusion>& out) {
  const std::size_t chains = graph.chains.size();
  std::size_t tested = 0, clustered = 0;
  std::vector<double> share, chance, q;
  for (const auto& c : graph.chains) {
    if (!c.tested) continue;
    ++tested;
    const auto& t = c.mixing.same_group_share;
    clustered += t.p_value <= level && t.statistic > t.null_mean ? 1 : 0;
    share.push_back(t.statistic);
    chance.push_back(t.null_mean);
    q.push_back(c.mixing.modularity.statistic);
  }
  if (tested == 0) return;
  const Spread s = spread_of(share), n = spread_of(chance), m = spread_of(q);
  const std::string numbers = "mean share of neighbours in the own group " + range_text(s.min, s.max) + " against " +
                              range_text(n.min, n.max) + " by chance; modularity of the groups " +
                              range_text(m.min, m.max);
  if (2 * clustered >= chains && clustered > 0) {
    out.push_back({"Documents cluster by group on the similarity graph: p <= " + short_number(level) + " in " +
                       of_chains(clustered, chains) + " (" + numbers + "; graph of " + graph.construction + ").",
                   agreement(clustered, chains)});
  } else {
    out.push_back({"Documents do not cluster by group on the similarity graph beyond chance in " +
                       of_chains(chains - clustered, chains) + " (" + numbers + "; graph of " + graph.construction +
                       ").",
                   agreement(chains - clustered, chains)});
  }
}

json conclusions_json(std::vector<Conclusion> conclusions) {
  auto rank = [](const std::string& a) { return a == "all chains" ? 0 : a == "most chains" ? 1 : 2; };
  std::stable_sort(conclusions.begin(), conclusions.end(),
                   [&](const Conclusion& a, const Conclusion& b) { return rank(a.agreement) < rank(b.agreement); });
  json out = json::array();
  for (const auto& c : conclusions) out.push_back({{"text", c.text}, {"agreement", c.agreement}});
  return out;
}

std::size_t count_disputed(const Corpus& corpus) {
  std::set<std::string> seen;
  for (const auto& d : corpus.documents) {
    if (d.role == DocumentRole::disputed) seen.insert(d.is_segment() ? d.parent_id : d.id);
  }
  return seen.size();
}

}  // namespace

StudyOutcome run_study(const StudyOptions& options, const StudyRunSettings& settings) {
  validate_study(options);
  check_source(options);
  const std::string started_at = utc_now();
  const Stopwatch clock;
  const std::size_t threads = std::max<std::size_t>(settings.threads, 1);
  const IngestOptions ingest = resolved_ingest(options);
  // Listing the sources first checks them (every problem named with its file and line) before any work.
  const SourceListing listing = list_sources(options.source, ingest.sources);
  StudyFolder folder(settings.output_dir, settings.overwrite);
  InterruptGuard interrupt;  // Ctrl-C stops the study between stages (a fit after its sweep); nothing is left behind
  StageProgress stages(options.sweep.topics.empty() ? 8 : 9, settings.quiet);
  StudyOutcome outcome;
  outcome.output_dir = settings.output_dir;
  outcome.replaced_previous = folder.replacing();
  json results = json::object();
  json stage_seconds = json::object();
  json skipped = json::object();
  std::vector<Conclusion> conclusions;

  // 1. Ingest.
  Stopwatch watch;
  json inputs = input_checksums(options, listing);
  ProgressBar* bar = &stages.start("reading");
  IngestReport report;
  const Corpus corpus = build_corpus(options.source, ingest, &report, [&](std::size_t done, std::size_t total) {
    bar->update(static_cast<double>(done), static_cast<double>(total));
  });
  stages.finish();
  write_corpus(corpus, folder.file(kCorpusFile));
  results["corpus"] = report.to_json();
  write_file_atomically(folder.file("ingest-summary.json"), results["corpus"].dump(2) + "\n");
  stage_seconds["ingest"] = watch.seconds();

  // 2. Choosing K (when asked), before the fit.
  if (!options.sweep.topics.empty()) {
    watch = Stopwatch();
    TopicCountSweepOptions sweep_options = resolved_sweep(options, threads);
    validate_sweep_options(sweep_options, corpus);
    bar = &stages.start("sweeping K");
    sweep_options.on_progress = [&](std::size_t done, std::size_t total, double work) {
      bar->update(work, 1.0, std::to_string(done) + " of " + std::to_string(total) + " K values");
    };
    sweep_options.stop_requested = &InterruptGuard::stop_requested();
    TopicCountSweep sweep;
    try {
      sweep = sweep_topic_counts(corpus, sweep_options);
    } catch (const FitInterrupted&) {
      throw Error("interrupted: the study was stopped while sweeping K and nothing was written.");
    }
    stages.finish();
    results["sweep"] = to_json(sweep);
    stage_seconds["sweep"] = watch.seconds();
  }

  // 3. Fit.
  watch = Stopwatch();
  const FitOptions fit = resolved_fit(options);
  validate_fit_options(fit, corpus);
  if (!options.graph.threshold_graph && options.graph.neighbours >= corpus.num_documents()) {
    throw Error("--graph-neighbours " + std::to_string(options.graph.neighbours) +
                " must be below the number of documents (" + std::to_string(corpus.num_documents()) +
                "). Choose a smaller k.");
  }
  bar = &stages.start("fitting");
  FitControl control;
  control.stop_requested = &InterruptGuard::stop_requested();
  control.on_progress = [&](const FitProgress& p) {
    bar->update(p.sweep, p.sweeps, "sweep " + std::to_string(p.sweep) + "/" + std::to_string(p.sweeps));
  };
  Model model;
  try {
    model = fit_model(corpus, fit, control);
  } catch (const FitInterrupted&) {
    throw Error("interrupted: the study was stopped during the fit and nothing was written.");
  }
  stages.finish();
  write_model(model, folder.file(kModelFile));
  results["model"] = model_json(model, fit);
  results["topics"] = topics_json_of(model, corpus, options.topic_words);
  stage_seconds["fit"] = watch.seconds();

  // 4. Compare.
  watch = Stopwatch();
  stages.start("comparing groups");
  std::set<std::uint32_t> known_groups;
  for (const auto& d : corpus.documents) {
    if (d.group != kNoGroup && (d.role == DocumentRole::known || options.compare.include_disputed))
      known_groups.insert(d.group);
  }
  if (known_groups.size() >= 2) {
    GroupComparisonOptions compare;
    compare.tests.permutation.permutations = options.compare.permutations;
    compare.tests.permutation.seed = options.compare.seed;
    compare.tests.permutation.threads = threads;
    compare.tests.permutation.keep_null_distribution = true;
    compare.tests.bootstrap_replicates = options.compare.bootstrap;
    compare.tests.weight_by_length = options.compare.weight_by_length;
    compare.tests.pairwise_adjustment = parse_adjustment(options.compare.pairwise_adjustment);
    compare.tests.anosim_max_documents = options.compare.anosim_limit;
    compare.include_disputed = options.compare.include_disputed;
    compare.strata_column = options.compare.strata;
    compare.level = options.level;
    const GroupComparison comparison = compare_groups(model, &corpus, compare);
    results["compare"] = to_json(comparison);
    write_records_csv(folder.file("compare.csv"), comparison.all_records());
    std::string profiles;
    for (const auto& chain : comparison.chains) {
      const auto text = to_csv(chain.profiles);
      profiles += profiles.empty() ? text : text.substr(text.find('\n') + 1);  // one header
    }
    write_file_atomically(folder.file("group-profiles.csv"), profiles);
    conclude_groups_differ(comparison, options.level, conclusions);
    conclude_distinctive_topics(comparison, model, options.level, conclusions);
  } else {
    skipped["compare"] = "fewer than two groups with known documents";
  }
  stages.finish();
  stage_seconds["compare"] = watch.seconds();

  // 5. Attribute.
  watch = Stopwatch();
  stages.start("attributing disputed documents");
  if (count_disputed(corpus) == 0) {
    skipped["attribute"] = "no disputed documents (mark them in a 'role' column, or put them in the " +
                           options.ingest.sources.disputed_folder + " folder)";
  } else {
    AttributionOptions attribute;
    attribute.none_level = options.attribute.none_level;
    attribute.min_tokens = options.attribute.min_tokens;
    attribute.neighbours = options.attribute.neighbours;
    attribute.candidates_column = options.attribute.candidates_column;
    attribute.calibration.permutations = options.attribute.permutations;
    attribute.calibration.seed = options.attribute.seed;
    attribute.calibration.threads = threads;
    try {
      const Attribution attribution = attribute_disputed(model, &corpus, ExternalDocuments{}, attribute);
      results["attribution"] = to_json(attribution);
      write_file_atomically(folder.file("attribution.csv"), to_csv(attribution));
      conclude_attribution(attribution, conclusions);
    } catch (const Error& e) {
      skipped["attribute"] = std::string("not run: ") + e.what();
    }
  }
  stages.finish();
  stage_seconds["attribute"] = watch.seconds();

  // 6. Scan segmented disputed texts.
  watch = Stopwatch();
  stages.start("scanning segmented texts");
  bool any_segmented_disputed = false;
  for (const auto& d : corpus.documents) any_segmented_disputed |= d.is_segment() && d.role == DocumentRole::disputed;
  if (!any_segmented_disputed) {
    skipped["scan"] = "no disputed documents cut into segments (--segment-words N cuts them)";
  } else {
    CompositeScanOptions scan;
    scan.change_points.level = options.scan.level;
    scan.change_points.permutations = options.scan.permutations;
    scan.change_points.min_segments = options.scan.min_segments;
    scan.change_points.seed = options.scan.seed;
    scan.change_points.threads = threads;
    scan.none_level = options.scan.none_level;
    try {
      const CompositeScan result = scan_composite_texts(model, corpus, {}, scan);
      results["scan"] = to_json(result);
      write_file_atomically(folder.file("scan.csv"), to_csv(result));
      conclude_scan(result, conclusions);
    } catch (const Error& e) {
      skipped["scan"] = std::string("not run: ") + e.what();
    }
  }
  stages.finish();
  stage_seconds["scan"] = watch.seconds();

  // 7. Graph.
  watch = Stopwatch();
  bar = &stages.start("similarity graph");
  const DocumentTable table = document_table(corpus);
  GraphStudyOptions graph_options = options.graph;
  graph_options.chain = 1;
  graph_options.threads = threads;
  GraphStudy graph = build_graph_study(
      model, kModelFile, table, graph_options, [&](std::size_t c, std::size_t done, std::size_t total) {
        bar->update(static_cast<double>(c * total + done), static_cast<double>(model.chains.size() * total),
                    "chain " + std::to_string(c + 1));
      });
  const bool laid_out = boost::num_vertices(graph.exported) <= kMaxLayoutDocuments;
  if (laid_out) {
    LayoutOptions layout;
    layout.seed = options.graph.seed;
    layout.iterations = options.layout_iterations;
    layout_document_graph(graph.exported, layout);
  }
  write_graphml(graph.exported, folder.file("graph.graphml"));
  write_edge_csv(graph.exported, folder.file("graph-edges.csv"));
  write_node_csv(graph.exported, folder.file("graph-nodes.csv"));
  write_file_atomically(folder.file("graph-tests.csv"), graph_tests_csv(graph));
  json graph_json = graph_study_json(graph, table, graph_options, kModelFile, kCorpusFile);
  for (std::size_t c = 0; c < graph.chains.size(); ++c) {
    if (!graph.chains[c].tested) continue;
    auto& tests = graph_json["chains"][c]["group_tests"];
    const PermutationTest* both[2] = {&graph.chains[c].mixing.modularity, &graph.chains[c].mixing.same_group_share};
    for (std::size_t t = 0; t < 2; ++t) {
      const NullDistribution h = null_distribution_of(both[t]->null_statistics, 1, 0, both[t]->statistic);
      if (h.counts.empty()) continue;
      tests[t]["null_distribution"] = {{"low", h.low}, {"high", h.high}, {"counts", h.counts}};
    }
  }
  graph_json["drawing"] = drawing_json(graph.exported, laid_out, 1);
  results["graph"] = graph_json;
  conclude_mixing(graph, options.level, conclusions);
  stages.finish();
  stage_seconds["graph"] = watch.seconds();

  // 8. Near-duplicates, among whole documents (segments joined back).
  watch = Stopwatch();
  bar = &stages.start("near-duplicates");
  const JoinedCorpus joined = join_segments(corpus);
  NearDuplicateOptions near;
  near.threshold = options.near_duplicates.threshold;
  near.shingle_words = options.near_duplicates.shingle_words;
  near.num_hashes = options.near_duplicates.hashes;
  near.rows_per_band = options.near_duplicates.rows_per_band;
  near.seed = options.near_duplicates.seed;
  near.threads = threads;
  near.progress = [&](const char* stage, std::size_t done, std::size_t total) {
    bar->update(static_cast<double>(done), static_cast<double>(total), stage);
  };
  NearDuplicateResult copies = find_near_duplicates(joined.corpus, near);
  add_topic_distances(copies, joined_profiles(model, 0, corpus, joined));
  json near_json = near_duplicates_json(copies, joined.corpus);
  near_json["corpus"] = kCorpusFile;
  near_json["model"] = kModelFile;
  near_json["chain"] = 1;
  near_json["documents_compared"] = "whole documents: the segments of a cut document are joined back";
  near_json["seconds"] = watch.seconds();
  results["near_duplicates"] = near_json;
  write_file_atomically(folder.file("near-duplicates.csv"), near_duplicates_csv(copies, joined.corpus));
  conclude_copies(copies, joined.corpus, conclusions);
  stages.finish();
  stage_seconds["near_duplicates"] = watch.seconds();

  // 9. Results, provenance and the report.
  watch = Stopwatch();
  stages.start("writing the report");
  results["conclusions"] = conclusions_json(conclusions);
  const json study = study_to_json(options);
  json chain_seeds = json::array();
  for (const auto& chain : model.chains) chain_seeds.push_back(chain.seed);
  json outputs = json::array();
  for (const char* name : {kCorpusFile, kModelFile}) outputs.push_back(file_record(folder.file(name), name));
  json provenance = {
      {"loupe_version", kVersion},
      {"study_format", kStudyFormat},
      {"options", study},
      {"seeds",
       {{"fit", options.fit.seed},
        {"chains", chain_seeds},
        {"compare", options.compare.seed},
        {"attribute", options.attribute.seed},
        {"scan", options.scan.seed},
        {"graph", options.graph.seed},
        {"layout", options.graph.seed},
        {"near_duplicates", options.near_duplicates.seed}}},
      {"fit_threads", fit.threads},
      {"inputs", inputs},
      {"outputs", outputs},
      {"checksum_algorithm",
       "FNV-1a 64-bit (lib/common/checksum.h) of each file's bytes, as 16 hex digits; it guards against accidents, "
       "not tampering"},
      {"skipped_stages", skipped},
      {"started_at", started_at},
  };
  provenance["stage_seconds"] = stage_seconds;
  provenance["finished_at"] = utc_now();
  provenance["seconds"] = clock.seconds();
  results["provenance"] = provenance;
  write_file_atomically(folder.file(kStudyFile), study.dump(2) + "\n");
  write_file_atomically(folder.file("provenance.json"), provenance.dump(2) + "\n");
  write_file_atomically(folder.file(kResultsFile), results.dump(2) + "\n");
  write_study_report(results, folder.file(kReportFile));
  stages.finish();
  folder.commit();

  for (const auto& [stage, why] : skipped.items()) outcome.notes.push_back(stage + ": " + why.get<std::string>());
  for (const auto& entry : fs::directory_iterator(settings.output_dir)) {
    outcome.files.push_back(entry.path().filename().string());
  }
  std::sort(outcome.files.begin(), outcome.files.end());
  outcome.results = std::move(results);
  return outcome;
}

void print_study_summary(const StudyOutcome& outcome, std::ostream& out) {
  const json& r = outcome.results;
  const json& corpus = r["corpus"];
  const json& model = r["model"];
  const json& provenance = r["provenance"];
  out << "Corpus: " << format_count(corpus.value("corpus_documents", std::size_t{0})) << " documents in "
      << corpus["groups"].size() << " groups";
  if (corpus.value("disputed_documents", std::size_t{0}) > 0) {
    out << " (" << format_count(corpus.value("disputed_documents", std::size_t{0})) << " disputed, segments counted";
    if (corpus.value("segmented_documents", std::size_t{0}) > 0)
      out << "; " << corpus.value("segmented_documents", std::size_t{0}) << " texts cut into segments";
    out << ")";
  }
  out << ", " << format_count(corpus.value("tokens_kept", std::size_t{0})) << " tokens, vocabulary of "
      << format_count(corpus.value("vocabulary_size", std::size_t{0})) << " words";
  const auto& names = corpus["proper_names_dropped"];
  if (!names.empty()) out << "; " << names.size() << " proper names dropped";
  out << ".\n";
  out << "Model: " << model["topics"].get<std::size_t>() << " topics, " << model["chains"].get<std::size_t>()
      << " chains x " << model["sweeps"].get<std::size_t>() << " sweeps";
  if (model["rhat"].is_number()) {
    const double rhat = model["rhat"].get<double>();
    out << ", R-hat " << fixed(rhat, 3) << (rhat < 1.1 ? " (the chains agree)" : " (1.1 or more: run longer)");
  }
  out << ". Study took " << fixed(provenance["seconds"].get<double>(), 1) << " s.\n\n";

  const auto& conclusions = r["conclusions"];
  for (const char* level : {"all chains", "most chains", "split"}) {
    bool header = false;
    for (const auto& c : conclusions) {
      if (c["agreement"] != level) continue;
      if (!header) {
        out << (std::string(level) == "all chains"    ? "Conclusions that hold in all chains:\n"
                : std::string(level) == "most chains" ? "\nConclusions that hold in most chains:\n"
                                                      : "\nChains split on:\n");
        header = true;
      }
      out << "  - " << c["text"].get<std::string>() << "\n";
    }
  }
  if (!outcome.notes.empty()) {
    out << "\nNot run:\n";
    for (const auto& note : outcome.notes) out << "  - " << note << "\n";
  }
  if (r.contains("attribution") || r.contains("scan")) {
    out << "\nCautions\n";
    for (const auto caution : kAttributionCautions) out << "  " << caution << "\n";
  }
  const std::string folder = outcome.output_dir;
  out << "\n"
      << (outcome.replaced_previous ? "Replaced the study in " : "Wrote the study to ") << folder << "/ ("
      << outcome.files.size() << " files). The report: " << (fs::path(folder) / kReportFile).string() << "\n";
}

}  // namespace loupe::cli

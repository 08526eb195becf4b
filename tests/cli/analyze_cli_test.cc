// End-to-end tests of `loupe analyze`: the whole study on the demo (demo/harbour-letters/letters.csv) checked
// against demo/truth.json (the groups differ; each disputed letter gets the verdict its true source allows;
// the seam of the stitched letter dsp-02; the copy dsp-06 of gr-1901-007), the results' shape, the report, a
// rerun from the study file, and the refusals and messages for bad input.
#include <gmock/gmock.h>
#include <gtest/gtest.h>

#include <cstdio>
#include <filesystem>
#include <map>
#include <set>
#include <string>

#include <nlohmann/json.hpp>

#include "cli/run_command.h"
#include "common/binary_io.h"
#include "common/checksum.h"
#include "corpus/corpus_file.h"
#include "corpus/text_tokenizer.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

namespace fs = std::filesystem;
using ::testing::HasSubstr;
using ::testing::Not;
using testing::quote;
using testing::run_loupe;

const std::string kSource = LOUPE_SOURCE_DIR;
const std::string kManifest = kSource + "/demo/harbour-letters/letters.csv";
constexpr std::size_t kSegmentWords = 50;
constexpr double kLevel = 0.05;
// The demo's options (proper names dropped; disputed letters in 50-token segments are analyze's default),
// with fewer sweeps and permutations than the defaults so that the test stays short.
const std::string kQuickOptions =
    " --drop-proper-names --sweeps 200 --burn-in 100 --permutations 99 --bootstrap 99 --seed 7 --threads 2"
    " --sweep-topics 4,8 --sweep-sweeps 40";

nlohmann::json read_json(const std::string& path) { return nlohmann::json::parse(read_whole_file(path)); }

// The same results apart from the times a run records.
nlohmann::json without_times(nlohmann::json results) {
  for (const char* key : {"started_at", "finished_at", "seconds", "stage_seconds"}) results["provenance"].erase(key);
  results["near_duplicates"].erase("seconds");
  return results;
}

class AnalyzeCliTest : public ::testing::Test {
 protected:
  static void SetUpTestSuite() {
    folder_ = new testing::TempFolder("analyze-cli");
    study_ = folder_->file("study");
    const auto r = run_loupe("analyze " + quote(kManifest) + " -o " + quote(study_) + kQuickOptions);
    output_ = r.output;
    ASSERT_EQ(r.exit_code, 0) << r.output;
    results_ = new nlohmann::json(read_json(study_ + "/results.json"));
    truth_ = new nlohmann::json(read_json(kSource + "/demo/truth.json"));
  }
  static void TearDownTestSuite() {
    delete results_;
    delete truth_;
    delete folder_;
    results_ = truth_ = nullptr;
    folder_ = nullptr;
  }
  static const nlohmann::json& results() { return *results_; }
  static const nlohmann::json& truth() { return *truth_; }
  // The checks, grouped into a few tests below so that the study runs once per test process.
  static void check_files_and_keys();
  static void check_provenance();
  static void check_groups_differ();
  static void check_verdicts();
  static void check_seam();
  static void check_near_copy();
  static void check_null_distributions();
  static void check_drawing();
  static void check_conclusions();
  static void check_report();
  static void check_rerun();
  static void check_refusal();

  static testing::TempFolder* folder_;
  static std::string study_, output_;
  static nlohmann::json* results_;
  static nlohmann::json* truth_;
};

testing::TempFolder* AnalyzeCliTest::folder_ = nullptr;
std::string AnalyzeCliTest::study_;
std::string AnalyzeCliTest::output_;
nlohmann::json* AnalyzeCliTest::results_ = nullptr;
nlohmann::json* AnalyzeCliTest::truth_ = nullptr;

void AnalyzeCliTest::check_files_and_keys() {
  for (const char* name :
       {"study.json", "provenance.json", "results.json", "report.html", "corpus.loupe", "model.loupe", "compare.csv",
        "attribution.csv", "scan.csv", "graph-edges.csv", "near-duplicates.csv", "graph.graphml"}) {
    EXPECT_TRUE(fs::is_regular_file(study_ + "/" + name)) << name;
  }
  std::set<std::string> keys;
  for (const auto& [key, value] : results().items()) keys.insert(key);
  EXPECT_EQ(keys, (std::set<std::string>{"provenance", "corpus", "model", "topics", "compare", "attribution", "scan",
                                         "graph", "near_duplicates", "conclusions", "sweep"}));
  // The sweep over K ran before the fit, at the K values asked for; the model keeps --topics (20).
  const auto& sweep = results()["sweep"];
  ASSERT_EQ(sweep["results"].size(), 2u);
  EXPECT_EQ(sweep["results"][0]["topics"], 4);
  EXPECT_EQ(sweep["results"][1]["topics"], 8);
  EXPECT_EQ(sweep["chains"], 2);
  EXPECT_EQ(sweep["sweeps"], 40);
  EXPECT_TRUE(sweep["suggested"] == 4 || sweep["suggested"] == 8) << sweep["suggested"];
  EXPECT_THAT(sweep["reason"].get<std::string>(), HasSubstr("not a verdict"));
  EXPECT_EQ(results()["model"]["chains"], 4);
  EXPECT_EQ(results()["model"]["topics"], 20);
  EXPECT_EQ(results()["topics"]["group_shares"].size(), 3u);
  for (const auto& [group, shares] : results()["topics"]["group_shares"].items()) {
    double sum = 0;
    for (const auto& s : shares) sum += s.get<double>();
    EXPECT_NEAR(sum, 1.0, 1e-4) << group;  // mean of distributions
  }
  // Each topic carries its stability across the 4 chains and its coherence (the
  // office themes' stability at 1000 sweeps is checked in stability_cli_test.cc).
  for (const auto& topic : results()["topics"]["topics"]) {
    const double stability = topic.at("stability");
    EXPECT_GE(stability, 0.0);
    EXPECT_LE(stability, 1.0);
    EXPECT_EQ(topic.at("stable").get<bool>(), stability >= 0.8);
    EXPECT_GE(topic.at("coherence_npmi").get<double>(), -1.0);
    EXPECT_LE(topic.at("coherence_npmi").get<double>(), 1.0);
  }
  EXPECT_TRUE(results()["topics"]["stability"]["redundant_pairs"].is_array());
  // The terminal summary leads with what holds in all chains, and carries the cautions.
  EXPECT_EQ(output_.find("Conclusions that hold in all chains:"), output_.find("Conclusions"));
  EXPECT_THAT(output_, HasSubstr("statistical evidence, not proof"));
  EXPECT_THAT(output_, HasSubstr("report.html"));
}

void AnalyzeCliTest::check_provenance() {
  const auto& p = results()["provenance"];
  EXPECT_FALSE(p["loupe_version"].get<std::string>().empty());
  EXPECT_EQ(p["seeds"]["fit"], 7);
  EXPECT_EQ(p["seeds"]["chains"].size(), 4u);
  EXPECT_EQ(p["options"], read_json(study_ + "/study.json"));
  EXPECT_EQ(p, read_json(study_ + "/provenance.json"));
  EXPECT_THAT(p["checksum_algorithm"].get<std::string>(), HasSubstr("FNV-1a 64"));
  // 618 letters and the manifest, each with the checksum of its bytes.
  const auto& files = p["inputs"]["files"];
  ASSERT_EQ(files.size(), 619u);
  const std::string manifest = read_whole_file(kManifest);
  char hex[17];
  std::snprintf(hex, sizeof hex, "%016llx", static_cast<unsigned long long>(fnv1a64(manifest.data(), manifest.size())));
  EXPECT_EQ(files[0]["path"], "letters.csv");
  EXPECT_EQ(files[0]["bytes"], manifest.size());
  EXPECT_EQ(files[0]["fnv1a64"], std::string(hex));
  EXPECT_LE(p["started_at"].get<std::string>(), p["finished_at"].get<std::string>());
}

void AnalyzeCliTest::check_groups_differ() {
  const auto& chains = results()["compare"]["chains"];
  ASSERT_EQ(chains.size(), 4u);
  for (const auto& chain : chains) {
    bool found = false;
    for (const auto& r : chain["records"]) {
      if (r["method"] != "PERMANOVA" || r["comparison"] != "all groups") continue;
      found = true;
      EXPECT_LE(r["p_value"].get<double>(), kLevel) << "chain " << chain["chain"];
    }
    EXPECT_TRUE(found);
  }
  const auto& first = results()["conclusions"][0];
  EXPECT_THAT(first["text"].get<std::string>(), HasSubstr("The groups differ in their topics"));
  EXPECT_EQ(first["agreement"], "all chains");
}

void AnalyzeCliTest::check_verdicts() {
  const auto& attribution = results()["attribution"];
  ASSERT_EQ(attribution["cautions"].size(), 3u);
  std::map<std::string, const nlohmann::json*> by_id;
  for (const auto& d : attribution["documents"]) by_id[d["id"].get<std::string>()] = &d;
  const auto& composite = truth()["composite"];
  for (const auto& letter : truth()["disputed"]) {
    const std::string id = letter["id"];
    ASSERT_TRUE(by_id.count(id)) << id;
    std::set<std::string> allowed;
    if (letter["kind"] == "outside_all_offices") {
      allowed = {"none of the candidates"};  // dsp-08: none of the three offices wrote it
    } else if (letter["kind"] == "composite") {
      // dsp-02 is stitched from two offices: either of them, or none, is a fair answer for the whole.
      allowed = {"none of the candidates", composite["first_office"].get<std::string>(),
                 composite["second_office"].get<std::string>()};
    } else {
      allowed = {letter["true_office"].get<std::string>()};
    }
    const auto& chains = (*by_id[id])["by_chain"];
    ASSERT_EQ(chains.size(), 4u) << id;
    for (const auto& chain : chains) {
      EXPECT_TRUE(allowed.count(chain["verdict"].get<std::string>()))
          << id << " chain " << chain["chain"] << ": " << chain["verdict"];
    }
  }
}

// The seam in modelled tokens: a word of the letter is a token exactly when its folded form is in the
// vocabulary (every ingest filter decides per word type), so count those before the seam's byte offset.
std::size_t tokens_before(const std::string& text, std::size_t byte_offset, const std::set<std::string>& vocabulary) {
  TextTokenizer tokenizer(TokenizerOptions{});
  std::vector<WordToken> words;
  tokenizer.tokenize(std::string_view(text).substr(0, byte_offset), words);
  std::size_t count = 0;
  for (const auto& w : words) count += vocabulary.count(w.text);
  return count;
}

void AnalyzeCliTest::check_seam() {
  const auto& composite = truth()["composite"];
  const Corpus corpus = read_corpus(study_ + "/corpus.loupe");
  const std::set<std::string> vocabulary(corpus.vocabulary.begin(), corpus.vocabulary.end());
  const std::string letter = read_whole_file(kSource + "/demo/harbour-letters/disputed/dsp-02.txt");
  const std::size_t seam = tokens_before(letter, composite["seam_byte_offset"].get<std::size_t>(), vocabulary);
  const auto& texts = results()["scan"]["texts"];
  ASSERT_EQ(texts.size(), 1u);  // the other disputed letters are too short for the scan
  EXPECT_EQ(texts[0]["id"], composite["id"]);
  ASSERT_EQ(texts[0]["chains"].size(), 4u);
  for (const auto& chain : texts[0]["chains"]) {
    ASSERT_GE(chain["change_points"].size(), 1u) << chain.dump(2);
    const auto& cp = chain["change_points"][0];
    EXPECT_LE(cp["p_value"].get<double>(), kLevel);
    const auto after = cp["first_token_after"].get<std::size_t>();  // within one segment of the seam
    EXPECT_LE(after, seam + kSegmentWords) << "seam at token " << seam;
    EXPECT_GE(after + kSegmentWords, seam) << "seam at token " << seam;
    EXPECT_EQ(chain["stretches"].front()["nearest_group"], composite["first_office"]);
    EXPECT_EQ(chain["stretches"].back()["nearest_group"], composite["second_office"]);
  }
  bool concluded = false;
  for (const auto& c : results()["conclusions"]) {
    if (c["text"].get<std::string>().rfind("dsp-02 looks composite", 0) == 0) {
      concluded = true;
      EXPECT_EQ(c["agreement"], "all chains");
    }
  }
  EXPECT_TRUE(concluded);
}

void AnalyzeCliTest::check_near_copy() {
  const auto& copy = truth()["near_copy"];
  const std::set<std::string> expected{copy["id"].get<std::string>(), copy["original_id"].get<std::string>()};
  const auto& pairs = results()["near_duplicates"]["pairs"];
  ASSERT_EQ(pairs.size(), 1u) << pairs.dump(2);
  EXPECT_EQ((std::set<std::string>{pairs[0]["first"].get<std::string>(), pairs[0]["second"].get<std::string>()}),
            expected);
  EXPECT_GE(pairs[0]["jaccard"].get<double>(), 0.5);
  EXPECT_LT(pairs[0]["topic_distance"].get<double>(), 0.2);  // a lexical copy shares its topics too
}

// Every permutation test keeps a 30-bin histogram of its permuted statistics that covers the observed one.
void expect_null_distribution(const nlohmann::json& test, std::size_t permutations, const std::string& where) {
  ASSERT_TRUE(test.contains("null_distribution")) << where;
  const auto& h = test["null_distribution"];
  ASSERT_EQ(h["counts"].size(), 30u) << where;
  std::size_t total = 0;
  for (const auto& c : h["counts"]) total += c.get<std::size_t>();
  EXPECT_EQ(total, permutations) << where;
  const double statistic = test["statistic"].get<double>();
  EXPECT_LE(h["low"].get<double>(), statistic) << where;
  EXPECT_GE(h["high"].get<double>(), statistic) << where;
}

void AnalyzeCliTest::check_null_distributions() {
  std::size_t checked = 0;
  for (const auto& chain : results()["compare"]["chains"]) {
    for (const auto& r : chain["records"]) {
      if (r["permutations"].get<std::size_t>() == 0) continue;
      expect_null_distribution(r, r["permutations"].get<std::size_t>(),
                               r["method"].get<std::string>() + " " + r["comparison"].dump());
      ++checked;
    }
  }
  EXPECT_GT(checked, 4u * 3u);
  for (const auto& chain : results()["graph"]["chains"]) {
    ASSERT_EQ(chain["group_tests"].size(), 2u);
    for (const auto& t : chain["group_tests"]) expect_null_distribution(t, 99, t["method"].get<std::string>());
  }
}

void AnalyzeCliTest::check_drawing() {
  const auto& drawing = results()["graph"]["drawing"];
  EXPECT_EQ(drawing["chain"], 1);
  const auto n = results()["graph"]["documents"].get<std::size_t>();
  ASSERT_EQ(drawing["nodes"].size(), n);
  double min_x = 1, max_x = 0;
  for (const auto& node : drawing["nodes"]) {
    for (const char* axis : {"x", "y"}) {
      EXPECT_GE(node[axis].get<double>(), 0.0);
      EXPECT_LE(node[axis].get<double>(), 1.0);
    }
    min_x = std::min(min_x, node["x"].get<double>());
    max_x = std::max(max_x, node["x"].get<double>());
  }
  EXPECT_GT(max_x - min_x, 0.5);  // spread over the square, not collapsed
  EXPECT_EQ(drawing["edges"].size(), results()["graph"]["chains"][0]["edges"]);
  for (const auto& e : drawing["edges"]) {
    EXPECT_LT(e["source"].get<std::size_t>(), n);
    EXPECT_LT(e["target"].get<std::size_t>(), n);
  }
}

void AnalyzeCliTest::check_conclusions() {
  const auto& conclusions = results()["conclusions"];
  ASSERT_GE(conclusions.size(), 5u);
  auto rank = [](const std::string& a) { return a == "all chains" ? 0 : a == "most chains" ? 1 : 2; };
  for (std::size_t i = 1; i < conclusions.size(); ++i) {
    EXPECT_LE(rank(conclusions[i - 1]["agreement"].get<std::string>()),
              rank(conclusions[i]["agreement"].get<std::string>()))
        << conclusions.dump(2);
  }
  std::string all;
  for (const auto& c : conclusions) all += c["text"].get<std::string>() + "\n";
  EXPECT_THAT(all, HasSubstr("dsp-08 resembles none of the candidate groups"));
  EXPECT_THAT(all, HasSubstr("Documents cluster by group on the similarity graph"));
  EXPECT_THAT(all, HasSubstr("are near-copies"));
  // Distinctive topics, summarised over the aligned chains: each office has a theme of its own in the demo.
  for (const char* office : {"cinderholt-quay", "gannetmouth-roads", "skelloway-harbour"}) {
    EXPECT_THAT(all, HasSubstr(std::string("is more common in ") + office)) << all;
  }
}

void AnalyzeCliTest::check_report() {
  const std::string report = read_whole_file(study_ + "/report.html");
  for (const char* section : {"conclusions", "corpus", "model", "sweep", "topics", "tests", "attribution", "scan",
                              "graph", "near-duplicates", "provenance"}) {
    EXPECT_THAT(report, HasSubstr("id=\"" + std::string(section) + "-heading\"")) << section;
  }
  EXPECT_THAT(report, HasSubstr("data-figure=\"topic-count-sweep\""));
  // The conclusions come first, as a table of each with its agreement across chains.
  EXPECT_LT(report.find("id=\"conclusions-heading\""), report.find("id=\"corpus-heading\""));
  EXPECT_THAT(report, HasSubstr("Every conclusion and its agreement across chains"));
  EXPECT_THAT(report, HasSubstr("dsp-02"));
}

void AnalyzeCliTest::check_rerun() {
  const std::string again = folder_->file("again");
  const auto r = run_loupe("analyze --study " + quote(study_ + "/study.json") + " -o " + quote(again) + " -q");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_EQ(r.output, "");  // quiet
  EXPECT_EQ(without_times(read_json(again + "/results.json")), without_times(results()));
  for (const char* name : {"study.json", "corpus.loupe", "model.loupe", "compare.csv", "attribution.csv", "scan.csv",
                           "graph.graphml", "near-duplicates.csv"}) {
    EXPECT_EQ(read_whole_file(again + "/" + name), read_whole_file(study_ + "/" + name)) << name;
  }
}

void AnalyzeCliTest::check_refusal() {
  const std::string before = read_whole_file(study_ + "/results.json");
  auto r = run_loupe("analyze " + quote(kManifest) + " -o " + quote(study_) + " -q");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("already exists. Add --overwrite"));
  EXPECT_EQ(read_whole_file(study_ + "/results.json"), before);
  // --overwrite replaces only folders that hold a study.
  const std::string other = folder_->write("notes/letter.txt", "my own notes");
  r = run_loupe("analyze " + quote(kManifest) + " -o " + quote(folder_->file("notes")) + " --overwrite -q");
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("holds no loupe study"));
  EXPECT_EQ(read_whole_file(other), "my own notes");
}

TEST(AnalyzeCliEmptyFolder, AnEmptyFolderTakesTheStudyWithoutOverwrite) {
  testing::TempFolder folder("analyze-empty");
  const std::string study = folder.file("empty");
  fs::create_directories(study);
  const auto r = run_loupe("analyze " + quote(kManifest) + " -o " + quote(study) +
                           " --topics 4 --chains 2 --sweeps 20 --burn-in 10 --samples 1 --permutations 9 "
                           "--bootstrap 9 -q");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  EXPECT_TRUE(fs::is_regular_file(study + "/results.json"));
}

TEST_F(AnalyzeCliTest, WritesEveryFileResultKeyProvenanceAndReportSection) {
  check_files_and_keys();
  check_provenance();
  check_report();
}

// demo/truth.json: the offices differ; each disputed letter's source; the seam of dsp-02; the copy dsp-06.
TEST_F(AnalyzeCliTest, FindsWhatTheDemoTruthHolds) {
  check_groups_differ();
  check_verdicts();
  check_seam();
  check_near_copy();
  check_conclusions();
}

TEST_F(AnalyzeCliTest, TestsCarryNullDistributionsAndTheGraphADrawing) {
  check_null_distributions();
  check_drawing();
}

TEST_F(AnalyzeCliTest, StudyFileReproducesTheRunAndNoStudyIsReplacedUnasked) {
  check_rerun();
  check_refusal();
}

TEST(AnalyzeCliOverwrite, OverwriteReplacesTheWholeStudyAndLeavesNothingBehind) {
  testing::TempFolder folder("analyze-overwrite");
  const std::string study = folder.file("small");
  const std::string tiny =
      " --topics 4 --chains 2 --sweeps 20 --burn-in 10 --samples 1 --permutations 9 --bootstrap 9 -q -o " +
      quote(study);
  auto r = run_loupe("analyze " + quote(kManifest) + tiny + " --seed 1");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  const auto first = read_json(study + "/study.json");
  fs::remove(study + "/scan.csv");  // a file of the old study that the new one must bring back
  r = run_loupe("analyze " + quote(kManifest) + tiny + " --seed 2 --overwrite");
  ASSERT_EQ(r.exit_code, 0) << r.output;
  const auto second = read_json(study + "/study.json");
  EXPECT_EQ(first["fit"]["seed"], 1);
  EXPECT_EQ(second["fit"]["seed"], 2);
  EXPECT_TRUE(fs::exists(study + "/scan.csv"));
  // Only the study folder is left: no temporary or old copies beside it.
  std::vector<std::string> entries;
  for (const auto& entry : fs::directory_iterator(folder.path())) entries.push_back(entry.path().filename().string());
  EXPECT_EQ(entries, std::vector<std::string>{"small"});
}

TEST(AnalyzeCliErrors, BadInputGetsAClearMessage) {
  testing::TempFolder folder("analyze-errors");
  // SOURCE neither a folder nor a manifest.
  const std::string text = folder.write("letter.txt", "a single letter");
  auto r = run_loupe("analyze " + quote(text) + " -o " + quote(folder.file("out")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("is neither a folder nor a manifest"));
  r = run_loupe("analyze " + quote(folder.file("missing")) + " -o " + quote(folder.file("out")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("does not exist"));
  r = run_loupe("analyze -o " + quote(folder.file("out")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("give SOURCE"));
  // An output folder that cannot be written: its parent is a file.
  r = run_loupe("analyze " + quote(kManifest) + " -o " + quote(text + "/study"));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("cannot create the folder"));
  EXPECT_THAT(r.output, HasSubstr("Choose a folder you can write to"));
  // Study files with unknown keys, at the top and inside a section, are refused naming the key.
  nlohmann::json study = {{"study_format", 1}, {"source", kManifest}, {"fit", {{"topics", 4}, {"sweep", 20}}}};
  r = run_loupe("analyze --study " + quote(folder.write("a.json", study.dump())) + " -o " + quote(folder.file("a")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("unknown key \"fit.sweep\""));
  EXPECT_THAT(r.output, HasSubstr("sweeps"));  // the known keys are listed
  study = {{"study_format", 1}, {"source", kManifest}, {"colour", "blue"}};
  r = run_loupe("analyze --study " + quote(folder.write("b.json", study.dump())) + " -o " + quote(folder.file("b")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("unknown key \"colour\""));
  study = {{"study_format", 1}, {"source", kManifest}, {"fit", {{"topics", "many"}}}};
  r = run_loupe("analyze --study " + quote(folder.write("c.json", study.dump())) + " -o " + quote(folder.file("c")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("\"fit.topics\" must be a whole number"));
  // A sweep needs two chains at least, and K values of 2 or more.
  r = run_loupe("analyze " + quote(kManifest) + " --sweep-topics 4,8 --sweep-chains 1 -o " + quote(folder.file("e")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--sweep-chains 1"));
  EXPECT_THAT(r.output, HasSubstr("at least 2"));
  r = run_loupe("analyze " + quote(kManifest) + " --sweep-topics 1,8 -o " + quote(folder.file("f")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--sweep-topics: K = 1"));
  r = run_loupe("analyze " + quote(kManifest) + " --sweep-topics 4,x -o " + quote(folder.file("g")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--sweep-topics 4,x: 'x'"));
  // With --study the options come from the file.
  r = run_loupe("analyze --study " + quote(folder.file("c.json")) + " --topics 5 -o " + quote(folder.file("d")));
  EXPECT_EQ(r.exit_code, 1);
  EXPECT_THAT(r.output, HasSubstr("--topics: with --study the options come from the study file"));
  // Nothing was left behind by the refused runs.
  for (const char* name : {"out", "a", "b", "c", "d", "e", "f", "g"})
    EXPECT_FALSE(fs::exists(folder.file(name))) << name;
  for (const auto& entry : fs::directory_iterator(folder.path())) {
    EXPECT_THAT(entry.path().filename().string(), Not(HasSubstr(".loupe-")));
  }
}

}  // namespace
}  // namespace loupe

// The distributed checks of issue 9, run through `mpirun` (Open MPI) on the built
// `loupe` binary and on mpi_permutation_driver, each command under `timeout` so
// that a hang fails the test instead of stalling the suite:
//  - a fit spread over 2 processes reaches a held-out document-completion
//    perplexity (Wallach et al. 2009) within 1% of the single-process fit's, on a
//    corpus drawn from the LDA generative process (JMLR, 2003);
//  - one process under mpirun writes the very file a single process writes;
//  - permutation tests spread over 2 and 3 processes give the single-process
//    results bit for bit;
//  - bad input (more processes than documents, a corpus one process cannot read,
//    a damaged corpus) gives a clear error from every process and a clean exit.
// The reference for every comparison is loupe's own single-process run.
// Test names start with "Mpi": `make sanitize` leaves them out (Open MPI's own
// allocations are reported by LeakSanitizer).
#include <sys/wait.h>

#include <cmath>
#include <cstdio>
#include <filesystem>
#include <fstream>
#include <iterator>
#include <numeric>
#include <string>

#include <gtest/gtest.h>

#include "corpus/corpus_file.h"
#include "model/evaluation.h"
#include "model/model_file.h"
#include "model/synthetic_corpus.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

struct CommandResult {
  int exit_code = -1;
  std::string output;  // stdout and stderr together
};

// Runs a shell command under `timeout`; exit code 124 means it hung.
CommandResult run(const std::string& command, int seconds = 240) {
  const std::string line = "timeout " + std::to_string(seconds) + " " + command + " 2>&1";
  CommandResult result;
  FILE* pipe = ::popen(line.c_str(), "r");
  if (pipe == nullptr) return result;
  char buffer[4096];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) result.output.append(buffer, n);
  const int status = ::pclose(pipe);
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return result;
}

// Open MPI's launcher; tests run as root in CI, and the machine may have fewer cores than processes.
std::string mpirun(int processes) {
  return std::string(LOUPE_MPIEXEC) + " --allow-run-as-root --oversubscribe -np " + std::to_string(processes) + " ";
}

std::string loupe() { return std::string("'") + LOUPE_CLI + "' "; }

std::string file_bytes(const std::string& path) {
  std::ifstream in(path, std::ios::binary);
  return {std::istreambuf_iterator<char>(in), std::istreambuf_iterator<char>()};
}

std::size_t occurrences(const std::string& text, const std::string& what) {
  std::size_t count = 0;
  for (auto at = text.find(what); at != std::string::npos; at = text.find(what, at + 1)) ++count;
  return count;
}

using testing::TempFolder;

constexpr std::uint32_t kTopics = 10;
constexpr std::uint32_t kWords = 1000;
constexpr double kAlpha = 0.2;
constexpr double kBeta = 0.05;

// Drawn once: 2000 training documents and 300 held out (the set-up of tests/model/perplexity_reference_test.cc).
struct DrawnCorpus {
  TempFolder folder{"mpi"};
  std::string train_path;
  Corpus train;
  Corpus held_out;
};

const DrawnCorpus& drawn() {
  static const DrawnCorpus* corpus = [] {
    auto* x = new DrawnCorpus;
    SyntheticCorpusSpec spec;
    spec.topic_count = kTopics;
    spec.vocabulary_size = kWords;
    spec.num_documents = 2300;
    spec.document_length = 80;
    spec.vary_length = true;
    spec.alpha = kAlpha;
    spec.topic_word_prior = kBeta;
    spec.num_groups = 3;
    spec.seed = 2009;
    const auto sample = draw_lda_corpus(spec);
    x->train = corpus_subset(sample.corpus, 0, 2000);
    x->held_out = corpus_subset(sample.corpus, 2000, 2300);
    x->train_path = x->folder.file("train.corpus");
    write_corpus(x->train, x->train_path);
    return x;
  }();
  return *corpus;
}

std::string fit_options(const std::string& extra = "") {
  return " --topics " + std::to_string(kTopics) + " --alpha " + std::to_string(kAlpha) + " --beta " +
         std::to_string(kBeta) + " --sweeps 200 --burn-in 100 --samples 10 --sample-lag 5 --seed 3 --threads 1 -q" +
         (extra.find("--chains") == std::string::npos ? " --chains 1" : "") + extra;
}

double held_out_perplexity(const Model& model) {
  const auto& chain = model.chains[0];
  FoldInOptions fold_in;
  fold_in.seed = 77;
  return document_completion_perplexity(TopicWordTable(chain.phi, model.topic_count(), kWords), chain.alpha,
                                        drawn().held_out, fold_in, ParallelRunner(2))
      .perplexity;
}

void expect_fits_within_one_percent(const std::string& name, const std::string& sampler) {
  const auto& corpus = drawn();
  TempFolder folder;
  const std::string single = folder.file("single.model");
  const std::string shared = folder.file("shared.model");
  const auto alone = run(loupe() + "fit '" + corpus.train_path + "' -o '" + single + "'" + fit_options(sampler));
  ASSERT_EQ(alone.exit_code, 0) << alone.output;
  const auto two =
      run(mpirun(2) + loupe() + "fit '" + corpus.train_path + "' -o '" + shared + "'" + fit_options(sampler));
  ASSERT_NE(two.exit_code, 124) << "mpirun -np 2 loupe fit did not finish:\n" << two.output;
  ASSERT_EQ(two.exit_code, 0) << two.output;

  const Model one_process = read_model(single);
  const Model two_processes = read_model(shared);
  // The rest of the pipeline reads it as a model of this corpus: every document's theta, in corpus order.
  EXPECT_NO_THROW(check_model_matches(two_processes, corpus.train, corpus.train_path));
  ASSERT_EQ(two_processes.document_ids, one_process.document_ids);
  ASSERT_EQ(two_processes.chains[0].theta.size(), one_process.chains[0].theta.size());
  for (std::size_t d = 0; d < two_processes.num_documents(); ++d) {
    const auto row = two_processes.theta(0, d);
    EXPECT_NEAR(std::accumulate(row.begin(), row.end(), 0.0), 1.0, 1e-4) << "document " << d;
  }
  const double p1 = held_out_perplexity(one_process);
  const double p2 = held_out_perplexity(two_processes);
  std::printf("held-out perplexity (%s): 1 process %.3f, 2 processes %.3f (ratio %.5f)\n", name.c_str(), p1, p2,
              p2 / p1);
  // The criterion: within 1% of the single-process run.
  EXPECT_LT(std::abs(p2 - p1) / p1, 0.01);
}

TEST(MpiFit, TwoProcessesReachTheSingleProcessPerplexityExactKernel) {
  expect_fits_within_one_percent("exact kernel", "");
}

TEST(MpiFit, TwoProcessesReachTheSingleProcessPerplexityMetropolisHastings) {
  expect_fits_within_one_percent("Metropolis-Hastings, 2 chains, tuned priors",
                                 " --sampler mh --chains 2 --tune-priors-every 10");
}

TEST(MpiFit, OneProcessWritesTheSingleProcessModelByteForByte) {
  const auto& corpus = drawn();
  TempFolder folder;
  const std::string single = folder.file("single.model");
  const std::string shared = folder.file("shared.model");
  const std::string options =
      " --topics 8 --chains 1 --sweeps 30 --burn-in 10 --samples 3 --sample-lag 5 --threads 2 -q";
  ASSERT_EQ(run(loupe() + "fit '" + corpus.train_path + "' -o '" + single + "'" + options).exit_code, 0);
  const auto one = run(mpirun(1) + loupe() + "fit '" + corpus.train_path + "' -o '" + shared + "'" + options);
  ASSERT_EQ(one.exit_code, 0) << one.output;
  EXPECT_TRUE(file_bytes(single) == file_bytes(shared)) << "mpirun -np 1 wrote another model file";
}

TEST(MpiFit, TheSharedModelIsReadByLoupeTopics) {
  const auto& corpus = drawn();
  TempFolder folder;
  const std::string model = folder.file("shared.model");
  const std::string options = " --topics 8 --chains 1 --sweeps 30 --burn-in 10 --samples 3 --sample-lag 5 -q";
  const auto fit = run(mpirun(2) + loupe() + "fit '" + corpus.train_path + "' -o '" + model + "'" + options);
  ASSERT_EQ(fit.exit_code, 0) << fit.output;
  const auto topics = run(loupe() + "topics '" + model + "'");
  EXPECT_EQ(topics.exit_code, 0) << topics.output;
  EXPECT_NE(topics.output.find("8 topics"), std::string::npos) << topics.output;
}

TEST(MpiPermutations, TwoAndThreeProcessesGiveTheSingleProcessResultsBitForBit) {
  TempFolder folder;
  const std::string driver = std::string("'") + LOUPE_PERMUTATION_DRIVER + "' ";
  const auto alone = run(driver + folder.file("alone.json"));
  ASSERT_EQ(alone.exit_code, 0) << alone.output;
  const std::string expected = file_bytes(folder.file("alone.json"));
  ASSERT_NE(expected.find("\"PERMANOVA\""), std::string::npos);
  ASSERT_NE(expected.find("\"complete_enumeration\": true"), std::string::npos);
  ASSERT_NE(expected.find("null_distribution"), std::string::npos);
  for (const int processes : {2, 3}) {
    const std::string path = folder.file("shared-" + std::to_string(processes) + ".json");
    const auto shared = run(mpirun(processes) + driver + path);
    ASSERT_EQ(shared.exit_code, 0) << shared.output;
    ASSERT_NE(shared.output.find("permutations shared among " + std::to_string(processes) + " processes"),
              std::string::npos)
        << shared.output;
    // Every statistic, p-value, null histogram and permuted statistic, as JSON numbers that read back exactly.
    EXPECT_TRUE(file_bytes(path) == expected) << processes << " processes gave other results; compare " << path;
  }
}

TEST(MpiBadInput, MoreProcessesThanDocumentsStopsEveryProcess) {
  TempFolder folder;
  const std::string path = folder.file("two-documents.corpus");
  write_corpus(corpus_subset(drawn().train, 0, 2), path);
  const auto result =
      run(mpirun(3) + loupe() + "fit '" + path + "' -o '" + folder.file("m.model") + "' --topics 2", 120);
  ASSERT_NE(result.exit_code, 124) << "mpirun hung:\n" << result.output;
  EXPECT_NE(result.exit_code, 0);
  EXPECT_EQ(occurrences(result.output, "the corpus has 2 documents but the fit was started on 3 processes"), 3U)
      << result.output;
  for (const char* label : {"(process 1 of 3)", "(process 2 of 3)", "(process 3 of 3)"}) {
    EXPECT_NE(result.output.find(label), std::string::npos) << label << "\n" << result.output;
  }
  EXPECT_FALSE(std::filesystem::exists(folder.file("m.model")));
}

TEST(MpiBadInput, ACorpusOneProcessCannotReadStopsEveryProcess) {
  // mpirun's colon syntax starts process 2 with a path that does not exist, while
  // process 1 reads its share and would wait for process 2 at the first sum.
  TempFolder folder;
  const std::string model = folder.file("m.model");
  const std::string missing = folder.file("nowhere.corpus");
  const std::string options =
      " -o '" + model + "' --topics 4 --chains 1 --sweeps 20 --burn-in 5 --samples 2 --sample-lag 2";
  const std::string launcher = std::string(LOUPE_MPIEXEC) + " --allow-run-as-root --oversubscribe ";
  const auto result = run(launcher + "-np 1 " + loupe() + "fit '" + drawn().train_path + "'" + options + " : -np 1 " +
                              loupe() + "fit '" + missing + "'" + options,
                          120);
  ASSERT_NE(result.exit_code, 124) << "mpirun hung:\n" << result.output;
  EXPECT_NE(result.exit_code, 0);
  EXPECT_NE(result.output.find("loupe: error (process 2 of 2): cannot read corpus file " + missing +
                               ": no such file. Check the path."),
            std::string::npos)
      << result.output;
  EXPECT_NE(
      result.output.find("loupe: error (process 1 of 2): process 2 of 2 stopped: cannot read corpus file " + missing),
      std::string::npos)
      << result.output;
  EXPECT_FALSE(std::filesystem::exists(model));
}

TEST(MpiBadInput, ADamagedCorpusStopsEveryProcess) {
  TempFolder folder;
  const std::string path = folder.file("damaged.corpus");
  std::string bytes = file_bytes(drawn().train_path);
  // Flip one byte in the last tokens: process 2 holds them, process 1 finds the checksum wrong.
  bytes[bytes.size() - 200] = static_cast<char>(bytes[bytes.size() - 200] ^ 0x5A);
  std::ofstream(path, std::ios::binary) << bytes;
  const auto result = run(mpirun(2) + loupe() + "fit '" + path + "' -o '" + folder.file("m.model") + "'", 120);
  ASSERT_NE(result.exit_code, 124) << "mpirun hung:\n" << result.output;
  EXPECT_NE(result.exit_code, 0);
  EXPECT_NE(result.output.find("loupe: error (process 1 of 2): " + path + ": corpus file checksum mismatch"),
            std::string::npos)
      << result.output;
  EXPECT_NE(result.output.find("loupe: error (process 2 of 2): "), std::string::npos) << result.output;
}

}  // namespace
}  // namespace loupe

// Helpers shared by the graph tests: random topic profiles, a brute-force
// nearest-neighbour computation, planted-partition graphs, small corpora, and
// running the Python reference scripts in tests/graph/reference/.
#pragma once

#include <sys/wait.h>

#include <algorithm>
#include <cmath>
#include <cstdio>
#include <string>
#include <utility>
#include <vector>

#include "corpus/corpus.h"
#include "graph/document_profiles.h"
#include "graph/hellinger_neighbours.h"
#include "model/random.h"

namespace loupe::test {

// N documents over K topics, each row drawn from a symmetric Dirichlet(alpha)
// (normalised Gamma draws), so rows sum to 1.
inline ProfileMatrix random_profiles(std::size_t n, std::size_t k, double alpha, std::uint64_t seed) {
  Xoshiro256 random(seed);
  ProfileMatrix theta(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(k));
  for (Eigen::Index d = 0; d < theta.rows(); ++d) {
    double sum = 0;
    for (Eigen::Index t = 0; t < theta.cols(); ++t) {
      theta(d, t) = random.gamma(alpha) + 1e-300;
      sum += theta(d, t);
    }
    theta.row(d) /= sum;
  }
  return theta;
}

// Profiles in `groups` clusters: document d belongs to group d % groups and
// puts most of its weight on that group's own topics.
inline ProfileMatrix clustered_profiles(std::size_t n, std::size_t groups, std::size_t topics_per_group,
                                        std::uint64_t seed) {
  Xoshiro256 random(seed);
  const std::size_t k = groups * topics_per_group;
  ProfileMatrix theta(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(k));
  for (std::size_t d = 0; d < n; ++d) {
    const std::size_t g = d % groups;
    double sum = 0;
    for (std::size_t t = 0; t < k; ++t) {
      const bool own = t / topics_per_group == g;
      const double v = random.gamma(own ? 1.0 : 0.05) + 1e-300;
      theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(t)) = v;
      sum += v;
    }
    theta.row(static_cast<Eigen::Index>(d)) /= sum;
  }
  return theta;
}

// Every distance from document d by the textbook formula, H = sqrt(1 - sum sqrt(p q))
// (common practice), sorted nearest first, ties by index.
inline std::vector<std::pair<double, std::uint32_t>> brute_force_row(const ProfileMatrix& theta, std::size_t d) {
  std::vector<std::pair<double, std::uint32_t>> row;
  for (Eigen::Index j = 0; j < theta.rows(); ++j) {
    if (static_cast<std::size_t>(j) == d) continue;
    double bc = 0;
    for (Eigen::Index t = 0; t < theta.cols(); ++t)
      bc += std::sqrt(theta(static_cast<Eigen::Index>(d), t) * theta(j, t));
    row.emplace_back(std::sqrt(std::max(0.0, 1.0 - bc)), static_cast<std::uint32_t>(j));
  }
  std::sort(row.begin(), row.end());
  return row;
}

inline DocumentTable numbered_documents(std::size_t n, std::size_t groups) {
  DocumentTable table;
  for (std::size_t g = 0; g < groups; ++g) table.groups.push_back("g" + std::to_string(g));
  for (std::size_t d = 0; d < n; ++d) {
    DocumentInfo info;
    info.id = "d" + std::to_string(d);
    info.group = groups == 0 ? "" : table.groups[d % groups];
    table.documents.push_back(info);
  }
  return table;
}

// A corpus from documents given as word-id lists over words "w0", "w1", ...
inline Corpus corpus_from_tokens(const std::vector<std::vector<WordId>>& documents, std::size_t vocabulary_size) {
  Corpus corpus;
  for (std::size_t w = 0; w < vocabulary_size; ++w) corpus.vocabulary.push_back("w" + std::to_string(w));
  corpus.groups = {"a", "b"};
  corpus.word_frequency.assign(vocabulary_size, 0);
  corpus.document_frequency.assign(vocabulary_size, 0);
  for (std::size_t d = 0; d < documents.size(); ++d) {
    Document doc;
    doc.id = "doc" + std::to_string(d);
    doc.group = static_cast<std::uint32_t>(d % 2);
    for (const auto w : documents[d]) ++corpus.word_frequency[w];
    corpus.add_document(std::move(doc), documents[d]);
  }
  return corpus;
}

struct ScriptOutput {
  int exit_code = -1;
  std::string output;  // stdout and stderr together
};

inline std::string shell_quote(const std::string& s) {
  std::string out = "'";
  for (const char c : s) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

// Runs /usr/bin/python3 tests/graph/reference/SCRIPT ARGS (a listed
// dependency: scripts/debian-packages.txt). A missing module makes the script
// fail, and so the test: never a skip.
inline ScriptOutput run_python_reference(const std::string& script, const std::string& args) {
  const std::string command = "/usr/bin/python3 " +
                              shell_quote(std::string(LOUPE_SOURCE_DIR) + "/tests/graph/reference/" + script) + " " +
                              args + " 2>&1";
  ScriptOutput result;
  FILE* pipe = ::popen(command.c_str(), "r");
  if (!pipe) return result;
  char buffer[4096];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) result.output.append(buffer, n);
  const int status = ::pclose(pipe);
  result.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  return result;
}

}  // namespace loupe::test

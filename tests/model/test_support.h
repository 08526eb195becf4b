// Helpers shared by the model tests: small corpora built in memory, topic
// matching (Hungarian algorithm, Kuhn 1955) and Hellinger distances, temp folders.
#pragma once

#include <algorithm>
#include <cmath>
#include <cstdint>
#include <filesystem>
#include <limits>
#include <random>
#include <span>
#include <string>
#include <vector>

#include "corpus/corpus.h"

namespace loupe::test {

// A corpus from documents given as lists of word ids over `vocabulary_size`
// words named "w0", "w1", ...; document d is "d<d>" in group d % groups.
inline Corpus make_corpus(const std::vector<std::vector<WordId>>& documents, std::size_t vocabulary_size,
                          std::size_t groups = 2) {
  Corpus corpus;
  for (std::size_t w = 0; w < vocabulary_size; ++w) corpus.vocabulary.push_back("w" + std::to_string(w));
  for (std::size_t g = 0; g < groups; ++g) corpus.groups.push_back("g" + std::to_string(g));
  corpus.word_frequency.assign(vocabulary_size, 0);
  corpus.document_frequency.assign(vocabulary_size, 0);
  for (std::size_t d = 0; d < documents.size(); ++d) {
    Document doc;
    doc.id = "d" + std::to_string(d);
    doc.group = groups == 0 ? kNoGroup : static_cast<std::uint32_t>(d % groups);
    std::vector<bool> seen(vocabulary_size, false);
    for (const auto w : documents[d]) {
      ++corpus.word_frequency[w];
      if (!seen[w]) ++corpus.document_frequency[w];
      seen[w] = true;
    }
    corpus.add_document(std::move(doc), documents[d]);
  }
  return corpus;
}

// H(p, q) = sqrt(1 - sum_i sqrt(p_i q_i)) (common practice; ARCHITECTURE.md).
template <typename A, typename B>
double hellinger(std::span<const A> p, std::span<const B> q) {
  double bc = 0;
  for (std::size_t i = 0; i < p.size(); ++i) bc += std::sqrt(static_cast<double>(p[i]) * static_cast<double>(q[i]));
  return std::sqrt(std::max(0.0, 1.0 - bc));
}

// Minimum-cost assignment of rows to columns of a square cost matrix
// (Hungarian algorithm, Kuhn 1955; the O(n^3) potentials form). Returns
// column_of_row.
inline std::vector<std::size_t> hungarian(const std::vector<std::vector<double>>& cost) {
  const std::size_t n = cost.size();
  const double inf = std::numeric_limits<double>::infinity();
  std::vector<double> u(n + 1, 0), v(n + 1, 0);
  std::vector<std::size_t> p(n + 1, 0), way(n + 1, 0);
  for (std::size_t i = 1; i <= n; ++i) {
    p[0] = i;
    std::size_t j0 = 0;
    std::vector<double> minv(n + 1, inf);
    std::vector<bool> used(n + 1, false);
    do {
      used[j0] = true;
      const std::size_t i0 = p[j0];
      double delta = inf;
      std::size_t j1 = 0;
      for (std::size_t j = 1; j <= n; ++j) {
        if (used[j]) continue;
        const double cur = cost[i0 - 1][j - 1] - u[i0] - v[j];
        if (cur < minv[j]) {
          minv[j] = cur;
          way[j] = j0;
        }
        if (minv[j] < delta) {
          delta = minv[j];
          j1 = j;
        }
      }
      for (std::size_t j = 0; j <= n; ++j) {
        if (used[j]) {
          u[p[j]] += delta;
          v[j] -= delta;
        } else {
          minv[j] -= delta;
        }
      }
      j0 = j1;
    } while (p[j0] != 0);
    do {
      const std::size_t j1 = way[j0];
      p[j0] = p[j1];
      j0 = j1;
    } while (j0 != 0);
  }
  std::vector<std::size_t> column_of_row(n);
  for (std::size_t j = 1; j <= n; ++j) column_of_row[p[j] - 1] = j - 1;
  return column_of_row;
}

// A fresh empty folder under the system temp folder, removed by the destructor.
class TempFolder {
 public:
  TempFolder() {
    std::random_device entropy;
    path_ = std::filesystem::temp_directory_path() /
            ("loupe-model-test-" + std::to_string(entropy()) + std::to_string(entropy()));
    std::filesystem::create_directories(path_);
  }
  ~TempFolder() {
    std::error_code ignored;
    std::filesystem::remove_all(path_, ignored);
  }
  TempFolder(const TempFolder&) = delete;
  TempFolder& operator=(const TempFolder&) = delete;
  std::string file(const std::string& name) const { return (path_ / name).string(); }
  const std::filesystem::path& path() const { return path_; }

 private:
  std::filesystem::path path_;
};

}  // namespace loupe::test

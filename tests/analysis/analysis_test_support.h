// Helpers for the analysis tests: drawn documents with known group profiles,
// and running the outside references (R with vegan, Python with scikit-bio and
// SciPy) on files written to a temporary folder, reading back "key=value" lines.
#pragma once

#include <sys/wait.h>
#include <cmath>
#include <cstdio>
#include <fstream>
#include <map>
#include <random>
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include "analysis/grouped_documents.h"
#include "support/temp_folder.h"

namespace loupe::testing {

// A draw from Dirichlet(concentration * profile) (gamma variates normalised).
inline std::vector<double> draw_dirichlet(const std::vector<double>& profile, double concentration,
                                          std::mt19937_64& rng) {
  std::vector<double> x(profile.size());
  double sum = 0;
  for (std::size_t k = 0; k < profile.size(); ++k) {
    std::gamma_distribution<double> gamma(concentration * profile[k], 1.0);
    x[k] = std::max(gamma(rng), 1e-300);
    sum += x[k];
  }
  for (auto& v : x) v /= sum;
  return x;
}

// A profile over K topics: `tilt` shifts weight towards the first topics.
inline std::vector<double> tilted_profile(std::size_t topics, double tilt) {
  std::vector<double> p(topics);
  double sum = 0;
  for (std::size_t k = 0; k < topics; ++k) {
    p[k] = std::exp(-tilt * static_cast<double>(k) / static_cast<double>(topics)) + 0.2;
    sum += p[k];
  }
  for (auto& v : p) v /= sum;
  return p;
}

// Documents drawn group by group: group g gets sizes[g] documents from
// Dirichlet(concentration[g] * profiles[g]); lengths drawn in [50, 500).
inline GroupedDocuments draw_documents(const std::vector<std::size_t>& sizes,
                                       const std::vector<std::vector<double>>& profiles,
                                       const std::vector<double>& concentration, std::uint64_t seed) {
  std::mt19937_64 rng(seed);
  std::size_t total = 0;
  for (const auto s : sizes) total += s;
  GroupedDocuments data;
  data.theta.resize(static_cast<Eigen::Index>(total), static_cast<Eigen::Index>(profiles[0].size()));
  std::uniform_int_distribution<int> length(50, 499);
  Eigen::Index row = 0;
  for (std::size_t g = 0; g < sizes.size(); ++g) {
    data.group_names.push_back(std::string(1, static_cast<char>('A' + g)));
    for (std::size_t i = 0; i < sizes[g]; ++i, ++row) {
      const auto x = draw_dirichlet(profiles[g], concentration[g], rng);
      for (std::size_t k = 0; k < x.size(); ++k) data.theta(row, static_cast<Eigen::Index>(k)) = x[k];
      data.groups.push_back(static_cast<int>(g));
      data.lengths.push_back(length(rng));
    }
  }
  return data;
}

inline std::string shell_quote(const std::string& s) {
  std::string out = "'";
  for (const char c : s) out += c == '\'' ? std::string("'\\''") : std::string(1, c);
  return out + "'";
}

struct ReferenceOutput {
  int exit_code = -1;
  std::string text;                      // everything printed
  std::map<std::string, double> values;  // from lines "key=value"
  double at(const std::string& key) const {
    const auto it = values.find(key);
    if (it == values.end()) {
      ADD_FAILURE() << "the reference printed no value for '" << key << "'; it printed:\n" << text;
      return std::nan("");
    }
    return it->second;
  }
};

// Runs a shell command (stderr joined), parses "key=value" lines with numeric values.
inline ReferenceOutput run_reference(const std::string& command) {
  ReferenceOutput out;
  FILE* pipe = ::popen((command + " 2>&1").c_str(), "r");
  if (!pipe) return out;
  char buffer[4096];
  std::size_t n;
  while ((n = std::fread(buffer, 1, sizeof buffer, pipe)) > 0) out.text.append(buffer, n);
  const int status = ::pclose(pipe);
  out.exit_code = WIFEXITED(status) ? WEXITSTATUS(status) : -1;
  std::istringstream lines(out.text);
  std::string line;
  while (std::getline(lines, line)) {
    const auto eq = line.find('=');
    if (eq == std::string::npos || eq == 0) continue;
    char* end = nullptr;
    const std::string value = line.substr(eq + 1);
    const double v = std::strtod(value.c_str(), &end);
    if (end != value.c_str()) out.values[line.substr(0, eq)] = v;
  }
  return out;
}

// The reference scripts live beside the tests.
inline std::string reference_script(const std::string& name) {
  return std::string(LOUPE_SOURCE_DIR) + "/tests/analysis/reference/" + name;
}

// Rscript and /usr/bin/python3 are listed dependencies (scripts/debian-packages.txt):
// a missing one fails the test through the exit code check.
inline ReferenceOutput run_r(const std::string& script, const std::string& args) {
  return run_reference("Rscript --vanilla " + shell_quote(reference_script(script)) + " " + args);
}
inline ReferenceOutput run_python(const std::string& script, const std::string& args) {
  return run_reference("/usr/bin/python3 " + shell_quote(reference_script(script)) + " " + args);
}

// Full-precision numbers for files the references read.
inline std::string exact(double v) {
  char buffer[40];
  std::snprintf(buffer, sizeof buffer, "%.17g", v);
  return buffer;
}

// Writes a square matrix (no header) as CSV.
inline void write_square_csv(const std::string& path, const std::vector<double>& condensed, std::size_t n) {
  std::vector<double> full(n * n, 0.0);
  std::size_t idx = 0;
  for (std::size_t i = 0; i < n; ++i) {
    for (std::size_t j = i + 1; j < n; ++j, ++idx) full[i * n + j] = full[j * n + i] = condensed[idx];
  }
  std::ofstream out(path);
  for (std::size_t i = 0; i < n; ++i) {
    for (std::size_t j = 0; j < n; ++j) out << (j ? "," : "") << exact(full[i * n + j]);
    out << "\n";
  }
}

inline void write_ints(const std::string& path, const std::vector<int>& values) {
  std::ofstream out(path);
  for (const int v : values) out << v << "\n";
}

inline void write_doubles(const std::string& path, const std::vector<double>& values) {
  std::ofstream out(path);
  for (const double v : values) out << exact(v) << "\n";
}

inline void write_matrix_csv(const std::string& path, const TopicMatrix& m) {
  std::ofstream out(path);
  for (Eigen::Index i = 0; i < m.rows(); ++i) {
    for (Eigen::Index j = 0; j < m.cols(); ++j) out << (j ? "," : "") << exact(m(i, j));
    out << "\n";
  }
}

// Whether two Monte-Carlo permutation p-values from P1 and P2 permutations
// agree within a 99.9% band: |p1 - p2| <= 3.29 sqrt(pbar (1 - pbar) (1/P1 + 1/P2))
// plus 1/P1 + 1/P2 for the discreteness of the estimates (normal approximation
// to the binomial, common practice; 3.29 is the 0.9995 normal quantile, R: qnorm(0.9995)).
inline bool p_values_agree(double p1, std::size_t permutations1, double p2, std::size_t permutations2) {
  const double pbar = 0.5 * (p1 + p2);
  const double inv = 1.0 / static_cast<double>(permutations1) + 1.0 / static_cast<double>(permutations2);
  return std::abs(p1 - p2) <= 3.29 * std::sqrt(pbar * (1 - pbar) * inv) + inv;
}

inline double relative_difference(double a, double b) { return std::abs(a - b) / std::max(std::abs(b), 1e-300); }

}  // namespace loupe::testing

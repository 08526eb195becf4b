// The input of every group test: documents' topic shares (theta), their group
// labels (kLeftOut leaves a document out, e.g. a disputed text), and optional
// permutation strata and document lengths. Plain matrices: no model needed.
#pragma once

#include <cstddef>
#include <string>
#include <string_view>
#include <vector>

#include "analysis/hellinger.h"

namespace loupe {

inline constexpr int kLeftOut = -1;

struct GroupedDocuments {
  TopicMatrix theta;                     // D x K, each row a distribution over topics
  std::vector<int> groups;               // D: 0..G-1, or kLeftOut
  std::vector<std::string> group_names;  // G; empty gives "group 0", "group 1", ...
  std::vector<int> strata;               // D or empty (free permutations); kLeftOut = no value
  std::string strata_name;               // the metadata column the strata came from
  std::vector<double> lengths;           // D or empty: token counts, for length weighting
};

// The documents one test uses, compacted: included rows only, groups without
// documents dropped and the rest renumbered 0..G-1 in label order, strata
// renumbered 0..S-1. Rows of theta are rescaled to sum to exactly 1.
struct IncludedDocuments {
  TopicMatrix theta;                     // n x K
  std::vector<int> groups;               // n
  std::vector<std::string> group_names;  // G
  std::vector<std::size_t> group_sizes;  // G
  std::vector<int> strata;               // n, or empty
  std::string strata_name;
  std::vector<double> lengths;           // n, or empty
  std::vector<std::size_t> source_rows;  // n: the row in GroupedDocuments

  std::size_t size() const { return groups.size(); }
  std::size_t num_groups() const { return group_names.size(); }
  std::size_t topic_count() const { return static_cast<std::size_t>(theta.cols()); }
};

struct InclusionRules {
  std::size_t min_groups = 2;      // groups with documents
  std::size_t min_group_size = 2;  // documents in every group
};

// Checks and compacts. `method` names the test in messages ("PERMANOVA").
// Throws loupe::Error for mismatched sizes, a theta row that is not a
// distribution (sum off 1 by more than 1e-4, a negative or non-finite share),
// a non-positive length, too few groups, a group with too few documents, and an
// included document without a stratum.
IncludedDocuments select_documents(const GroupedDocuments& data, std::string_view method,
                                   const InclusionRules& rules = {});

// The documents of groups g and h only (for pairwise tests), renumbered 0 (g) and 1 (h).
IncludedDocuments select_pair(const IncludedDocuments& documents, int g, int h);

// "A vs B".
std::string pair_name(const IncludedDocuments& documents, int g, int h);

}  // namespace loupe

// Permutation strata from a metadata column: each distinct value (a decade, an
// archive box) becomes one stratum, so labels are only exchanged among
// documents that share it. An empty value means "no stratum" (kLeftOut).
#pragma once

#include <span>
#include <string>
#include <vector>

namespace loupe {

struct Strata {
  std::string column;
  std::vector<std::string> values;  // stratum s is values[s], sorted
  std::vector<int> labels;          // per document: 0..S-1, or -1 for an empty value
};

// The index of `column` among `columns`. Throws loupe::Error naming the column
// and listing the available ones when it is absent, e.g.
// "no metadata column 'decade'; the corpus has: year, box (choose one with --strata)".
std::size_t find_metadata_column(const std::string& column, std::span<const std::string> columns);

// rows[d] is document d's metadata, aligned with `columns` (Document::metadata).
// Example: column "box", values {"B2", "B1", "B2", ""} -> values {"B1", "B2"}, labels {1, 0, 1, -1}.
Strata strata_from_metadata(const std::string& column, std::span<const std::string> columns,
                            std::span<const std::vector<std::string>> rows);

}  // namespace loupe

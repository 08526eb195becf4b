#include "analysis/strata.h"

#include <algorithm>
#include <map>

#include "common/error.h"

namespace loupe {

std::size_t find_metadata_column(const std::string& column, std::span<const std::string> columns) {
  const auto it = std::find(columns.begin(), columns.end(), column);
  if (it != columns.end()) return static_cast<std::size_t>(it - columns.begin());
  std::string available;
  for (const auto& name : columns) available += (available.empty() ? "" : ", ") + name;
  if (available.empty()) {
    throw Error("no metadata column '" + column +
                "': the corpus has no metadata columns; add one to the manifest or permute freely");
  }
  throw Error("no metadata column '" + column + "'; the corpus has: " + available + " (choose one of these)");
}

Strata strata_from_metadata(const std::string& column, std::span<const std::string> columns,
                            std::span<const std::vector<std::string>> rows) {
  const std::size_t index = find_metadata_column(column, columns);
  Strata strata;
  strata.column = column;
  std::map<std::string, int> value_index;
  for (std::size_t d = 0; d < rows.size(); ++d) {
    if (rows[d].size() != columns.size()) {
      throw Error("document " + std::to_string(d) + " has " + std::to_string(rows[d].size()) +
                  " metadata values but the corpus has " + std::to_string(columns.size()) + " columns");
    }
    if (!rows[d][index].empty()) value_index.try_emplace(rows[d][index], 0);
  }
  for (auto& [value, s] : value_index) {
    s = static_cast<int>(strata.values.size());
    strata.values.push_back(value);
  }
  strata.labels.reserve(rows.size());
  for (const auto& row : rows) {
    strata.labels.push_back(row[index].empty() ? -1 : value_index[row[index]]);
  }
  return strata;
}

}  // namespace loupe

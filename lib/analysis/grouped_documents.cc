#include "analysis/grouped_documents.h"

#include <cmath>
#include <map>

#include "common/error.h"

namespace loupe {
namespace {

std::string quoted(const std::string& name) { return "'" + name + "'"; }

std::string default_group_name(std::size_t g) { return "group " + std::to_string(g); }

}  // namespace

IncludedDocuments select_documents(const GroupedDocuments& data, std::string_view method, const InclusionRules& rules) {
  const std::string what(method);
  const auto num_docs = static_cast<std::size_t>(data.theta.rows());
  const auto topic_count = static_cast<std::size_t>(data.theta.cols());
  if (data.groups.size() != num_docs) {
    throw Error(what + ": " + std::to_string(num_docs) + " documents in theta but " +
                std::to_string(data.groups.size()) + " group labels; give one label per document");
  }
  if (!data.strata.empty() && data.strata.size() != num_docs) {
    throw Error(what + ": " + std::to_string(num_docs) + " documents but " + std::to_string(data.strata.size()) +
                " strata labels; give one per document or none");
  }
  if (!data.lengths.empty() && data.lengths.size() != num_docs) {
    throw Error(what + ": " + std::to_string(num_docs) + " documents but " + std::to_string(data.lengths.size()) +
                " document lengths; give one per document or none");
  }
  if (topic_count == 0) throw Error(what + ": theta has no topics");

  int max_label = -1;
  for (std::size_t d = 0; d < num_docs; ++d) {
    const int g = data.groups[d];
    if (g < kLeftOut) {
      throw Error(what + ": document " + std::to_string(d) + " has group label " + std::to_string(g) +
                  "; labels are 0, 1, ... or -1 to leave a document out");
    }
    if (g > max_label) max_label = g;
  }
  const std::size_t num_labels = max_label < 0 ? 0 : static_cast<std::size_t>(max_label) + 1;
  if (!data.group_names.empty() && data.group_names.size() < num_labels) {
    throw Error(what + ": group label " + std::to_string(max_label) + " has no name; " +
                std::to_string(data.group_names.size()) + " group names were given");
  }
  auto label_name = [&](std::size_t g) {
    return data.group_names.empty() ? default_group_name(g) : data.group_names[g];
  };

  std::vector<std::size_t> label_sizes(num_labels, 0);
  for (const int g : data.groups) {
    if (g != kLeftOut) ++label_sizes[static_cast<std::size_t>(g)];
  }
  IncludedDocuments out;
  std::vector<int> new_label(num_labels, kLeftOut);
  for (std::size_t g = 0; g < num_labels; ++g) {
    if (label_sizes[g] == 0) continue;
    new_label[g] = static_cast<int>(out.group_names.size());
    out.group_names.push_back(label_name(g));
    out.group_sizes.push_back(label_sizes[g]);
  }
  if (out.num_groups() < rules.min_groups) {
    std::string found = out.num_groups() == 0 ? "no document has a group"
                                              : "only one group has documents (" + quoted(out.group_names[0]) + ", " +
                                                    std::to_string(out.group_sizes[0]) + " documents)";
    throw Error(what + " compares groups and needs at least " + std::to_string(rules.min_groups) +
                " with documents, but " + found +
                "; check the group of each collection, or include the documents left out");
  }
  for (std::size_t g = 0; g < out.num_groups(); ++g) {
    if (out.group_sizes[g] < rules.min_group_size) {
      throw Error(what + ": group " + quoted(out.group_names[g]) + " has " +
                  (out.group_sizes[g] == 1 ? std::string("a single document")
                                           : std::to_string(out.group_sizes[g]) + " documents") +
                  ", and every group needs at least " + std::to_string(rules.min_group_size) +
                  "; add documents to it, merge it with another group, or leave it out");
    }
  }

  std::size_t n = 0;
  for (const auto size : out.group_sizes) n += size;
  out.theta.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(topic_count));
  out.groups.reserve(n);
  out.source_rows.reserve(n);
  std::map<int, int> stratum_index;
  const bool has_strata = !data.strata.empty();
  const bool has_lengths = !data.lengths.empty();
  out.strata_name = has_strata ? data.strata_name : std::string();
  for (std::size_t d = 0; d < num_docs; ++d) {
    const int g = data.groups[d];
    if (g == kLeftOut) continue;
    const auto row = static_cast<Eigen::Index>(out.groups.size());
    double sum = 0;
    for (std::size_t k = 0; k < topic_count; ++k) {
      const double share = data.theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(k));
      if (!std::isfinite(share) || share < 0) {
        throw Error(what + ": document " + std::to_string(d) + ", topic " + std::to_string(k) + ": share " +
                    std::to_string(share) + " is not a probability; theta rows must be distributions over topics");
      }
      sum += share;
    }
    if (std::abs(sum - 1.0) > 1e-4) {
      throw Error(what + ": document " + std::to_string(d) + ": topic shares sum to " + std::to_string(sum) +
                  ", not 1; theta rows must be distributions over topics");
    }
    out.theta.row(row) = data.theta.row(static_cast<Eigen::Index>(d)) / sum;
    out.groups.push_back(new_label[static_cast<std::size_t>(g)]);
    out.source_rows.push_back(d);
    if (has_strata) {
      const int s = data.strata[d];
      if (s < 0) {
        throw Error(what + ": document " + std::to_string(d) + " has no value in the strata column " +
                    quoted(data.strata_name) + "; give it one, leave the document out, or permute freely");
      }
      const auto [it, inserted] = stratum_index.try_emplace(s, 0);
      (void)inserted;
      out.strata.push_back(s);
    }
    if (has_lengths) {
      const double length = data.lengths[d];
      if (!std::isfinite(length) || length <= 0) {
        throw Error(what + ": document " + std::to_string(d) + " has length " + std::to_string(length) +
                    "; length weighting needs a positive token count for every document");
      }
      out.lengths.push_back(length);
    }
  }
  if (has_strata) {
    int next = 0;
    for (auto& [label, index] : stratum_index) index = next++;
    for (auto& s : out.strata) s = stratum_index[s];
  }
  return out;
}

IncludedDocuments select_pair(const IncludedDocuments& documents, int g, int h) {
  IncludedDocuments out;
  const auto gi = static_cast<std::size_t>(g);
  const auto hi = static_cast<std::size_t>(h);
  out.group_names = {documents.group_names[gi], documents.group_names[hi]};
  out.group_sizes = {documents.group_sizes[gi], documents.group_sizes[hi]};
  out.strata_name = documents.strata_name;
  const std::size_t n = out.group_sizes[0] + out.group_sizes[1];
  out.theta.resize(static_cast<Eigen::Index>(n), documents.theta.cols());
  std::map<int, int> stratum_index;
  for (std::size_t i = 0; i < documents.size(); ++i) {
    const int label = documents.groups[i];
    if (label != g && label != h) continue;
    out.theta.row(static_cast<Eigen::Index>(out.groups.size())) = documents.theta.row(static_cast<Eigen::Index>(i));
    out.groups.push_back(label == g ? 0 : 1);
    out.source_rows.push_back(documents.source_rows[i]);
    if (!documents.strata.empty()) {
      out.strata.push_back(documents.strata[i]);
      stratum_index.try_emplace(documents.strata[i], 0);
    }
    if (!documents.lengths.empty()) out.lengths.push_back(documents.lengths[i]);
  }
  int next = 0;
  for (auto& [label, index] : stratum_index) index = next++;
  for (auto& s : out.strata) s = stratum_index[s];
  return out;
}

std::string pair_name(const IncludedDocuments& documents, int g, int h) {
  return documents.group_names[static_cast<std::size_t>(g)] + " vs " +
         documents.group_names[static_cast<std::size_t>(h)];
}

}  // namespace loupe

#include "graph/document_profiles.h"

#include <cmath>
#include <map>

#include "common/error.h"

namespace loupe {

std::vector<std::uint32_t> DocumentTable::group_labels() const {
  std::map<std::string, std::uint32_t> index;
  for (std::size_t g = 0; g < groups.size(); ++g) index[groups[g]] = static_cast<std::uint32_t>(g);
  std::vector<std::uint32_t> labels(documents.size(), kNoGroup);
  for (std::size_t d = 0; d < documents.size(); ++d) {
    const auto found = index.find(documents[d].group);
    if (!documents[d].group.empty() && found != index.end()) labels[d] = found->second;
  }
  return labels;
}

std::vector<std::uint32_t> DocumentTable::metadata_labels(const std::string& column) const {
  std::size_t c = 0;
  while (c < metadata_columns.size() && metadata_columns[c] != column) ++c;
  if (c == metadata_columns.size()) {
    std::string known;
    for (const auto& name : metadata_columns) known += (known.empty() ? "" : ", ") + name;
    throw Error("no metadata column named '" + column + "'" +
                (known.empty()
                     ? std::string(" (the documents carry no metadata; pass the corpus built from a manifest)")
                     : " (known columns: " + known + ")") +
                ". Choose one of the corpus's metadata columns.");
  }
  std::map<std::string, std::uint32_t> seen;
  std::vector<std::uint32_t> labels(documents.size());
  for (std::size_t d = 0; d < documents.size(); ++d) {
    const auto [it, inserted] = seen.emplace(documents[d].metadata[c], static_cast<std::uint32_t>(seen.size()));
    labels[d] = it->second;
  }
  return labels;
}

DocumentTable document_table(const Corpus& corpus) {
  DocumentTable table;
  table.groups = corpus.groups;
  table.metadata_columns = corpus.metadata_columns;
  table.documents.reserve(corpus.num_documents());
  for (const auto& doc : corpus.documents) {
    DocumentInfo info;
    info.id = doc.id;
    info.group = doc.group == kNoGroup || doc.group >= corpus.groups.size() ? "" : corpus.groups[doc.group];
    info.role = doc.role;
    info.metadata = doc.metadata;
    table.documents.push_back(std::move(info));
  }
  return table;
}

DocumentTable document_table(const Model& model) {
  DocumentTable table;
  table.groups = model.groups;
  table.documents.reserve(model.num_documents());
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    DocumentInfo info;
    info.id = model.document_ids[d];
    info.group = model.group_name(d);
    info.role = d < model.document_roles.size() ? model.document_roles[d] : DocumentRole::known;
    table.documents.push_back(std::move(info));
  }
  return table;
}

ProfileMatrix chain_profiles(const Model& model, std::size_t chain) {
  const auto n = static_cast<Eigen::Index>(model.num_documents());
  const auto k = static_cast<Eigen::Index>(model.topic_count());
  ProfileMatrix theta(n, k);
  for (Eigen::Index d = 0; d < n; ++d) {
    const auto row = model.theta(chain, static_cast<std::size_t>(d));
    for (Eigen::Index t = 0; t < k; ++t) theta(d, t) = static_cast<double>(row[static_cast<std::size_t>(t)]);
  }
  return theta;
}

void check_profiles(const ProfileMatrix& theta, const std::string& where) {
  if (theta.rows() < 2) {
    throw Error(where + ": " + std::to_string(theta.rows()) +
                " document(s); a similarity graph needs at least 2. Fit the model on more documents.");
  }
  if (theta.cols() < 1) throw Error(where + ": the topic profiles have no topics.");
  for (Eigen::Index d = 0; d < theta.rows(); ++d) {
    double sum = 0;
    for (Eigen::Index t = 0; t < theta.cols(); ++t) {
      const double v = theta(d, t);
      if (!std::isfinite(v) || v < 0) {
        throw Error(where + ": document " + std::to_string(d) + " has topic share " + std::to_string(v) + " at topic " +
                    std::to_string(t) + "; shares must be finite and non-negative.");
      }
      sum += v;
    }
    if (std::abs(sum - 1.0) > 1e-4) {
      throw Error(where + ": the topic shares of document " + std::to_string(d) + " sum to " + std::to_string(sum) +
                  ", not 1. Pass topic profiles (theta) whose rows are distributions.");
    }
  }
}

std::vector<std::uint32_t> top_topics(const ProfileMatrix& theta) {
  std::vector<std::uint32_t> top(static_cast<std::size_t>(theta.rows()), 0);
  for (Eigen::Index d = 0; d < theta.rows(); ++d) {
    Eigen::Index best = 0;
    for (Eigen::Index t = 1; t < theta.cols(); ++t) {
      if (theta(d, t) > theta(d, best)) best = t;
    }
    top[static_cast<std::size_t>(d)] = static_cast<std::uint32_t>(best);
  }
  return top;
}

}  // namespace loupe

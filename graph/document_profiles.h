// The plain data the graph stage works on: topic profiles (theta, documents x
// topics, rows summing to 1) and, per document, its id, group, role and
// metadata. Built from a Corpus or a Model, so graph code needs neither's API.
#pragma once

#include <cstddef>
#include <cstdint>
#include <string>
#include <vector>

#include <Eigen/Dense>

#include "corpus/corpus.h"
#include "model/model.h"

namespace loupe {

// Documents x topics, row-major so a document's shares lie together. The same
// type as analysis' TopicMatrix.
using ProfileMatrix = Eigen::Matrix<double, Eigen::Dynamic, Eigen::Dynamic, Eigen::RowMajor>;

struct DocumentInfo {
  std::string id;
  std::string group;  // "" when the document has none (e.g. disputed)
  DocumentRole role = DocumentRole::known;
  std::vector<std::string> metadata;  // aligned with DocumentTable::metadata_columns
};

struct DocumentTable {
  std::vector<std::string> groups;            // group names, sorted (index = group label)
  std::vector<std::string> metadata_columns;  // empty when only the model is known
  std::vector<DocumentInfo> documents;

  std::size_t size() const { return documents.size(); }
  // Group label per document: index into groups, kNoGroup for none.
  std::vector<std::uint32_t> group_labels() const;
  // Labels of a metadata column's values (first seen = 0, 1, ...), e.g. for
  // strata. Throws loupe::Error naming the column and the known ones when absent.
  std::vector<std::uint32_t> metadata_labels(const std::string& column) const;
};

DocumentTable document_table(const Corpus& corpus);
DocumentTable document_table(const Model& model);

// theta of one chain of a model as doubles (D x K).
ProfileMatrix chain_profiles(const Model& model, std::size_t chain);

// Checks that theta has at least 2 rows and 1 column, no negative or
// non-finite entry, and rows summing to 1 within 1e-4 (float32 models).
// Throws loupe::Error naming `where` and the first bad row.
void check_profiles(const ProfileMatrix& theta, const std::string& where);

// The most probable topic of each document (lowest index on ties).
std::vector<std::uint32_t> top_topics(const ProfileMatrix& theta);

}  // namespace loupe

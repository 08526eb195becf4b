#include "analysis/group_comparison.h"

#include "analysis/strata.h"
#include "analysis/topic_alignment.h"
#include "common/error.h"

namespace loupe {

std::vector<TestRecord> GroupComparison::all_records() const {
  std::vector<TestRecord> records;
  for (const auto& chain : chains) records.insert(records.end(), chain.records.begin(), chain.records.end());
  return records;
}

GroupedDocuments grouped_documents(const Model& model, std::size_t chain, const Corpus* corpus,
                                   const GroupComparisonOptions& options) {
  const std::size_t n = model.num_documents();
  const std::size_t topics = model.topic_count();
  if (chain >= model.chains.size()) {
    throw Error("the model has " + std::to_string(model.chains.size()) + " chains; there is no chain " +
                std::to_string(chain));
  }
  if (corpus != nullptr && corpus->num_documents() != n) {
    throw Error("the corpus has " + std::to_string(corpus->num_documents()) + " documents but the model " +
                std::to_string(n) + "; use the corpus the model was fitted on");
  }
  GroupedDocuments data;
  data.theta.resize(static_cast<Eigen::Index>(n), static_cast<Eigen::Index>(topics));
  for (std::size_t d = 0; d < n; ++d) {
    const auto shares = model.theta(chain, d);
    for (std::size_t k = 0; k < topics; ++k) {
      data.theta(static_cast<Eigen::Index>(d), static_cast<Eigen::Index>(k)) = static_cast<double>(shares[k]);
    }
  }
  data.group_names = model.groups;
  data.groups.resize(n, kLeftOut);
  for (std::size_t d = 0; d < n; ++d) {
    const auto group = model.document_groups[d];
    const bool disputed = d < model.document_roles.size() && model.document_roles[d] == DocumentRole::disputed;
    if (group == kNoGroup || (disputed && !options.include_disputed)) continue;
    data.groups[d] = static_cast<int>(group);
  }
  if (!options.strata_column.empty()) {
    if (corpus == nullptr) {
      throw Error("permutations within strata of '" + options.strata_column +
                  "' need the corpus file the model was fitted on, which holds the metadata columns");
    }
    std::vector<std::vector<std::string>> rows;
    rows.reserve(n);
    for (const auto& document : corpus->documents) rows.push_back(document.metadata);
    auto strata = strata_from_metadata(options.strata_column, corpus->metadata_columns, rows);
    data.strata = std::move(strata.labels);
    data.strata_name = options.strata_column;
  }
  if (options.tests.weight_by_length) {
    if (corpus == nullptr) {
      throw Error("weighting documents by length needs the corpus file the model was fitted on");
    }
    for (std::size_t d = 0; d < n; ++d) data.lengths.push_back(static_cast<double>(corpus->document_length(d)));
  }
  return data;
}

GroupComparison compare_groups(const Model& model, const Corpus* corpus, const GroupComparisonOptions& options) {
  if (model.chains.empty()) throw Error("the model has no chains to compare groups with");
  GroupComparison comparison;
  comparison.strata_column = options.strata_column;
  for (std::size_t d = 0; d < model.num_documents(); ++d) {
    const bool disputed = d < model.document_roles.size() && model.document_roles[d] == DocumentRole::disputed;
    if (model.document_groups[d] == kNoGroup) {
      ++comparison.without_group;
    } else if (disputed && !options.include_disputed) {
      ++comparison.disputed_left_out;
    } else {
      ++comparison.documents_compared;
    }
  }
  ChainAlignment alignment;
  comparison.topics_aligned = options.align_topics && model.chains.size() >= 2;
  if (comparison.topics_aligned) alignment = align_chains(model);
  for (std::size_t chain = 0; chain < model.chains.size(); ++chain) {
    auto data = grouped_documents(model, chain, corpus, options);
    // Chain 1 is the reference, so its topics keep their numbers.
    if (comparison.topics_aligned && chain > 0) data.theta = aligned_theta(model, alignment, chain);
    comparison.chains.push_back(run_group_tests(data, options.tests, static_cast<int>(chain)));
  }
  std::vector<TestRecord> summarised;
  for (const auto& r : comparison.all_records()) {
    if (r.topic < 0 || comparison.topics_aligned) summarised.push_back(r);
  }
  comparison.summaries = summarize_by_test(summarised, options.level);
  return comparison;
}

nlohmann::json to_json(const GroupComparison& comparison) {
  auto chains = nlohmann::json::array();
  for (const auto& chain : comparison.chains) {
    auto extra = nlohmann::json::array();
    for (const double v : chain.mean_distance_to_centroid) extra.push_back(v);
    chains.push_back({{"chain", chain.chain + 1},
                      {"profiles", to_json(chain.profiles)},
                      {"mean_distance_to_centroid", extra},
                      {"records", to_json(chain.records)}});
  }
  auto summaries = nlohmann::json::array();
  for (const auto& s : comparison.summaries) summaries.push_back(to_json(s));
  return {{"documents_compared", comparison.documents_compared},
          {"disputed_left_out", comparison.disputed_left_out},
          {"without_group", comparison.without_group},
          {"strata", comparison.strata_column},
          {"topics_aligned", comparison.topics_aligned},
          {"across_chains", summaries},
          {"chains", chains}};
}

}  // namespace loupe

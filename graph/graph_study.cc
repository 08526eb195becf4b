#include "graph/graph_study.h"

#include <algorithm>
#include <cmath>
#include <map>
#include <sstream>

#include "graph/graph_export.h"
#include "graph/graph_layout.h"
#include "graph/hellinger_neighbours.h"

namespace loupe {

std::string describe_graph_construction(const GraphStudyOptions& options) {
  if (options.threshold_graph) {
    std::ostringstream text;
    text << "Hellinger distance <= " << options.max_distance;
    return text.str();
  }
  return "k = " + std::to_string(options.neighbours) + " nearest neighbours (" +
         (options.mutual ? "mutual" : "either") + ")";
}

GraphStudy build_graph_study(const Model& model, const std::string& model_name, const DocumentTable& table,
                             const GraphStudyOptions& options, const GraphStudyProgress& progress) {
  GroupMixingOptions mixing;
  mixing.permutations = options.permutations;
  mixing.seed = options.seed;
  mixing.threads = options.threads;
  mixing.processes = options.processes;
  if (!options.strata.empty()) {
    mixing.strata = table.metadata_labels(options.strata);
    mixing.strata_name = options.strata;
  }
  const auto groups = table.group_labels();
  std::map<std::uint32_t, std::size_t> group_sizes;
  for (const auto g : groups)
    if (g != kNoGroup) ++group_sizes[g];
  GraphStudy study;
  study.groups_with_documents = group_sizes.size();
  study.can_test = group_sizes.size() >= 2 && options.permutations > 0;
  study.construction = describe_graph_construction(options);

  NeighbourOptions neighbour_options;
  neighbour_options.threads = options.threads;
  for (std::size_t c = 0; c < model.chains.size(); ++c) {
    neighbour_options.progress = [&](std::size_t done, std::size_t total) {
      if (progress) progress(c, done, total);
    };
    const ProfileMatrix theta = chain_profiles(model, c);
    check_profiles(theta, model_name + " chain " + std::to_string(c));
    const auto edges = options.threshold_graph
                           ? pairs_within_distance(theta, options.max_distance, neighbour_options)
                           : neighbour_edges(nearest_neighbours(theta, options.neighbours, neighbour_options),
                                             options.mutual ? NeighbourRule::mutual : NeighbourRule::either);
    DocumentGraph graph = make_document_graph(table, edges, top_topics(theta), study.construction);
    GraphChainResult r;
    r.chain = c;
    r.edges = edges.size();
    r.components = label_components(graph);
    std::vector<std::size_t> sizes(r.components, 0);
    for (std::size_t v = 0; v < boost::num_vertices(graph); ++v) {
      ++sizes[graph[v].component];
      if (boost::degree(v, graph) == 0) ++r.isolated;
    }
    r.largest_component = sizes.empty() ? 0 : *std::max_element(sizes.begin(), sizes.end());
    const WeightedAdjacency flat = weighted_adjacency(graph);
    LouvainOptions louvain;
    louvain.seed = options.seed;
    louvain.resolution = options.resolution;
    r.louvain = louvain_communities(flat, louvain);
    for (std::size_t v = 0; v < r.louvain.community.size(); ++v) graph[v].community = r.louvain.community[v];
    if (study.can_test && !edges.empty()) {
      r.mixing = test_group_mixing(flat, groups, mixing);
      r.tested = true;
    }
    study.chains.push_back(std::move(r));
    if (c + 1 == options.chain) study.exported = std::move(graph);
  }
  return study;
}

nlohmann::json graph_chain_json(const GraphChainResult& r, const DocumentTable& table) {
  nlohmann::json j = {{"chain", r.chain + 1},
                      {"edges", r.edges},
                      {"components", r.components},
                      {"largest_component", r.largest_component},
                      {"isolated_documents", r.isolated},
                      {"communities", r.louvain.num_communities},
                      {"louvain_modularity", std::isnan(r.louvain.modularity) ? nlohmann::json(nullptr)
                                                                              : nlohmann::json(r.louvain.modularity)},
                      {"louvain_levels", r.louvain.levels},
                      {"louvain_seed", r.louvain.seed}};
  if (r.tested) {
    nlohmann::json shares = nlohmann::json::object();
    for (std::size_t g = 0; g < table.groups.size() && g < r.mixing.group_share.size(); ++g) {
      const double s = r.mixing.group_share[g];
      shares[table.groups[g]] = std::isnan(s) ? nlohmann::json(nullptr) : nlohmann::json(s);
    }
    j["group_tests"] = {r.mixing.modularity.to_json(), r.mixing.same_group_share.to_json()};
    j["same_group_share_by_group"] = shares;
  }
  return j;
}

nlohmann::json graph_study_json(const GraphStudy& study, const DocumentTable& table, const GraphStudyOptions& options,
                                const std::string& model_path, const std::string& corpus_path) {
  const std::size_t n = boost::num_vertices(study.exported);
  nlohmann::json chains = nlohmann::json::array();
  for (const auto& r : study.chains) chains.push_back(graph_chain_json(r, table));
  return {{"command", "graph"},
          {"model", model_path},
          {"corpus", corpus_path.empty() ? nlohmann::json(nullptr) : nlohmann::json(corpus_path)},
          {"documents", n},
          {"construction", study.construction},
          {"distance", "Hellinger, H = sqrt(1 - sum_k sqrt(theta_ik theta_jk)); edge weight 1 - H"},
          {"seed", options.seed},
          {"permutations", options.permutations},
          {"strata", options.strata.empty() ? nlohmann::json(nullptr) : nlohmann::json(options.strata)},
          {"resolution", options.resolution},
          {"exported_chain", options.chain},
          {"layout",
           n <= kMaxLayoutDocuments ? "Fruchterman-Reingold" : "none (too many documents; see the summary graph)"},
          {"chains", chains},
          {"note",
           "Topic similarity reflects subject matter more than authorship or style; these results are statistical "
           "evidence, not proof."}};
}

std::string graph_tests_csv(const GraphStudy& study) {
  std::string out =
      "chain,method,statistic_name,sample_size,groups,statistic,null_mean,null_sd,effect,p_value,permutations,seed,"
      "strata\n";
  for (const auto& r : study.chains) {
    if (!r.tested) continue;
    for (const PermutationTest* t : {&r.mixing.modularity, &r.mixing.same_group_share}) {
      out += std::to_string(r.chain + 1) + "," + csv_cell(t->method) + "," + csv_cell(t->statistic_name) + "," +
             std::to_string(t->sample_size) + "," + std::to_string(t->groups) + "," +
             nlohmann::json(t->statistic).dump() + "," + nlohmann::json(t->null_mean).dump() + "," +
             nlohmann::json(t->null_sd).dump() + "," + nlohmann::json(t->effect).dump() + "," +
             nlohmann::json(t->p_value).dump() + "," + std::to_string(t->permutations) + "," + std::to_string(t->seed) +
             "," + csv_cell(t->strata) + "\n";
    }
  }
  return out;
}

}  // namespace loupe

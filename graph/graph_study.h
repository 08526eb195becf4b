// The similarity-graph stage in one call: the graph of every chain of a model (k nearest neighbours or a
// distance threshold on Hellinger distance), its components, Louvain communities and group-mixing tests,
// and the JSON and CSV that `loupe graph` and `loupe analyze` write from it.
#pragma once

#include <cstddef>
#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include <nlohmann/json.hpp>

#include "graph/document_graph.h"
#include "graph/document_profiles.h"
#include "graph/group_mixing.h"
#include "graph/louvain.h"
#include "model/model.h"

namespace loupe {

struct GraphStudyOptions {
  std::size_t neighbours = 10;
  double max_distance = 0;
  bool threshold_graph = false;  // join pairs within max_distance instead of neighbours
  bool mutual = false;           // with neighbours: keep an edge only when each is among the other's k nearest
  std::size_t chain = 1;         // the chain kept in GraphStudy::exported, numbered from 1
  std::size_t permutations = 999;
  std::uint64_t seed = 1;  // permutations, Louvain's visiting order (and the layout callers draw)
  std::string strata;      // a metadata column of the table; "" = free permutations
  double resolution = 1.0;
  std::size_t threads = 0;  // 0: all cores; never changes the result
  // Several processes (MPI ranks) share the group-mixing permutations; null: this process alone.
  ProcessGroup* processes = nullptr;
};

struct GraphChainResult {
  std::size_t chain = 0;  // 0-based
  std::size_t edges = 0;
  std::size_t components = 0;
  std::size_t largest_component = 0;
  std::size_t isolated = 0;
  LouvainResult louvain;
  bool tested = false;  // group tests ran (two groups or more, permutations, edges)
  GroupMixingResult mixing;
};

struct GraphStudy {
  std::string construction;  // e.g. "k = 10 nearest neighbours (either)"
  std::vector<GraphChainResult> chains;
  DocumentGraph exported;  // the graph of options.chain, components and communities set, not laid out
  std::size_t groups_with_documents = 0;
  bool can_test = false;  // at least two groups and permutations > 0
};

// "k = 10 nearest neighbours (either)" or "Hellinger distance <= 0.3".
std::string describe_graph_construction(const GraphStudyOptions& options);

// Called while distances are computed: chain (0-based), blocks done and total.
using GraphStudyProgress = std::function<void(std::size_t chain, std::size_t done, std::size_t total)>;

// Builds and tests the graph of every chain. The options must be valid for the model (the callers check them
// with their own option names); table is document_table() of the model or of its corpus. Throws loupe::Error
// for bad profiles (naming `model_name` and the chain) and for an unknown strata column.
GraphStudy build_graph_study(const Model& model, const std::string& model_name, const DocumentTable& table,
                             const GraphStudyOptions& options, const GraphStudyProgress& progress = {});

// One chain's summary: edges, components, communities and, when tested, "group_tests" and
// "same_group_share_by_group".
nlohmann::json graph_chain_json(const GraphChainResult& result, const DocumentTable& table);

// The whole stage as `loupe graph --json` writes it; corpus_path "" is written as null.
nlohmann::json graph_study_json(const GraphStudy& study, const DocumentTable& table, const GraphStudyOptions& options,
                                const std::string& model_path, const std::string& corpus_path);

// The group tests, one CSV row per test and chain (`loupe graph --csv`).
std::string graph_tests_csv(const GraphStudy& study);

}  // namespace loupe

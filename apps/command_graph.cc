// `loupe graph MODEL`: the document similarity graph of a fitted model (k
// nearest neighbours or a distance threshold on Hellinger distance), its
// components and Louvain communities, permutation tests of whether documents
// cluster by group (every chain), a layout, and GraphML / DOT / CSV files.
#include <cmath>
#include <iomanip>
#include <iostream>
#include <memory>
#include <string>
#include <utility>
#include <vector>

#include "analysis/chain_agreement.h"
#include "apps/commands.h"
#include "apps/mpi_session.h"
#include "apps/progress_bar.h"
#include "common/binary_io.h"
#include "common/error.h"
#include "corpus/corpus_file.h"
#include "graph/document_graph.h"
#include "graph/graph_export.h"
#include "graph/graph_layout.h"
#include "graph/graph_study.h"
#include "graph/group_mixing.h"
#include "graph/hellinger_neighbours.h"
#include "graph/louvain.h"
#include "model/model_file.h"

namespace loupe::cli {

void check_output_folder(const std::string& path, const std::string& option);  // command_near_duplicates.cc

namespace {

struct GraphArguments {
  std::string model;
  std::string corpus;
  std::size_t neighbours = 10;
  double max_distance = 0;
  bool threshold_graph = false;  // --max-distance given: threshold graph instead of kNN
  bool mutual = false;
  std::size_t chain = 1;  // numbered from 1, as `loupe topics` shows chains
  std::size_t permutations = 999;
  std::uint64_t seed = 1;
  double level = 0.05;
  std::string strata;
  double resolution = 1.0;
  std::size_t threads = 0;
  std::string summary_by = "community";
  std::string graphml, dot, edges_csv, nodes_csv, summary_graphml, json, csv;
  bool quiet = false;
};

void run_graph(GraphArguments& a) {
  for (const auto& [path, option] :
       std::vector<std::pair<std::string, std::string>>{{a.graphml, "--graphml"},
                                                        {a.dot, "--dot"},
                                                        {a.edges_csv, "--edges-csv"},
                                                        {a.nodes_csv, "--nodes-csv"},
                                                        {a.summary_graphml, "--summary-graphml"},
                                                        {a.json, "--json"},
                                                        {a.csv, "--csv"}}) {
    check_output_folder(path, option);
  }
  if (a.threshold_graph && !(a.max_distance > 0 && a.max_distance <= 1)) {
    throw Error("--max-distance must lie in (0, 1] (Hellinger distances run from 0 to 1), not " +
                std::to_string(a.max_distance) + ".");
  }
  const Model model = read_model(a.model);
  if (model.chains.empty()) throw Error(a.model + ": the model holds no chains. Fit it again.");
  if (a.chain < 1 || a.chain > model.chains.size()) {
    throw Error("--chain " + std::to_string(a.chain) + ": the model has " + std::to_string(model.chains.size()) +
                " chain(s), numbered from 1.");
  }
  if (model.num_documents() < 2) {
    throw Error(a.model + ": the model holds " + std::to_string(model.num_documents()) +
                " document(s); a similarity graph needs at least 2.");
  }
  if (!a.threshold_graph && a.neighbours >= model.num_documents()) {
    throw Error("--neighbours " + std::to_string(a.neighbours) + " must be below the number of documents (" +
                std::to_string(model.num_documents()) + "). Choose a smaller k.");
  }
  DocumentTable table;
  if (!a.corpus.empty()) {
    const Corpus corpus = read_corpus(a.corpus);
    check_model_matches(model, corpus, a.corpus);
    table = document_table(corpus);
  } else {
    table = document_table(model);
  }
  GraphStudyOptions options;
  options.neighbours = a.neighbours;
  options.max_distance = a.max_distance;
  options.threshold_graph = a.threshold_graph;
  options.mutual = a.mutual;
  options.chain = a.chain;
  options.permutations = a.permutations;
  options.seed = a.seed;
  options.resolution = a.resolution;
  options.threads = a.threads;
  options.processes = processes();  // under mpirun the processes share the group-mixing permutations
  if (!a.strata.empty()) {
    if (a.corpus.empty()) throw Error("--strata needs --corpus: metadata columns live in the corpus, not the model.");
    options.strata = a.strata;
  }
  std::unique_ptr<ProgressBar> bar;
  std::size_t bar_chain = model.chains.size();
  GraphStudy study =
      build_graph_study(model, a.model, table, options, [&](std::size_t c, std::size_t done, std::size_t total) {
        if (c != bar_chain) {
          if (bar) bar->finish();
          bar = std::make_unique<ProgressBar>("chain " + std::to_string(c) + ": distances",
                                              a.quiet || !is_main_process());
          bar_chain = c;
        }
        bar->update(static_cast<double>(done), static_cast<double>(total), "blocks");
      });
  if (bar) bar->finish();
  if (!is_main_process()) return;  // process 1 writes and prints
  const std::vector<GraphChainResult>& results = study.chains;
  DocumentGraph& exported = study.exported;
  const auto groups = table.group_labels();
  const bool can_test = study.can_test;
  const std::string& construction = study.construction;

  const std::size_t n = boost::num_vertices(exported);
  const bool laid_out = n <= kMaxLayoutDocuments;
  LayoutOptions layout;
  layout.seed = a.seed;
  if (laid_out && (!a.graphml.empty() || !a.dot.empty() || !a.nodes_csv.empty()))
    layout_document_graph(exported, layout);
  if (!a.graphml.empty()) write_graphml(exported, a.graphml);
  if (!a.dot.empty()) write_dot(exported, a.dot);
  if (!a.edges_csv.empty()) write_edge_csv(exported, a.edges_csv);
  if (!a.nodes_csv.empty()) write_node_csv(exported, a.nodes_csv);
  if (!a.summary_graphml.empty()) {
    std::vector<std::uint32_t> labels(n);
    std::vector<std::string> names;
    if (a.summary_by == "group") {
      // Documents without a group share one extra vertex, "(no group)".
      names = table.groups;
      names.push_back("(no group)");
      for (std::size_t v = 0; v < n; ++v)
        labels[v] = groups[v] == kNoGroup ? static_cast<std::uint32_t>(table.groups.size()) : groups[v];
    } else {
      labels = results[a.chain - 1].louvain.community;
    }
    SummaryGraph summary = summary_graph(exported, labels, names);
    layout_summary_graph(summary, layout);
    write_summary_graphml(summary, a.summary_graphml);
  }

  if (!a.json.empty()) {
    write_file_atomically(a.json, graph_study_json(study, table, options, a.model, a.corpus).dump(2) + "\n");
  }
  if (!a.csv.empty()) write_file_atomically(a.csv, graph_tests_csv(study));
  if (a.quiet) return;

  std::cout << "Similarity graph of " << a.model << ": " << format_count(n) << " documents, " << construction
            << ", edge weight 1 - Hellinger\n";
  std::cout << std::fixed << std::setprecision(3);
  for (const auto& r : results) {
    std::cout << "  chain " << r.chain + 1 << ": " << format_count(r.edges) << " edges, " << r.components
              << " component(s) (largest " << r.largest_component << ", " << r.isolated << " isolated), "
              << r.louvain.num_communities << " Louvain communities (Q = " << r.louvain.modularity << ")\n";
    if (r.tested) {
      for (const PermutationTest* t : {&r.mixing.modularity, &r.mixing.same_group_share}) {
        std::cout << "    " << std::left << std::setw(54) << t->statistic_name << std::right << t->statistic
                  << "  (chance " << t->null_mean << ", p = " << std::setprecision(4) << t->p_value
                  << std::setprecision(3) << ")\n";
      }
    }
  }
  // Each group test's conclusion across chains: above chance at the level, or not, on how many chains.
  std::vector<std::string> modularity_conclusions, share_conclusions;
  for (const auto& r : results) {
    if (!r.tested) continue;
    const auto conclude = [&](const PermutationTest& t) {
      const bool above = std::isfinite(t.p_value) && t.p_value <= a.level && t.statistic > t.null_mean;
      return above ? "above chance" : "not above chance";
    };
    modularity_conclusions.emplace_back(conclude(r.mixing.modularity));
    share_conclusions.emplace_back(conclude(r.mixing.same_group_share));
  }
  if (results.size() > 1 && !share_conclusions.empty()) {
    std::cout << "  across chains (p <= " << std::defaultfloat << a.level << std::fixed << "):\n";
    for (const auto& [name, conclusions] :
         {std::pair{std::string("modularity of the groups"), &modularity_conclusions},
          std::pair{std::string("share of neighbours in the own group"), &share_conclusions}}) {
      const ModalConclusion modal = modal_conclusion(*conclusions);
      std::cout << "    " << std::left << std::setw(40) << name << std::right << modal.conclusion << " on "
                << describe_backing(modal.backing, results.size()) << " (" << agreement_label(modal.agreement) << ")\n";
    }
  }
  if (can_test) {
    std::cout << "  p-values: " << a.permutations << " permutations of the group labels"
              << (a.strata.empty() ? "" : " within " + a.strata) << ", seed " << a.seed << "\n";
  } else if (study.groups_with_documents < 2) {
    std::cout << "  (no group tests: the documents come from fewer than 2 groups)\n";
  }
  if (!laid_out) {
    std::cout << "  (no document layout above " << kMaxLayoutDocuments
              << " documents: use --summary-graphml for a community-level drawing)\n";
  }
  for (const auto& path : {a.graphml, a.dot, a.edges_csv, a.nodes_csv, a.summary_graphml, a.json, a.csv}) {
    if (!path.empty()) std::cout << "Wrote " << path << "\n";
  }
}

}  // namespace

void add_graph_command(CLI::App& app) {
  auto args = std::make_shared<GraphArguments>();
  auto* cmd =
      app.add_subcommand("graph",
                         "Build the document similarity graph of a model: neighbours, communities, group "
                         "tests, GraphML.\n"
                         "  Example: loupe graph letters.model --corpus letters.corpus --graphml letters.graphml");
  cmd->add_option("MODEL", args->model, "A model file written by `loupe fit`")->required()->check(CLI::ExistingFile);
  cmd->add_option("--corpus", args->corpus, "The corpus the model was fitted on: adds metadata and allows --strata")
      ->check(CLI::ExistingFile);
  auto* k = cmd->add_option("-k,--neighbours", args->neighbours, "Join each document to its k nearest (Hellinger)")
                ->capture_default_str()
                ->check(CLI::PositiveNumber);
  auto* limit =
      cmd->add_option("--max-distance", args->max_distance,
                      "Instead of neighbours: join every pair with Hellinger distance at most this, in (0, 1]");
  k->excludes(limit);
  cmd->add_flag("--mutual", args->mutual, "With neighbours: keep an edge only when each is among the other's k nearest")
      ->excludes(limit);
  cmd->add_option("--chain", args->chain, "The chain whose graph is written to files (tests run on every chain)")
      ->capture_default_str();
  cmd->add_option("--permutations", args->permutations, "Permutations for the group tests (0: no tests)")
      ->capture_default_str();
  cmd->add_option("--level", args->level, "A group test finds clustering on a chain when p is at or below this")
      ->check(CLI::Range(1e-9, 0.5))
      ->capture_default_str();
  cmd->add_option("--seed", args->seed, "Seed of the permutations, of Louvain's visiting order and of the layout")
      ->capture_default_str();
  cmd->add_option("--strata", args->strata, "Shuffle group labels only within the values of this metadata column");
  cmd->add_option("--resolution", args->resolution, "Louvain resolution (above 1: smaller communities)")
      ->capture_default_str()
      ->check(CLI::PositiveNumber);
  cmd->add_option("--threads", args->threads, "Worker threads (0: all cores); never changes the result")
      ->capture_default_str();
  cmd->add_option("--graphml", args->graphml, "Write the graph as GraphML");
  cmd->add_option("--dot", args->dot, "Write the graph as DOT (Graphviz)");
  cmd->add_option("--edges-csv", args->edges_csv, "Write the edge list as CSV");
  cmd->add_option("--nodes-csv", args->nodes_csv, "Write the documents with component, community and position as CSV");
  cmd->add_option("--summary-graphml", args->summary_graphml,
                  "Write a summary graph (one vertex per community or group) as GraphML");
  cmd->add_option("--summary-by", args->summary_by, "What a summary vertex stands for")
      ->check(CLI::IsMember({"community", "group"}))
      ->capture_default_str();
  cmd->add_option("--json", args->json, "Write the results of every chain as JSON");
  cmd->add_option("--csv", args->csv, "Write the group tests (one row per test and chain) as CSV");
  cmd->add_flag("-q,--quiet", args->quiet, "Print nothing but errors");
  cmd->callback([args, limit] {
    args->threshold_graph = limit->count() > 0;
    run_graph(*args);
  });
}

}  // namespace loupe::cli

#include "graph/graph_export.h"

#include <filesystem>
#include <set>
#include <sstream>

#include <gtest/gtest.h>
#include <nlohmann/json.hpp>

#include "common/binary_io.h"
#include "common/error.h"
#include "graph/group_mixing.h"
#include "graph/louvain.h"
#include "graph_test_support.h"
#include "support/temp_folder.h"

namespace loupe {
namespace {

DocumentGraph small_graph() {
  DocumentTable table;
  table.groups = {"north", "south"};
  table.metadata_columns = {"year", "clerk name", "id"};
  table.documents = {{"a,1", "north", DocumentRole::known, {"1880", "Ann \"the\" clerk", "x"}},
                     {"b<2>", "south", DocumentRole::known, {"1881", "Bo", "y"}},
                     {"c", "", DocumentRole::disputed, {"1882", "", "z"}}};
  DocumentGraph graph = make_document_graph(table, {{0, 1, 0.25}, {1, 2, 0.5}}, {3, 1, 0}, "test graph");
  label_components(graph);
  graph[0].community = 0;
  graph[1].community = 0;
  return graph;
}

TEST(GraphExportTest, GraphmlCarriesEveryAttributeEscaped) {
  const std::string xml = graphml_text(small_graph());
  EXPECT_NE(xml.find("attr.name=\"id\" attr.type=\"string\""), std::string::npos) << xml;
  EXPECT_NE(xml.find("attr.name=\"community\" attr.type=\"int\""), std::string::npos);
  EXPECT_NE(xml.find("attr.name=\"weight\" attr.type=\"double\""), std::string::npos);
  EXPECT_NE(xml.find("attr.name=\"distance\" attr.type=\"double\""), std::string::npos);
  EXPECT_NE(xml.find("attr.name=\"clerk_name\""), std::string::npos);   // metadata column, made a plain name
  EXPECT_NE(xml.find("attr.name=\"metadata_id\""), std::string::npos);  // would clash with id
  EXPECT_NE(xml.find("b&lt;2&gt;"), std::string::npos);                 // document id escaped
  EXPECT_NE(xml.find(">0.75<"), std::string::npos);                     // weight 1 - 0.25
  EXPECT_NE(xml.find(">-1<"), std::string::npos);                       // unassigned community
  EXPECT_NE(xml.find("edgedefault=\"undirected\""), std::string::npos);
}

TEST(GraphExportTest, CsvAndDot) {
  const DocumentGraph graph = small_graph();
  const std::string edges = edge_csv_text(graph);
  EXPECT_EQ(edges, "source,target,distance,weight\n\"a,1\",b<2>,0.25,0.75\nb<2>,c,0.5,0.5\n");
  const std::string nodes = node_csv_text(graph);
  std::istringstream lines(nodes);
  std::string header, first;
  std::getline(lines, header);
  std::getline(lines, first);
  EXPECT_EQ(header, "id,group,role,component,community,top_topic,x,y,degree,year,clerk name,id");
  EXPECT_EQ(first, "\"a,1\",north,known,0,0,3,0,0,1,1880,\"Ann \"\"the\"\" clerk\",x");
  const std::string dot = dot_text(graph);
  EXPECT_NE(dot.find("graph G {"), std::string::npos) << dot;
  EXPECT_NE(dot.find("--"), std::string::npos);
  EXPECT_NE(dot.find("similarity"), std::string::npos);
  EXPECT_NE(dot.find("\"b<2>\""), std::string::npos);
}

TEST(GraphExportTest, UnwritablePathIsAClearError) {
  const DocumentGraph graph = small_graph();
  testing::TempFolder folder("graph-export");
  const std::string missing = folder.file("no/such/folder/graph.graphml");
  try {
    write_graphml(graph, missing);
    FAIL() << "wrote into a missing folder";
  } catch (const Error& e) {
    EXPECT_NE(std::string(e.what()).find(missing), std::string::npos) << e.what();
  }
  const std::string good = folder.file("graph.graphml");
  write_graphml(graph, good);
  write_edge_csv(graph, folder.file("edges.csv"));
  EXPECT_EQ(read_whole_file(good), graphml_text(graph));
}

// Outside reference: networkx (Debian python3-networkx) reads our GraphML
// (read_graphml) and computes connected_components and community.modularity;
// both must equal loupe's, and loupe's Louvain modularity must be at least
// that of networkx's louvain_communities minus 0.01 on the same graph.
TEST(GraphExportReferenceTest, ComponentsAndModularityEqualNetworkx) {
  testing::TempFolder folder("graph-networkx");
  struct Case {
    std::size_t n, groups, k;
    NeighbourRule rule;
  };
  for (const Case& c : {Case{600, 4, 8, NeighbourRule::either}, Case{400, 5, 2, NeighbourRule::mutual}}) {
    const ProfileMatrix theta = test::clustered_profiles(c.n, c.groups, 2, 31 + c.n);
    const auto edges = neighbour_edges(nearest_neighbours(theta, c.k), c.rule);
    const DocumentTable table = test::numbered_documents(c.n, c.groups);
    DocumentGraph graph = make_document_graph(table, edges, top_topics(theta), "reference");
    const std::size_t components = label_components(graph);
    const WeightedAdjacency flat = weighted_adjacency(graph);
    LouvainOptions options;
    options.seed = 5;
    const LouvainResult louvain = louvain_communities(flat, options);
    for (std::size_t v = 0; v < c.n; ++v) graph[v].community = louvain.community[v];
    const std::string path = folder.file("graph.graphml");
    write_graphml(graph, path);

    const auto reference = test::run_python_reference("networkx_graph.py", test::shell_quote(path) + " 5");
    ASSERT_EQ(reference.exit_code, 0) << reference.output;
    const auto theirs = nlohmann::json::parse(reference.output);
    EXPECT_EQ(theirs["nodes"], c.n);
    EXPECT_EQ(theirs["edges"], edges.size());
    EXPECT_EQ(theirs["components"].size(), components);
    // The same partition into components, compared as sets of document ids.
    std::set<std::set<std::string>> mine_components, their_components;
    std::vector<std::set<std::string>> by_label(components);
    for (std::size_t v = 0; v < c.n; ++v) by_label[graph[v].component].insert(graph[v].id);
    mine_components.insert(by_label.begin(), by_label.end());
    for (const auto& component : theirs["components"]) their_components.insert(component.get<std::set<std::string>>());
    EXPECT_EQ(mine_components, their_components);
    EXPECT_NEAR(theirs["modularity_of_loupe_communities"].get<double>(), louvain.modularity, 1e-9);
    EXPECT_NEAR(theirs["modularity_of_groups"].get<double>(), group_modularity(flat, table.group_labels()), 1e-9);
    EXPECT_GE(louvain.modularity, theirs["networkx_louvain_modularity"].get<double>() - 0.01)
        << "networkx found " << theirs["networkx_louvain_communities"] << " communities, loupe "
        << louvain.num_communities;
  }
}

}  // namespace
}  // namespace loupe

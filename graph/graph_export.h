// Writing a document graph for other tools: GraphML (open standard, read by
// the common network tools), DOT (Graphviz) and CSV edge and node lists. All
// writes are atomic (temporary file, then rename).
#pragma once

#include <string>

#include "graph/document_graph.h"
#include "graph/graph_layout.h"

namespace loupe {

// Node attributes: id, group, role, component, community, top_topic, x, y and
// one string attribute per metadata column (named after the column, prefixed
// "metadata_" when it would clash); unassigned component/community are -1.
// Edge attributes: weight (1 - H) and distance (H). Graph attribute: construction.
// Doubles are written in full (shortest round-trip form).
std::string graphml_text(const DocumentGraph& graph);
// DOT: nodes named by document id; edge attributes `similarity` (1 - H; DOT's
// own `weight` is an integer in Graphviz's dot) and `distance`; pos="x,y".
std::string dot_text(const DocumentGraph& graph);
// CSV (RFC 4180 quoting): source,target,distance,weight with document ids.
std::string edge_csv_text(const DocumentGraph& graph);
// CSV: id,group,role,component,community,top_topic,x,y,degree, then metadata columns.
std::string node_csv_text(const DocumentGraph& graph);
// GraphML of a summary graph: name, label, documents, main_group,
// main_group_share, x, y; edges weight and edges.
std::string summary_graphml_text(const SummaryGraph& graph);

// Each writes its text to PATH atomically; throws loupe::Error naming PATH.
void write_graphml(const DocumentGraph& graph, const std::string& path);
void write_dot(const DocumentGraph& graph, const std::string& path);
void write_edge_csv(const DocumentGraph& graph, const std::string& path);
void write_node_csv(const DocumentGraph& graph, const std::string& path);
void write_summary_graphml(const SummaryGraph& graph, const std::string& path);

// One CSV field, quoted when it holds a comma, quote, CR or LF.
std::string csv_cell(const std::string& text);

}  // namespace loupe

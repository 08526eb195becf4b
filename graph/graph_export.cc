#include "graph/graph_export.h"

#include <charconv>
#include <set>
#include <sstream>
#include <utility>

#include "common/binary_io.h"
#include "common/markup_escape.h"

namespace loupe {

namespace {

// Attribute names go into XML and DOT: keep letters, digits, '_', '-', '.'.
std::string attribute_name(const std::string& column, const std::set<std::string>& taken) {
  std::string name;
  for (const char c : column) {
    const bool plain =
        (c >= 'a' && c <= 'z') || (c >= 'A' && c <= 'Z') || (c >= '0' && c <= '9') || c == '_' || c == '-' || c == '.';
    name += plain ? c : '_';
  }
  if (name.empty() || taken.count(name)) name = "metadata_" + name;
  while (taken.count(name)) name += "_";
  return name;
}

// Shortest text that reads back as the same double.
std::string number(double value) {
  char buffer[32];
  const auto result = std::to_chars(buffer, buffer + sizeof buffer, value);
  return std::string(buffer, result.ptr);
}

int signed_label(std::uint32_t label) { return label == kUnassigned ? -1 : static_cast<int>(label); }

// A DOT ID: always quoted, with quotes and backslashes escaped.
std::string dot_id(const std::string& text) {
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"' || c == '\\') out += '\\';
    out += c == '\n' ? ' ' : c;
  }
  return out + "\"";
}

// GraphML (graphml.graphdrawing.org): keys declared first, then nodes n0..,
// then edges, each with its data values as text. Written by hand rather than
// with Boost's write_graphml, which prints doubles with only 6 significant digits.
class GraphmlWriter {
 public:
  struct Key {
    std::string name;
    std::string type;  // "string", "int", "double"
  };
  GraphmlWriter(std::vector<Key> graph_keys, std::vector<Key> node_keys, std::vector<Key> edge_keys)
      : graph_keys_(std::move(graph_keys)), node_keys_(std::move(node_keys)), edge_keys_(std::move(edge_keys)) {
    out_ +=
        "<?xml version=\"1.0\" encoding=\"UTF-8\"?>\n"
        "<graphml xmlns=\"http://graphml.graphdrawing.org/xmlns\" "
        "xmlns:xsi=\"http://www.w3.org/2001/XMLSchema-instance\" "
        "xsi:schemaLocation=\"http://graphml.graphdrawing.org/xmlns "
        "http://graphml.graphdrawing.org/xmlns/1.0/graphml.xsd\">\n";
    declare("graph", "g", graph_keys_);
    declare("node", "v", node_keys_);
    declare("edge", "e", edge_keys_);
    out_ +=
        "  <graph id=\"G\" edgedefault=\"undirected\" parse.nodeids=\"canonical\" parse.edgeids=\"canonical\" "
        "parse.order=\"nodesfirst\">\n";
  }
  void graph_data(const std::vector<std::string>& values) { data("    ", "g", values); }
  void node(std::size_t index, const std::vector<std::string>& values) {
    out_ += "    <node id=\"n" + std::to_string(index) + "\">\n";
    data("      ", "v", values);
    out_ += "    </node>\n";
  }
  void edge(std::size_t source, std::size_t target, const std::vector<std::string>& values) {
    out_ += "    <edge id=\"e" + std::to_string(edges_++) + "\" source=\"n" + std::to_string(source) + "\" target=\"n" +
            std::to_string(target) + "\">\n";
    data("      ", "e", values);
    out_ += "    </edge>\n";
  }
  std::string finish() {
    out_ += "  </graph>\n</graphml>\n";
    return std::move(out_);
  }

 private:
  void declare(const char* domain, const char* prefix, const std::vector<Key>& keys) {
    for (std::size_t k = 0; k < keys.size(); ++k) {
      out_ += "  <key id=\"" + std::string(prefix) + std::to_string(k) + "\" for=\"" + domain + "\" attr.name=\"" +
              escape_markup(keys[k].name) + "\" attr.type=\"" + keys[k].type + "\" />\n";
    }
  }
  void data(const char* indent, const char* prefix, const std::vector<std::string>& values) {
    for (std::size_t k = 0; k < values.size(); ++k) {
      out_ += std::string(indent) + "<data key=\"" + prefix + std::to_string(k) + "\">" + escape_markup(values[k]) +
              "</data>\n";
    }
  }
  std::vector<Key> graph_keys_, node_keys_, edge_keys_;
  std::string out_;
  std::size_t edges_ = 0;
};

std::vector<std::string> metadata_attribute_names(const DocumentGraph& graph) {
  std::set<std::string> taken = {"id", "group", "role", "component", "community", "top_topic",  "x",
                                 "y",  "label", "pos",  "weight",    "distance",  "similarity", "construction"};
  std::vector<std::string> names;
  for (const auto& column : graph[boost::graph_bundle].metadata_columns) {
    names.push_back(attribute_name(column, taken));
    taken.insert(names.back());
  }
  return names;
}

std::string metadata_value(const DocumentVertex& d, std::size_t c) {
  return c < d.metadata.size() ? d.metadata[c] : "";
}

}  // namespace

std::string csv_cell(const std::string& text) {
  if (text.find_first_of(",\"\r\n") == std::string::npos) return text;
  std::string out = "\"";
  for (const char c : text) {
    if (c == '"') out += '"';
    out += c;
  }
  return out + "\"";
}

std::string graphml_text(const DocumentGraph& graph) {
  const auto metadata = metadata_attribute_names(graph);
  std::vector<GraphmlWriter::Key> node_keys = {{"id", "string"},     {"group", "string"},  {"role", "string"},
                                               {"component", "int"}, {"community", "int"}, {"top_topic", "int"},
                                               {"x", "double"},      {"y", "double"}};
  for (const auto& name : metadata) node_keys.push_back({name, "string"});
  GraphmlWriter writer({{"construction", "string"}}, node_keys, {{"weight", "double"}, {"distance", "double"}});
  writer.graph_data({graph[boost::graph_bundle].construction});
  for (std::size_t v = 0; v < boost::num_vertices(graph); ++v) {
    const DocumentVertex& d = graph[v];
    std::vector<std::string> values = {d.id,
                                       d.group,
                                       d.role,
                                       std::to_string(signed_label(d.component)),
                                       std::to_string(signed_label(d.community)),
                                       std::to_string(d.top_topic),
                                       number(d.x),
                                       number(d.y)};
    for (std::size_t c = 0; c < metadata.size(); ++c) values.push_back(metadata_value(d, c));
    writer.node(v, values);
  }
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    writer.edge(boost::source(e, graph), boost::target(e, graph), {number(graph[e].weight), number(graph[e].distance)});
  }
  return writer.finish();
}

std::string dot_text(const DocumentGraph& graph) {
  const auto metadata = metadata_attribute_names(graph);
  std::string out = "graph G {\n";
  out += "  label=" + dot_id(graph[boost::graph_bundle].construction) + ";\n";
  for (std::size_t v = 0; v < boost::num_vertices(graph); ++v) {
    const DocumentVertex& d = graph[v];
    out += "  " + dot_id(d.id) + " [group=" + dot_id(d.group) + ", role=" + dot_id(d.role) +
           ", component=" + std::to_string(signed_label(d.component)) +
           ", community=" + std::to_string(signed_label(d.community)) + ", top_topic=" + std::to_string(d.top_topic) +
           ", pos=" + dot_id(number(d.x) + "," + number(d.y));
    for (std::size_t c = 0; c < metadata.size(); ++c)
      out += ", " + dot_id(metadata[c]) + "=" + dot_id(metadata_value(d, c));
    out += "];\n";
  }
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    out += "  " + dot_id(graph[boost::source(e, graph)].id) + " -- " + dot_id(graph[boost::target(e, graph)].id) +
           " [similarity=" + number(graph[e].weight) + ", distance=" + number(graph[e].distance) + "];\n";
  }
  return out + "}\n";
}

std::string edge_csv_text(const DocumentGraph& graph) {
  std::string out = "source,target,distance,weight\n";
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    out += csv_cell(graph[boost::source(e, graph)].id) + "," + csv_cell(graph[boost::target(e, graph)].id) + "," +
           number(graph[e].distance) + "," + number(graph[e].weight) + "\n";
  }
  return out;
}

std::string node_csv_text(const DocumentGraph& graph) {
  const auto& columns = graph[boost::graph_bundle].metadata_columns;
  std::string out = "id,group,role,component,community,top_topic,x,y,degree";
  for (const auto& column : columns) out += "," + csv_cell(column);
  out += "\n";
  for (std::size_t v = 0; v < boost::num_vertices(graph); ++v) {
    const DocumentVertex& d = graph[v];
    out += csv_cell(d.id) + "," + csv_cell(d.group) + "," + d.role + "," + std::to_string(signed_label(d.component)) +
           "," + std::to_string(signed_label(d.community)) + "," + std::to_string(d.top_topic) + "," + number(d.x) +
           "," + number(d.y) + "," + std::to_string(boost::degree(v, graph));
    for (std::size_t c = 0; c < columns.size(); ++c) out += "," + csv_cell(c < d.metadata.size() ? d.metadata[c] : "");
    out += "\n";
  }
  return out;
}

std::string summary_graphml_text(const SummaryGraph& graph) {
  GraphmlWriter writer({},
                       {{"name", "string"},
                        {"label", "int"},
                        {"documents", "int"},
                        {"main_group", "string"},
                        {"main_group_share", "double"},
                        {"x", "double"},
                        {"y", "double"}},
                       {{"weight", "double"}, {"edges", "int"}});
  for (std::size_t v = 0; v < boost::num_vertices(graph); ++v) {
    const SummaryVertex& s = graph[v];
    writer.node(v, {s.name, std::to_string(s.label), std::to_string(s.documents), s.main_group,
                    number(s.main_group_share), number(s.x), number(s.y)});
  }
  for (const auto e : boost::make_iterator_range(boost::edges(graph))) {
    writer.edge(boost::source(e, graph), boost::target(e, graph),
                {number(graph[e].weight), std::to_string(graph[e].edges)});
  }
  return writer.finish();
}

void write_graphml(const DocumentGraph& graph, const std::string& path) {
  write_file_atomically(path, graphml_text(graph));
}
void write_dot(const DocumentGraph& graph, const std::string& path) { write_file_atomically(path, dot_text(graph)); }
void write_edge_csv(const DocumentGraph& graph, const std::string& path) {
  write_file_atomically(path, edge_csv_text(graph));
}
void write_node_csv(const DocumentGraph& graph, const std::string& path) {
  write_file_atomically(path, node_csv_text(graph));
}
void write_summary_graphml(const SummaryGraph& graph, const std::string& path) {
  write_file_atomically(path, summary_graphml_text(graph));
}

}  // namespace loupe

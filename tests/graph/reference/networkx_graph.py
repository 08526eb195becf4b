# Outside reference for loupe's graph analysis: networkx (Debian
# python3-networkx) reads loupe's GraphML and computes the connected
# components, the modularity of loupe's communities (node attribute
# "community") and of the groups (attribute "group"), and its own Louvain
# communities with their modularity. All weighted by the edge attribute "weight".
# Usage: python3 networkx_graph.py GRAPH.graphml SEED  -> JSON on stdout
import json
import sys

import networkx as nx
from networkx.algorithms import community as nxc

graph = nx.read_graphml(sys.argv[1])
seed = int(sys.argv[2])


def partition(attribute):
    parts = {}
    for node, data in graph.nodes(data=True):
        parts.setdefault(data[attribute], set()).add(node)
    return list(parts.values())


louvain = nxc.louvain_communities(graph, weight="weight", seed=seed)
print(json.dumps({
    "nodes": graph.number_of_nodes(),
    "edges": graph.number_of_edges(),
    "components": [sorted(graph.nodes[n]["id"] for n in c) for c in nx.connected_components(graph)],
    "modularity_of_loupe_communities": nxc.modularity(graph, partition("community"), weight="weight"),
    "modularity_of_groups": nxc.modularity(graph, partition("group"), weight="weight"),
    "networkx_louvain_modularity": nxc.modularity(graph, louvain, weight="weight"),
    "networkx_louvain_communities": len(louvain),
}))

#!/usr/bin/env python3
"""Reference peer: total cost of networkx's minimum spanning forest over reknit's network layer.

Usage: peer_msf_networkx.py network.geojson
Reads every usable edge (cost not null) of the layer as an undirected multigraph edge between its
`from` and `to` junctions, weighted by its cost in milli-repair-metres, and prints the forest's total
(integer milli-repair-metres) and its edge count as JSON.
"""
import json
import sys

import networkx as nx


def main(path):
    with open(path, encoding="utf-8") as f:
        fc = json.load(f)
    g = nx.MultiGraph()
    for feat in fc["features"]:
        p = feat["properties"]
        g.add_node(p["from"])
        g.add_node(p["to"])
        if p["cost"] is None or p["from"] == p["to"]:
            continue
        g.add_edge(p["from"], p["to"], weight=round(p["cost"] * 1000))
    forest = nx.minimum_spanning_tree(g, weight="weight", algorithm="kruskal")
    total = sum(d["weight"] for _, _, d in forest.edges(data=True))
    print(json.dumps({"total_milli": total, "edges": forest.number_of_edges()}))


if __name__ == "__main__":
    main(sys.argv[1])

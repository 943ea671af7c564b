#!/usr/bin/env python3
"""Reference peer: networkx's Steiner tree approximation on reknit's network and sites layers.

Usage: peer_steiner_networkx.py network.geojson sites.geojson [mehlhorn|kou]
Builds an undirected graph of the usable edges (cost not null; the cheapest of parallel edges),
weighted in milli-repair-metres, keeps the connected component of the terminals (the junctions the
sites attached to; they must share one), and prints the tree's cost and the seconds networkx's
algorithm took (graph building excluded), as JSON.
"""
import json
import sys
import time

import networkx as nx
from networkx.algorithms.approximation import steiner_tree


def main(network, sites, method="mehlhorn"):
    with open(network, encoding="utf-8") as f:
        fc = json.load(f)
    g = nx.Graph()
    for feat in fc["features"]:
        p = feat["properties"]
        a, b, c = p["from"], p["to"], p["cost"]
        if c is None or a == b:
            continue
        w = round(c * 1000)
        if not g.has_edge(a, b) or g[a][b]["weight"] > w:
            g.add_edge(a, b, weight=w)
    with open(sites, encoding="utf-8") as f:
        terminals = sorted({s["properties"]["junction"] for s in json.load(f)["features"]
                            if s["properties"]["junction"] is not None})
    # networkx's Mehlhorn needs a connected graph: keep the terminals' component.
    g = g.subgraph(nx.node_connected_component(g, terminals[0])).copy()
    start = time.perf_counter()
    tree = steiner_tree(g, terminals, weight="weight", method=method)
    seconds = time.perf_counter() - start
    cost = sum(d["weight"] for _, _, d in tree.edges(data=True))
    print(json.dumps({"cost_milli": cost, "seconds": seconds, "terminals": len(terminals)}))


if __name__ == "__main__":
    main(*sys.argv[1:])

#!/usr/bin/env python3
"""Reference peer for benchmarks: networkx's Steiner tree on an edge list written by
examples/bench_steiner.rs ("u v w" lines, then "terminals t1 t2 ...").

Usage: peer_steiner_edgelist.py EDGES [mehlhorn|kou]
Prints the tree's cost and the seconds the algorithm took (graph building excluded) as JSON.
"""
import json
import sys
import time

import networkx as nx
from networkx.algorithms.approximation import steiner_tree


def main(path, method="mehlhorn"):
    g = nx.Graph()
    terminals = []
    with open(path) as f:
        for line in f:
            parts = line.split()
            if parts[0] == "terminals":
                terminals = [int(t) for t in parts[1:]]
                continue
            a, b, w = int(parts[0]), int(parts[1]), int(parts[2])
            if a != b and (not g.has_edge(a, b) or g[a][b]["weight"] > w):
                g.add_edge(a, b, weight=w)
    g = g.subgraph(nx.node_connected_component(g, terminals[0])).copy()
    start = time.perf_counter()
    tree = steiner_tree(g, terminals, weight="weight", method=method)
    seconds = time.perf_counter() - start
    cost = sum(d["weight"] for _, _, d in tree.edges(data=True))
    print(json.dumps({"method": method, "cost_milli": cost, "seconds": round(seconds, 3)}))


if __name__ == "__main__":
    main(*sys.argv[1:])

#!/usr/bin/env python3
"""Reference peer: bridges and articulation points with networkx.

Usage: peer_bridges_networkx.py EDGES     ("u v" per line, undirected; parallel edges allowed)
networkx's bridges() takes simple graphs, so pairs joined by two or more parallel edges are dropped
from its answer (they are never bridges). Prints JSON: sorted bridges as [min, max] pairs, sorted
articulation points.
"""
import json
import sys
from collections import Counter

import networkx as nx


def main(path):
    mult = Counter()
    g = nx.Graph()
    with open(path) as f:
        for line in f:
            a, b = map(int, line.split())
            if a == b:
                g.add_node(a)
                continue
            key = (min(a, b), max(a, b))
            mult[key] += 1
            g.add_edge(*key)
    bridges = sorted([min(a, b), max(a, b)] for a, b in nx.bridges(g) if mult[(min(a, b), max(a, b))] == 1)
    cuts = sorted(nx.articulation_points(g))
    print(json.dumps({"bridges": bridges, "articulation_points": cuts}))


if __name__ == "__main__":
    main(sys.argv[1])

#!/usr/bin/env python3
"""Reference peers for the minimum spanning forest: scipy.sparse.csgraph.minimum_spanning_tree and
networkx.minimum_spanning_tree on the same edge list ("u v w" lines, positive integer weights).
The graph is loaded before timing (algorithm time only); scipy's median of 3 runs, networkx's one run.
Usage: peer_forest.py EDGES [--no-networkx]      Prints JSON.
"""
import json
import sys
import time

import numpy as np


def main(path, with_nx):
    data = np.fromfile(path, sep=" ", dtype=np.int64).reshape(-1, 3)
    u, v, w = data[:, 0], data[:, 1], data[:, 2]
    n = int(max(u.max(), v.max())) + 1
    out = {"edges": int(len(w))}
    try:
        from scipy.sparse import csr_matrix
        from scipy.sparse.csgraph import minimum_spanning_tree
        g = csr_matrix((w.astype(np.float64), (u, v)), shape=(n, n))
        times = []
        for _ in range(3):
            t = time.perf_counter()
            mst = minimum_spanning_tree(g)
            times.append(time.perf_counter() - t)
        out["scipy_s"] = sorted(times)[1]
        out["scipy_total"] = int(round(mst.sum()))
    except ImportError:
        out["scipy_skipped"] = "scipy not installed"
    if with_nx:
        try:
            import networkx as nx
            g = nx.Graph()
            g.add_weighted_edges_from(zip(u.tolist(), v.tolist(), w.tolist()))
            t = time.perf_counter()
            forest = nx.minimum_spanning_tree(g, algorithm="kruskal")
            out["networkx_s"] = time.perf_counter() - t
            out["networkx_total"] = int(sum(d["weight"] for _, _, d in forest.edges(data=True)))
        except ImportError:
            out["networkx_skipped"] = "networkx not installed"
    print(json.dumps(out))


if __name__ == "__main__":
    main(sys.argv[1], "--no-networkx" not in sys.argv[2:])

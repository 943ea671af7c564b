#!/usr/bin/env python3
"""Reference peers for the minimum spanning forest: scipy.sparse.csgraph.minimum_spanning_tree and
networkx.minimum_spanning_tree on the same edge list ("u v w" lines, positive integer weights).
The graph is loaded before timing (algorithm time only). scipy: one untimed warm-up call, then the
median of RUNS calls (default 5), wall (perf_counter) and CPU (process_time) seconds; networkx: one
run. Usage: peer_forest.py EDGES [--no-networkx] [--runs N]      Prints JSON.
"""
import json
import os
import sys
import time

import numpy as np


def main(path, with_nx, runs):
    data = np.fromfile(path, sep=" ", dtype=np.int64).reshape(-1, 3)
    u, v, w = data[:, 0], data[:, 1], data[:, 2]
    n = int(max(u.max(), v.max())) + 1
    out = {"edges": int(len(w)), "load_before": os.getloadavg()[0]}
    try:
        from scipy.sparse import csr_matrix
        from scipy.sparse.csgraph import minimum_spanning_tree
        g = csr_matrix((w.astype(np.float64), (u, v)), shape=(n, n))
        minimum_spanning_tree(g)
        wall, cpu = [], []
        for _ in range(runs):
            t, c = time.perf_counter(), time.process_time()
            mst = minimum_spanning_tree(g)
            wall.append(time.perf_counter() - t)
            cpu.append(time.process_time() - c)
        out["scipy_s"] = sorted(wall)[runs // 2]
        out["scipy_cpu_s"] = sorted(cpu)[runs // 2]
        out["scipy_runs"] = runs
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
    out["load_after"] = os.getloadavg()[0]
    print(json.dumps(out))


if __name__ == "__main__":
    args = sys.argv[1:]
    runs = int(args[args.index("--runs") + 1]) if "--runs" in args else 5
    main(args[0], "--no-networkx" not in args, runs)

#!/usr/bin/env bash
# Minimum spanning forest: reknit (Kruskal, Prim) against petgraph's min_spanning_tree, measured in the
# same run with divan on road-like graphs of ~2 million edges; prints each median and the ratio
# petgraph / reknit. Usage: scripts/bench-forest.sh   (REKNIT_BENCH_SIDE=1000 sets the lattice side)
set -euo pipefail
cd "$(dirname "$0")/.."
out=$(cargo bench --quiet --bench forest 2>/dev/null)
echo "$out"
echo "$out" | python3 -c '
import re, sys
units = {"ns": 1e-9, "µs": 1e-6, "us": 1e-6, "ms": 1e-3, "s": 1.0}
med, group = {}, None
for line in sys.stdin:
    m = re.match(r"^[├╰]─ (\w+)", line)
    if m:
        group = m.group(1)
        continue
    m = re.match(r"^[│ ]+[├╰]─ (\d+)\s+\S+ \S+\s+│\s+\S+ \S+\s+│\s+([\d.]+) (\S+)", line)
    if m and group:
        med[(group, m.group(1))] = float(m.group(2)) * units[m.group(3)]
labels = {"0": "50 % intact", "1": "80 % intact"}
for arg, label in labels.items():
    peer = med.get(("petgraph_min_spanning_tree", arg))
    for ours in ("reknit_kruskal", "reknit_prim"):
        t = med.get((ours, arg))
        if peer and t:
            print(f"{label}: petgraph / {ours} = {peer / t:.1f}x  ({peer*1e3:.1f} ms vs {t*1e3:.1f} ms)")
'

#!/usr/bin/env bash
# Single points of failure and backup links on a 1-million-edge road-like lattice with 200 sites:
# reknit's fragility search against networkx's bridges + articulation_points on the same network
# after the plan (graph already in memory on both sides), measured in the same run; then the backup
# links' time. Usage: scripts/bench-backup.sh   (Python peers from target/py-peers, made by scripts/test)
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --quiet --release --example bench_backup
py=${REKNIT_PYTHON:-target/py-peers/bin/python}
mkdir -p target/bench-data
for intact in 0.5 0.3; do
  edges=target/bench-data/after-plan-$intact.txt
  r=$(target/release/examples/bench_backup 710 200 "$intact" "$edges")
  echo "lattice 710x710, 200 sites, $intact intact: $r"
  if "$py" -c 'import networkx' 2>/dev/null; then
    "$py" - "$edges" "$r" <<'PY'
import json, sys, time
import networkx as nx
g = nx.MultiGraph()
with open(sys.argv[1]) as f:
    g.add_edges_from(tuple(map(int, line.split())) for line in f)
t = time.perf_counter()
simple = nx.Graph(g)
b = sum(1 for _ in nx.bridges(simple))
a = sum(1 for _ in nx.articulation_points(simple))
s = time.perf_counter() - t
r = json.loads(sys.argv[2])
print(f"  networkx bridges + articulation_points: {s:.3f} s ({b} bridges before dropping parallel pairs, {a} cut vertices); "
      f"reknit fragility {r['fragility_seconds']:.3f} s: {s / max(r['fragility_seconds'], 1e-3):.0f}x faster")
PY
  else
    echo "  networkx not installed: peer skipped"
  fi
done

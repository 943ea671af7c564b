#!/usr/bin/env bash
# Minimum spanning forest: reknit's Kruskal against petgraph's min_spanning_tree and scipy's
# minimum_spanning_tree on road-like lattices (SIDE × SIDE junctions, ~2 million edges at the default
# 1000, 1 % closed) with half and with four fifths of the roads intact. One method, the suite's
# (`scripts/bench` runs the same `bench_peers forest`): graphs built before timing, one warm-up call
# each, then PAIRS calls of reknit and petgraph interleaved (alternating which goes first), wall and
# CPU time; scipy (which needs costs + 1) right after in the Python peer on the same edges, against
# reknit's costs + 1 figures. Prints the JSON lines, the ratios (peer / reknit) and the load average.
# Usage: scripts/bench-forest.sh [PAIRS]   (default 7; REKNIT_BENCH_SIDE sets the lattice side)
set -euo pipefail
cd "$(dirname "$0")/.."
side=${REKNIT_BENCH_SIDE:-1000}
pairs=${1:-7}
py=target/py-peers/bin/python
[ -x "$py" ] || py=python3
cargo build --quiet --release --example bench_peers
data=target/bench-data
mkdir -p "$data"
res=$data/forest.jsonl
: > "$res"
for intact in 0.5 0.8; do
  edges=$data/forest-edges-$intact.txt
  target/release/examples/bench_peers forest "$side" "$intact" "$edges" "$pairs" >> "$res"
  "$py" scripts/peer_forest.py "$edges" --no-networkx | sed "s/^{/{\"bench\":\"forest_python\",\"intact\":$intact,/" >> "$res" \
    || echo "{\"bench\":\"forest_python\",\"intact\":$intact,\"skipped\":\"the Python peer failed\"}" >> "$res"
  rm -f "$edges"
done
cat "$res"
python3 - "$res" <<'PY'
import json, sys
rows = [json.loads(l) for l in open(sys.argv[1])]
for intact in sorted({r["intact"] for r in rows}):
    rk = {r["weights"]: r for r in rows if r["bench"] == "forest" and r["intact"] == intact}
    sc = next((r for r in rows if r["bench"] == "forest_python" and r["intact"] == intact), {})
    label = f"{round(intact * 100)} % intact"
    for w, r in rk.items():
        print(f"{label}, {w}: petgraph / reknit = {r['ratio']:.1f}x wall, {r['ratio_cpu']:.1f}x CPU "
              f"(medians {r['petgraph_s']:.3f} s / {r['reknit_s']:.3f} s; {r['pairs']} pairs; "
              f"load {r['load_before']}-{r['load_after']})")
    r = rk.get("costs + 1")
    if r and "scipy_s" in sc:
        agree = "totals agree" if sc["scipy_total"] == r["total"] else "TOTALS DIFFER"
        print(f"{label}, costs + 1: scipy / reknit = {sc['scipy_s'] / r['reknit_s']:.1f}x wall, "
              f"{sc['scipy_cpu_s'] / r['reknit_cpu_s']:.1f}x CPU (medians {sc['scipy_s']:.3f} s / "
              f"{r['reknit_s']:.3f} s; {agree}; load {sc['load_before']:.2f}-{sc['load_after']:.2f})")
    elif sc:
        print(f"{label}: scipy skipped: {sc.get('scipy_skipped') or sc.get('skipped')}")
PY

#!/usr/bin/env bash
# Bounded resources: a synthetic layer of 10 million road features (8 vertices each, about 20
# million noded edges) through `reknit plan`, streamed; reports wall time, peak memory (GNU time -v)
# and bytes per feature and per edge. Needs ~3 GB for the input and ~15 GB for the outputs, which are
# deleted afterwards. Usage: scripts/bench-10m.sh [FEATURES]
set -euo pipefail
cd "$(dirname "$0")/.."
n=${1:-10000000}
cargo build --quiet --release --bin reknit --example synth_roads
data=target/bench-data; mkdir -p "$data"
f=$data/synth-$n.geojson
[ -f "$f" ] || target/release/examples/synth_roads "$n" "$f"
/usr/bin/time -v target/release/reknit plan --roads "$f" --out "$data/out-$n" --force -v 2> "$data/time-$n.txt" || { cat "$data/time-$n.txt"; exit 1; }
grep -E " s  " "$data/time-$n.txt" || true
wall=$(grep "Elapsed (wall clock)" "$data/time-$n.txt" | awk '{print $NF}')
rss=$(grep "Maximum resident set size" "$data/time-$n.txt" | awk '{print $NF}')
edges=$(python3 -c "import json;print(json.load(open('$data/out-$n/summary.json'))['counts']['edges'])")
python3 - "$n" "$wall" "$rss" "$edges" <<'PY'
import sys
n, wall, rss, edges = int(sys.argv[1]), sys.argv[2], int(sys.argv[3]), int(sys.argv[4])
print(f"{n:,} features, {edges:,} edges: wall {wall}, peak {rss / 1024 / 1024:.2f} GiB, "
      f"{rss * 1024 / n:.0f} bytes per feature, {rss * 1024 / edges:.0f} bytes per edge")
PY
rm -rf "$data/out-$n"

#!/usr/bin/env bash
# Whole `reknit plan` runs: wall time and peak memory (GNU time -v) on the Liechtenstein extract and on
# synthetic layers of N features × 8 vertices (default 100000 and 1000000).
# Usage: scripts/bench-pipeline.sh [N ...]     Layers are generated into target/bench-data.
set -euo pipefail
cd "$(dirname "$0")/.."
sizes=("$@")
[ ${#sizes[@]} -gt 0 ] || sizes=(100000 1000000)
cargo build --quiet --release --bin reknit --example synth_roads
mkdir -p target/bench-data
timer=/usr/bin/time
[ -x "$timer" ] || { echo "GNU time (/usr/bin/time) is needed: apt-get install time" >&2; exit 1; }
measure() { # name roads
  local out=target/bench-data/out-$1
  "$timer" -v target/release/reknit plan --roads "$2" --out "$out" --force --quiet 2> target/bench-data/time-$1.txt
  local wall rss
  wall=$(grep "Elapsed (wall clock)" target/bench-data/time-$1.txt | awk '{print $NF}')
  rss=$(grep "Maximum resident set size" target/bench-data/time-$1.txt | awk '{print $NF}')
  printf "%-22s wall %-9s peak %6.0f MB  (%s features, %s edges)\n" "$1" "$wall" "$((rss))e-3" \
    "$(python3 -c "import json;print(json.load(open('$out/summary.json'))['counts']['features_read'])")" \
    "$(python3 -c "import json;print(json.load(open('$out/summary.json'))['counts']['edges'])")"
}
measure liechtenstein tests/data/roads/liechtenstein/liechtenstein_highways.geojson
for n in "${sizes[@]}"; do
  f=target/bench-data/synth-$n.geojson
  [ -f "$f" ] || target/release/examples/synth_roads "$n" "$f"
  measure "synthetic-$n" "$f"
done

#!/usr/bin/env bash
# Ingest at scale: reading, noding with snapping repairs, and 5,000 damage zones on synthetic layers
# of N features × 8 vertices (default 100000 1000000 4000000); prints the stage times (--verbose),
# wall time and peak memory (GNU time -v) of a whole-network `reknit plan`.
# Usage: scripts/bench-ingest.sh [N ...]
set -euo pipefail
cd "$(dirname "$0")/.."
sizes=("$@")
[ ${#sizes[@]} -gt 0 ] || sizes=(100000 1000000 4000000)
cargo build --quiet --release --bin reknit --example synth_roads --example synth_zones
mkdir -p target/bench-data
for n in "${sizes[@]}"; do
  roads=target/bench-data/synth-$n.geojson
  zones=target/bench-data/zones-$n.geojson
  [ -f "$roads" ] || target/release/examples/synth_roads "$n" "$roads"
  [ -f "$zones" ] || target/release/examples/synth_zones 5000 "$n" "$zones"
  /usr/bin/time -v target/release/reknit plan --roads "$roads" --damage-zones "$zones" --whole-network \
    --out target/bench-data/ingest-out-$n --force --verbose 2> target/bench-data/ingest-$n.txt
  stages=$(grep -E "^ +[0-9.]+ s " target/bench-data/ingest-$n.txt | awk '{printf "%s %s; ", $3" "$4" "$5, $1"s"}')
  wall=$(grep "Elapsed (wall clock)" target/bench-data/ingest-$n.txt | awk '{print $NF}')
  rss=$(grep "Maximum resident set size" target/bench-data/ingest-$n.txt | awk '{print $NF}')
  echo "$n features: wall $wall, peak $((rss / 1024)) MB; $stages"
done

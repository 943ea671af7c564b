#!/usr/bin/env bash
# Reading an OpenStreetMap extract: `reknit check --snap 0` (read, node, QA) against pyosmium
# reading the same file into the same node-id topology (scripts/peer_osm_topology.py), in one run,
# interleaved, median of N runs each. Extracts: Liechtenstein (tests/data) and Malta (the shared
# data folder, not copied into the repository).
# Usage: scripts/bench-osm.sh [RUNS]   (needs target/release/reknit and a Python with osmium)
set -euo pipefail
cd "$(dirname "$0")/.."
runs=${1:-5}
py=${REKNIT_PYTHON:-target/py-peers/bin/python}
bin=target/release/reknit
tmp=$(mktemp -d)
trap 'rm -rf "$tmp"' EXIT
median() { sort -n | awk '{a[NR]=$1} END {print a[int((NR+1)/2)]}'; }
secs() { local s e; s=$(date +%s.%N); "$@" >/dev/null 2>&1; e=$(date +%s.%N); echo "$e - $s" | bc; }
for pbf in tests/data/roads/liechtenstein/liechtenstein-2015-10-06.osm.pbf ../shared/data/roads/malta/malta-2018-08-27.osm.pbf; do
  [ -f "$pbf" ] || { echo "skip: $pbf not found"; continue; }
  : >"$tmp/r"; : >"$tmp/p"
  for _ in $(seq "$runs"); do
    rm -rf "$tmp/out"
    secs "$bin" check --roads "$pbf" --snap 0 --out "$tmp/out" -q >>"$tmp/r"
    secs "$py" scripts/peer_osm_topology.py "$pbf" >>"$tmp/p"
  done
  r=$(median <"$tmp/r"); p=$(median <"$tmp/p")
  printf '%s: reknit check %.3f s, pyosmium topology %.3f s, ratio %.2f\n' "$(basename "$pbf")" "$r" "$p" "$(echo "$r / $p" | bc -l)"
done

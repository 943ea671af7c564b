#!/usr/bin/env bash
# Sites plans on real extracts: the Liechtenstein highways (tests/data) and Malta (the shared data
# folder's .osm.pbf, converted to GeoJSON lines with GDAL's ogr2ogr), every road damaged at factor 1
# (the default), 10, 50 and 200 sites on road vertices drawn with a fixed seed
# (scripts/make-extract-sites.py). One `reknit plan` per extract, site count and effort: prints
# wall and CPU seconds (GNU time), cost, bound, gap and whether the plan is proven optimal.
# Usage: scripts/bench-extracts.sh [EFFORT …]   (default: normal thorough)
#   BENCH_TIMEOUT=SECONDS stops a run after that long (reported as such); default: no limit.
set -euo pipefail
cd "$(dirname "$0")/.."
efforts=("$@")
[ ${#efforts[@]} -gt 0 ] || efforts=(normal thorough)
cargo build --quiet --release --bin reknit
d=target/bench-data/extracts; mkdir -p "$d"
malta_pbf=../shared/data/roads/malta/malta-2018-08-27.osm.pbf
if [ ! -f "$d/malta.geojson" ]; then
  command -v ogr2ogr >/dev/null || { echo "ogr2ogr (gdal-bin) is needed for Malta" >&2; exit 1; }
  ogr2ogr -q -f GeoJSON "$d/malta.geojson" "$malta_pbf" lines -where "highway IS NOT NULL" \
    -select osm_id,highway,name
fi
cp -f tests/data/roads/liechtenstein/liechtenstein_highways.geojson "$d/liechtenstein.geojson"
printf "| extract | sites | effort | wall s | CPU s | cost | bound | gap | proven |\n|---|---|---|---|---|---|---|---|---|\n"
for x in liechtenstein malta; do
  for n in 10 50 200; do
    s="$d/$x-sites-$n.geojson"
    python3 scripts/make-extract-sites.py "$d/$x.geojson" "$n" 24 "$s"
    for e in "${efforts[@]}"; do
      out="$d/out-$x-$n-$e"
      if ! /usr/bin/time -f "%e %U %S" -o "$d/time" timeout "${BENCH_TIMEOUT:-0}" \
        target/release/reknit plan --roads "$d/$x.geojson" --sites "$s" --effort "$e" \
        --out "$out" --force --quiet; then
        echo "| $x | $n | $e | stopped after ${BENCH_TIMEOUT:-?} s | | | | | |"
        continue
      fi
      read -r wall user sys < "$d/time"
      python3 - "$out/summary.json" "$x" "$n" "$e" "$wall" "$user" "$sys" <<'PY'
import json, sys
s = json.load(open(sys.argv[1]))
x, n, e, wall, user, sysc = sys.argv[2:]
gap = "–" if s["gap"] is None else f"{100 * s['gap']:.3f} %"
cpu = float(user) + float(sysc)
print(f"| {x} | {n} | {e} | {float(wall):.2f} | {cpu:.2f} | {s['total_cost']:.1f} | {s['lower_bound']:.1f} | {gap} | {'yes' if s['optimal'] else 'no'} |")
PY
    done
  done
done

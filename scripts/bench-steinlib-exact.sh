#!/usr/bin/env bash
# SteinLib per instance, one process per instance and binary so that CPU time (GNU time, user
# seconds) is measured per instance: prints one JSON line per instance and binary.
# Usage: scripts/bench-steinlib-exact.sh SERIES EFFORT [BIN …]
#   SERIES: B, C or D; EFFORT: quick, normal or thorough; BIN: bench_steinlib builds to compare
#   (default: this tree's). To compare with an older solver, build its examples/bench_steinlib and
#   pass both binaries: they run interleaved, instance by instance.
set -euo pipefail
cd "$(dirname "$0")/.."
s=$1; e=$2; shift 2
if [ $# -eq 0 ]; then
  cargo build --quiet --release --example bench_steinlib
  set -- target/release/examples/bench_steinlib
fi
data=tests/data/steinlib
for name in $(tail -n +2 $data/optima.tsv | cut -f1 | grep "^$s/"); do
  d=target/bench-data/steinlib-one/$name; mkdir -p "$d/$s"
  (head -1 $data/optima.tsv; grep "^$name	" $data/optima.tsv) > "$d/optima.tsv"
  ln -sf "$(pwd)/$data/$name.stp" "$d/$s/"
  for b in "$@"; do
    /usr/bin/time -f "%U" -o "$d/t" "$b" "$d" "$e" > "$d/o"
    sed "s|}$|,\"bin\":\"$(basename "$b")\",\"user\":$(cat "$d/t")}|" "$d/o"
  done
done

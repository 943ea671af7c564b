#!/usr/bin/env bash
# Batch throughput: a synthetic region of D districts (default 200) of F road features each
# (default 10000, about 20,000 segments), planned with --jobs 1 and --jobs 2 in the same run; prints
# districts per minute, the speed-up, and peak memory (GNU time -v).
# Usage: scripts/bench-batch.sh [DISTRICTS] [FEATURES]
set -euo pipefail
cd "$(dirname "$0")/.."
n=${1:-200}
f=${2:-10000}
region=target/bench-data/region-$n-$f
[ -f "$region/manifest.toml" ] || python3 scripts/make-region.py "$region" "$n" "$f" 12
cargo build --quiet --release --bin reknit
for jobs in 1 2; do
  out=target/bench-data/region-out-$jobs
  rm -rf "$out"
  /usr/bin/time -v target/release/reknit batch "$region/manifest.toml" --out "$out" --jobs $jobs --quiet \
    2> "target/bench-data/batch-time-$jobs.txt" || true
  wall=$(grep "Elapsed (wall clock)" "target/bench-data/batch-time-$jobs.txt" | awk '{print $NF}')
  rss=$(grep "Maximum resident set size" "target/bench-data/batch-time-$jobs.txt" | awk '{print $NF}')
  secs=$(python3 -c "p='$wall'.split(':'); print(sum(float(x)*60**i for i,x in enumerate(reversed(p))))")
  echo "jobs=$jobs: $n districts in ${secs}s = $(python3 -c "print(round($n*60/$secs,1))") districts/min, peak $((rss/1024)) MB"
  echo "$secs" > "target/bench-data/batch-secs-$jobs.txt"
done
python3 -c "a=float(open('target/bench-data/batch-secs-1.txt').read()); b=float(open('target/bench-data/batch-secs-2.txt').read()); print(f'speed-up of --jobs 2 over --jobs 1: {a/b:.2f}x')"

#!/usr/bin/env bash
# Whole `reknit plan` at scale against the analyst's script (scripts/peer_plan_numpy.py: json,
# numpy, pyproj, scipy), on synthetic layers of N features × 8 vertices (examples/synth_roads.rs).
# Both plan the whole network with noding at identical coordinates (reknit `--snap 0`); reknit
# writes its default outputs, the peer only its plan layer. Per size: the totals must agree, then
# RUNS paired runs (order alternating) under GNU time -v; prints the median of the paired ratios
# peer wall / reknit wall, reknit's median wall, its peak memory per feature, and the load average
# beside them. With BENCH_10M=1 (and 40 GB free) also reknit alone at 10,000,000 features for memory.
# Usage: scripts/bench-scale.sh [RUNS] [N ...]      (defaults: 5 runs, 200000 and 1000000)
# Results also go to target/bench-data/scale.jsonl, one JSON object per run.
set -euo pipefail
cd "$(dirname "$0")/.."
runs=${1:-5}
shift || true
sizes=("$@")
[ ${#sizes[@]} -gt 0 ] || sizes=(200000 1000000)
timer=/usr/bin/time
[ -x "$timer" ] || { echo "GNU time (/usr/bin/time) is needed: apt-get install time" >&2; exit 1; }
py=target/py-peers/bin/python
if ! "$py" -c 'import numpy, scipy, pyproj' 2>/dev/null; then
  echo "scripts/bench-scale.sh: $py lacks numpy/scipy/pyproj; run 'bash scripts/test --test words' once" >&2
  exit 1
fi
# REKNIT_BIN names another reknit binary (e.g. a copy of an earlier build) and skips the build.
bin=${REKNIT_BIN:-target/release/reknit}
[ -n "${REKNIT_BIN:-}" ] || cargo build --quiet --release --bin reknit --example synth_roads
data=target/bench-data; mkdir -p "$data"
res=$data/scale.jsonl; : > "$res"

# seconds wall and peak kB from a GNU time -v log
wall_of() { awk -F': ' '/Elapsed \(wall clock\)/ {n=split($2,t,":"); s=0; for(i=1;i<=n;i++) s=s*60+t[i]; print s}' "$1"; }
rss_of() { awk '/Maximum resident set size/ {print $NF}' "$1"; }
cpu_of() { awk -F': ' '/User time|System time/ {s+=$2} END {print s}' "$1"; }
load() { cut -d' ' -f1 /proc/loadavg; }

run_reknit() { # layer out log
  "$timer" -v "$bin" plan --roads "$1" --out "$2" --snap 0 --force --quiet 2> "$3"
}
run_peer() { # layer out log
  "$timer" -v "$py" scripts/peer_plan_numpy.py "$1" "$2" > "$2.json" 2> "$3"
}

for n in "${sizes[@]}"; do
  f=$data/synth-$n.geojson
  [ -f "$f" ] || target/release/examples/synth_roads "$n" "$f" 2> /dev/null
  out=$data/scale-out-$n peer=$data/scale-peer-$n.geojson
  for r in $(seq 1 "$runs"); do
    l0=$(load)
    if [ $((r % 2)) = 1 ]; then
      run_reknit "$f" "$out" "$data/scale-time-r.txt"; run_peer "$f" "$peer" "$data/scale-time-p.txt"
    else
      run_peer "$f" "$peer" "$data/scale-time-p.txt"; run_reknit "$f" "$out" "$data/scale-time-r.txt"
    fi
    ours=$("$py" -c "import json;print(json.load(open('$out/summary.json'))['total_cost'])")
    theirs=$("$py" -c "import json;print(json.load(open('$peer.json'))['total_cost'])")
    echo "{\"features\":$n,\"run\":$r,\"reknit_s\":$(wall_of "$data/scale-time-r.txt"),\"reknit_kb\":$(rss_of "$data/scale-time-r.txt"),\"reknit_cpu\":$(cpu_of "$data/scale-time-r.txt"),\"peer_cpu\":$(cpu_of "$data/scale-time-p.txt"),\"peer_s\":$(wall_of "$data/scale-time-p.txt"),\"peer_kb\":$(rss_of "$data/scale-time-p.txt"),\"reknit_total\":$ours,\"peer_total\":$theirs,\"load\":\"$l0 $(load)\",\"peer\":$(cat "$peer.json")}" >> "$res"
  done
  rm -f "$peer" "$peer.json"
done

if [ "${BENCH_10M:-0}" = 1 ]; then
  free_gb=$(df -BG --output=avail / | tail -1 | tr -dc 0-9)
  if [ "$free_gb" -lt 40 ]; then
    echo "{\"features\":10000000,\"skipped\":\"only ${free_gb} GB free (needs 40)\"}" >> "$res"
  else
    f=$data/synth-10000000.geojson
    [ -f "$f" ] || target/release/examples/synth_roads 10000000 "$f" 2> /dev/null
    l0=$(load)
    run_reknit "$f" "$data/scale-out-10000000" "$data/scale-time-r.txt"
    echo "{\"features\":10000000,\"run\":1,\"reknit_s\":$(wall_of "$data/scale-time-r.txt"),\"reknit_kb\":$(rss_of "$data/scale-time-r.txt"),\"load\":\"$l0 $(load)\"}" >> "$res"
    rm -rf "$f" "$data/scale-out-10000000"
  fi
fi

"$py" - "$res" <<'PY'
import json, statistics, sys
rows = [json.loads(l) for l in open(sys.argv[1])]
for n in sorted({r["features"] for r in rows}):
    rs = [r for r in rows if r["features"] == n]
    if "skipped" in rs[0]:
        print(f"{n:>10,} features: skipped ({rs[0]['skipped']})")
        continue
    kb = max(r["reknit_kb"] for r in rs)
    line = (f"{n:>10,} features: reknit median wall {statistics.median(r['reknit_s'] for r in rs):.2f} s, "
            f"peak {kb / 1024:.0f} MB = {kb * 1024 / n:.0f} bytes per feature")
    if "peer_s" in rs[0]:
        ratios = [r["peer_s"] / r["reknit_s"] for r in rs]
        cpu = [r["peer_cpu"] / r["reknit_cpu"] for r in rs]
        bad = [r for r in rs if abs(r["reknit_total"] - r["peer_total"]) > 0.0005]
        line += (f"; peer median {statistics.median(r['peer_s'] for r in rs):.2f} s; "
                 f"median paired ratio peer/reknit {statistics.median(ratios):.1f}x "
                 f"(range {min(ratios):.1f}-{max(ratios):.1f}, {len(rs)} runs), "
                 f"CPU time (user + system) {statistics.median(cpu):.1f}x; "
                 f"total cost {rs[0]['reknit_total']} vs {rs[0]['peer_total']}"
                 + (" AGREE" if not bad else f" DISAGREE in {len(bad)} runs"))
    loads = " | ".join(r["load"] for r in rs)
    print(line + f"; load before|after each run: {loads}")
PY

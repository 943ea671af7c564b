#!/usr/bin/env bash
# Runs every fuzz target for SECONDS each (default 120) with cargo-fuzz (installed if absent) on the
# stable toolchain (no sanitizer: reknit has no unsafe code; panics, aborts, hangs and runaway memory
# are the findings). Corpus grows in fuzz/corpus/<target> (not committed); seeds in fuzz/seeds.
# Findings land in fuzz/artifacts/<target>/; copy a minimised one to fuzz/regressions/<target>/ so
# tests/fuzz_smoke.rs replays it in every CI run.
# Usage: scripts/fuzz.sh [SECONDS] [TARGET...]
set -euo pipefail
cd "$(dirname "$0")/../fuzz"
secs=${1:-120}
shift || true
command -v cargo-fuzz >/dev/null || cargo install --locked cargo-fuzz
targets=("$@")
if [ ${#targets[@]} -eq 0 ]; then
  mapfile -t targets < <(cargo fuzz list)
fi
cargo fuzz build -s none "${targets[@]/#/}" >/dev/null 2>&1 || cargo fuzz build -s none
for t in "${targets[@]}"; do
  mkdir -p "corpus/$t"
  echo "== $t: ${secs}s"
  cargo fuzz run -s none "$t" "corpus/$t" "seeds/$t" -- \
    -max_total_time="$secs" -timeout=20 -rss_limit_mb=4096 -max_len=262144 -print_final_stats=1 \
    2>&1 | grep -E "^(stat::number_of_executed_units|stat::peak_rss_mb|#[0-9]+ *DONE)|SUMMARY|panicked|ERROR|Test unit written" || true
done

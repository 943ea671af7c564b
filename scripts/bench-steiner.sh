#!/usr/bin/env bash
# Steiner plans: reknit against networkx's steiner_tree (mehlhorn and kou) on the same road-like
# lattice (70 % of roads damaged), measured in the same run; then reknit alone at 1 million junctions
# with 1,000 sites; then SteinLib quality per series and effort.
# Usage: scripts/bench-steiner.sh        (Python peers from target/py-peers, made by scripts/test)
set -euo pipefail
cd "$(dirname "$0")/.."
cargo build --quiet --release --example bench_steiner
py=${REKNIT_PYTHON:-target/py-peers/bin/python}
mkdir -p target/bench-data
bin=target/release/examples/bench_steiner
for spec in "300 100" "500 200"; do
  set -- $spec
  edges=target/bench-data/steiner-$1-$2.txt
  q=$($bin "$1" "$2" quick 0.3 "$edges")
  n=$($bin "$1" "$2" normal 0.3)
  echo "lattice ${1}x$1, $2 sites: quick $q"
  echo "lattice ${1}x$1, $2 sites: normal $n"
  if "$py" -c 'import networkx' 2>/dev/null; then
    for m in mehlhorn kou; do
      r=$(timeout 1800 "$py" scripts/peer_steiner_edgelist.py "$edges" "$m" || echo '{"skipped":"timeout"}')
      echo "lattice ${1}x$1, $2 sites: networkx $r"
      python3 - "$q" "$n" "$r" <<'PY'
import json, sys
q, n, r = (json.loads(a) for a in sys.argv[1:])
if "seconds" in r:
    for name, o in (("quick", q), ("normal", n)):
        print(f"  networkx {r['method']} / reknit {name}: time ratio {r['seconds'] / max(o['seconds'], 1e-3):.1f}x, "
              f"cost {o['cost_milli'] / r['cost_milli']:.4f} of networkx's")
PY
    done
  else
    echo "skip: networkx is not installed (run scripts/test to set up target/py-peers)"
  fi
done
for e in quick normal; do echo "lattice 1000x1000, 1000 sites: $($bin 1000 1000 $e 0.3)"; done
cargo test --quiet --release --test steinlib -- --include-ignored --nocapture 2>&1 | grep -E "^series"

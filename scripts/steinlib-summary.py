#!/usr/bin/env python3
# Summary of scripts/bench-steinlib-exact.sh output: mean gap to the published optimum, certified
# gap, instances proven optimal, time per series and binary; time ratios per instance.
# Usage: scripts/steinlib-summary.py FILE.jsonl …
import sys,json,collections
rows=[json.loads(l) for f in sys.argv[1:] for l in open(f) if l.startswith('{')]
by=collections.defaultdict(dict)
for r in rows: by[r['name']][r['bin']]=r
bins=sorted({r['bin'] for r in rows})
for s in "CD":
  for b in bins:
    rs=[by[n][b] for n in sorted(by) if n.startswith(s) and b in by[n]]
    if not rs: continue
    gap=sum((r['cost']-r['optimum'])/r['optimum'] for r in rs)/len(rs)
    cert=sum((r['cost']-r['bound'])/max(r['bound'],1) for r in rs)/len(rs)
    prov=sum(r['cost']==r['bound'] for r in rs)
    t=sum(r['seconds'] for r in rs); u=sum(r['user'] for r in rs)
    print(f"{s} {b}: n={len(rs)} mean gap {100*gap:.3f}% certified {100*cert:.3f}% proven {prov} wall {t:.1f}s user {u:.1f}s max {max(r['seconds'] for r in rs):.1f}s")
  if len(bins)==2:
    rat=[by[n][bins[1]]['seconds']/max(by[n][bins[0]]['seconds'],1e-3) for n in by if n.startswith(s) and len(by[n])==2]
    if rat: print(f"  ratio {bins[1]}/{bins[0]} per instance: median {sorted(rat)[len(rat)//2]:.2f} max {max(rat):.2f}")

#!/usr/bin/env python3
"""Turns scripts/bench's results (JSON lines) into the suite section of docs/benchmarks.md.
Usage: bench_report.py RESULTS.jsonl docs/benchmarks.md
The section between "<!-- suite:begin -->" and "<!-- suite:end -->" is replaced (added after the
title when absent); the rest of the file is kept.
"""
import datetime
import json
import math
import sys

BEGIN, END = "<!-- suite:begin -->", "<!-- suite:end -->"


def secs(wall):
    parts = [float(p) for p in wall.split(":")]
    s = 0.0
    for p in parts:
        s = s * 60 + p
    return s


def fmt_s(x):
    return f"{x:.3f} s" if x < 10 else f"{x:.1f} s"


def ratio(a, b):
    if not (a and b):
        return "—"
    x = a / b
    return f"{x:.2f}×" if x < 10 else f"{x:.1f}×"


def main(path, doc):
    rows = [json.loads(l) for l in open(path) if l.strip()]
    by = lambda k: [r for r in rows if r.get("bench") == k]
    out = [BEGIN, "", f"## Peer suite — `scripts/bench` ({datetime.date.today().isoformat()})", ""]
    m = (by("machine") or [{}])[0]
    out.append(f"Machine: {m.get('cpu', '?')}, {m.get('cores', '?')} cores, {m.get('memory_gib', '?')} GiB; "
               f"{m.get('rustc', '?')}; Python {m.get('python', '?')}, scipy {m.get('scipy', '?')}, "
               f"networkx {m.get('networkx', '?')}. All figures from one run of `scripts/bench`; ratios are "
               f"peer time / reknit time on the same input.")
    out.append("")

    out.append("### Minimum spanning forest (road-like lattice, half the roads intact; algorithm time, graph in memory)")
    out.append("")
    out.append("| weights | edges | reknit Kruskal | petgraph `min_spanning_tree` | ratio | scipy `minimum_spanning_tree` | ratio | networkx `minimum_spanning_tree` | ratio |")
    out.append("|---|---|---|---|---|---|---|---|---|")
    pyf = (by("forest_python") or [{}])[0]
    for r in by("forest"):
        plus = r["weights"] == "costs + 1"
        sc = pyf.get("scipy_s") if plus else None
        nx = pyf.get("networkx_s") if plus else None
        if plus and pyf.get("scipy_total") not in (None, r["total"]):
            sc = None
        out.append(f"| {r['weights']} | {r['edges']:,} | {fmt_s(r['reknit_s'])} | {fmt_s(r['petgraph_s'])} | "
                   f"{ratio(r['petgraph_s'], r['reknit_s'])} | {fmt_s(sc) if sc else '—'} | {ratio(sc, r['reknit_s'])} | "
                   f"{fmt_s(nx) if nx else '—'} | {ratio(nx, r['reknit_s'])} |")
    out.append("")
    out.append("scipy treats a weight of 0 as no edge, so the peers that need it run on costs + 1 (reknit "
               "and petgraph are timed on both); every forest total agrees with reknit's. "
               + ("; ".join(f"{k}: {v}" for k, v in pyf.items() if k.endswith("skipped")) or ""))
    out.append("")

    out.append("### Steiner plans (lattice, 70 % of roads damaged)")
    out.append("")
    out.append("| lattice | sites | reknit quick | reknit normal | networkx mehlhorn | networkx kou | mehlhorn / quick (time) | quick cost / mehlhorn cost | normal cost / mehlhorn cost |")
    out.append("|---|---|---|---|---|---|---|---|---|")
    for q in [r for r in by("steiner_reknit") if r["effort"] == "quick"]:
        side, sites = q["side"], q["sites"]
        n = next((r for r in by("steiner_reknit") if r["side"] == side and r["effort"] == "normal"), None)
        nx = {r.get("method"): r for r in by("steiner_networkx") if r.get("side") == side}
        meh, kou = nx.get("mehlhorn", {}), nx.get("kou")

        def cell(r):
            if not r:
                return "not run"
            if "seconds" in r:
                return f"{fmt_s(r['seconds'])}, {r['cost_milli']:,}"
            return r.get("skipped", "—")

        def cost_ratio(r):
            return f"{r['cost_milli'] / meh['cost_milli']:.4f}" if r and "cost_milli" in meh else "—"

        out.append(f"| {side}×{side} ({q['edges']:,} edges) | {sites} | {cell(q)} | {cell(n)} | {cell(meh)} | "
                   f"{cell(kou)} | {ratio(meh.get('seconds'), q['seconds'])} | {cost_ratio(q)} | {cost_ratio(n)} |")
    out.append("")
    out.append("Costs in milli-repair-metres; cells give time, cost. petgraph's `steiner_tree` (Kou et al., "
               "cubic in the vertices) on small lattices:")
    out.append("")
    out.append("| vertices | sites | petgraph time, cost | reknit quick time, cost | reknit normal time, cost | petgraph / quick (time) |")
    out.append("|---|---|---|---|---|---|")
    pet = by("steiner")
    for v in sorted({r["vertices"] for r in pet}):
        q = next(r for r in pet if r["vertices"] == v and r["effort"] == "quick")
        n = next(r for r in pet if r["vertices"] == v and r["effort"] == "normal")
        out.append(f"| {v:,} | {q['sites']} | {fmt_s(q['petgraph_s'])}, {q['petgraph_cost']:,} | "
                   f"{fmt_s(q['reknit_s'])}, {q['reknit_cost']:,} | {fmt_s(n['reknit_s'])}, {n['reknit_cost']:,} | "
                   f"{ratio(q['petgraph_s'], q['reknit_s'])} |")
    out.append("")

    out.append("### Whole pipeline (`reknit plan`, synthetic layers of 8-vertex features; GNU time -v)")
    out.append("")
    out.append("| features | edges | wall | peak memory | bytes per feature | time ratio to the previous size | n log n ratio |")
    out.append("|---|---|---|---|---|---|---|")
    prev = None
    for r in sorted(by("pipeline"), key=lambda r: r["features"]):
        n, t, kb = r["features"], secs(r["wall"]), r["peak_kb"]
        grow = nlogn = "—"
        if prev:
            grow = f"{t / prev[1]:.2f}"
            nlogn = f"{(n * math.log(n)) / (prev[0] * math.log(prev[0])):.2f}"
        out.append(f"| {n:,} | {r['edges']:,} | {fmt_s(t)} | {kb / 1024:,.0f} MB | {kb * 1024 / n:,.0f} | {grow} | {nlogn} |")
        prev = (n, t)
    out.append("")

    out.append("### SteinLib (published optima, ZIB SteinLib; instances in tests/data/steinlib)")
    out.append("")
    out.append("| series | effort | instances | mean gap | worst gap | optimal | mean time | longest |")
    out.append("|---|---|---|---|---|---|---|---|")
    sl = [r for r in by("steinlib") if "name" in r]
    for effort in ("quick", "normal"):
        for series in ("B", "C", "D"):
            rs = [r for r in sl if r["effort"] == effort and r["name"].startswith(series + "/")]
            if not rs:
                continue
            gaps = [(r["cost"] - r["optimum"]) / r["optimum"] for r in rs]
            times = [r["seconds"] for r in rs]
            out.append(f"| {series} | {effort} | {len(rs)} | {100 * sum(gaps) / len(gaps):.2f} % | {100 * max(gaps):.2f} % | "
                       f"{sum(1 for g in gaps if g == 0)} | {fmt_s(sum(times) / len(times))} | {fmt_s(max(times))} |")
    out.append("")

    b = (by("backup") or [None])[0]
    nb = (by("bridges_networkx") or [{}])[0]
    if b:
        out.append("### Roads with no way round and backup links")
        out.append("")
        out.append(f"Lattice of {b['vertices']:,} junctions and {b['edges']:,} edges, {b['sites']} sites planned at quick effort. "
                   f"Search for roads with no way round on the network after the plan ({b['usable_after_plan']:,} edges): {fmt_s(b['fragility_seconds'])}"
                   + (f"; networkx `bridges` + `articulation_points` on the same edges: {fmt_s(nb['seconds'])} ({ratio(nb['seconds'], b['fragility_seconds'])})" if "seconds" in nb else "")
                   + f". Over all {b['usable']:,} usable edges: {fmt_s(b['fragility_all_usable_seconds'])}. "
                   f"Backup links: {fmt_s(b['backup_seconds'])} for {b['bridges_needing_backup']:,} roads needing a way round, "
                   f"{b['backup_repairs']:,} added repairs.")
        out.append("")
    out.append("### Against the targets")
    out.append("")
    fr = {r["weights"]: r for r in by("forest")}
    checks = []
    if "own costs" in fr:
        x = fr["own costs"]["petgraph_s"] / fr["own costs"]["reknit_s"]
        checks.append(f"forest vs petgraph ≥ 10×: {x:.2f}× — {'met' if x >= 10 else 'not met'}")
    if "costs + 1" in fr and pyf.get("scipy_s"):
        x = pyf["scipy_s"] / fr["costs + 1"]["reknit_s"]
        checks.append(f"forest vs scipy ≥ 2.5×: {x:.2f}× — {'met' if x >= 2.5 else 'not met'}")
    for q in [r for r in by("steiner_reknit") if r["effort"] == "quick"]:
        meh = next((r for r in by("steiner_networkx") if r.get("side") == q["side"] and r.get("method") == "mehlhorn" and "seconds" in r), None)
        if meh:
            x = meh["seconds"] / q["seconds"]
            ok = x >= 50 and q["cost_milli"] <= meh["cost_milli"]
            checks.append(f"Steiner quick vs networkx mehlhorn ≥ 50× at equal or lower cost ({q['side']}×{q['side']}): "
                          f"{x:.1f}×, cost {q['cost_milli'] / meh['cost_milli']:.4f} of networkx's — {'met' if ok else 'not met'}")
    pipe = {r["features"]: r for r in by("pipeline")}
    if 100000 in pipe and 4000000 in pipe:
        t = secs(pipe[4000000]["wall"]) / secs(pipe[100000]["wall"])
        nl = (4e6 * math.log(4e6)) / (1e5 * math.log(1e5))
        checks.append(f"pipeline time 100k → 4M no worse than n log n: {t:.1f}× against {nl:.1f}× — {'met' if t <= nl else 'not met'}")
        b = pipe[4000000]["peak_kb"] * 1024 / 4e6
        checks.append(f"peak memory at 4M ≤ 600 bytes per feature: {b:.0f} — {'met' if b <= 600 else 'not met'}")
    for c in checks:
        out.append(f"- {c}")
    out.append("")
    out.append(END)
    text = open(doc).read()
    section = "\n".join(out)
    if BEGIN in text and END in text:
        head, rest = text.split(BEGIN, 1)
        tail = rest.split(END, 1)[1]
        text = head + section + tail
    else:
        lines = text.split("\n")
        # After the title and the machine paragraph.
        cut = next((i for i, l in enumerate(lines) if l.startswith("## ")), len(lines))
        text = "\n".join(lines[:cut]) + "\n" + section + "\n\n" + "\n".join(lines[cut:])
    open(doc, "w").write(text)


if __name__ == "__main__":
    main(*sys.argv[1:])

#!/usr/bin/env python3
"""Generate the bundled demo district, Ombrevane (an invented island district; no real place).

Deterministic: a fixed seed and only the standard library, so the files can be regenerated
byte for byte:  python3 scripts/make-sample-map.py sample-maps/ombrevane
Every name is invented and checked against an offline gazetteer by tests/invented_names.rs.
"""
import json
import math
import random
import sys
from pathlib import Path

SEED = 20261201
LON0, LAT0 = -35.0, 14.0  # open ocean: the district is fictional
M_PER_DEG_LAT = 110_650.0
M_PER_DEG_LON = 111_320.0 * math.cos(math.radians(LAT0))

TOWNS = [
    ("Orlenvask", 0, 0),
    ("Brisquell", 6500, 2500),
    ("Quarnivel", 12500, -1000),
    ("Velmorix", 4000, -7000),
    ("Pelquine", 10500, -8500),
    ("Tessimork", 17500, 4000),
    ("Nembrask", -5000, -4500),
]
# The Ysquel river runs roughly south-west to north-east; roads near it are flood damaged.
RIVER = [(-9000, -9000), (-2000, -3500), (3000, -1200), (9000, -3800), (15000, 1500), (21000, 2500)]


def to_lonlat(x, y):
    return [round(LON0 + x / M_PER_DEG_LON, 7), round(LAT0 + y / M_PER_DEG_LAT, 7)]


def dist_to_river(x, y):
    best = float("inf")
    for (ax, ay), (bx, by) in zip(RIVER, RIVER[1:]):
        dx, dy = bx - ax, by - ay
        t = max(0.0, min(1.0, ((x - ax) * dx + (y - ay) * dy) / (dx * dx + dy * dy)))
        best = min(best, math.hypot(x - ax - t * dx, y - ay - t * dy))
    return best


def crosses_river(pts):
    def ccw(a, b, c):
        return (c[1] - a[1]) * (b[0] - a[0]) > (b[1] - a[1]) * (c[0] - a[0])

    for p, q in zip(pts, pts[1:]):
        for a, b in zip(RIVER, RIVER[1:]):
            if ccw(p, a, b) != ccw(q, a, b) and ccw(p, q, a) != ccw(p, q, b):
                return True
    return False


def damage_for(rng, pts):
    """Flood damage grows towards the river; some river crossings have lost their bridge."""
    if crosses_river(pts) and rng.random() < 0.35:
        return "closed"
    d = min(dist_to_river(x, y) for x, y in pts)
    if d < 400:
        return round(rng.uniform(0.6, 1.0), 2)
    if d < 1200:
        return round(rng.uniform(0.15, 0.6), 2) if rng.random() < 0.7 else 0
    if d < 2500 and rng.random() < 0.25:
        return round(rng.uniform(0.05, 0.3), 2)
    return 0


def main(out):
    rng = random.Random(SEED)
    features = []
    grids = {}

    def add(pts, props):
        props = dict(props)
        props["damage"] = damage_for(rng, pts)
        features.append((pts, props))

    # Town street grids: 5 x 5 lines at ~160 m spacing, jittered but sharing crossing vertices.
    for t, (name, cx, cy) in enumerate(TOWNS):
        n, step = 5, 160.0
        node = {}
        for i in range(n):
            for j in range(n):
                node[i, j] = (cx + (i - 2) * step + rng.uniform(-15, 15), cy + (j - 2) * step + rng.uniform(-15, 15))
        grids[name] = node
        for j in range(n):
            add([node[i, j] for i in range(n)], {"name": f"{name} Street {j + 1}", "class": "street"})
        for i in range(n):
            add([node[i, j] for j in range(n)], {"name": f"{name} Lane {i + 1}", "class": "street"})

    # Roads between towns: a spanning tree plus two loops, ending on a grid corner of each town.
    links = [(0, 1), (1, 2), (0, 3), (3, 4), (2, 5), (0, 6), (2, 4), (6, 3)]
    for k, (a, b) in enumerate(links):
        na, nb = TOWNS[a][0], TOWNS[b][0]
        ax, ay = TOWNS[a][1:]
        bx, by = TOWNS[b][1:]
        ia = (4 if bx > ax else 0, 4 if by > ay else 0)
        ib = (4 if ax > bx else 0, 4 if ay > by else 0)
        p, q = grids[na][ia], grids[nb][ib]
        steps = max(6, int(math.hypot(q[0] - p[0], q[1] - p[1]) / 400))
        pts = [p]
        for s in range(1, steps):
            t = s / steps
            wig = math.sin(t * math.pi) * rng.uniform(-250, 250)
            nx, ny = -(q[1] - p[1]), q[0] - p[0]
            ln = math.hypot(nx, ny)
            pts.append((p[0] + t * (q[0] - p[0]) + wig * nx / ln, p[1] + t * (q[1] - p[1]) + wig * ny / ln))
        end = q
        if k % 3 == 1:
            # Digitised with a small gap at the far junction (an undershoot within the 0.5 m default snap).
            end = (q[0] + 0.3, q[1] - 0.2)
        pts.append(end)
        # Split long roads into two features at a shared vertex, as exports often do.
        mid = len(pts) // 2
        road = f"Route {k + 1}"
        add(pts[: mid + 1], {"name": f"{road} ({na}–{nb})", "class": "main"})
        add(pts[mid:], {"name": f"{road} ({na}–{nb})", "class": "main"})

    # A bypass flyover crossing Route 1 without a junction (an overpass: must stay unconnected).
    bx, by = (TOWNS[0][1] + TOWNS[1][1]) / 2, (TOWNS[0][2] + TOWNS[1][2]) / 2
    add([(bx - 600, by + 900), (bx, by), (bx + 700, by - 1000)], {"name": "Ombrevane Flyover", "class": "main"})
    # Farm tracks hanging off towns (dead ends).
    for t, (name, cx, cy) in enumerate(TOWNS):
        corner = grids[name][(0, 4)]
        pts = [corner]
        for s in range(1, 5):
            pts.append((corner[0] - 300 * s + rng.uniform(-60, 60), corner[1] + 200 * s + rng.uniform(-60, 60)))
        add(pts, {"name": f"{name} Farm Track", "class": "track"})

    fc = {"type": "FeatureCollection", "name": "Ombrevane roads (invented demo district)", "features": []}
    for i, (pts, props) in enumerate(features):
        props = {"id": f"RD-{i + 1:04d}", **props}
        fc["features"].append(
            {"type": "Feature", "properties": props,
             "geometry": {"type": "LineString", "coordinates": [to_lonlat(x, y) for x, y in pts]}})
    out = Path(out)
    out.mkdir(parents=True, exist_ok=True)
    with open(out / "roads.geojson", "w", encoding="utf-8") as f:
        f.write('{"type":"FeatureCollection","name":' + json.dumps(fc["name"]) + ',"features":[\n')
        f.write(",\n".join(json.dumps(ft, ensure_ascii=False, separators=(",", ":")) for ft in fc["features"]))
        f.write("\n]}\n")

    kinds = ["hospital", "shelter", "depot", "water plant", "shelter", "clinic", "shelter"]
    sites = []
    for t, (name, cx, cy) in enumerate(TOWNS):
        x, y = grids[name][(2, 2)]
        sites.append({"type": "Feature",
                      "properties": {"site_id": f"S{t + 1}", "name": f"{name} {kinds[t].title()}",
                                     "kind": kinds[t], "priority": 5 if kinds[t] in ("hospital", "depot") else 3},
                      "geometry": {"type": "Point", "coordinates": to_lonlat(x + 40, y + 25)}})
    with open(out / "sites.geojson", "w", encoding="utf-8") as f:
        f.write('{"type":"FeatureCollection","features":[\n')
        f.write(",\n".join(json.dumps(s, ensure_ascii=False, separators=(",", ":")) for s in sites))
        f.write("\n]}\n")
    print(f"{out}: {len(features)} road features, {len(sites)} sites")


if __name__ == "__main__":
    main(sys.argv[1] if len(sys.argv) > 1 else "sample-maps/ombrevane")

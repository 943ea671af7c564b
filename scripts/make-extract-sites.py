#!/usr/bin/env python3
# Critical sites for the extract benchmarks: N distinct road vertices of a GeoJSON road layer, drawn
# with a fixed seed, written as GeoJSON points (ids S1…SN, invented, priority 1).
# Usage: scripts/make-extract-sites.py ROADS.geojson N SEED OUT.geojson
import json, random, sys

roads, n, seed, out = sys.argv[1], int(sys.argv[2]), int(sys.argv[3]), sys.argv[4]
fc = json.load(open(roads, encoding="utf-8"))
pts = set()
for f in fc["features"]:
    g = f.get("geometry") or {}
    lines = {"LineString": [g.get("coordinates")], "MultiLineString": g.get("coordinates")}.get(g.get("type"), [])
    for line in lines or []:
        for c in line or []:
            pts.add((c[0], c[1]))
pts = sorted(pts)
chosen = random.Random(seed).sample(pts, n)
feats = [
    {"type": "Feature", "properties": {"id": f"S{i + 1}", "priority": 1},
     "geometry": {"type": "Point", "coordinates": [x, y]}}
    for i, (x, y) in enumerate(chosen)
]
json.dump({"type": "FeatureCollection", "features": feats}, open(out, "w"))

#!/usr/bin/env python3
"""The whole-network plan as an analyst would script it with numpy, pyproj and scipy: the peer of
`reknit plan --snap 0` (no sites) in scripts/bench-scale.sh.

1. Read the GeoJSON FeatureCollection with `json` (LineString features).
2. Node at identical coordinates: `np.unique` over every vertex; a vertex is a junction where a
   feature starts or ends, where two vertices share a position or where a line turns straight back
   (the tip of a spike); features split there.
3. Lengths on the WGS84 ellipsoid by one vectorised pyproj `Geod.inv` call over every vertex pair,
   summed per piece.
4. Costs as reknit defines them: length in millimetres times the feature's `damage` factor,
   rounded once (a number is the factor, "closed" or a negative number is impassable and left out,
   a missing value is factor 1).
5. scipy's `minimum_spanning_tree` treats a zero weight as no edge, so intact pieces (cost 0) are
   contracted first (`connected_components` over them); self-loops and repeated junction pairs are
   then dropped, the cheapest of each pair kept (a sparse matrix would add repeated pairs up).
6. Write only the plan layer: every repaired piece of the forest as a LineString with its cost.

Usage: peer_plan_numpy.py ROADS.geojson PLAN_OUT.geojson
Prints one JSON line: the total cost in repair-metres, the counts and the time of each step.
"""
import json
import sys
import time

import numpy as np
from pyproj import Geod
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components, minimum_spanning_tree


def main(roads, out):
    times = {}
    t = time.perf_counter()

    def lap(name):
        nonlocal t
        now = time.perf_counter()
        times[name] = round(now - t, 3)
        t = now

    with open(roads, encoding="utf-8") as f:
        feats = json.load(f)["features"]
    lines = []
    factor = np.empty(len(feats))
    for i, feat in enumerate(feats):
        g = feat["geometry"]
        if g["type"] != "LineString":
            sys.exit(f"{roads}: feature {i}: geometry {g['type']} (this peer reads LineStrings)")
        lines.append(g["coordinates"])
        d = (feat.get("properties") or {}).get("damage")
        factor[i] = 1.0 if d is None else (-1.0 if d == "closed" else float(d))
    counts = np.fromiter((len(c) for c in lines), dtype=np.int64, count=len(lines))
    xy = np.array([p for c in lines for p in c], dtype=np.float64)
    del lines, feats
    lap("read")

    # Junctions: positions shared by two vertices, and every feature's ends.
    last = np.cumsum(counts) - 1
    first = last - counts + 1
    _, vid, shared = np.unique(xy, axis=0, return_inverse=True, return_counts=True)
    vid = vid.ravel()
    node = shared[vid] > 1
    node[first] = True
    node[last] = True
    # A line that turns straight back (a spike) ends a piece at its tip, as a dead end would.
    back = np.flatnonzero(vid[:-2] == vid[2:]) + 1
    node[back] = True
    # Pieces run from a junction to the next one in the same feature.
    end_of_feature = np.zeros(len(xy), dtype=bool)
    end_of_feature[last] = True
    nodes = np.flatnonzero(node)
    is_start = ~end_of_feature[nodes]
    starts = nodes[is_start]
    ends = nodes[np.flatnonzero(is_start) + 1]
    lap("noding")

    geod = Geod(ellps="WGS84")
    _, _, step = geod.inv(xy[:-1, 0], xy[:-1, 1], xy[1:, 0], xy[1:, 1])
    inside = ~end_of_feature[:-1]
    starts_flag = np.zeros(len(xy), dtype=bool)
    starts_flag[starts] = True
    piece_of_step = np.cumsum(starts_flag)[:-1] - 1
    length = np.bincount(piece_of_step[inside], weights=step[inside], minlength=len(starts))
    feature = np.repeat(np.arange(len(counts)), counts)[starts]
    f = factor[feature]
    usable = f >= 0
    cost = np.floor(length * 1000.0 * np.where(usable, f, 0.0) + 0.5).astype(np.int64)
    u, v = vid[starts], vid[ends]
    lap("lengths")

    # Intact pieces joined first, then the cheapest piece per pair of groups.
    n = int(vid.max()) + 1 if len(vid) else 0
    zero = usable & (cost == 0)
    z = coo_matrix((np.ones(zero.sum()), (u[zero], v[zero])), shape=(n, n))
    _, group = connected_components(z, directed=False)
    gu, gv = group[u], group[v]
    keep = np.flatnonzero(usable & (cost > 0) & (gu != gv))
    a, b = np.minimum(gu[keep], gv[keep]), np.maximum(gu[keep], gv[keep])
    order = np.lexsort((cost[keep], b, a))
    a, b, keep = a[order], b[order], keep[order]
    fresh = np.ones(len(keep), dtype=bool)
    fresh[1:] = (a[1:] != a[:-1]) | (b[1:] != b[:-1])
    a, b, keep = a[fresh], b[fresh], keep[fresh]
    m = group.max() + 1 if len(group) else 0
    graph = coo_matrix((cost[keep].astype(np.float64), (a, b)), shape=(m, m)).tocsr()
    tree = minimum_spanning_tree(graph).tocoo()
    # Back from the tree's group pairs to the pieces (one piece per pair after the drop above).
    piece_of_pair = {(int(p), int(q)): int(k) for p, q, k in zip(a, b, keep)}
    chosen = sorted(piece_of_pair[(min(p, q), max(p, q))] for p, q in zip(tree.row.tolist(), tree.col.tolist()))
    total_mm = int(cost[chosen].sum())
    lap("solve")

    with open(out, "w", encoding="utf-8") as w:
        w.write('{"type":"FeatureCollection","features":[\n')
        for i, k in enumerate(chosen):
            geom = xy[starts[k]: ends[k] + 1].round(7).tolist()
            w.write(("," if i else "") + json.dumps({
                "type": "Feature",
                "properties": {"piece": k, "length_m": round(float(length[k]), 3),
                               "cost": cost[k] / 1000.0},
                "geometry": {"type": "LineString", "coordinates": geom},
            }) + "\n")
        w.write("]}\n")
    lap("write")
    print(json.dumps({"features": int(len(counts)), "pieces": int(len(starts)),
                      "junctions": int(np.unique(np.concatenate([u, v])).size),
                      "length_m": round(float(length.sum()), 3), "repairs": len(chosen),
                      "total_cost": total_mm / 1000.0, "seconds": times}))


if __name__ == "__main__":
    if len(sys.argv) != 3:
        sys.exit(__doc__)
    main(sys.argv[1], sys.argv[2])

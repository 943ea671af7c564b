#!/usr/bin/env python3
"""Reference peer: the road graph's size counted straight from an OpenStreetMap .osm.pbf with pyosmium.

Usage: peer_osm_topology.py extract.osm.pbf [--not-roads V1,V2,...]
Takes every way tagged highway=* except area=yes (as the shared GeoJSON layer was derived) and,
with --not-roads, except the highway values listed (their ways are counted by value as `left_out`). OSM ways
share junctions by node id, so the topology needs no geometry: a node is a junction when it ends a way
or when the distinct node-to-node segments meeting there are not exactly two. Ways are split at
junctions; pieces with the same node sequence (either direction) count once. Distinct nodes at the
same position rounded to 7 decimals (the precision of the shared GeoJSON layer) are one place, as with
`reknit --snap 0`; their number is printed as `coincident_nodes`. A way whose nodes are partly
missing from the extract keeps its runs of two or more located nodes. Prints JSON counts: ways
used, ways cut at the extract's edge, ways wholly outside, edges, junctions, and junctions whose
degree is not 2.
"""
import json
import sys
from collections import Counter, defaultdict

import osmium


class Ways(osmium.SimpleHandler):
    def __init__(self, not_roads=()):
        super().__init__()
        self.not_roads = set(not_roads)
        self.left_out = Counter()
        self.used = 0
        self.cut = 0
        self.outside = 0
        self.ways = []
        self.place = {}
        self.coincident = 0

    def node_id(self, n):
        key = (round(n.lon, 7), round(n.lat, 7))
        first = self.place.setdefault(key, n.ref)
        if first != n.ref:
            self.coincident += 1
        return first

    def way(self, w):
        if "highway" not in w.tags or w.tags.get("area") == "yes":
            return
        if w.tags["highway"] in self.not_roads:
            self.left_out[w.tags["highway"]] += 1
            return
        # A node missing from the extract (a way cut at its edge) splits the way into runs.
        runs, run, cut = [], [], False
        for n in w.nodes:
            if n.location.valid():
                run.append(self.node_id(n))
            else:
                cut = True
                runs.append(run)
                run = []
        runs.append(run)
        runs = [r for r in runs if len(r) >= 2]
        if not runs:
            self.outside += 1
            return
        self.used += 1
        self.cut += cut
        for nodes in runs:
            dedup = [n for i, n in enumerate(nodes) if i == 0 or n != nodes[i - 1]]
            self.ways.append(dedup)


def main(path, not_roads=()):
    h = Ways(not_roads)
    h.apply_file(path, locations=True)
    ways = [w for w in h.ways if len(w) >= 2]
    segs = set()
    ends = set()
    for w in ways:
        ends.add(w[0])
        ends.add(w[-1])
        for a, b in zip(w, w[1:]):
            segs.add((min(a, b), max(a, b)))
    seg_degree = Counter()
    for a, b in segs:
        seg_degree[a] += 1
        seg_degree[b] += 1
    junction = lambda n: n in ends or seg_degree[n] != 2
    pieces = set()
    degree = defaultdict(int)
    for w in ways:
        start = 0
        for i in range(1, len(w)):
            if junction(w[i]):
                piece = tuple(w[start : i + 1])
                key = min(piece, piece[::-1])
                if key not in pieces:
                    pieces.add(key)
                    degree[piece[0]] += 1
                    degree[piece[-1]] += 1
                start = i
    junctions = {n for w in ways for n in w if junction(n)}
    print(json.dumps({
        "ways": h.used,
        "ways_cut_at_edge": h.cut,
        "ways_outside": h.outside,
        "coincident_nodes": h.coincident,
        "edges": len(pieces),
        "junctions": len(junctions),
        "junctions_degree_not_2": sum(1 for n in junctions if degree[n] != 2),
        "left_out": dict(sorted(h.left_out.items())),
    }))


if __name__ == "__main__":
    args = sys.argv[1:]
    listed = []
    if "--not-roads" in args:
        i = args.index("--not-roads")
        listed = args[i + 1].split(",")
        del args[i : i + 2]
    main(args[0], listed)

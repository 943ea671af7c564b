#!/usr/bin/env python3
"""Reference peer: the road graph's size counted straight from an OpenStreetMap .osm.pbf with pyosmium.

Usage: peer_osm_topology.py extract.osm.pbf
Takes every way tagged highway=* except area=yes (as the shared GeoJSON layer was derived). OSM ways
share junctions by node id, so the topology needs no geometry: a node is a junction when it ends a way
or when the distinct node-to-node segments meeting there are not exactly two. Ways are split at
junctions; pieces with the same node sequence (either direction) count once. Distinct nodes at the
same position rounded to 7 decimals (the precision of the shared GeoJSON layer) are one place, as with
`reknit --snap 0`; their number is printed as `coincident_nodes`. Prints JSON counts:
ways, edges, junctions, and junctions whose degree is not 2.
"""
import json
import sys
from collections import Counter, defaultdict

import osmium


class Ways(osmium.SimpleHandler):
    def __init__(self):
        super().__init__()
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
        nodes = [self.node_id(n) for n in w.nodes]
        dedup = [n for i, n in enumerate(nodes) if i == 0 or n != nodes[i - 1]]
        self.ways.append(dedup)


def main(path):
    h = Ways()
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
        "ways": len(h.ways),
        "coincident_nodes": h.coincident,
        "edges": len(pieces),
        "junctions": len(junctions),
        "junctions_degree_not_2": sum(1 for n in junctions if degree[n] != 2),
    }))


if __name__ == "__main__":
    main(sys.argv[1])

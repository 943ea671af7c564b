#!/usr/bin/env python3
"""Writes tests/data/osm/invented.osm.pbf: a tiny invented OpenStreetMap extract for the reader's tests.

Usage: make-osm-fixture.py OUT.osm.pbf   (needs pyosmium)
A grid of invented streets around 47.1 N 9.5 E with the cases the reader must handle: a road left out
by value (highway=construction, highway=proposed), a highway area (area=yes), a bridge and a tunnel,
names and refs, a way cut at the extract's edge (it names node 999, which the file does not hold), a
way whose nodes are all outside, and sites by tag (a hospital node, a school drawn as a closed way,
fuel, a shelter, a clinic).
"""
import sys

import osmium
from osmium.osm.mutable import Node, Way

def main(out):
    w = osmium.SimpleWriter(out)
    # Nodes 1..16: a 4 x 4 grid, 0.001 degree apart.
    for i in range(16):
        r, c = divmod(i, 4)
        w.add_node(Node(id=i + 1, location=(9.5 + 0.001 * c, 47.1 + 0.001 * r), tags={}))
    w.add_node(Node(id=20, location=(9.5015, 47.1005), tags={"amenity": "hospital", "name": "Spital Ost"}))
    w.add_node(Node(id=21, location=(9.5025, 47.1025), tags={"amenity": "fuel"}))
    w.add_node(Node(id=22, location=(9.5005, 47.1025), tags={"amenity": "shelter", "name": "Hütte"}))
    w.add_node(Node(id=23, location=(9.5035, 47.1005), tags={"amenity": "bench"}))
    for i, (lon, lat) in enumerate([(9.5011, 47.1011), (9.5019, 47.1011), (9.5019, 47.1019), (9.5011, 47.1019)]):
        w.add_node(Node(id=30 + i, location=(lon, lat), tags={}))
    ways = [
        (100, [1, 2, 3, 4], {"highway": "primary", "name": "Talstrasse", "ref": "28"}),
        (101, [5, 6, 7, 8], {"highway": "residential", "name": "Gartenweg"}),
        (102, [9, 10, 11, 12], {"highway": "construction", "construction": "residential"}),
        (103, [13, 14, 15, 16], {"highway": "proposed"}),
        (104, [1, 5, 9, 13], {"highway": "secondary", "bridge": "yes", "layer": "1"}),
        (105, [2, 6, 10, 14], {"highway": "tertiary", "tunnel": "yes"}),
        (106, [3, 7, 999, 11, 15], {"highway": "track"}),
        (107, [6, 7, 11, 10, 6], {"highway": "pedestrian", "area": "yes"}),
        (108, [997, 998], {"highway": "service"}),
        (109, [4, 8, 12, 16], {"highway": "unclassified"}),
        (200, [30, 31, 32, 33, 30], {"amenity": "school", "name": "Schule Nord", "building": "yes"}),
        (201, [9, 10, 14, 13, 9], {"landuse": "meadow"}),
    ]
    for wid, nodes, tags in ways:
        w.add_way(Way(id=wid, nodes=nodes, tags=tags))
    w.close()

if __name__ == "__main__":
    main(sys.argv[1])

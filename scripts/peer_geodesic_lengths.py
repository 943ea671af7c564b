#!/usr/bin/env python3
"""Reference peer: geodesic length of every edge of a reknit network layer with geographiclib.

Usage: peer_geodesic_lengths.py network.geojson
Prints one line per feature: the edge id and its WGS84 geodesic length in metres (Karney's algorithm
as implemented by geographiclib), summed over consecutive vertices.
"""
import json
import sys

from geographiclib.geodesic import Geodesic


def main(path):
    g = Geodesic.WGS84
    with open(path, encoding="utf-8") as f:
        fc = json.load(f)
    for feat in fc["features"]:
        c = feat["geometry"]["coordinates"]
        length = sum(g.Inverse(a[1], a[0], b[1], b[0])["s12"] for a, b in zip(c, c[1:]))
        print(feat["properties"]["edge"], repr(length))


if __name__ == "__main__":
    main(sys.argv[1])
